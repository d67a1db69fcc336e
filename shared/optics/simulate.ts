/**
 * Simulated response of a realized device (a JonesField, one 2×2 Jones matrix per cell) to an incident
 * polarization state: near field E = J·(a·input) per cell (a: illumination amplitude), far field of each
 * Cartesian component and of the projections onto an analyser basis of two orthogonal Jones vectors.
 * Far fields follow propagation.ts: centred (zero order at pixel (N/2, N/2)), unitary (Σ|F|² = Σ|E|²),
 * direction-cosine step λ/(N·P), evanescent pixels zero. Time convention exp(−iωt).
 */
import { farField } from './propagation';
import { illuminationAmplitude, incidentPower, type Illumination } from './illumination';
import type { CellGrid, ComplexField, JonesField, JonesVector } from './types';

export interface SimulationOptions {
  grid: CellGrid;
  /** Incident Jones vector (normalized to unit norm here). */
  input: JonesVector;
  /** Default flat. */
  illumination?: Illumination;
  /** Two orthogonal Jones vectors to analyse the output with (e.g. state A and its partner). */
  analyser?: [JonesVector, JonesVector];
}

export interface FieldWithIntensity {
  field: ComplexField;
  intensity: Float64Array;
}

export interface SimulationResult {
  /** Σ a²·|input|² over the cells: the power every efficiency is a fraction of. */
  incidentPower: number;
  nearField: { x: ComplexField; y: ComplexField };
  farField: { x: FieldWithIntensity; y: FieldWithIntensity };
  /** |Fx|² + |Fy|². */
  totalIntensity: Float64Array;
  /** Far field projected on analyser[0] and analyser[1], if given. */
  projections?: [FieldWithIntensity, FieldWithIntensity];
}

/** Jones vector scaled to unit norm; RangeError for a zero vector. Example: [[3,0],[0,4]] → [[0.6,0],[0,0.8]]. */
export function normalizeJones(v: JonesVector): JonesVector {
  const norm = Math.hypot(v[0][0], v[0][1], v[1][0], v[1][1]);
  if (!(norm > 0) || !Number.isFinite(norm)) throw new RangeError('Jones vector must be non-zero and finite');
  return [
    [v[0][0] / norm, v[0][1] / norm],
    [v[1][0] / norm, v[1][1] / norm],
  ];
}

/** Hermitian inner product ⟨a|b⟩ = a_x*·b_x + a_y*·b_y as [re, im]. Example: ⟨x|x⟩ = [1, 0]. */
export function jonesInner(a: JonesVector, b: JonesVector): [number, number] {
  const re = a[0][0] * b[0][0] + a[0][1] * b[0][1] + a[1][0] * b[1][0] + a[1][1] * b[1][1];
  const im = a[0][0] * b[0][1] - a[0][1] * b[0][0] + a[1][0] * b[1][1] - a[1][1] * b[1][0];
  return [re, im];
}

function assertJonesField(jones: JonesField): void {
  const size = jones.n * jones.n;
  for (const part of [jones.xx, jones.xy, jones.yx, jones.yy]) {
    if (part.n !== jones.n || part.re.length !== size || part.im.length !== size) {
      throw new RangeError(`Every Jones component must be ${jones.n}×${jones.n}`);
    }
  }
}

/**
 * Near field per cell: (Ex, Ey) = J·(a·input), input normalized; `amplitude` (N², default 1) is the
 * illumination. Example: J = identity, input x, flat → Ex = 1, Ey = 0 in every cell.
 */
