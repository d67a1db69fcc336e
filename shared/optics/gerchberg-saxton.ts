/**
 * Phase retrieval of an image hologram: find a phase-only device (amplitude fixed by the illumination)
 * whose image-plane amplitude matches a target (target.ts).
 *
 * Algorithms, all alternating between device plane and image plane with a float32 FFT (fft.ts):
 * - 'gs': Gerchberg–Saxton error reduction (Gerchberg & Saxton, Optik 35, 237 (1972)): image-plane modulus
 *   replaced by the target everywhere (zero outside the window), device modulus by the illumination.
 * - 'weighted-gs': weighted GS (Di Leonardo, Ianni & Ruocco, Opt. Express 15, 1913 (2007)): inside the
 *   window the target is multiplied by weights w ← w·⟨|G|/T⟩/(|G|/T), the mean taken over the bright
 *   window pixels of the previous iteration (first iteration: w = 1).
 * - 'mraf': mixed-region amplitude freedom (Pasienski & DeMarco, Opt. Express 16, 2176 (2008)):
 *   G' = m·T·G/|G| in the signal region (the window), (1 − m)·G in the rest of the propagating region.
 *
 * Geometry: 'fourier' — image plane = far field, G = FFT of the device field; 'fresnel' — image plane at
 * distance z, G = angular-spectrum propagation (propagation.ts, band-limited) of the device field, on a grid
 * zero-padded by `padding` (the device in its centre, zero around it) so light leaving the aperture is not
 * folded back in — the same propagation the run's simulation of the image plane uses.
 * Evanescent far-field pixels are always set to zero. Target values outside the window are ignored (target.ts
 * keeps them zero).
 *
 * Work saved without changing the result: for 'gs' and 'weighted-gs' in the Fourier geometry every spectrum
 * column (kx) without window pixels is zeroed by the constraint, so the FFT plan skips those columns
 * (`cycle`'s spectrumRows) and their power enters the Fourier error through Parseval: it is the incident power
 * minus the power of the columns computed, since the device field entering each FFT has modulus a exactly.
 *
 * Scaling: the target is scaled so that Σ T² equals the incident power Σ a² (Parseval, unitary transform).
 * Errors recorded per iteration k, all from the image-plane field G_k before its modulus is replaced:
 * - fourierError  E_k = √(Σ_all (|G_k| − T)² / Σ T²), the full-plane Fourier-domain error of Fienup
 *   (Appl. Opt. 21, 2758 (1982), eq. 15 normalized); non-increasing for 'gs' (error-reduction property).
 * - windowError   ε_k = √(min_α Σ_win (α|G_k| − T)² / Σ_win T²), RMS amplitude error inside the window
 *   after the best overall scale α (insensitive to efficiency).
 * - windowEfficiency η_k = Σ_win |G_k|² / Σ a², fraction of incident power in the window.
 */
import { float64Array, type ArrayMemory } from './arrays';
import { allocateKernelArray, fftKernels, getFft2d, type Fft2d, type FftKernels, type RowOperation, type RowSpans } from './fft';
import { illuminationAmplitude, incidentPower, type Illumination } from './illumination';
import { transferFunction } from './propagation';
import { mulberry32Fill } from './random';
import type { PixelWindow, TargetPlane } from './target';
import type { CancelSignal, CellGrid, ProgressCallback } from './types';

export type RetrievalAlgorithm = 'gs' | 'weighted-gs' | 'mraf';

