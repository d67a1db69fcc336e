import { useEffect, useId, useRef, useState, type KeyboardEvent } from 'react';
import { Card } from '@/components/ui/card';
import type { PictureAnnotation } from '@/components/ui/zoom-pan-image';
import { componentName, type ArtifactGroups, type ChannelKey, type InputKey } from '@/features/runs/components/artifact-groups';
import { ArtifactFigure } from '@/features/runs/components/artifact-figure';

interface FarFieldPreviewsProps {
  projectId: number;
  runId: number;
  groups: ArtifactGroups;
  inputs: Record<InputKey, { title: string; state: string | null }>;
  channelNames: Record<ChannelKey, string>;
  /** Extra marks and controls for one picture, by artifact name. */
  annotate?: (artifactName: string) => PictureAnnotation | undefined;
  /** Asks to show the tab holding this picture; a new `nonce` asks again. */
  reveal?: { artifact: string; nonce: number } | null;
}

const INPUT_ORDER: InputKey[] = ['a', 'b', 'extra'];

/** Far fields under input A, input B and the extra input, one tab each: the total on top, its output components below, every one large. */
export function FarFieldPreviews({ projectId, runId, groups, inputs, channelNames, annotate, reveal }: FarFieldPreviewsProps) {
  const available = INPUT_ORDER.filter((input) => groups.farFields[input].length > 0);
  const [selected, setSelected] = useState<InputKey>(available[0] ?? 'a');
  const baseId = useId();
  const tabRefs = useRef<Partial<Record<InputKey, HTMLButtonElement | null>>>({});
  // Where a channel's picture is really looked at: the image plane of a Fresnel hologram, a flat screen.
  const viewed = (['a', 'b'] as const).flatMap((c) => [
    ...(groups.imagePlanes[c] ? [{ key: `plane-${c}`, artifact: groups.imagePlanes[c]!, title: `${channelNames[c]}: image plane (Fresnel hologram)` }] : []),
    ...(groups.screens[c] ? [{ key: `screen-${c}`, artifact: groups.screens[c]!, title: `${channelNames[c]}: on the flat screen` }] : []),
  ]);

  useEffect(() => {
    if (!reveal) return;
    const input = INPUT_ORDER.find((key) => groups.farFields[key].some(({ artifact }) => artifact.name === reveal.artifact));
    if (input) setSelected(input);
  }, [reveal, groups]);

  if (available.length === 0 && viewed.length === 0) return null;
  const split = available.some((input) => groups.farFields[input].length > 1);
  const current = available.includes(selected) ? selected : available[0];

  const onKeyDown = (event: KeyboardEvent) => {
    const index = available.indexOf(current);
    const moves: Record<string, number> = { ArrowRight: 1, ArrowLeft: -1, Home: -index, End: available.length - 1 - index };
    if (!(event.key in moves)) return;
    event.preventDefault();
    const next = available[(index + moves[event.key] + available.length) % available.length];
    setSelected(next);
    tabRefs.current[next]?.focus();
  };

  return (
    <Card
      title="Far-field previews"
      description={`Simulated far field of the realized device — the chosen atoms with their real transmissions and phases — for each input${
        split ? ', split into its output polarization components; all pictures of one input share the brightness scale of its total, so a dark part carries little light' : ''
      }. Target windows are outlined; a bright zero order is clipped rather than darkening the rest.`}
    >
      {available.length > 0 ? (
        <>
          <div role="tablist" aria-label="Input polarization" className="mb-5 inline-flex flex-wrap gap-1 rounded-full bg-paper-deep p-1 ring-1 ring-line ring-inset">
            {available.map((input) => (
              <button
                key={input}
                ref={(element) => {
                  tabRefs.current[input] = element;
                }}
                type="button"
                role="tab"
                id={`${baseId}-tab-${input}`}
                aria-selected={current === input}
                aria-controls={`${baseId}-panel-${input}`}
                tabIndex={current === input ? 0 : -1}
                onClick={() => setSelected(input)}
                onKeyDown={onKeyDown}
                className={`rounded-full px-4 py-1.5 text-sm font-bold transition-colors ${
                  current === input ? 'bg-ink text-card shadow' : 'text-ink-soft hover:text-ink'
                }`}
              >
                Under {inputs[input].title.charAt(0).toLowerCase() + inputs[input].title.slice(1)}
                {inputs[input].state ? <span className="font-normal"> ({inputs[input].state})</span> : null}
              </button>
            ))}
          </div>
          {available.map((input) => (
            <div
              key={input}
              role="tabpanel"
              id={`${baseId}-panel-${input}`}
              aria-labelledby={`${baseId}-tab-${input}`}
              hidden={current !== input}
              className={`grid gap-6 ${groups.farFields[input].length > 1 ? 'xl:grid-cols-2' : 'max-w-3xl'}`}
            >
              {current === input
                ? groups.farFields[input].map(({ artifact, component }, index) => (
                    <div key={artifact.name} className={index === 0 && groups.farFields[input].length > 1 ? 'xl:col-span-2 xl:mx-auto xl:w-full xl:max-w-3xl' : 'min-w-0'}>
                      <ArtifactFigure
                        projectId={projectId}
                        runId={runId}
                        artifact={artifact}
                        title={`${inputs[input].title}: ${componentName(component, channelNames)}`}
                        annotation={annotate?.(artifact.name)}
                      />
                    </div>
                  ))
                : null}
            </div>
          ))}
        </>
      ) : null}
      {viewed.length > 0 ? (
        <div className="mt-6 grid gap-6 xl:grid-cols-2">
          {viewed.map(({ key, artifact, title }) => (
            <ArtifactFigure key={key} projectId={projectId} runId={runId} artifact={artifact} title={title} annotation={annotate?.(artifact.name)} />
          ))}
        </div>
      ) : null}
    </Card>
  );
}
