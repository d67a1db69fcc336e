/**
 * Propagation analyses of beam channels, from the channel's output field on the cell grid (types.ts
 * conventions, metres, radians), by angular-spectrum propagation (Goodman, Introduction to Fourier
 * Optics, 3rd ed., §3.10; propagation.ts):
 * - Bessel / vortex-Bessel beams of an axicon φ = −k r sinβ (+ ℓ·atan2(y, x)): x–z intensity slice
 *   through the axis, on-axis (ℓ = 0) or ring-line (ℓ ≠ 0) intensity along z, transverse radial profile at
 *   mid-range against J_ℓ²(k sinβ r), core radius 2.404826/(k sinβ) or ring radius j'_{ℓ,1}/(k sinβ)
 *   (Abramowitz & Stegun, Table 9.5), non-diffracting length R/tanβ (Durnin, JOSA A 4, 651 (1987)).
 * - Lenses φ = −k(√(r² + f²) − f): focal spot at z = f. The device is square (side D = N·P), so the spot
 *   is the sinc² pattern of a square aperture, first zero along x at λf/D (paraxial; Goodman §4.4.1); the
 *   Airy value 0.61 λ/NA of a circular aperture (Born & Wolf, Principles of Optics, §8.5) is given beside
 *   it. Also the focal peak relative to the ideal design phase (a Strehl ratio against the design, §9.3).
 */
import {
  besselCoreRadius,
  besselFirstMaximum,
  besselIntensity,
  besselNonDiffractingLength,
  besselRingRadius,
  measuredFirstMaximum,
  measuredFirstMinimum,
  measuredNonDiffractingLength,
} from './metrics';
import { AngularSpectrumPropagator, radialProfile } from './propagation';
import type { CancelSignal, CellGrid, ComplexField, ProgressCallback } from './types';

/** What defines a beam channel: its axicon's sinβ, the total vortex charge ℓ and any tilt (direction cosines). */
export interface BeamSpec {
  sinBeta: number;
  charge: number;
  /** Direction cosines of the channel's tilt: the beam axis leans to (u, v); 0 for none. */
  tiltU: number;
  tiltV: number;
  /** Radius of the illuminated aperture that forms the beam, metres (N·P/2, or the Gaussian waist if smaller). */
  apertureRadius: number;
}

/** A transverse profile, measured and analytic, at one distance. */
export interface BeamProfile {
  z: number;
  /** Mean radius of each bin, metres. */
  radius: Float64Array;
  /** Azimuthal mean of the intensity, normalized to its largest value over the compared range. */
  measured: Float64Array;
  /** J_ℓ²(k sinβ r) scaled by least squares to `measured` over the compared range. */
  analytic: Float64Array;
}

export interface BeamAnalysis {
  spec: BeamSpec;
  /** Cell x coordinates of the slice, metres (length N). */
  x: Float64Array;
  /** Distances of the slice planes, metres. */
  z: Float64Array;
  /** |E|² through the beam axis (mean of the rows at y = ±P/2 for even N), row per z: z × N, float32. */
  slice: Float32Array;
  /** Intensity along z on the axis (ℓ = 0) or on the ring of radius j'_{ℓ,1}/(k sinβ) (ℓ ≠ 0). */
  lineIntensity: Float64Array;
  profile: BeamProfile;
  /** Core radius (ℓ = 0, first zero of J₀) or ring radius (ℓ ≠ 0, first maximum of J_ℓ), metres. */
  featureRadius: { measured: number; formula: number; kind: 'core' | 'ring' };
  /** Non-diffracting length, metres: measured where the line intensity falls below half its peak; formula R/tanβ. */
  nonDiffractingLength: { measured: number; formula: number };
  /** Pearson correlation of measured and analytic profile over the compared range. */
  profileCorrelation: number;
}

export interface AnalysisOptions {
  /** Zero-padding factor of the angular spectrum (1 or 2). */
  padding: number;
  onProgress?: (fraction: number) => void;
  signal?: CancelSignal;
}

/** Default number of x–z planes when the design gives none. */
export const DEFAULT_BEAM_PLANES = 48;

/**
 * Planes of the x–z slice: the design's (start, end, steps) if given, otherwise 0…1.2·z_max in
 * DEFAULT_BEAM_PLANES steps (z_max = R/tanβ). Example: z_max = 1 mm → 48 planes from 0 to 1.2 mm.
 */