export interface RetrievalOptions {
  grid: CellGrid;
  /** Target amplitude in the centred image-plane layout (target.ts); its geometry selects Fourier or Fresnel. */
  target: TargetPlane;
  /** Default 'gs'. */
  algorithm?: RetrievalAlgorithm;
  /** Number of iterations (≥ 1). Default 50. */
  iterations?: number;
  /** Seed of the uniform random start phase (mulberry32). Default 1. */
  seed?: number;
  /** Start phase (radians, N×N) instead of a random one. */
  initialPhase?: ArrayLike<number>;
  /** MRAF mixing parameter m in (0, 1]. Default 0.5. */
  mixing?: number;
  /** Default flat. */
  illumination?: Illumination;
  /** Image distance z in metres, required for the Fresnel geometry. */
  fresnelDistance?: number;
  /** Fresnel geometry: zero-padding factor of the propagation grid (1 or 2; a power of two). Default 1. */
  padding?: number;
  onProgress?: ProgressCallback;
  signal?: CancelSignal;
  /** Where the result phase is allocated (arrays.ts); default 'private'. */
  memory?: ArrayMemory;
}

export interface RetrievalResult {
  /** Retrieved device phase, radians in (−π, π], N×N row-major on the cell grid. */
  phase: Float64Array;
  fourierError: Float64Array;
  windowError: Float64Array;
  windowEfficiency: Float64Array;
  iterations: number;
}

/** Image-plane codes below zero (a code ≥ 0 is a window pixel's target amplitude): kept ×(1 − m) by MRAF, or dropped. */
const NOISE_CODE = -1;
const EVANESCENT_CODE = -2;

/** Slots of one iteration's sums (the order kernels.wat's imagePlane adds them in). */
const ACC_FIENUP = 0;
const ACC_GT = 1;
const ACC_GG = 2;
const ACC_TT = 3;
const ACC_RATIO = 4;
const ACC_BRIGHT = 5;
/** Σ |G|² over every spectrum pixel the plan computed. */
const ACC_COMPUTED = 6;
const SUM_SLOTS = 8;

/**
 * Runs GS / weighted GS / MRAF and returns the device phase with the per-iteration error history.
 * Needs `await initFft()` in this thread first. Cancellation is checked and progress reported between
 * iterations. Example: a Fourier target of one bright pixel 8 px right of the zero order → after the first
 * iteration the phase is the matching tilt, and windowEfficiency[1] ≈ 1.
 */
