/**
 * Free-space propagation of a field sampled at the cell centres (one complex sample per cell).
 *
 * - Far field (Fraunhofer): 2-D FFT of the cell field, shifted so the zero order is pixel (N/2, N/2),
 *   scaled by 1/N so Σ|F|² = Σ|E|² (power per direction-cosine pixel, in the near field's |E|²·cell units).
 *   Pixel (ix, iy) is the direction (u, v) = ((ix − N/2)·Δu, (iy − N/2)·Δu), Δu = λ/(N·P); pixels with
 *   u² + v² > 1 are evanescent and set to zero. Phases are referenced to the first cell (index 0).
 * - Angular spectrum (Goodman, Introduction to Fourier Optics, 3rd ed., §3.10): E(z) = F⁻¹{F{E(0)}·H},
 *   H = exp(i z √(k² − kx² − ky²)) for propagating waves, exp(−z √(kx² + ky² − k²)) for evanescent ones
 *   (z > 0; for z < 0 evanescent components are dropped instead of amplified). kx = 2π m/(M·P) for the
 *   padded size M. Optional band limit |fx|, |fy| ≤ 1/(λ √((2 Δf z)² + 1)), Δf = 1/(M·P), against aliasing
 *   of the sampled transfer function (Matsushima & Shimobaba, Opt. Express 17, 19662 (2009)).
 *   Zero padding (factor 2, 4 …) keeps light leaving the aperture from wrapping around.
 */
import { assertFftSize, getFft2d } from './fft';
import type { ComplexField, CellGrid } from './types';

const TWO_PI = 2 * Math.PI;

/** Direction-cosine step of the far-field grid, Δu = λ/(N·P). Example: λ = 1 µm, N = 512, P = 0.5 µm → 1/256. */
export function directionCosineStep(grid: CellGrid): number {
  return grid.lambda / (grid.n * grid.period);
}

function assertField(field: ComplexField): void {
  const size = field.n * field.n;
  if (field.re.length !== size || field.im.length !== size) {
    throw new RangeError(`Field planes must hold ${field.n}×${field.n} = ${size} values, got ${field.re.length}/${field.im.length}`);
  }
}

function assertGridMatches(field: ComplexField, grid: CellGrid): void {
  assertField(field);
  if (field.n !== grid.n) throw new RangeError(`Field is ${field.n}×${field.n} but the grid has N = ${grid.n}`);
}

/**
 * Far field of a cell field: centred, unitary (Σ|F|² = Σ|E|² when nothing is evanescent), evanescent pixels
 * zeroed unless `maskEvanescent` is false. Example: a uniform field of amplitude 1 on N = 64 gives F = 64 at
 * pixel (32, 32) and 0 elsewhere.
 */
export function farField(field: ComplexField, grid: CellGrid, options: { maskEvanescent?: boolean } = {}): ComplexField {
  assertGridMatches(field, grid);
  const n = field.n;
  const plan = getFft2d(n);
  plan.load(field.re, field.im);
  plan.forward();
  const data = plan.data;
  const out: ComplexField = { n, re: new Float64Array(n * n), im: new Float64Array(n * n) };
  const half = n / 2;
  const deltaU = directionCosineStep(grid);
  const mask = options.maskEvanescent ?? true;
  const scale = 1 / n;
  for (let ky = 0; ky < n; ky++) {
    const iy = (ky + half) % n;
    const v = (iy - half) * deltaU;
    for (let kx = 0; kx < n; kx++) {
      const ix = (kx + half) % n;
      const u = (ix - half) * deltaU;
      if (mask && u * u + v * v > 1) continue;
      const source = 2 * (ky * n + kx);
      out.re[iy * n + ix] = data[source] * scale;
      out.im[iy * n + ix] = data[source + 1] * scale;
    }
  }
  return out;
}

/** |F|² of `farField` (centred, unitary, evanescent pixels zero). Example: uniform N = 64 field → 4096 at (32, 32). */
export function farFieldIntensity(field: ComplexField, grid: CellGrid): Float64Array {
  return intensityOf(farField(field, grid));
}

/** Pointwise |E|² of a field. Example: E = 3 + 4i → 25. */
export function intensityOf(field: ComplexField): Float64Array {
  assertField(field);
  const out = new Float64Array(field.re.length);
  for (let i = 0; i < out.length; i++) out[i] = field.re[i] * field.re[i] + field.im[i] * field.im[i];
  return out;
}