export function beamPlanes(spec: BeamSpec, given: { start: number; end: number; steps: number } | null): Float64Array {
  const start = given ? given.start : 0;
  const end = given ? given.end : 1.2 * besselNonDiffractingLength(spec.apertureRadius, spec.sinBeta);
  const steps = given ? given.steps : DEFAULT_BEAM_PLANES;
  const z = new Float64Array(steps);
  for (let i = 0; i < steps; i++) z[i] = start + ((end - start) * i) / (steps - 1);
  return z;
}

/** Beam-axis offset at distance z for a tilted channel: (z·u/w, z·v/w), w = √(1 − u² − v²). */
function axisOffset(spec: BeamSpec, z: number): [number, number] {
  const w = Math.sqrt(Math.max(1e-12, 1 - spec.tiltU * spec.tiltU - spec.tiltV * spec.tiltV));
  return [(z * spec.tiltU) / w, (z * spec.tiltV) / w];
}

function pearson(a: ArrayLike<number>, b: ArrayLike<number>, count: number): number {
  let ma = 0;
  let mb = 0;
  for (let i = 0; i < count; i++) {
    ma += a[i];
    mb += b[i];
  }
  ma /= count;
  mb /= count;
  let ab = 0;
  let aa = 0;
  let bb = 0;
  for (let i = 0; i < count; i++) {
    ab += (a[i] - ma) * (b[i] - mb);
    aa += (a[i] - ma) ** 2;
    bb += (b[i] - mb) ** 2;
  }
  return aa > 0 && bb > 0 ? ab / Math.sqrt(aa * bb) : 0;
}

function intensityMap(field: ComplexField): Float64Array {
  const out = new Float64Array(field.re.length);
  for (let i = 0; i < out.length; i++) out[i] = field.re[i] * field.re[i] + field.im[i] * field.im[i];
  return out;
}

/** Mean intensity of the four cells nearest to the point (px, py) (metres from the axis), bilinear. */
function sampleAt(intensity: Float64Array, grid: CellGrid, px: number, py: number): number {
  const { n, period } = grid;
  const fx = px / period + (n - 1) / 2;
  const fy = py / period + (n - 1) / 2;
  const x0 = Math.floor(fx);
  const y0 = Math.floor(fy);
  if (x0 < 0 || y0 < 0 || x0 + 1 >= n || y0 + 1 >= n) return 0;
  const tx = fx - x0;
  const ty = fy - y0;
  const at = (x: number, y: number) => intensity[y * n + x];
  return (at(x0, y0) * (1 - tx) + at(x0 + 1, y0) * tx) * (1 - ty) + (at(x0, y0 + 1) * (1 - tx) + at(x0 + 1, y0 + 1) * tx) * ty;
}

/** Azimuthal mean of the intensity on a circle of radius r about (cx, cy), 64 bilinear samples. */
function ringMean(intensity: Float64Array, grid: CellGrid, cx: number, cy: number, r: number): number {
  let sum = 0;
  const samples = 64;
  for (let s = 0; s < samples; s++) {
    const a = (2 * Math.PI * s) / samples;
    sum += sampleAt(intensity, grid, cx + r * Math.cos(a), cy + r * Math.sin(a));
  }
  return sum / samples;
}

/**
 * Analyses a (vortex-)Bessel beam channel: `field` is the channel's output field on the cell grid.
 * Needs `await initFft()` first. Example: a flat-lit axicon of NA 0.15 at 633 nm gives a measured core
 * radius within a few percent of 2.404826/(k·0.15) = 1.615 µm.
 */