export function retrievePhase(options: RetrievalOptions): RetrievalResult {
  const { grid, target } = options;
  const n = grid.n;
  if (target.n !== n || target.amplitude.length !== n * n) throw new RangeError(`Target is ${target.n}×${target.n}, grid has N = ${n}`);
  const algorithm = options.algorithm ?? 'gs';
  const iterations = options.iterations ?? 50;
  if (!Number.isInteger(iterations) || iterations < 1) throw new RangeError(`Iterations must be a positive integer, got ${iterations}`);
  const mixing = options.mixing ?? 0.5;
  if (algorithm === 'mraf' && !(mixing > 0 && mixing <= 1)) throw new RangeError(`MRAF mixing m must lie in (0, 1], got ${mixing}`);
  const fresnel = target.geometry === 'fresnel';
  const z = options.fresnelDistance;
  if (fresnel && !(z !== undefined && Number.isFinite(z) && z > 0)) throw new RangeError('Fresnel geometry needs a positive fresnelDistance (metres)');

  const padding = fresnel ? (options.padding ?? 1) : 1;
  if (!Number.isInteger(padding) || padding < 1 || (padding & (padding - 1)) !== 0) throw new RangeError(`Padding factor must be a power of two ≥ 1, got ${padding}`);
  // The plan's grid: m = n·padding, the device and the target plane in its centre (offset o).
  const m = n * padding;
  const o = (m - n) / 2;
  const plan = getFft2d(m);
  const fourierError = new Float64Array(iterations);
  const windowError = new Float64Array(iterations);
  const windowEfficiency = new Float64Array(iterations);

  // Working arrays. With the SIMD kernels they live in the FFT backend's memory, where the kernels reach them by
  // pointer beside the plan's buffer, and where memory freed by one retrieval is reused by the next one already
  // paged in (a first touch of fresh memory costs ≈ 13 µs per 4 KiB page on the build machine); views are taken
  // after the last allocation. Otherwise plain arrays.
  const count = m * m;
  const kernels = fftKernels();
  const held = kernels
    ? {
        illumination: allocateKernelArray(8 * n * n),
        amplitudes: allocateKernelArray(4 * count),
        codes: allocateKernelArray(4 * count),
        weights: algorithm === 'weighted-gs' ? allocateKernelArray(4 * count) : null,
        transfer: fresnel ? allocateKernelArray(8 * count) : null,
        sums: allocateKernelArray(8 * SUM_SLOTS),
      }
    : null;
  try {
    const illumination = illuminationAmplitude(grid, options.illumination, held?.illumination.float64());
    const power = incidentPower(illumination);
    const deviceAmplitude = held ? held.amplitudes.float32().fill(0) : new Float32Array(count);
    for (let y = 0; y < n; y++) deviceAmplitude.set(illumination.subarray(y * n, y * n + n), (y + o) * m + o);
    // A plain loop: `every` would box each value for its callback (16 MB of garbage at 1024²).
    let uniform = true;
    for (let i = 1; i < count && uniform; i++) uniform = deviceAmplitude[i] === deviceAmplitude[0];

    // Image-plane codes in the layout the plan presents them (Fourier geometry: transposed and unshifted spectrum,
    // each row in the plan's spectrum order; Fresnel: normal centred rows of the image plane): target amplitude ≥ 0
    // in the window, NOISE_CODE in the rest of the propagating region, EVANESCENT_CODE where the field is dropped.
    const order = plan.spectrumOrder();
    const codes = held ? held.codes.float32() : new Float32Array(count);
    const { x0, y0, width, height } = target.window;
    let targetPower = 0;
    for (let iy = y0; iy < y0 + height; iy++) {
      for (let ix = x0; ix < x0 + width; ix++) targetPower += target.amplitude[iy * n + ix] ** 2;
    }
    if (!(targetPower > 0)) throw new RangeError('Target is dark: no pixel of the window has a positive value');
    // Fourier: FFT units (unscaled transform, Σ|G|² = N²·Σ a²); Fresnel: the propagated field is unitary.
    const scale = Math.sqrt(power / targetPower) * (fresnel ? 1 : n);
    const half = n / 2;
    const deltaU = grid.lambda / (n * grid.period);
    for (let r = 0; r < m; r++) {
      for (let q = 0; q < m; q++) {
        const j = order && !fresnel ? order[q] : q;
        const ix = fresnel ? j - o : (r + half) % n;
        const iy = fresnel ? r - o : (j + half) % n;
        const u = (ix - half) * deltaU;
        const v = (iy - half) * deltaU;
        const inWindow = ix >= x0 && ix < x0 + width && iy >= y0 && iy < y0 + height;
        codes[r * m + q] = inWindow ? target.amplitude[iy * n + ix] * scale : !fresnel && u * u + v * v > 1 ? EVANESCENT_CODE : NOISE_CODE;
      }
    }
    const weights = algorithm === 'weighted-gs' ? (held ? held.weights!.float32() : new Float32Array(count)).fill(1) : null;
    let transfer: Float32Array | null = null;
    if (fresnel) {
      // H/M²: the transfer function with the inverse FFT's scaling folded in, interleaved (re, im), or in the plan's
      // spectrum order (groups of four real parts, then four imaginary parts) when it has one.
      const h = transferFunction(m, grid.period, grid.lambda, z as number, true);
      const norm = 1 / count;
      transfer = held ? held.transfer!.float32() : new Float32Array(2 * count);
      for (let r = 0; r < m; r++) {
        for (let q = 0; q < m; q++) {
          const i = r * m + (order ? order[q] : q);
          const re = order ? 2 * r * m + 8 * (q >> 2) + (q & 3) : 2 * (r * m + q);
          transfer[re] = h.re[i] * norm;
          transfer[re + (order ? 4 : 1)] = h.im[i] * norm;
        }
      }
    }
    let sumsView = held ? held.sums.float64().fill(0) : new Float64Array(SUM_SLOTS);
    // A view of the backend's memory is detached when the memory grows (the plan's column buffer, first cycle).
    const sums = () => (sumsView.buffer.byteLength > 0 ? sumsView : (sumsView = held!.sums.float64()));
    let previousMeanRatio = 0;
    const constraint = { algorithm, mixing, meanRatio: () => previousMeanRatio };
    const spectrumRows = !fresnel && algorithm !== 'mraf' ? windowSpectrumRows(target.window, n) : null;

    let imagePlaneOp: RowOperation;
    let deviceOp: RowOperation;
    let forwardOp: RowOperation | null = null;
    let backwardOp: RowOperation | null = null;
    if (kernels && held) {
      imagePlaneOp = kernelImagePlaneOp(kernels, m, held.codes.pointer, held.weights?.pointer ?? 0, held.sums.pointer, constraint, !fresnel && order !== null);
      deviceOp = kernelDeviceOp(kernels, m, uniform ? null : held.amplitudes.pointer, deviceAmplitude[0]);
      if (held.transfer) {
        const h = held.transfer.pointer;
        const multiply = order ? kernels.multiplyComplexSplit : kernels.multiplyComplex;
        forwardOp = (data, offset, row) => multiply(data.byteOffset + 4 * offset, m, h + 8 * m * row, 0);
        backwardOp = (data, offset, row) => multiply(data.byteOffset + 4 * offset, m, h + 8 * m * row, 1);
      }
    } else {
      imagePlaneOp = makeImagePlaneOp(m, codes, weights, sumsView, constraint);
      deviceOp = makeDeviceOp(m, deviceAmplitude, uniform);
      if (transfer) {
        const h = transfer;
        forwardOp = (data, offset, row) => multiplyRow(data, offset, h, row * m, m, 1);
        backwardOp = (data, offset, row) => multiplyRow(data, offset, h, row * m, m, -1);
      }
    }

    loadStartField(plan, n, o, deviceAmplitude, options.initialPhase, options.seed ?? 1);
    const fftUnits = fresnel ? 1 : n * n;
    for (let k = 0; k < iterations; k++) {
      options.signal?.throwIfAborted();
      sums().fill(0);
      const last = k === iterations - 1;
      if (fresnel) {
        plan.cycle(forwardOp, imagePlaneOp, true);
        plan.cycle(backwardOp, deviceOp, !last);
      } else {
        plan.cycle(imagePlaneOp, deviceOp, !last, spectrumRows);
      }
      const acc = sums();
      const skipped = spectrumRows ? Math.max(0, power * fftUnits - acc[ACC_COMPUTED]) : 0;
      fourierError[k] = Math.sqrt((acc[ACC_FIENUP] + skipped) / (power * fftUnits));
      const tt = acc[ACC_TT];
      const gg = acc[ACC_GG];
      const residual = gg > 0 ? Math.max(0, tt - (acc[ACC_GT] * acc[ACC_GT]) / gg) : tt;
      windowError[k] = tt > 0 ? Math.sqrt(residual / tt) : 0;
      windowEfficiency[k] = gg / (power * fftUnits);
      previousMeanRatio = acc[ACC_BRIGHT] > 0 ? acc[ACC_RATIO] / acc[ACC_BRIGHT] : 0;
      options.onProgress?.((k + 1) / iterations, 'phase retrieval', {
        iteration: k + 1,
        fourierError: fourierError[k],
        windowError: windowError[k],
        windowEfficiency: windowEfficiency[k],
      });
    }
  } catch (error) {
    // Leaves the shared plan usable (a cycle may have been left half-way).
    plan.load(new Float32Array(count));
    throw error;
  } finally {
    if (held) for (const array of Object.values(held)) array?.free();
  }

  const data = plan.data;
  const phase = float64Array(n * n, options.memory);
  for (let y = 0; y < n; y++) {
    for (let x = 0; x < n; x++) {
      const q = 2 * ((y + o) * m + x + o);
      const angle = Math.atan2(data[q + 1], data[q]);
      phase[y * n + x] = angle === -Math.PI ? Math.PI : angle;
    }
  }
  return { phase, fourierError, windowError, windowEfficiency, iterations };
}

