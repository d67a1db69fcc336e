import type { PictureAxesSpec } from '@/components/ui/picture-axes';
import type { FarFieldComparison } from '@shared/schemas/run-comparison';
import { differenceColor } from '@shared/optics/difference-colormap';
import type { Rgb } from '@shared/optics/colormap';
import { Card } from '@/components/ui/card';
import { ZoomPanImage } from '@/components/ui/zoom-pan-image';
import { comparisonPictureHref } from '@/features/runs/api/get-run-comparison';
import { SequentialLegend } from '@/features/runs/components/colour-legend';

interface ComparisonFarFieldsProps {
  projectId: number;
  runA: number;
  runB: number;
  farFields: FarFieldComparison | null;
  note: string | null;
}

/** A share of the incident power in %, to two significant figures. Example: 0.00123 → '0.12 %'. */
function share(value: number): string {
  if (value === 0) return '0';
  const percent = 100 * value;
  return `${percent >= 10 ? percent.toFixed(0) : percent.toPrecision(2)} %`;
}

const css = ([r, g, b]: Rgb) => `rgb(${r} ${g} ${b})`;
const DIFFERENCE_GRADIENT = `linear-gradient(to right, ${Array.from({ length: 33 }, (_, i) => `${css(differenceColor(-1 + i / 16))} ${((100 * i) / 32).toFixed(2)}%`).join(', ')})`;

function DifferenceLegend({ max, runA, runB }: { max: number; runA: number; runB: number }) {
  return (
    <figure className="flex flex-col gap-1" aria-label="Difference colour key">
      <figcaption className="text-xs font-bold text-ink-soft">Difference run {runB} − run {runA} (share of the incident power per pixel)</figcaption>
      <div className="h-3 w-full rounded-full ring-1 ring-line ring-inset" style={{ background: DIFFERENCE_GRADIENT }} aria-hidden="true" />
      <div className="flex justify-between text-xs text-ink-soft tabular-nums">
        <span>−{share(max)}</span>
        <span>0</span>
        <span>+{share(max)}</span>
      </div>
      <p className="text-xs text-ink-faint">
        Teal: brighter in run {runA}; amber: brighter in run {runB}; colour grows as √|difference|, so faint changes show.
      </p>
    </figure>
  );
}

const CHANNEL_TITLES = { a: 'Under input A', b: 'Under input B' } as const;

/** Both runs' far fields under inputs A and B on one brightness scale per input, with their difference. */
export function ComparisonFarFields({ projectId, runA, runB, farFields, note }: ComparisonFarFieldsProps) {
  if (!farFields) {
    return (
      <Card title="Far fields">
        <p className="text-sm text-ink-soft">{note ?? 'No far fields to compare.'}</p>
      </Card>
    );
  }
  const { side, extent, scales } = farFields;
  const extentText = (value: number) => `u, v from −${value.toFixed(3)} to ${value.toFixed(3)}`;
  // The pictures are painted +v up (README "Picture convention"), each run's over its own u, v extent.
  const farFieldAxes = (value: number): PictureAxesSpec => ({
    x: { label: 'u = sin θx', unit: '', from: -value, to: value },
    y: { label: 'v = sin θy', unit: '', from: -value, to: value },
  });
  return (
    <Card
      title="Far fields"
      description={`Total far field of each run under inputs A and B, painted by the server from the stored arrays on one brightness scale per input: each pixel is the share of its run's incident power falling in it (${side}×${side} pixels), shown as √ of it up to the brighter run's brightest pixel away from the zero order (a brighter zero order is clipped).`}
    >
      <div className="flex flex-col gap-8">
        {scales.map((scale) => {
          const figures = [
            { show: 'a' as const, title: `Run ${runA}`, caption: extentText(extent.a) },
            { show: 'b' as const, title: `Run ${runB}`, caption: extentText(extent.b) },
            ...(scale.differenceScale !== null ? [{ show: 'difference' as const, title: `Run ${runB} − run ${runA}`, caption: 'difference, pixel by pixel' }] : []),
          ];
          return (
            <section key={scale.channel} aria-label={CHANNEL_TITLES[scale.channel]} data-compare-channel={scale.channel}>
              <h3 className="mb-3 font-extrabold">{CHANNEL_TITLES[scale.channel]}</h3>
              <div className="grid gap-4 md:grid-cols-3">
                {figures.map(({ show, title, caption }) => (
                  <figure key={show} className="flex min-w-0 flex-col gap-1.5">
                    <figcaption className="flex flex-wrap items-baseline justify-between gap-x-2">
                      <span className="font-bold">{title}</span>
                      <span className="text-xs text-ink-soft">{caption}</span>
                    </figcaption>
                    <ZoomPanImage
                      axes={farFieldAxes(show === 'b' ? extent.b : extent.a)}
                      src={comparisonPictureHref(projectId, runA, runB, scale.channel, show)}
                      alt={`${CHANNEL_TITLES[scale.channel]}: ${show === 'difference' ? `difference ${title}` : `${title} far field on the common scale`}`}
                    />
                  </figure>
                ))}
              </div>
              <div className="mt-3 grid gap-4 md:grid-cols-3">
                <div className="md:col-span-2">
                  <SequentialLegend
                    title="Both runs: share of the incident power per pixel (√ scale)"
                    ticks={['0', share(scale.fullScale / 4), share(scale.fullScale)]}
                    note={scale.fullScale > 0 ? undefined : 'Both far fields are dark.'}
                  />
                </div>
                {scale.differenceScale !== null ? <DifferenceLegend max={scale.differenceScale} runA={runA} runB={runB} /> : null}
              </div>
              {scale.differenceScale === null && farFields.differenceNote ? <p className="mt-2 text-sm text-ink-soft">{farFields.differenceNote}</p> : null}
            </section>
          );
        })}
      </div>
    </Card>
  );
}
