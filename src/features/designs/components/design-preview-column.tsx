import { useMemo } from 'react';
import { ChannelsFarFieldSketch } from '@/features/designs/components/channels-far-field-sketch';
import { PhasePreview } from '@/features/designs/components/phase-preview';
import { PolarizationDrawing } from '@/features/designs/components/polarization-drawing';
import { useUploads } from '@/features/designs/api/get-uploads';
import { useDesignEditor } from '@/features/designs/stores/design-editor-store';
import { CHANNEL_NAMES } from '@/features/designs/utils/design-draft';
import { draftPolarizationPair } from '@/features/designs/utils/polarization-pair';

/** Wide screens only: the design page's right-hand column (the composer shows it from this width on). */
export const PREVIEW_COLUMN_GRID = 'min-[1400px]:grid min-[1400px]:grid-cols-[minmax(0,1fr)_24rem] min-[1400px]:items-start min-[1400px]:gap-6';

/**
 * Live previews beside the form on wide screens: both channels' phases, where each channel sends its light
 * in the far field, and the polarization pair. Sticky below the composer's bar, scrolling on its own when
 * taller than the window.
 */
export function DesignPreviewColumn({ projectId }: { projectId: number }) {
  const setup = useDesignEditor((state) => state.draft?.setup);
  const channels = useDesignEditor((state) => state.draft?.channels);
  const polarization = useDesignEditor((state) => state.draft?.polarization);
  const uploads = useUploads(projectId);
  const pair = useMemo(() => draftPolarizationPair(polarization), [polarization]);
  if (!setup || !channels) return null;
  return (
    <aside
      aria-label="Live previews"
      data-design-previews=""
      className="hidden min-[1400px]:sticky min-[1400px]:top-24 min-[1400px]:flex min-[1400px]:max-h-[calc(100dvh-7rem)] min-[1400px]:flex-col min-[1400px]:gap-4 min-[1400px]:overflow-y-auto min-[1400px]:rounded-card min-[1400px]:bg-card min-[1400px]:p-4 min-[1400px]:shadow-card min-[1400px]:ring-1 min-[1400px]:ring-line/70"
    >
      <section aria-labelledby="preview-phases">
        <h2 id="preview-phases" className="mb-2 text-sm font-extrabold">
          Phases
        </h2>
        <div className="grid grid-cols-2 gap-3">
          {(['a', 'b'] as const).map((c) => (
            <div key={c} className="flex min-w-0 flex-col gap-1">
              <h3 className="text-xs font-bold text-ink-soft">{CHANNEL_NAMES[c]}</h3>
              <PhasePreview setup={setup} terms={channels[c].terms} channelName={CHANNEL_NAMES[c]} />
            </div>
          ))}
        </div>
      </section>
      <section aria-labelledby="preview-far-field">
        <h2 id="preview-far-field" className="mb-2 text-sm font-extrabold">
          Far field
        </h2>
        <ChannelsFarFieldSketch setup={setup} channels={channels} uploads={uploads.data} />
      </section>
      {pair ? (
        <section aria-labelledby="preview-polarization">
          <h2 id="preview-polarization" className="mb-2 text-sm font-extrabold">
            Polarization pair
          </h2>
          <PolarizationDrawing pair={pair} />
        </section>
      ) : null}
    </aside>
  );
}