export function analyzeBeam(field: ComplexField, grid: CellGrid, spec: BeamSpec, zList: Float64Array, options: AnalysisOptions): BeamAnalysis {
  const { n, period, lambda } = grid;
  const l = spec.charge;
  const propagator = new AngularSpectrumPropagator(field, grid, { padding: options.padding });
  const rows = n % 2 === 0 ? [n / 2 - 1, n / 2] : [(n - 1) / 2];
  const formulaRadius = l === 0 ? besselCoreRadius(lambda, spec.sinBeta) : besselRingRadius(lambda, spec.sinBeta, l);
  const slice = new Float32Array(zList.length * n);
  const lineIntensity = new Float64Array(zList.length);
  const total = zList.length + 1;
  for (let iz = 0; iz < zList.length; iz++) {
    options.signal?.throwIfAborted();
    const z = zList[iz];
    const intensity = intensityMap(propagator.propagate(z));
    const [cx, cy] = axisOffset(spec, z);
    const shift = Math.round(cy / period);
    for (const row of rows) {
      const iy = Math.min(n - 1, Math.max(0, row + shift));
      for (let ix = 0; ix < n; ix++) slice[iz * n + ix] += intensity[iy * n + ix] / rows.length;
    }
    lineIntensity[iz] = l === 0 ? sampleAt(intensity, grid, cx, cy) : ringMean(intensity, grid, cx, cy, formulaRadius);
    options.onProgress?.((iz + 1) / total);
  }

  const zMid = (zList[0] + zList[zList.length - 1]) / 2;
  options.signal?.throwIfAborted();
  const mid = intensityMap(propagator.propagate(zMid));
  const [cx, cy] = axisOffset(spec, zMid);
  // Compare over the first few lobes: up to the 4th zero of J₀ (≈ 11.79) or ℓ + 10 beyond the first maximum.
  const kr = ((2 * Math.PI) / lambda) * spec.sinBeta;
  const compareRadius = Math.min(((l === 0 ? 11.79 : besselFirstMaximum(l) + 10) / kr), spec.apertureRadius / 2);
  const raw = radialProfile(mid, n, period, { centerX: cx, centerY: cy, binWidth: period / 2, maxRadius: compareRadius });
  const analyticRaw = besselIntensity(raw.radius, lambda, spec.sinBeta, l);
  let peak = 0;
  for (let i = 0; i < raw.value.length; i++) peak = Math.max(peak, raw.value[i]);
  const measured = raw.value.map((v) => (peak > 0 ? v / peak : 0));
  let ma = 0;
  let aa = 0;
  for (let i = 0; i < measured.length; i++) {
    ma += measured[i] * analyticRaw[i];
    aa += analyticRaw[i] * analyticRaw[i];
  }
  const scale = aa > 0 ? ma / aa : 0;
  const analytic = analyticRaw.map((v) => v * scale);
  options.onProgress?.(1);
  const profile: BeamProfile = { z: zMid, radius: raw.radius, measured, analytic };
  const measuredRadius = l === 0 ? measuredFirstMinimum(raw) : measuredFirstMaximum(raw);
  return {
    spec,
    x: Float64Array.from({ length: n }, (_, i) => (i - (n - 1) / 2) * period),
    z: zList,
    slice,
    lineIntensity,
    profile,
    featureRadius: { measured: measuredRadius, formula: formulaRadius, kind: l === 0 ? 'core' : 'ring' },
    nonDiffractingLength: {
      measured: measuredNonDiffractingLength(zList, lineIntensity),
      formula: besselNonDiffractingLength(spec.apertureRadius, spec.sinBeta),
    },
    profileCorrelation: pearson(measured, analytic, measured.length),
  };
}

export interface FocusAnalysis {
  focalLength: number;
  /** NA = sin(atan(R/f)) of the illuminated aperture. */
  numericalAperture: number;
  /** Airy first-zero radius 0.61 λ/NA of a circular aperture, metres (reference). */
  airyRadius: number;
  /** First zero along x of the square aperture's focus, λ·f/D (paraxial), metres. */
  squareApertureZero: number;
  /**
   * Distance from the focal peak to the first zero of the intensity along x through the peak at z = f, metres,
   * read from a cut sampled far finer than the cells (NaN if the cut has none, e.g. a Gaussian or vortex focus).
   */
  measuredFirstZero: number;
  /** Peak intensity of the realized focus / peak of the ideal design phase propagated the same way. */
  strehlVsDesign: number;
  /** The cut the first zero is read from: distance from the peak along +x (metres), intensity / peak. */
  profile: { radius: Float64Array; measured: Float64Array };
}

/** Samples of the focal cut per expected first zero, and how many expected zeros it spans. */
const CUT_SAMPLES_PER_ZERO = 40;
const CUT_ZEROS = 4;
/** A local minimum of the cut counts as the first zero only below this fraction of the peak. */
const ZERO_LEVEL = 0.2;

/** Position of the largest value of a map, refined by a parabola through its neighbours in x and y (metres from the centre). */
function peakPosition(map: Float64Array, n: number, period: number): [number, number] {
  let best = 0;
  for (let i = 1; i < map.length; i++) if (map[i] > map[best]) best = i;
  const ix = best % n;
  const iy = Math.floor(best / n);
  const refine = (minus: number, centre: number, plus: number) => {
    const d = minus - 2 * centre + plus;
    return d < 0 ? Math.max(-0.5, Math.min(0.5, (0.5 * (minus - plus)) / d)) : 0;
  };
  const dx = ix > 0 && ix < n - 1 ? refine(map[best - 1], map[best], map[best + 1]) : 0;
  const dy = iy > 0 && iy < n - 1 ? refine(map[best - n], map[best], map[best + n]) : 0;
  return [(ix + dx - (n - 1) / 2) * period, (iy + dy - (n - 1) / 2) * period];
}

