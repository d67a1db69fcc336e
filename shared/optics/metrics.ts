/**
 * Figures of merit of a simulated preview. Intensity maps are centred N×N far-field (or image-plane)
 * maps as produced by propagation.ts / simulate.ts (zero order at pixel (N/2, N/2)); windows are the
 * integer pixel rectangles of target.ts. Powers are in the maps' own units (unitary far field:
 * Σ pixels = incident power for a lossless device).
 */
import bessel from 'bessel';
import type { RadialProfile } from './propagation';
import type { PixelWindow } from './target';
import { wrapPhase } from './phase-terms';

const TWO_PI = 2 * Math.PI;

/** First zero of J₀ (Abramowitz & Stegun, Table 9.5). */
export const BESSEL_J0_FIRST_ZERO = 2.404826;

/** First maxima of J_ℓ, j'_{ℓ,1}, ℓ = 1, 2, 3 (Abramowitz & Stegun, Table 9.5). */
export const BESSEL_FIRST_MAXIMA: Readonly<Record<number, number>> = { 1: 1.841184, 2: 3.054237, 3: 4.201189 };

function assertWindow(n: number, window: PixelWindow): void {
  const { x0, y0, width, height } = window;
  if (x0 < 0 || y0 < 0 || width < 1 || height < 1 || x0 + width > n || y0 + height > n) {
    throw new RangeError(`Window (${x0}, ${y0}, ${width}×${height}) is not inside the ${n}×${n} grid`);
  }
}

function assertMap(map: ArrayLike<number>, n: number, name: string): void {
  if (map.length !== n * n) throw new RangeError(`${name} has ${map.length} values, expected ${n}×${n}`);
}

/** Sum of an N×N map over a window. Example: a map of ones, 3×2 window → 6. */
export function windowPower(intensity: ArrayLike<number>, n: number, window: PixelWindow): number {
  assertMap(intensity, n, 'Intensity');
  assertWindow(n, window);
  let sum = 0;
  for (let y = window.y0; y < window.y0 + window.height; y++) {
    for (let x = window.x0; x < window.x0 + window.width; x++) sum += intensity[y * n + x];
  }
  return sum;
}

/**
 * Efficiency into the signal window: window power / incident power (fraction, 0…1).
 * Example: 0.3 of the incident power in the window → 0.3.
 */
export function signalEfficiency(intensity: ArrayLike<number>, n: number, window: PixelWindow, incidentPower: number): number {
  if (!(incidentPower > 0)) throw new RangeError('Incident power must be positive');
  return windowPower(intensity, n, window) / incidentPower;
}

/** Window pixels whose target intensity is at least `threshold` × the largest target intensity. */
function brightPixels(target: ArrayLike<number>, n: number, window: PixelWindow, threshold: number): number[] {
  let max = 0;
  for (let y = window.y0; y < window.y0 + window.height; y++) {
    for (let x = window.x0; x < window.x0 + window.width; x++) max = Math.max(max, target[y * n + x]);
  }
  if (!(max > 0)) throw new RangeError('Target is dark in the window');
  const bright: number[] = [];
  for (let y = window.y0; y < window.y0 + window.height; y++) {
    for (let x = window.x0; x < window.x0 + window.width; x++) if (target[y * n + x] >= threshold * max) bright.push(y * n + x);
  }
  return bright;
}

/**
 * Uniformity over target-bright pixels (target intensity ≥ threshold·max, default 0.5):
 * U = 1 − (max − min)/(max + min) of the ratio I/T (for a binary target simply of I; common practice, no
 * published source). 1 is perfectly uniform. Example: bright pixels of intensity 1 and 3 → 0.5.
 */
export function uniformity(intensity: ArrayLike<number>, targetIntensity: ArrayLike<number>, n: number, window: PixelWindow, threshold = 0.5): number {
  assertMap(intensity, n, 'Intensity');
  assertMap(targetIntensity, n, 'Target');
  assertWindow(n, window);
  let max = -Infinity;
  let min = Infinity;
  for (const i of brightPixels(targetIntensity, n, window, threshold)) {
    const ratio = intensity[i] / targetIntensity[i];
    max = Math.max(max, ratio);
    min = Math.min(min, ratio);
  }
  return max + min > 0 ? 1 - (max - min) / (max + min) : 0;
}