/**
 * The start field in the plan's buffer: amplitude a·e^{iφ} on the n×n device at offset o of the plan's grid
 * (zero around it), φ given or uniform random (mulberry32, cell order y·n + x).
 */
function loadStartField(plan: Fft2d, n: number, o: number, amplitude: Float32Array, initialPhase: ArrayLike<number> | undefined, seed: number): void {
  if (initialPhase && initialPhase.length !== n * n) throw new RangeError(`Initial phase must have ${n * n} values, got ${initialPhase.length}`);
  const state = Uint32Array.of(seed);
  const draws = new Float64Array(n);
  const m = plan.n;
  plan.load(amplitude);
  const data = plan.data;
  for (let y = 0; y < n; y++) {
    if (!initialPhase) mulberry32Fill(state, draws);
    for (let x = 0; x < n; x++) {
      const phi = initialPhase ? initialPhase[y * n + x] : 2 * Math.PI * draws[x] - Math.PI;
      const q = (y + o) * m + x + o;
      const a = amplitude[q];
      data[2 * q] = a * Math.cos(phi);
      data[2 * q + 1] = a * Math.sin(phi);
    }
  }
}

/**
 * Spectrum rows of the plan's transposed layout (kx indices, unshifted) that hold the window's columns, as
 * row spans. Example (n = 8, window columns x0 = 5, width 2 → ix 5, 6): kx 1, 2 → [1, 3].
 */