export interface AngularSpectrumOptions {
  /** Zero-padding factor (power of two, ≥ 1): the field is embedded in an (N·padding)² grid. Default 1. */
  padding?: number;
  /** Matsushima–Shimobaba band limit of the transfer function. Default true. */
  bandLimit?: boolean;
}

/**
 * Angular-spectrum transfer function on an unshifted M×M frequency grid (index ky·M + kx), as float32
 * re/im planes. Symmetric in kx ↔ ky, so it also serves transposed spectra.
 * Example: z = 0 → H = 1 wherever |fx|, |fy| ≤ 1/λ (the band limit at z = 0), 0 beyond.
 */
export function transferFunction(
  m: number,
  period: number,
  lambda: number,
  z: number,
  bandLimit = true,
): { re: Float32Array; im: Float32Array } {
  const re = new Float32Array(m * m);
  const im = new Float32Array(m * m);
  const k = TWO_PI / lambda;
  const deltaF = 1 / (m * period);
  const fLimit = bandLimit ? 1 / (lambda * Math.sqrt((2 * deltaF * z) ** 2 + 1)) : Infinity;
  const grazing = 1e-9 * k * k;
  const kxSquared = new Float64Array(m);
  const inBand = new Uint8Array(m);
  for (let i = 0; i < m; i++) {
    const f = (i < m / 2 ? i : i - m) * deltaF;
    kxSquared[i] = (TWO_PI * f) ** 2;
    inBand[i] = Math.abs(f) <= fLimit ? 1 : 0;
  }
  for (let iy = 0; iy < m; iy++) {
    for (let ix = 0; ix < m; ix++) {
      const index = iy * m + ix;
      if (!inBand[ix] || !inBand[iy]) continue;
      const kzSquared = k * k - kxSquared[ix] - kxSquared[iy];
      // Grazing samples (kz = 0 up to rounding) count as evanescent, so the boundary does not depend on rounding.
      if (kzSquared > grazing) {
        const phase = z * Math.sqrt(kzSquared);
        re[index] = Math.cos(phase);
        im[index] = Math.sin(phase);
      } else if (z >= 0) {
        re[index] = Math.exp(-z * Math.sqrt(Math.max(0, -kzSquared)));
      }
    }
  }
  return { re, im };
}

function paddedSize(n: number, padding: number): number {
  if (!Number.isInteger(padding) || padding < 1 || (padding & (padding - 1)) !== 0) {
    throw new RangeError(`Padding factor must be a power of two ≥ 1, got ${padding}`);
  }
  const m = n * padding;
  assertFftSize(m);
  return m;
}

/**
 * Reusable angular-spectrum propagator of one input field: the (padded) spectrum is computed once,
 * each `propagate(z)` costs one inverse FFT. Output is the central N×N cells (same grid as the input).
 */
export class AngularSpectrumPropagator {
  readonly grid: CellGrid;
  readonly size: number;
  private readonly spectrum: Float32Array;
  private readonly bandLimit: boolean;

  constructor(field: ComplexField, grid: CellGrid, options: AngularSpectrumOptions = {}) {
    assertGridMatches(field, grid);
    this.grid = grid;
    this.bandLimit = options.bandLimit ?? true;
    const n = grid.n;
    const m = paddedSize(n, options.padding ?? 1);
    this.size = m;
    const plan = getFft2d(m);
    const offset = (m - n) / 2;
    // Straight into the plan's buffer, zero-padded: no padded float64 planes (1 GiB at m = 8192).
    const data = plan.data;
    data.fill(0);
    for (let iy = 0; iy < n; iy++) {
      for (let ix = 0, j = 2 * ((iy + offset) * m + offset); ix < n; ix++, j += 2) {
        data[j] = field.re[iy * n + ix];
        data[j + 1] = field.im[iy * n + ix];
      }
    }
    plan.forwardTransposed();
    this.spectrum = plan.data.slice();
  }