/**
 * Pearson correlation of intensity and target intensity over all window pixels (−1…1).
 * Example: intensity = 2·target + 1 → 1.
 */
export function correlation(intensity: ArrayLike<number>, targetIntensity: ArrayLike<number>, n: number, window: PixelWindow): number {
  assertMap(intensity, n, 'Intensity');
  assertMap(targetIntensity, n, 'Target');
  assertWindow(n, window);
  let sa = 0;
  let sb = 0;
  let count = 0;
  for (let y = window.y0; y < window.y0 + window.height; y++) {
    for (let x = window.x0; x < window.x0 + window.width; x++) {
      sa += intensity[y * n + x];
      sb += targetIntensity[y * n + x];
      count++;
    }
  }
  const ma = sa / count;
  const mb = sb / count;
  let cab = 0;
  let caa = 0;
  let cbb = 0;
  for (let y = window.y0; y < window.y0 + window.height; y++) {
    for (let x = window.x0; x < window.x0 + window.width; x++) {
      const a = intensity[y * n + x] - ma;
      const b = targetIntensity[y * n + x] - mb;
      cab += a * b;
      caa += a * a;
      cbb += b * b;
    }
  }
  return caa > 0 && cbb > 0 ? cab / Math.sqrt(caa * cbb) : 0;
}

/**
 * RMSE of normalized intensity against the target in the window: target scaled to max 1, intensity scaled
 * by the least-squares factor α = Σ I·T / Σ I², RMSE = √(mean((α·I − T)²)) (0 = perfect, in units of the
 * target's peak). Example: intensity = 5·target → 0.
 */
export function normalizedRmse(intensity: ArrayLike<number>, targetIntensity: ArrayLike<number>, n: number, window: PixelWindow): number {
  assertMap(intensity, n, 'Intensity');
  assertMap(targetIntensity, n, 'Target');
  assertWindow(n, window);
  let tMax = 0;
  let it = 0;
  let ii = 0;
  for (let y = window.y0; y < window.y0 + window.height; y++) {
    for (let x = window.x0; x < window.x0 + window.width; x++) {
      const i = y * n + x;
      tMax = Math.max(tMax, targetIntensity[i]);
      it += intensity[i] * targetIntensity[i];
      ii += intensity[i] * intensity[i];
    }
  }
  if (!(tMax > 0)) throw new RangeError('Target is dark in the window');
  const alpha = ii > 0 ? it / ii : 0;
  let sum = 0;
  for (let y = window.y0; y < window.y0 + window.height; y++) {
    for (let x = window.x0; x < window.x0 + window.width; x++) {
      const i = y * n + x;
      sum += ((alpha * intensity[i] - targetIntensity[i]) / tMax) ** 2;
    }
  }
  return Math.sqrt(sum / (window.width * window.height));
}

/**
 * Crosstalk in dB: 10·log10(unwanted power / wanted power). Example: 1% leakage → −20 dB.
 */
export function crosstalkDb(wantedPower: number, unwantedPower: number): number {
  if (!(wantedPower > 0)) throw new RangeError('Wanted power must be positive');
  return 10 * Math.log10(unwantedPower / wantedPower);
}

/**
 * Crosstalk between channels in one window: power of the unwanted channel's map relative to the wanted
 * channel's map in the same window, dB (e.g. the two analyser outputs under input A, window of image A).
 * Example: unwanted map 1000× weaker in the window → −30 dB.
 */
export function windowCrosstalkDb(wanted: ArrayLike<number>, unwanted: ArrayLike<number>, n: number, window: PixelWindow): number {
  return crosstalkDb(windowPower(wanted, n, window), windowPower(unwanted, n, window));
}

/**
 * Zero-order fraction: power in the pixels within `radius` pixels (Euclidean; 0 = the single pixel
 * (N/2, N/2)) of the zero order, divided by `totalPower`. Example: all power in pixel (N/2, N/2) → 1.
 */