/**
 * First zero of a focal cut: the first local minimum below ZERO_LEVEL of the peak (parabolic refinement),
 * metres from the peak; NaN if none. Example: a sampled sinc²(x/a) → a.
 */
export function firstZeroOfCut(radius: ArrayLike<number>, value: ArrayLike<number>): number {
  for (let i = 1; i + 1 < value.length; i++) {
    if (value[i] < value[i - 1] && value[i] <= value[i + 1] && value[i] < ZERO_LEVEL * value[0]) {
      const x0 = radius[i - 1];
      const x1 = radius[i];
      const x2 = radius[i + 1];
      const y0 = value[i - 1];
      const y1 = value[i];
      const y2 = value[i + 1];
      const d = y0 - 2 * y1 + y2;
      // Equal steps: vertex offset (y0 − y2) / (2d) steps from the middle sample.
      return d > 0 ? x1 + ((y0 - y2) / (2 * d)) * (x2 - x1) : x1;
    }
  }
  return NaN;
}

/**
 * Focal spot of a lens channel: propagates the realized output field and the ideal one (same illumination,
 * the channel's designed phase) to z = f. Needs `await initFft()` first.
 * The focal plane is sampled at the cell pitch P, which is coarser than the spot's structure (P = 0.45 µm
 * against a first zero near 0.8 µm is typical): samples there fall beside the zeros, and a "first minimum"
 * of those samples lands on a dip of the background light far out. So the cut through the peak along x is
 * evaluated from the angular spectrum itself at CUT_SAMPLES_PER_ZERO points per expected zero (the larger of
 * λf/D and 1.22 λf/(2R)) out to CUT_ZEROS of them.
 * Example: an ideal hyperbolic lens lit over the whole square device gives strehlVsDesign = 1 and
 * measuredFirstZero ≈ λf/D (Goodman §4.4.1); lit over a disc of radius R, ≈ 0.61 λ/NA (Born & Wolf §8.5.2).
 */
export function analyzeFocus(
  realized: ComplexField,
  ideal: ComplexField,
  grid: CellGrid,
  focalLength: number,
  apertureRadius: number,
  vortexCharge: number,
  options: AnalysisOptions,
): FocusAnalysis {
  const { n, period, lambda } = grid;
  const numericalAperture = Math.sin(Math.atan(apertureRadius / focalLength));
  const airyRadius = (0.61 * lambda) / numericalAperture;
  const squareApertureZero = (lambda * focalLength) / (n * period);
  options.signal?.throwIfAborted();
  const propagator = new AngularSpectrumPropagator(realized, grid, { padding: options.padding });
  const focus = intensityMap(propagator.propagate(focalLength));
  options.onProgress?.(0.4);
  options.signal?.throwIfAborted();
  const reference = intensityMap(new AngularSpectrumPropagator(ideal, grid, { padding: options.padding }).propagate(focalLength));
  options.onProgress?.(0.8);
  let peak = 0;
  let peakIdeal = 0;
  for (let i = 0; i < focus.length; i++) {
    if (focus[i] > peak) peak = focus[i];
    if (reference[i] > peakIdeal) peakIdeal = reference[i];
  }
  options.signal?.throwIfAborted();
  const [cx, cy] = peakPosition(focus, n, period);
  const expected = Math.max(squareApertureZero, 1.22 * lambda * focalLength / (2 * apertureRadius));
  const samples = CUT_SAMPLES_PER_ZERO * CUT_ZEROS + 1;
  const radius = Float64Array.from({ length: samples }, (_, i) => (i * expected) / CUT_SAMPLES_PER_ZERO);
  const line = propagator.lineAt(focalLength, cy, radius.map((r) => cx + r));
  const cut = new Float64Array(samples);
  for (let i = 0; i < samples; i++) cut[i] = line.re[i] * line.re[i] + line.im[i] * line.im[i];
  const top = cut.reduce((m, v) => Math.max(m, v), 0);
  const measured = cut.map((v) => (top > 0 ? v / top : 0));
  options.onProgress?.(1);
  return {
    focalLength,
    numericalAperture,
    airyRadius,
    squareApertureZero,
    measuredFirstZero: vortexCharge === 0 ? firstZeroOfCut(radius, measured) : NaN,
    strehlVsDesign: peakIdeal > 0 ? peak / peakIdeal : NaN,
    profile: { radius, measured },
  };
}
