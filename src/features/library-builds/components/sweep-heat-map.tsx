import { useMemo } from 'react';
import { paintIntensity, paintPhase, upright } from '@shared/optics/colormap';
import type { LibraryBuildAtom } from '@shared/schemas/library-builds';
import type { PictureAxesSpec } from '@/components/ui/picture-axes';
import { ZoomPanImage } from '@/components/ui/zoom-pan-image';
import { CyclicLegend } from '@/features/runs/components/colour-legend';
import { sweepMap } from '@/features/library-builds/utils/sweep';

export type SweepQuantity = 'amplitude' | 'phase' | 'power';

interface SweepHeatMapProps {
  title: string;
  atoms: LibraryBuildAtom[];
  sizesNm: number[];
  stepNm: number;
  value: (atom: LibraryBuildAtom) => number;
  quantity: SweepQuantity;
  /** What the colours measure, with its unit: "|t_x|", "power in other orders (of the incident)". */
  measure: string;
}

function pictureUrl(map: Float64Array, n: number, quantity: SweepQuantity): string {
  const painted = quantity === 'phase' ? paintPhase(map, n, n) : paintIntensity(map, n, n, { kind: 'gamma', gamma: 1, max: 1 });
  const image = upright(painted);
  const canvas = document.createElement('canvas');
  canvas.width = n;
  canvas.height = n;
  canvas.getContext('2d')!.putImageData(new ImageData(image.data as Uint8ClampedArray<ArrayBuffer>, n, n), 0, 0);
  return canvas.toDataURL('image/png');
}

function range(map: Float64Array): string {
  let lo = Infinity;
  let hi = -Infinity;
  for (const v of map) {
    if (Number.isFinite(v)) {
      lo = Math.min(lo, v);
      hi = Math.max(hi, v);
    }
  }
  return Number.isFinite(lo) ? `from ${lo.toFixed(3)} to ${hi.toFixed(3)}` : 'no values';
}

/**
 * One quantity of the sweep over (w, l): w, the pillar's width along x, to the right; l, its length along y, up
 * (README "Picture convention"). Amplitudes and powers on a linear 0…1 key, phases in the cyclic colours.
 */
export function SweepHeatMap({ title, atoms, sizesNm, stepNm, value, quantity, measure }: SweepHeatMapProps) {
  const n = sizesNm.length;
  const map = useMemo(() => sweepMap(atoms, sizesNm, value), [atoms, sizesNm, value]);
  const src = useMemo(() => (n > 0 ? pictureUrl(map, n, quantity) : ''), [map, n, quantity]);
  if (n === 0) return null;
  const half = stepNm / 2;
  const axes: PictureAxesSpec = {
    x: { label: 'w', unit: 'nm', from: sizesNm[0] - half, to: sizesNm[n - 1] + half },
    y: { label: 'l', unit: 'nm', from: sizesNm[0] - half, to: sizesNm[n - 1] + half },
    key: quantity === 'phase' ? undefined : { colours: 'sequential', quantity: `${measure}, linear`, from: '0', to: '1' },
  };
  return (
    <figure className="flex min-w-0 flex-col gap-2">
      <figcaption className="font-extrabold">{title}</figcaption>
      <ZoomPanImage src={src} alt={`${title}: ${n} × ${n} atoms, ${measure} ${range(map)}`} axes={axes} />
      {quantity === 'phase' ? <CyclicLegend title={`${measure} (rad)`} /> : null}
    </figure>
  );
}