export function windowSpectrumRows(window: PixelWindow, n: number): RowSpans {
  const half = n / 2;
  const rows = Array.from({ length: window.width }, (_, i) => (window.x0 + i + half) % n).sort((a, b) => a - b);
  const spans: number[] = [];
  for (const row of rows) {
    if (spans.length > 0 && spans[spans.length - 1] === row) spans[spans.length - 1] = row + 1;
    else spans.push(row, row + 1);
  }
  return spans;
}

/** What the image-plane constraint needs besides the arrays: the algorithm, MRAF's m, weighted GS's ⟨|G|/T⟩. */
interface Constraint {
  algorithm: RetrievalAlgorithm;
  mixing: number;
  /** Mean |G|/T over the bright window pixels of the previous iteration (0 in the first). */
  meanRatio: () => number;
}

/**
 * The image-plane constraint and its sums on the SIMD kernel, in place on the row the plan hands over; `split`:
 * the row is in the plan's spectrum order (fft.ts `spectrumOrder`).
 */
function kernelImagePlaneOp(kernels: FftKernels, n: number, codes: number, weights: number, sums: number, constraint: Constraint, split: boolean): RowOperation {
  const mix = constraint.algorithm === 'mraf' ? constraint.mixing : 1;
  const keep = constraint.algorithm === 'mraf' ? 1 - constraint.mixing : 0;
  const kernel = split ? kernels.imagePlaneSplit : kernels.imagePlane;
  return (data, offset, row) => kernel(data.byteOffset + 4 * offset, n, codes + 4 * n * row, weights && weights + 4 * n * row, mix, keep, constraint.meanRatio(), sums);
}

/** The device-plane constraint on the SIMD kernel: one amplitude for all cells, or one per cell (`amplitudes`). */
function kernelDeviceOp(kernels: FftKernels, n: number, amplitudes: number | null, uniformAmplitude: number): RowOperation {
  // The plan's buffers live in the backend's memory: a view's byteOffset is the kernel's pointer.
  if (amplitudes === null) return (data, offset) => kernels.normalizeUniform(data.byteOffset + 4 * offset, n, uniformAmplitude);
  return (data, offset, row) => kernels.normalize(data.byteOffset + 4 * offset, n, amplitudes + 4 * n * row);
}

