/**
 * Far-field preview of a realized device under one input state, computed lean enough for 2048² designs.
 *
 * Physics (the same as atoms.ts `realizeDevice` followed by simulate.ts `simulateDevice`, which the unit
 * tests compare it with): the cell of atom j (transmissions A = tx e^{iαx}, B = ty e^{iαy}) placed at
 * rotation θ has the Jones matrix R(θ)·diag(A, B)·R(θ)ᵀ = S·I + D·M(2θ), S = (A + B)/2, D = (A − B)/2,
 * M(2θ) = [[cos2θ, sin2θ], [sin2θ, −cos2θ]]. The near field E = J·(a·input) (a: illumination amplitude,
 * input of unit norm) is projected on an orthonormal analyser basis (k0, k1): P_k = ⟨k|E⟩ = k_x*·Ex + k_y*·Ey.
 * Far fields follow propagation.ts: F = FFT/N, fftshifted (zero order at (N/2, N/2)), evanescent pixels
 * (u² + v² > 1, u = (ix − N/2)·λ/(N·P)) set to zero, unitary. The x and y components are rebuilt from the
 * two projections, E = k0·P0 + k1·P1, so each input costs two FFTs.
 *
 * Memory: no Jones field and no float64 near field are stored; the two projections go straight into the
 * FFT buffer and one reusable float32 scratch buffer.
 */
import { float32Array, type ArrayMemory } from './arrays';
import type { AtomLibrary } from './atoms';
import { getFft2d } from './fft';
import { directionCosineStep } from './propagation';
import { jonesInner, normalizeJones } from './simulate';
import type { CellGrid, JonesVector } from './types';

/** The mapped layout: chosen atom and placement rotation θ (radians) per cell. */
export interface PlacedAtoms {
  atomIndex: Int32Array;
  theta: Float64Array;
  library: AtomLibrary;
}

/** Far-field intensities under one input, float32, centred (zero order at (N/2, N/2)), unitary. */
export interface FarFieldSet {
  input: JonesVector;
  /** Σ a²·|input|²: the power the efficiencies refer to. */
  incidentPower: number;
  /** |Fx|² + |Fy|² (= analyserA + analyserB). */
  total: Float32Array;
  /** Component along the first analyser state (λA*, where J sends input A). */
  analyserA: Float32Array;
  /** Component along the second analyser state (λB*, where J sends input B). */
  analyserB: Float32Array;
  x: Float32Array;
  y: Float32Array;
}

/** A complex cell field in float32 planes. */
export interface Field32 {
  n: number;
  re: Float32Array;
  im: Float32Array;
}

/** Reusable float32 buffers of one grid size (2·N² floats each). */
export interface PreviewScratch {
  n: number;
  second: Float32Array;
  spectrum: Float32Array;
}

/** Allocates the scratch buffers once per run. Example: createPreviewScratch(64).second.length → 8192. */
export function createPreviewScratch(n: number): PreviewScratch {
  return { n, second: new Float32Array(2 * n * n), spectrum: new Float32Array(2 * n * n) };
}

/** Per atom: S = (A + B)/2 and D = (A − B)/2 as re/im arrays. */
function halfSums(library: AtomLibrary) {
  const k = library.atoms.length;
  const sRe = new Float64Array(k);
  const sIm = new Float64Array(k);
  const dRe = new Float64Array(k);
  const dIm = new Float64Array(k);
  library.atoms.forEach((atom, j) => {
    const aRe = atom.tx * Math.cos(atom.alphaX);
    const aIm = atom.tx * Math.sin(atom.alphaX);
    const bRe = atom.ty * Math.cos(atom.alphaY);
    const bIm = atom.ty * Math.sin(atom.alphaY);
    sRe[j] = (aRe + bRe) / 2;
    sIm[j] = (aIm + bIm) / 2;
    dRe[j] = (aRe - bRe) / 2;
    dIm[j] = (aIm - bIm) / 2;
  });
  return { sRe, sIm, dRe, dIm };
}