  /**
   * Field at distance z (metres, may be negative) on the input's N×N cells.
   * Example: propagate(0) returns the input field (to float32 precision) if it has no content at |fx| or |fy| > 1/λ.
   */
  propagate(z: number): ComplexField {
    const { n, period, lambda } = this.grid;
    const m = this.size;
    const h = transferFunction(m, period, lambda, z, this.bandLimit);
    const plan = getFft2d(m);
    const data = plan.data;
    const s = this.spectrum;
    for (let i = 0, j = 0; i < m * m; i++, j += 2) {
      const a = s[j];
      const b = s[j + 1];
      data[j] = a * h.re[i] - b * h.im[i];
      data[j + 1] = a * h.im[i] + b * h.re[i];
    }
    plan.inverseTransposed();
    const out: ComplexField = { n, re: new Float64Array(n * n), im: new Float64Array(n * n) };
    const offset = (m - n) / 2;
    for (let iy = 0; iy < n; iy++) {
      for (let ix = 0; ix < n; ix++) {
        const source = 2 * ((iy + offset) * m + ix + offset);
        out.re[iy * n + ix] = data[source];
        out.im[iy * n + ix] = data[source + 1];
      }
    }
    return out;
  }

  /**
   * Field at distance z on the line y = `y` (metres from the device centre, like `x`) at arbitrary x (metres),
   * by summing the same angular spectrum directly instead of sampling it on the cells: the band-limited
   * interpolation of `propagate(z)`, fine enough to locate a focal zero that falls between two cells.
   * Example: at the cell centres it returns `propagate(z)`'s values (to float32 precision).
   */
  lineAt(z: number, y: number, x: ArrayLike<number>): { re: Float64Array; im: Float64Array } {
    const { n, period, lambda } = this.grid;
    const m = this.size;
    const h = transferFunction(m, period, lambda, z, this.bandLimit);
    const s = this.spectrum;
    const offset = (m - n) / 2;
    // Padded index 0 sits at this coordinate; the spectrum is referenced to it.
    const origin = (-offset - (n - 1) / 2) * period;
    const frequency = (i: number) => (i < m / 2 ? i : i - m) / (m * period);
    // Sum over fy first (transposed spectrum: (fy index j, fx index i) at i·m + j).
    const rowRe = new Float64Array(m);
    const rowIm = new Float64Array(m);
    const cosY = new Float64Array(m);
    const sinY = new Float64Array(m);
    for (let j = 0; j < m; j++) {
      // The Nyquist row is shared by +f and −f: count it half at each, i.e. its cosine part only.
      const a = TWO_PI * frequency(j) * (y - origin);
      cosY[j] = Math.cos(a);
      sinY[j] = j === m / 2 ? 0 : Math.sin(a);
    }
    for (let i = 0; i < m; i++) {
      let re = 0;
      let im = 0;
      for (let j = 0, q = i * m; j < m; j++, q++) {
        const a = s[2 * q] * h.re[q] - s[2 * q + 1] * h.im[q];
        const b = s[2 * q] * h.im[q] + s[2 * q + 1] * h.re[q];
        re += a * cosY[j] - b * sinY[j];
        im += a * sinY[j] + b * cosY[j];
      }
      rowRe[i] = re;
      rowIm[i] = im;
    }
    const outRe = new Float64Array(x.length);
    const outIm = new Float64Array(x.length);
    const scale = 1 / (m * m);
    for (let p = 0; p < x.length; p++) {
      let re = 0;
      let im = 0;
      for (let i = 0; i < m; i++) {
        const a = TWO_PI * frequency(i) * (x[p] - origin);
        const c = Math.cos(a);
        const sn = i === m / 2 ? 0 : Math.sin(a);
        re += rowRe[i] * c - rowIm[i] * sn;
        im += rowRe[i] * sn + rowIm[i] * c;
      }
      outRe[p] = re * scale;
      outIm[p] = im * scale;
    }
    return { re: outRe, im: outIm };
  }
}

/**
 * Angular-spectrum propagation of a cell field over distance z (metres; Goodman §3.10), same N×N grid out.
 * Example: a plane wave of amplitude 1 propagated by z = λ keeps amplitude 1 (phase k·z = 2π).
 */
export function angularSpectrumPropagate(field: ComplexField, grid: CellGrid, z: number, options: AngularSpectrumOptions = {}): ComplexField {
  return new AngularSpectrumPropagator(field, grid, options).propagate(z);
}

export interface XzSlice {
  /** Cell x coordinates, metres (length N). */
  x: Float64Array;
  /** Propagation distances, metres. */
  z: Float64Array;
  /** Intensity |E|² at y = 0, one row of N values per z (row-major z × x). */
  intensity: Float64Array;
  /** Intensity on the axis (x = y = 0) per z. */
  onAxis: Float64Array;
}

