/**
 * Paints the pictures of a run comparison. Intensities: the previews' own sequential colours, √(I/max) (gamma
 * 0.5, as the run's far-field previews), brighter pixels clipped. Differences b − a: the diverging colours of
 * difference-colormap.ts (teal where run a is brighter, amber where run b is) at (b − a)/max. +v up, like the
 * run's far-field previews (README "Picture convention"): the stored rows [iv, iu] grow with v, so the last
 * one is painted at the top (`upright`).
 */
import { paintIntensity, upright, type RgbaImage } from '../../../shared/optics/colormap';
import { differenceColor } from '../../../shared/optics/difference-colormap';

export type CompareChannel = 'a' | 'b';
export type CompareView = 'a' | 'b' | 'difference';

export type ComparisonPaint =
  | { kind: 'intensity'; map: Float32Array; side: number; max: number }
  | { kind: 'difference'; a: Float32Array; b: Float32Array; side: number; max: number };

/** Example: a difference picture where b exceeds a by `max` at one pixel paints it differenceColor(1), equal pixels differenceColor(0). */
export function paintComparison(paint: ComparisonPaint): RgbaImage {
  const { side } = paint;
  if (paint.kind === 'intensity') return upright(paintIntensity(paint.map, side, side, { kind: 'gamma', gamma: 0.5, max: paint.max > 0 ? paint.max : undefined }));
  const { a, b, max } = paint;
  if (a.length !== side * side || b.length !== side * side) throw new RangeError(`difference of maps of ${a.length} and ${b.length} values, expected ${side}×${side}`);
  const data = new Uint8ClampedArray(side * side * 4);
  const inv = max > 0 ? 1 / max : 0;
  for (let i = 0; i < a.length; i++) {
    const [r, g, bl] = differenceColor((b[i] - a[i]) * inv);
    data[4 * i] = r;
    data[4 * i + 1] = g;
    data[4 * i + 2] = bl;
    data[4 * i + 3] = 255;
  }
  return upright({ width: side, height: side, data });
}