export interface DevicePreviewOptions {
  grid: CellGrid;
  /** Illumination amplitude per cell; null: 1 everywhere. */
  amplitude: Float64Array | null;
  input: JonesVector;
  /** Orthonormal analyser states (k0, k1). */
  analyser: [JonesVector, JonesVector];
  scratch: PreviewScratch;
  /** Which projected near fields [P0, P1] to return as well (float32); default neither. */
  keepNearFields?: [boolean, boolean];
  /** Where the far-field maps are allocated (arrays.ts); default 'private'. */
  memory?: ArrayMemory;
}

/**
 * Far fields of the realized device under one input (module comment). Needs `await initFft()`.
 * Example: a device of one lossless atom A = 1, B = −1 (half-wave plate) at θ = 0 under left-circular input
 * sends all power to the right-circular analyser, at the zero order.
 */
export function previewDevice(device: PlacedAtoms, options: DevicePreviewOptions): { farField: FarFieldSet; nearFields: [Field32 | null, Field32 | null] } {
  const { grid, amplitude, scratch } = options;
  const n = grid.n;
  const count = n * n;
  const { atomIndex, theta, library } = device;
  if (atomIndex.length !== count || theta.length !== count) throw new RangeError(`The layout must hold ${n}×${n} cells`);
  if (scratch.n !== n) throw new RangeError(`Scratch buffers are for N = ${scratch.n}, the grid has N = ${n}`);
  if (amplitude && amplitude.length !== count) throw new RangeError(`Illumination must hold ${count} values`);
  const { sRe, sIm, dRe, dIm } = halfSums(library);
  const k = library.atoms.length;
  const [[pRe, pIm], [qRe, qIm]] = normalizeJones(options.input);
  const k0 = normalizeJones(options.analyser[0]);
  const k1 = normalizeJones(options.analyser[1]);
  // Conjugated analyser components for P = k*·E.
  const [a0xRe, a0xIm, a0yRe, a0yIm] = [k0[0][0], -k0[0][1], k0[1][0], -k0[1][1]];
  const [a1xRe, a1xIm, a1yRe, a1yIm] = [k1[0][0], -k1[0][1], k1[1][0], -k1[1][1]];
  const [inner, innerIm] = jonesInner(k0, k1);
  if (Math.hypot(inner, innerIm) > 1e-6) throw new RangeError('Analyser states must be orthogonal');
  const field32 = (wanted: boolean | undefined): Field32 | null => (wanted ? { n, re: new Float32Array(count), im: new Float32Array(count) } : null);
  const near0 = field32(options.keepNearFields?.[0]);
  const near1 = field32(options.keepNearFields?.[1]);

  const plan = getFft2d(n);
  const first = plan.data;
  const second = scratch.second;
  let power = 0;
  for (let i = 0; i < count; i++) {
    const j = atomIndex[i];
    if (!(j >= 0 && j < k)) throw new RangeError(`Cell ${i} refers to atom ${j}, the library has ${k}`);
    const a = amplitude ? amplitude[i] : 1;
    power += a * a;
    const c2 = Math.cos(2 * theta[i]);
    const s2 = Math.sin(2 * theta[i]);
    // M·input = (c2 p + s2 q, s2 p − c2 q)
    const mxRe = c2 * pRe + s2 * qRe;
    const mxIm = c2 * pIm + s2 * qIm;
    const myRe = s2 * pRe - c2 * qRe;
    const myIm = s2 * pIm - c2 * qIm;
    const exRe = a * (sRe[j] * pRe - sIm[j] * pIm + dRe[j] * mxRe - dIm[j] * mxIm);
    const exIm = a * (sRe[j] * pIm + sIm[j] * pRe + dRe[j] * mxIm + dIm[j] * mxRe);
    const eyRe = a * (sRe[j] * qRe - sIm[j] * qIm + dRe[j] * myRe - dIm[j] * myIm);
    const eyIm = a * (sRe[j] * qIm + sIm[j] * qRe + dRe[j] * myIm + dIm[j] * myRe);
    const p0Re = a0xRe * exRe - a0xIm * exIm + a0yRe * eyRe - a0yIm * eyIm;
    const p0Im = a0xRe * exIm + a0xIm * exRe + a0yRe * eyIm + a0yIm * eyRe;
    const p1Re = a1xRe * exRe - a1xIm * exIm + a1yRe * eyRe - a1yIm * eyIm;
    const p1Im = a1xRe * exIm + a1xIm * exRe + a1yRe * eyIm + a1yIm * eyRe;
    first[2 * i] = p0Re;
    first[2 * i + 1] = p0Im;
    second[2 * i] = p1Re;
    second[2 * i + 1] = p1Im;
    if (near0) {
      near0.re[i] = p0Re;
      near0.im[i] = p0Im;
    }
    if (near1) {
      near1.re[i] = p1Re;
      near1.im[i] = p1Im;
    }
  }

  // F0: forward, then shifted, masked and scaled into the scratch spectrum.
  plan.forward();
  const half = n / 2;
  const deltaU = directionCosineStep(grid);
  const scale = 1 / n;
  const spectrum = scratch.spectrum;
  let data = plan.data;
  for (let iy = 0; iy < n; iy++) {
    const ky = (iy + half) % n;
    const v = (iy - half) * deltaU;
    for (let ix = 0; ix < n; ix++) {
      const u = (ix - half) * deltaU;
      const out = 2 * (iy * n + ix);
      if (u * u + v * v > 1) {
        spectrum[out] = 0;
        spectrum[out + 1] = 0;
        continue;
      }
      const source = 2 * (ky * n + ((ix + half) % n));
      spectrum[out] = data[source] * scale;
      spectrum[out + 1] = data[source + 1] * scale;
    }
  }
  // F1 in the FFT buffer; then both projections and the rebuilt x, y components per pixel.
  data = plan.data;
  data.set(second);
  plan.forward();
  data = plan.data;
  const set: FarFieldSet = {
    input: normalizeJones(options.input),
    incidentPower: power,
    total: float32Array(count, options.memory),
    analyserA: float32Array(count, options.memory),
    analyserB: float32Array(count, options.memory),
    x: float32Array(count, options.memory),
    y: float32Array(count, options.memory),
  };
  const [[k0xRe, k0xIm], [k0yRe, k0yIm]] = k0;
  const [[k1xRe, k1xIm], [k1yRe, k1yIm]] = k1;
  for (let iy = 0; iy < n; iy++) {
    const ky = (iy + half) % n;
    for (let ix = 0; ix < n; ix++) {
      const out = iy * n + ix;
      const f0Re = spectrum[2 * out];
      const f0Im = spectrum[2 * out + 1];
      if (f0Re === 0 && f0Im === 0) {
        const u = (ix - half) * deltaU;
        const v = (iy - half) * deltaU;
        if (u * u + v * v > 1) continue;
      }
      const source = 2 * (ky * n + ((ix + half) % n));
      const f1Re = data[source] * scale;
      const f1Im = data[source + 1] * scale;
      const i0 = f0Re * f0Re + f0Im * f0Im;
      const i1 = f1Re * f1Re + f1Im * f1Im;
      const fxRe = k0xRe * f0Re - k0xIm * f0Im + k1xRe * f1Re - k1xIm * f1Im;
      const fxIm = k0xRe * f0Im + k0xIm * f0Re + k1xRe * f1Im + k1xIm * f1Re;
      const fyRe = k0yRe * f0Re - k0yIm * f0Im + k1yRe * f1Re - k1yIm * f1Im;
      const fyIm = k0yRe * f0Im + k0yIm * f0Re + k1yRe * f1Im + k1yIm * f1Re;
      set.analyserA[out] = i0;
      set.analyserB[out] = i1;
      set.total[out] = i0 + i1;
      set.x[out] = fxRe * fxRe + fxIm * fxIm;
      set.y[out] = fyRe * fyRe + fyIm * fyIm;
    }
  }
  return { farField: set, nearFields: [near0, near1] };
}
