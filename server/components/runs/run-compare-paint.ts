/**
 * Paints the pictures of a run comparison. Intensities: the previews' own sequential colours, √(I/max) (gamma
 * 0.5, as the run's far-field previews), brighter pixels clipped. Differences b − a: a diverging map of our
 * own around a dark neutral — teal where run a is brighter, amber where run b is — at √(|b − a|/max), so a
 * faint change stays visible. Rows as stored (row 0 on top), like the run's far-field previews.
 */
import { paintIntensity, type Rgb, type RgbaImage } from '../../../shared/optics/colormap';

export type CompareChannel = 'a' | 'b';
export type CompareView = 'a' | 'b' | 'difference';

/** Colour of a zero difference, and at full scale where run a (negative) or run b (positive) is brighter. */
export const DIFFERENCE_COLORS: { zero: Rgb; aBrighter: Rgb; bBrighter: Rgb } = {
  zero: [22, 24, 34],
  aBrighter: [96, 214, 230],
  bBrighter: [255, 176, 64],
};

export type ComparisonPaint =
  | { kind: 'intensity'; map: Float32Array; side: number; max: number }
  | { kind: 'difference'; a: Float32Array; b: Float32Array; side: number; max: number };

const mix = (from: Rgb, to: Rgb, t: number, channel: number) => Math.round(from[channel] + (to[channel] - from[channel]) * t);

/**
 * Example: a difference picture where b exceeds a by `max` at one pixel paints that pixel
 * DIFFERENCE_COLORS.bBrighter, and equal pixels DIFFERENCE_COLORS.zero.
 */
export function paintComparison(paint: ComparisonPaint): RgbaImage {
  const { side } = paint;
  if (paint.kind === 'intensity') return paintIntensity(paint.map, side, side, { kind: 'gamma', gamma: 0.5, max: paint.max > 0 ? paint.max : undefined });
  const { a, b, max } = paint;
  if (a.length !== side * side || b.length !== side * side) throw new RangeError(`difference of maps of ${a.length} and ${b.length} values, expected ${side}×${side}`);
  const data = new Uint8ClampedArray(side * side * 4);
  const inv = max > 0 ? 1 / max : 0;
  for (let i = 0; i < a.length; i++) {
    const d = (b[i] - a[i]) * inv;
    const t = Math.min(1, Math.sqrt(Math.abs(d)));
    const to = d >= 0 ? DIFFERENCE_COLORS.bBrighter : DIFFERENCE_COLORS.aBrighter;
    for (let c = 0; c < 3; c++) data[4 * i + c] = mix(DIFFERENCE_COLORS.zero, to, t, c);
    data[4 * i + 3] = 255;
  }
  return { width: side, height: side, data };
}