export function zeroOrderFraction(intensity: ArrayLike<number>, n: number, totalPower: number, radius = 0): number {
  assertMap(intensity, n, 'Intensity');
  if (!(totalPower > 0)) throw new RangeError('Total power must be positive');
  const c = n / 2;
  const reach = Math.floor(radius);
  let sum = 0;
  for (let dy = -reach; dy <= reach; dy++) {
    for (let dx = -reach; dx <= reach; dx++) {
      const x = c + dx;
      const y = c + dy;
      if (dx * dx + dy * dy > radius * radius || x < 0 || y < 0 || x >= n || y >= n) continue;
      sum += intensity[y * n + x];
    }
  }
  return sum / totalPower;
}

/**
 * Quantizes phases to `levels` equal steps 2π·j/levels (nearest level), wrapped to (−π, π].
 * Example: quantizePhase([1.0], 4) → [π/2].
 */
export function quantizePhase(phase: ArrayLike<number>, levels: number): Float64Array {
  if (!Number.isInteger(levels) || levels < 2) throw new RangeError(`Levels must be an integer ≥ 2, got ${levels}`);
  const step = TWO_PI / levels;
  const out = new Float64Array(phase.length);
  for (let i = 0; i < phase.length; i++) out[i] = wrapPhase(step * Math.round(phase[i] / step));
  return out;
}

/**
 * RMS phase error (radians) of quantizing to `levels` steps; for uniformly spread phases it tends to
 * π/(levels·√3) (uniform quantization noise, step²/12). Example: phases spread uniformly, 8 levels → ≈ 0.2267.
 */
export function phaseQuantizationRmsError(phase: ArrayLike<number>, levels: number): number {
  const q = quantizePhase(phase, levels);
  let sum = 0;
  for (let i = 0; i < q.length; i++) sum += wrapPhase(phase[i] - q[i]) ** 2;
  return Math.sqrt(sum / Math.max(q.length, 1));
}

/**
 * First maximum j'_{ℓ,1} of J_ℓ (ℓ ≠ 0, sign ignored): A&S Table 9.5 for |ℓ| ≤ 3, otherwise the first
 * zero of J'_ℓ = (J_{ℓ−1} − J_{ℓ+1})/2 found by scan and bisection with the `bessel` package.
 * Example: besselFirstMaximum(1) → 1.841184.
 */
export function besselFirstMaximum(charge: number): number {
  const l = Math.abs(charge);
  if (!Number.isInteger(l) || l === 0) throw new RangeError(`Ring radius needs an integer ℓ ≠ 0, got ${charge}`);
  const tabulated = BESSEL_FIRST_MAXIMA[l];
  if (tabulated !== undefined) return tabulated;
  const derivative = (x: number) => bessel.besselj(x, l - 1) - bessel.besselj(x, l + 1);
  let a = l;
  let b = l + 0.01;
  while (derivative(b) > 0) {
    a = b;
    b += 0.01;
    if (b > 4 * l + 10) throw new RangeError(`No maximum of J_${l} found`);
  }
  for (let i = 0; i < 60; i++) {
    const m = (a + b) / 2;
    if (derivative(m) > 0) a = m;
    else b = m;
  }
  return (a + b) / 2;
}

/** Bessel core radius r₀ = 2.404826/(k sinβ), metres. Example: λ = 1 µm, sinβ = 0.1 → 3.8274 µm. */
export function besselCoreRadius(lambda: number, sinBeta: number): number {
  return BESSEL_J0_FIRST_ZERO / ((TWO_PI / lambda) * sinBeta);
}

/** Ring radius of an order-ℓ Bessel beam, j'_{ℓ,1}/(k sinβ), metres. Example: λ = 1 µm, sinβ = 0.1, ℓ = 1 → 2.9304 µm. */
export function besselRingRadius(lambda: number, sinBeta: number, charge: number): number {
  return besselFirstMaximum(charge) / ((TWO_PI / lambda) * sinBeta);
}

