import { useDeferredValue, useEffect, useMemo, useRef } from 'react';
import { FULL_VIEW, PictureAxes } from '@/components/ui/picture-axes';
import { cyclicColor, paintPhase, upright } from '@shared/optics/colormap';
import { analyticTermOf } from '@shared/optics/design-units';
import { sumPhaseTerms, type PhaseTerm } from '@shared/optics/phase-terms';
import { termKindLabel, type DraftTerm } from '@/features/designs/utils/design-draft';
import { phaseTermSchema } from '@shared/schemas/design';

const PREVIEW_CELLS = 256;

interface PreviewInput {
  wavelengthNm: number;
  periodNm: number;
  cells: number;
  terms: readonly DraftTerm[];
}

interface PreviewResult {
  n: number;
  phase: Float64Array | null;
  shown: string[];
  later: string[];
  skipped: number;
}

function computePreview({ wavelengthNm, periodNm, cells, terms }: PreviewInput): PreviewResult {
  const n = Math.min(cells, PREVIEW_CELLS);
  const analytic: PhaseTerm[] = [];
  const shown: string[] = [];
  const later: string[] = [];
  let skipped = 0;
  terms.forEach((term, index) => {
    const label = `${index + 1}. ${termKindLabel(term.kind)}`;
    if (term.kind === 'hologram' || term.kind === 'custom') {
      later.push(label);
      return;
    }
    const parsed = phaseTermSchema.safeParse(term);
    const engineTerm = parsed.success ? analyticTermOf(parsed.data) : null;
    if (!engineTerm) {
      skipped += 1;
      return;
    }
    analytic.push(engineTerm);
    shown.push(label);
  });
  if (!(wavelengthNm > 0 && periodNm > 0 && cells > 0) || analytic.length === 0) return { n, phase: null, shown, later, skipped };
  try {
    // Same aperture D = N·P sampled by n ≤ N cells, so the preview costs at most 256² evaluations per term.
    const grid = { n, period: (cells * periodNm * 1e-9) / n, lambda: wavelengthNm * 1e-9 };
    return { n, phase: sumPhaseTerms(grid, analytic), shown, later, skipped };
  } catch {
    return { n, phase: null, shown, later, skipped: skipped + analytic.length };
  }
}

const legendGradient = `linear-gradient(to right, ${Array.from({ length: 13 }, (_, i) => {
  const [r, g, b] = cyclicColor(-Math.PI + (i * Math.PI) / 6);
  return `rgb(${r} ${g} ${b})`;
}).join(', ')})`;


function PhaseLegend() {
  return (
    <div className="flex max-w-64 items-center gap-2 text-xs text-ink-soft" aria-hidden="true">
      <span>−π</span>
      <span className="h-2.5 flex-1 rounded-full" style={{ backgroundImage: legendGradient }} />
      <span>π</span>
    </div>
  );
}

/** The channel's analytic phase (axicon, vortex, lens, tilt) on a reduced grid, in the cyclic colours. */
export function PhasePreview({ setup, terms, channelName }: { setup: { wavelengthNm: number; periodNm: number; cells: number }; terms: readonly DraftTerm[]; channelName: string }) {
  const input = useDeferredValue(
    useMemo(
      () => ({ wavelengthNm: setup.wavelengthNm, periodNm: setup.periodNm, cells: setup.cells, terms }),
      [setup.wavelengthNm, setup.periodNm, setup.cells, terms],
    ),
  );
  const result = useMemo(() => computePreview(input), [input]);
  const canvasRef = useRef<HTMLCanvasElement>(null);
  const halfWidthUm = (setup.cells * setup.periodNm) / 2000;

  useEffect(() => {
    const canvas = canvasRef.current;
    if (!canvas || !result.phase) return;
    const image = paintPhase(result.phase, result.n, result.n);
    canvas.width = result.n;
    canvas.height = result.n;
    const context = canvas.getContext('2d');
    if (!context) return;
    // Row 0 is the smallest y; drawn y up as in the far-field drawing (README "Picture convention").
    context.putImageData(new ImageData(upright(image).data as Uint8ClampedArray<ArrayBuffer>, result.n, result.n), 0, 0);
  }, [result]);

  return (
    <figure className="flex flex-col gap-2">
      {result.phase ? (
        // README "Picture convention": x to the right, y up, cell centres across ±N·P/2.
        <div className="w-full max-w-[19.75rem]">
          <PictureAxes
            spec={{ x: { label: 'x', unit: 'µm', from: -halfWidthUm, to: halfWidthUm }, y: { label: 'y', unit: 'µm', from: -halfWidthUm, to: halfWidthUm } }}
            mirrored={false}
            visible={FULL_VIEW}
          >
            <canvas
              ref={canvasRef}
              role="img"
              aria-label={`${channelName} phase of ${result.shown.join(', ')}, previewed on ${result.n} × ${result.n} samples`}
              className="aspect-square w-full rounded-xl ring-1 ring-line [image-rendering:pixelated]"
            />
          </PictureAxes>
        </div>
      ) : (
        <div className="lattice-ink flex aspect-square w-full max-w-64 items-center justify-center rounded-xl p-4 text-center text-sm text-ink-soft ring-1 ring-line">
          {result.later.length ? 'No analytic term to draw yet.' : 'Add an axicon, vortex, lens or tilt to see its phase here.'}
        </div>
      )}
      {result.phase ? <PhaseLegend /> : null}
      <figcaption className="max-w-64 text-xs text-ink-soft">
        {result.phase ? (
          <>
            Phase of {result.shown.join(' + ')} across the whole aperture, {result.n} × {result.n} samples
            {result.n < setup.cells ? ` (the device has ${setup.cells} × ${setup.cells}; fine fringes may show moiré here)` : ''}. Colours
            repeat every 2π.
          </>
        ) : null}
        {result.later.length ? <span className="block">{result.later.join(', ')}: computed when the design runs.</span> : null}
        {result.skipped ? <span className="block text-danger">Terms with problems are left out until they are fixed.</span> : null}
      </figcaption>
    </figure>
  );
}