export function applyJones(jones: JonesField, input: JonesVector, amplitude?: Float64Array): { x: ComplexField; y: ComplexField } {
  assertJonesField(jones);
  const n = jones.n;
  const size = n * n;
  if (amplitude && amplitude.length !== size) throw new RangeError(`Illumination must have ${size} values`);
  const [[pRe, pIm], [qRe, qIm]] = normalizeJones(input);
  const x: ComplexField = { n, re: new Float64Array(size), im: new Float64Array(size) };
  const y: ComplexField = { n, re: new Float64Array(size), im: new Float64Array(size) };
  const { xx, xy, yx, yy } = jones;
  for (let i = 0; i < size; i++) {
    const a = amplitude ? amplitude[i] : 1;
    x.re[i] = a * (xx.re[i] * pRe - xx.im[i] * pIm + xy.re[i] * qRe - xy.im[i] * qIm);
    x.im[i] = a * (xx.re[i] * pIm + xx.im[i] * pRe + xy.re[i] * qIm + xy.im[i] * qRe);
    y.re[i] = a * (yx.re[i] * pRe - yx.im[i] * pIm + yy.re[i] * qRe - yy.im[i] * qIm);
    y.im[i] = a * (yx.re[i] * pIm + yx.im[i] * pRe + yy.re[i] * qIm + yy.im[i] * qRe);
  }
  return { x, y };
}

/**
 * Component of the field (Ex, Ey) along the analyser state: ⟨a|E⟩ = a_x*·Ex + a_y*·Ey, a normalized.
 * Example: analyser y on (Ex, Ey) = (1, i) → i.
 */
export function projectField(ex: ComplexField, ey: ComplexField, analyser: JonesVector): ComplexField {
  if (ex.n !== ey.n || ex.re.length !== ey.re.length) throw new RangeError('Field components differ in size');
  const [[aRe, aIm], [bRe, bIm]] = normalizeJones(analyser);
  const size = ex.re.length;
  const out: ComplexField = { n: ex.n, re: new Float64Array(size), im: new Float64Array(size) };
  for (let i = 0; i < size; i++) {
    out.re[i] = aRe * ex.re[i] + aIm * ex.im[i] + bRe * ey.re[i] + bIm * ey.im[i];
    out.im[i] = aRe * ex.im[i] - aIm * ex.re[i] + bRe * ey.im[i] - bIm * ey.re[i];
  }
  return out;
}

function withIntensity(field: ComplexField): FieldWithIntensity {
  const intensity = new Float64Array(field.re.length);
  for (let i = 0; i < intensity.length; i++) intensity[i] = field.re[i] ** 2 + field.im[i] ** 2;
  return { field, intensity };
}

/**
 * Simulates the device under one input state: near field, far field of x and y components, total far-field
 * intensity and (optionally) the far field split on an orthogonal analyser basis. RangeError if the analyser
 * states are not orthogonal (|⟨a|b⟩| > 1e-6 after normalization). Needs `await initFft()` first.
 * Example: identity device, flat, input x → farField.x.intensity = N² at the zero order, total power N².
 */
export function simulateDevice(jones: JonesField, options: SimulationOptions): SimulationResult {
  const { grid } = options;
  if (jones.n !== grid.n) throw new RangeError(`Jones field is ${jones.n}×${jones.n}, grid has N = ${grid.n}`);
  if (options.analyser) {
    const [a, b] = options.analyser.map(normalizeJones);
    const [re, im] = jonesInner(a, b);
    if (Math.hypot(re, im) > 1e-6) throw new RangeError(`Analyser states must be orthogonal, |⟨a|b⟩| = ${Math.hypot(re, im).toExponential(2)}`);
  }
  const amplitude = illuminationAmplitude(grid, options.illumination);
  const near = applyJones(jones, options.input, amplitude);
  const fx = withIntensity(farField(near.x, grid));
  const fy = withIntensity(farField(near.y, grid));
  const totalIntensity = new Float64Array(fx.intensity.length);
  for (let i = 0; i < totalIntensity.length; i++) totalIntensity[i] = fx.intensity[i] + fy.intensity[i];
  const result: SimulationResult = {
    incidentPower: incidentPower(amplitude),
    nearField: near,
    farField: { x: fx, y: fy },
    totalIntensity,
  };
  if (options.analyser) {
    result.projections = [
      withIntensity(projectField(fx.field, fy.field, options.analyser[0])),
      withIntensity(projectField(fx.field, fy.field, options.analyser[1])),
    ];
  }
  return result;
}
