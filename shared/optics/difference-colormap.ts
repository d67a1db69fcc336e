/**
 * The diverging colours of a difference picture b − a (run comparisons), our own: a dark neutral for no
 * change, teal where a is brighter, amber where b is, reached along √|t| so a faint change stays visible.
 */
import type { Rgb } from './colormap';

export const DIFFERENCE_ZERO: Rgb = [22, 24, 34];
export const DIFFERENCE_A_BRIGHTER: Rgb = [96, 214, 230];
export const DIFFERENCE_B_BRIGHTER: Rgb = [255, 176, 64];

/**
 * Colour of a difference t = (b − a)/max in −1…1 (clamped). Example: differenceColor(0) → [22, 24, 34],
 * differenceColor(1) → [255, 176, 64], differenceColor(−1) → [96, 214, 230].
 */
export function differenceColor(t: number): Rgb {
  const x = Number.isFinite(t) ? Math.max(-1, Math.min(1, t)) : 0;
  const s = Math.sqrt(Math.abs(x));
  const to = x >= 0 ? DIFFERENCE_B_BRIGHTER : DIFFERENCE_A_BRIGHTER;
  return [0, 1, 2].map((c) => Math.round(DIFFERENCE_ZERO[c] + (to[c] - DIFFERENCE_ZERO[c]) * s)) as Rgb;
}