/**
 * Intensity in the x–z plane through the axis for a list of distances. For even N no cell row lies at
 * y = 0: the slice is the mean of the rows at y = ±P/2, and `onAxis` the mean of the four cells around the
 * axis. Example: a plane wave gives intensity 1 everywhere in the slice.
 */
export function xzSlice(field: ComplexField, grid: CellGrid, zList: ArrayLike<number>, options: AngularSpectrumOptions = {}): XzSlice {
  const n = grid.n;
  const propagator = new AngularSpectrumPropagator(field, grid, options);
  const rows = n % 2 === 0 ? [n / 2 - 1, n / 2] : [(n - 1) / 2];
  const columns = rows;
  const intensity = new Float64Array(zList.length * n);
  const onAxis = new Float64Array(zList.length);
  for (let iz = 0; iz < zList.length; iz++) {
    const e = propagator.propagate(zList[iz]);
    for (const iy of rows) {
      for (let ix = 0; ix < n; ix++) {
        const i = iy * n + ix;
        intensity[iz * n + ix] += (e.re[i] * e.re[i] + e.im[i] * e.im[i]) / rows.length;
      }
    }
    let axis = 0;
    for (const iy of rows) {
      for (const ix of columns) axis += e.re[iy * n + ix] ** 2 + e.im[iy * n + ix] ** 2;
    }
    onAxis[iz] = axis / (rows.length * columns.length);
  }
  const x = new Float64Array(n);
  for (let i = 0; i < n; i++) x[i] = (i - (n - 1) / 2) * grid.period;
  return { x, z: Float64Array.from(zList), intensity, onAxis };
}

export interface RadialProfile {
  /** Mean radius of the samples in each bin, metres. */
  radius: Float64Array;
  /** Mean intensity of the samples in each bin. */
  value: Float64Array;
  /** Number of samples per bin. */
  count: Uint32Array;
}

export interface RadialProfileOptions {
  /** Centre relative to the optical axis, metres (default 0, 0). */
  centerX?: number;
  centerY?: number;
  /** Bin width, metres (default P/2). */
  binWidth?: number;
  /** Largest radius, metres (default N·P/2). */
  maxRadius?: number;
}

/**
 * Azimuthally averaged profile of an N×N map sampled at the cell centres (pitch `period`) about a centre.
 * Empty bins are left out, and each bin reports the mean radius of its samples (not the bin centre).
 * Example: a map equal to r² gives value ≈ radius² in every bin.
 */
export function radialProfile(map: Float64Array, n: number, period: number, options: RadialProfileOptions = {}): RadialProfile {
  if (map.length !== n * n) throw new RangeError(`Map has ${map.length} values, expected ${n}×${n}`);
  const cx = options.centerX ?? 0;
  const cy = options.centerY ?? 0;
  const binWidth = options.binWidth ?? period / 2;
  const maxRadius = options.maxRadius ?? (n * period) / 2;
  if (!(binWidth > 0) || !(maxRadius > 0)) throw new RangeError('binWidth and maxRadius must be positive');
  const bins = Math.ceil(maxRadius / binWidth);
  const sumR = new Float64Array(bins);
  const sumV = new Float64Array(bins);
  const count = new Uint32Array(bins);
  for (let iy = 0; iy < n; iy++) {
    const dy = (iy - (n - 1) / 2) * period - cy;
    for (let ix = 0; ix < n; ix++) {
      const dx = (ix - (n - 1) / 2) * period - cx;
      const r = Math.sqrt(dx * dx + dy * dy);
      const b = Math.floor(r / binWidth);
      if (b >= bins) continue;
      sumR[b] += r;
      sumV[b] += map[iy * n + ix];
      count[b]++;
    }
  }
  let used = 0;
  for (let b = 0; b < bins; b++) if (count[b] > 0) used++;
  const radius = new Float64Array(used);
  const value = new Float64Array(used);
  const counts = new Uint32Array(used);
  for (let b = 0, j = 0; b < bins; b++) {
    if (count[b] === 0) continue;
    radius[j] = sumR[b] / count[b];
    value[j] = sumV[b] / count[b];
    counts[j] = count[b];
    j++;
  }
  return { radius, value, count: counts };
}