/** Device-plane modulus constraint without the kernels: every field value gets the illumination amplitude, its phase kept. */
function makeDeviceOp(n: number, amplitude: Float32Array, uniform: boolean): RowOperation {
  const a0 = amplitude[0];
  return (data, offset, row) => {
    const base = row * n;
    for (let j = 0; j < n; j++) {
      const q = offset + 2 * j;
      const re = data[q];
      const im = data[q + 1];
      const a = uniform ? a0 : amplitude[base + j];
      const magnitude2 = re * re + im * im;
      if (magnitude2 > 0) {
        const s = a / Math.sqrt(magnitude2);
        data[q] = re * s;
        data[q + 1] = im * s;
      } else {
        data[q] = a;
        data[q + 1] = 0;
      }
    }
  };
}

/** data[row] ← data[row]·h (sign 1) or ·h* (sign −1), h interleaved complex from index `base`. */
function multiplyRow(data: Float32Array, offset: number, h: Float32Array, base: number, n: number, sign: number): void {
  for (let j = 0; j < n; j++) {
    const q = offset + 2 * j;
    const a = data[q];
    const b = data[q + 1];
    const c = h[2 * (base + j)];
    const d = h[2 * (base + j) + 1] * sign;
    data[q] = a * c - b * d;
    data[q + 1] = a * d + b * c;
  }
}

/** Image-plane modulus constraint of each algorithm without the kernels, also adding the iteration's sums to `acc`. */
function makeImagePlaneOp(n: number, codes: Float32Array, weights: Float32Array | null, acc: Float64Array, constraint: Constraint): RowOperation {
  const mraf = constraint.algorithm === 'mraf';
  const mixing = constraint.mixing;
  const keep = mraf ? 1 - mixing : 0;
  return (data, offset, row) => {
    const base = row * n;
    const meanRatio = constraint.meanRatio();
    let fienup = 0;
    let computed = 0;
    let gt = 0;
    let gg = 0;
    let tt = 0;
    let ratioSum = 0;
    let bright = 0;
    for (let j = 0; j < n; j++) {
      const q = offset + 2 * j;
      const re = data[q];
      const im = data[q + 1];
      const index = base + j;
      const power = re * re + im * im;
      computed += power;
      const t = codes[index];
      if (t < 0) {
        // Outside the window the target is zero: (|G| − 0)².
        fienup += power;
        const factor = t === NOISE_CODE ? keep : 0;
        data[q] = re * factor;
        data[q + 1] = im * factor;
        continue;
      }
      const magnitude = Math.sqrt(power);
      const difference = magnitude - t;
      fienup += difference * difference;
      gt += magnitude * t;
      gg += power;
      tt += t * t;
      let amplitude = t;
      if (weights) {
        if (t > 0 && magnitude > 0) {
          const ratio = magnitude / t;
          ratioSum += ratio;
          bright++;
          if (meanRatio > 0) weights[index] *= meanRatio / ratio;
        }
        amplitude = t * weights[index];
      } else if (mraf) {
        amplitude = mixing * t;
      }
      if (magnitude > 0) {
        const s = amplitude / magnitude;
        data[q] = re * s;
        data[q + 1] = im * s;
      } else {
        data[q] = amplitude;
        data[q + 1] = 0;
      }
    }
    acc[ACC_FIENUP] += fienup;
    acc[ACC_COMPUTED] += computed;
    acc[ACC_GT] += gt;
    acc[ACC_GG] += gg;
    acc[ACC_TT] += tt;
    acc[ACC_RATIO] += ratioSum;
    acc[ACC_BRIGHT] += bright;
  };
}