/**
 * Non-diffracting length z_max = R/tanβ for aperture radius R (Durnin, JOSA A 4, 651 (1987)), metres.
 * Example: R = 1 mm, sinβ = 0.1 → 9.9499 mm.
 */
export function besselNonDiffractingLength(apertureRadius: number, sinBeta: number): number {
  return (apertureRadius * Math.sqrt(1 - sinBeta * sinBeta)) / sinBeta;
}

/**
 * Analytic transverse intensity J_ℓ²(k sinβ r) at the given radii (peak 1 on axis for ℓ = 0).
 * Example: ℓ = 0 at r = r₀ → ≈ 0.
 */
export function besselIntensity(radius: ArrayLike<number>, lambda: number, sinBeta: number, charge: number): Float64Array {
  if (!Number.isInteger(charge)) throw new RangeError(`ℓ must be an integer, got ${charge}`);
  const kr = (TWO_PI / lambda) * sinBeta;
  const l = Math.abs(charge);
  const out = new Float64Array(radius.length);
  for (let i = 0; i < radius.length; i++) out[i] = bessel.besselj(kr * radius[i], l) ** 2;
  return out;
}

/** Vertex abscissa of the parabola through three points (falls back to the middle point). */
function parabolaVertex(x0: number, y0: number, x1: number, y1: number, x2: number, y2: number): number {
  const d = (x0 - x1) * (x0 - x2) * (x1 - x2);
  const a = (x2 * (y1 - y0) + x1 * (y0 - y2) + x0 * (y2 - y1)) / d;
  const b = (x2 * x2 * (y0 - y1) + x1 * x1 * (y2 - y0) + x0 * x0 * (y1 - y2)) / d;
  if (!(a !== 0) || !Number.isFinite(a)) return x1;
  const vertex = -b / (2 * a);
  return vertex >= x0 && vertex <= x2 ? vertex : x1;
}

function firstExtremum(profile: RadialProfile, minimum: boolean): number {
  const { radius, value } = profile;
  const sign = minimum ? 1 : -1;
  for (let i = 1; i + 1 < value.length; i++) {
    const v = sign * value[i];
    if (v < sign * value[i - 1] && v <= sign * value[i + 1]) {
      return parabolaVertex(radius[i - 1], value[i - 1], radius[i], value[i], radius[i + 1], value[i + 1]);
    }
  }
  return NaN;
}

/**
 * Measured core radius: radius of the first local minimum of a radial profile (parabolic refinement over
 * the three samples around it), metres; NaN if none. Example: profile of J₀² → ≈ 2.404826/(k sinβ).
 */
export function measuredFirstMinimum(profile: RadialProfile): number {
  return firstExtremum(profile, true);
}

/**
 * Measured ring radius: radius of the first local maximum after the centre (parabolic refinement), metres;
 * NaN if none. Example: profile of J₁² → ≈ 1.841184/(k sinβ).
 */
export function measuredFirstMaximum(profile: RadialProfile): number {
  return firstExtremum(profile, false);
}

/**
 * Measured non-diffracting length: the distance beyond the on-axis intensity peak where the intensity
 * first falls below half the peak (linear interpolation between samples), metres; NaN if it never does.
 * Example: z = [0, 1, 2, 3], I = [0.5, 1, 0.8, 0.2] → 2.5.
 */
export function measuredNonDiffractingLength(z: ArrayLike<number>, onAxis: ArrayLike<number>): number {
  if (z.length !== onAxis.length || z.length < 2) throw new RangeError('z and on-axis intensity must have the same length ≥ 2');
  let peak = 0;
  for (let i = 1; i < onAxis.length; i++) if (onAxis[i] > onAxis[peak]) peak = i;
  const half = onAxis[peak] / 2;
  for (let i = peak + 1; i < onAxis.length; i++) {
    if (onAxis[i] < half) {
      const t = (onAxis[i - 1] - half) / (onAxis[i - 1] - onAxis[i]);
      return z[i - 1] + t * (z[i] - z[i - 1]);
    }
  }
  return NaN;
}
