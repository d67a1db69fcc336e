/**
 * The engine's WebAssembly SIMD kernels (shared/optics/kernels.wat), loaded as in the command line and the
 * server (server/lib/fft-node.ts): the committed bytes are the assembled text; each kernel agrees with a plain
 * scalar reference written here from the published formulas (float64, so the kernels' float32 arithmetic is
 * checked to float32 precision); and phase retrieval running on them follows numpy step for step.
 */
import { execFileSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { beforeAll, describe, expect, it } from 'vitest';
import { allocateKernelArray, fft2, fftKernels, getFft2d, ifft2, type KernelArray } from '../../shared/optics/fft';
import { retrievePhase } from '../../shared/optics/gerchberg-saxton';
import { KERNELS_WASM } from '../../shared/optics/kernels-wasm';
import { mulberry32 } from '../../shared/optics/random';
import { buildTargetPlane } from '../../shared/optics/target';
import { assembleKernels } from '../../scripts/lib/kernels';
import { initFftInNode } from '../../server/lib/fft-node';
import { PYTHON } from '../support/python';

beforeAll(async () => {
  await initFftInNode();
});

/** Runs `check` with kernel operands of these sizes in the backend's memory (views: take them inside), then frees them. */
function withOperands(bytes: number[], check: (arrays: KernelArray[]) => void): void {
  const arrays = bytes.map((b) => allocateKernelArray(b));
  try {
    check(arrays);
  } finally {
    arrays.forEach((a) => a.free());
  }
}

/** Random complex values over six decades of magnitude, with some exact zeros (z = 0 has its own rule). */
function randomField(values: Float32Array, seed: number): void {
  const random = mulberry32(seed);
  for (let i = 0; i < values.length; i += 2) {
    const scale = 10 ** Math.floor(6 * random() - 3);
    values[i] = (random() - 0.5) * scale;
    values[i + 1] = (random() - 0.5) * scale;
    if (random() < 0.03) values[i] = values[i + 1] = 0;
  }
}

/** Largest |a − b| over complex values, relative to the largest |b|. */
function relativeDifference(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let worst = 0;
  let largest = 0;
  for (let i = 0; i < b.length; i++) {
    worst = Math.max(worst, Math.abs(a[i] - b[i]));
    largest = Math.max(largest, Math.abs(b[i]));
  }
  return worst / largest;
}

/** Image-plane codes as the engine writes them: target T ≥ 0 in the window, −1 noise region, −2 dropped. */
const NOISE = -1;
const DROPPED = -2;

interface ImagePlaneReference {
  field: Float64Array;
  weights: Float64Array | null;
  sums: number[];
}

/**
 * Scalar reference of one image-plane step, float64. Gerchberg & Saxton (Optik 35, 237 (1972)): in the window
 * G ← T·G/|G|. MRAF (Pasienski & DeMarco, Opt. Express 16, 2176 (2008), eq. 2): G ← m·T·G/|G| in the signal
 * window, (1 − m)·G in the rest of the propagating region. Weighted GS (Di Leonardo, Ianni & Ruocco, Opt. Express
 * 15, 1913 (2007), eq. 5 with a target amplitude T): w ← w·⟨|G|/T⟩/(|G|/T), G ← w·T·G/|G|, the mean taken over the
 * previous iteration. G = 0 in the window takes the amplitude on the real axis. Sums: Fienup's error Σ(|G| − T)²
 * (Appl. Opt. 21, 2758 (1982)) with T = 0 outside the window, and Σ|G|T, Σ|G|², ΣT² over the window,
 * Σ|G|/T and their count over bright window pixels, Σ|G|² over all.
 */
function imagePlaneReference(field: Float32Array, codes: Float32Array, options: { mix: number; keep: number; weights?: Float32Array; meanRatio: number }): ImagePlaneReference {
  const out = Float64Array.from(field);
  const weights = options.weights ? Float64Array.from(options.weights) : null;
  const sums = [0, 0, 0, 0, 0, 0, 0];
  for (let i = 0; i < codes.length; i++) {
    const [re, im] = [field[2 * i], field[2 * i + 1]];
    const magnitude = Math.hypot(re, im);
    const c = codes[i];
    sums[6] += magnitude * magnitude;
    if (c < 0) {
      sums[0] += magnitude * magnitude;
      const factor = c === NOISE ? options.keep : 0;
      out[2 * i] = re * factor;
      out[2 * i + 1] = im * factor;
      continue;
    }
    sums[0] += (magnitude - c) ** 2;
    sums[1] += magnitude * c;
    sums[2] += magnitude * magnitude;
    sums[3] += c * c;
    let amplitude = options.mix * c;
    if (weights) {
      if (c > 0 && magnitude > 0) {
        sums[4] += magnitude / c;
        sums[5] += 1;
        if (options.meanRatio > 0) weights[i] *= options.meanRatio / (magnitude / c);
      }
      amplitude = weights[i] * c;
    }
    out[2 * i] = magnitude > 0 ? (amplitude * re) / magnitude : amplitude;
    out[2 * i + 1] = magnitude > 0 ? (amplitude * im) / magnitude : 0;
  }
  return { field: out, weights, sums };
}

describe('SIMD kernels', () => {
  it('the committed kernels-wasm.ts holds kernels.wat as assembled by wabt (run scripts/build-kernels.ts after editing)', async () => {
    expect(Array.from(await assembleKernels())).toEqual(Array.from(KERNELS_WASM));
  });

  it('are loaded on the FFT backend memory when initFft gets the backend bytes', () => {
    expect(fftKernels()).not.toBeNull();
  });

  it('normalizeUniform: a·z/|z| for every complex value, (a, 0) where z = 0', () => {
    const n = 64;
    const plan = getFft2d(n);
    const data = plan.data;
    const random = mulberry32(7);
    for (let i = 0; i < data.length; i++) data[i] = (random() - 0.5) * 10 ** Math.floor(6 * random() - 3);
    data[6] = 0;
    data[7] = 0;
    const before = data.slice();
    const amplitude = 2.5;
    fftKernels()!.normalizeUniform(data.byteOffset + 4 * 2 * n, n * n - n, amplitude);
    let error = 0;
    for (let i = 0; i < n * n; i++) {
      const [re, im] = [before[2 * i], before[2 * i + 1]];
      const magnitude = Math.hypot(re, im);
      const expected = i < n ? [re, im] : magnitude > 0 ? [(amplitude * re) / magnitude, (amplitude * im) / magnitude] : [amplitude, 0];
      error = Math.max(error, Math.abs(data[2 * i] - expected[0]), Math.abs(data[2 * i + 1] - expected[1]));
    }
    // Float32 arithmetic: a few units in the last place of the amplitude; rows before the pointer untouched.
    expect(error).toBeLessThan(amplitude * 1e-6);
  });

  const count = 64 * 16;
  /** Codes over `count` values: windows of lit and dark pixels, noise and dropped regions, in runs. */
  function imageCodes(codes: Float32Array): void {
    const random = mulberry32(11);
    for (let i = 0; i < codes.length; i++) {
      const region = Math.floor(i / 48) % 4;
      codes[i] = region === 0 ? NOISE : region === 1 ? DROPPED : random() < 0.1 ? 0 : 0.1 + 3 * random();
    }
  }

  for (const [name, mix, keep] of [
    ['Gerchberg–Saxton (T·G/|G| in the window, 0 elsewhere)', 1, 0],
    ['MRAF with m = 0.4 (m·T·G/|G| in the window, (1 − m)·G in the noise region)', 0.4, 0.6],
  ] as const) {
    it(`imagePlane, ${name}: field and error sums as the scalar reference`, () => {
      withOperands([8 * count, 4 * count, 64], (arrays) => {
        const [field, codes, sums] = [arrays[0].float32(), arrays[1].float32(), arrays[2].float64()];
        randomField(field, 5);
        imageCodes(codes);
        sums.fill(0.5);
        const expected = imagePlaneReference(field, codes, { mix, keep, meanRatio: 0 });
        fftKernels()!.imagePlane(arrays[0].pointer, count, arrays[1].pointer, 0, mix, keep, 0, arrays[2].pointer);
        expect(relativeDifference(field, expected.field)).toBeLessThan(1e-6);
        // The kernel adds to the sums it finds (0.5 here); float32 partial sums over 32 values.
        for (let k = 0; k < 4; k++) expect(Math.abs(sums[k] - 0.5 - expected.sums[k])).toBeLessThan(1e-6 * expected.sums[k]);
        expect(Math.abs(sums[6] - 0.5 - expected.sums[6])).toBeLessThan(1e-6 * expected.sums[6]);
        expect(sums[4]).toBe(0.5);
      });
    });
  }

  it('imagePlane with weights (weighted GS, Di Leonardo, Ianni & Ruocco 2007): weights, field and sums as the scalar reference', () => {
    withOperands([8 * count, 4 * count, 4 * count, 64], (arrays) => {
      const [field, codes, weights, sums] = [arrays[0].float32(), arrays[1].float32(), arrays[2].float32(), arrays[3].float64()];
      randomField(field, 6);
      imageCodes(codes);
      const random = mulberry32(2);
      for (let i = 0; i < count; i++) weights[i] = 0.5 + random();
      sums.fill(0);
      for (const meanRatio of [0, 1.7]) {
        const expected = imagePlaneReference(field, codes, { mix: 1, keep: 0, weights, meanRatio });
        fftKernels()!.imagePlane(arrays[0].pointer, count, arrays[1].pointer, arrays[2].pointer, 1, 0, meanRatio, arrays[3].pointer);
        expect(relativeDifference(field, expected.field)).toBeLessThan(1e-6);
        expect(relativeDifference(weights, expected.weights!)).toBeLessThan(1e-6);
        expect(sums[5]).toBe(expected.sums[5]);
        expect(Math.abs(sums[4] - expected.sums[4])).toBeLessThan(1e-6 * expected.sums[4]);
        sums.fill(0);
        randomField(field, 7);
      }
    });
  });

  it('imagePlaneSplit and multiplyComplexSplit give the same bits as imagePlane and multiplyComplex on values in the backend\'s internal layout (groups of four real parts, then four imaginary parts)', () => {
    const toSplit = (from: Float32Array, to: Float32Array) => {
      for (let i = 0; i < count; i++) [to[8 * (i >> 2) + (i & 3)], to[8 * (i >> 2) + 4 + (i & 3)]] = [from[2 * i], from[2 * i + 1]];
    };
    withOperands([8 * count, 8 * count, 8 * count, 4 * count, 4 * count, 4 * count, 64, 64, 8 * count, 8 * count], (arrays) => {
      const [interleaved, split, back, codes, weightsA, weightsB, sumsA, sumsB, h, hSplit] = [
        arrays[0].float32(), arrays[1].float32(), arrays[2].float32(), arrays[3].float32(), arrays[4].float32(),
        arrays[5].float32(), arrays[6].float64(), arrays[7].float64(), arrays[8].float32(), arrays[9].float32(),
      ];
      const k = fftKernels()!;
      imageCodes(codes);
      for (const [weighted, mix, keep] of [[false, 1, 0], [false, 0.4, 0.6], [true, 1, 0]] as const) {
        randomField(interleaved, 13);
        toSplit(interleaved, split);
        weightsA.fill(1.25);
        weightsB.fill(1.25);
        sumsA.fill(0);
        sumsB.fill(0);
        const w = (array: KernelArray) => (weighted ? array.pointer : 0);
        k.imagePlane(arrays[0].pointer, count, arrays[3].pointer, w(arrays[4]), mix, keep, 1.3, arrays[6].pointer);
        k.imagePlaneSplit(arrays[1].pointer, count, arrays[3].pointer, w(arrays[5]), mix, keep, 1.3, arrays[7].pointer);
        toSplit(interleaved, back);
        expect(Array.from(split)).toEqual(Array.from(back));
        expect(Array.from(weightsB)).toEqual(Array.from(weightsA));
        expect(Array.from(sumsB)).toEqual(Array.from(sumsA));
      }
      randomField(h, 14);
      toSplit(h, hSplit);
      for (const conjugate of [0, 1]) {
        randomField(interleaved, 15);
        toSplit(interleaved, split);
        k.multiplyComplex(arrays[0].pointer, count, arrays[8].pointer, conjugate);
        k.multiplyComplexSplit(arrays[1].pointer, count, arrays[9].pointer, conjugate);
        toSplit(interleaved, back);
        expect(Array.from(split)).toEqual(Array.from(back));
      }
    });
  });

  it('normalize: a_i·z/|z| with an amplitude per value, (a_i, 0) where z = 0 (device-plane constraint)', () => {
    withOperands([8 * count, 4 * count], (arrays) => {
      const [field, amplitudes] = [arrays[0].float32(), arrays[1].float32()];
      randomField(field, 8);
      // A Gaussian-lit device in the middle of a zero-padded grid: zero amplitude around it.
      for (let i = 0; i < count; i++) amplitudes[i] = i % 64 < 16 ? 0 : Math.exp(-(((i % 64) - 40) ** 2) / 200);
      const expected = new Float64Array(2 * count);
      for (let i = 0; i < count; i++) {
        const magnitude = Math.hypot(field[2 * i], field[2 * i + 1]);
        expected[2 * i] = magnitude > 0 ? (amplitudes[i] * field[2 * i]) / magnitude : amplitudes[i];
        expected[2 * i + 1] = magnitude > 0 ? (amplitudes[i] * field[2 * i + 1]) / magnitude : 0;
      }
      fftKernels()!.normalize(arrays[0].pointer, count, arrays[1].pointer);
      expect(relativeDifference(field, expected)).toBeLessThan(1e-6);
    });
  });

  it('multiplyComplex: z·h and z·conj(h) (the angular-spectrum transfer function there and back)', () => {
    withOperands([8 * count, 8 * count], (arrays) => {
      const [field, h] = [arrays[0].float32(), arrays[1].float32()];
      randomField(h, 9);
      for (const conjugate of [0, 1]) {
        randomField(field, 10 + conjugate);
        const before = field.slice();
        const expected = new Float64Array(2 * count);
        for (let i = 0; i < count; i++) {
          const [a, b, c, d] = [field[2 * i], field[2 * i + 1], h[2 * i], conjugate ? -h[2 * i + 1] : h[2 * i + 1]];
          expected[2 * i] = a * c - b * d;
          expected[2 * i + 1] = a * d + b * c;
        }
        fftKernels()!.multiplyComplex(arrays[0].pointer, count, arrays[1].pointer, conjugate);
        // Products span twelve decades here: compare each with |z|·|h| (float32 rounding of a·c − b·d).
        for (let i = 0; i < count; i++) {
          const size = Math.hypot(before[2 * i], before[2 * i + 1]) * Math.hypot(h[2 * i], h[2 * i + 1]);
          expect(Math.abs(field[2 * i] - expected[2 * i])).toBeLessThanOrEqual(3e-7 * size);
          expect(Math.abs(field[2 * i + 1] - expected[2 * i + 1])).toBeLessThanOrEqual(3e-7 * size);
        }
      }
    });
  });

  it('scale: every float times the factor, rounded as float32 (the inverse FFT\'s 1/N²)', () => {
    withOperands([8 * count], (arrays) => {
      const field = arrays[0].float32();
      randomField(field, 12);
      const before = field.slice();
      fftKernels()!.scale(arrays[0].pointer, count, 1 / 4096);
      // A power-of-two factor: exact, so float32 products compare equal.
      for (let i = 0; i < 2 * count; i++) expect(field[i]).toBe(Math.fround(before[i] / 4096));
    });
  });

  it('fft2 and ifft2 on the kernels (column strips, scaling) match numpy (fixtures of tests/fixtures/make-fft-fixtures.py)', () => {
    for (const [name, transform] of [['fft-64-forward.json', fft2], ['fft-64-inverse.json', ifft2]] as const) {
      const f = JSON.parse(readFileSync(new URL(`../fixtures/${name}`, import.meta.url), 'utf8')) as {
        n: number;
        input: { re: number[]; im: number[] };
        expected: { re: number[]; im: number[] };
        tolerance: { relativeToMax: number };
      };
      const out = transform({ n: f.n, re: Float64Array.from(f.input.re), im: Float64Array.from(f.input.im) });
      // Source: numpy.fft.fft2 / ifft2 complex128; tolerance from the fixture (float32 engine).
      expect(relativeDifference([...out.re, ...out.im], [...f.expected.re, ...f.expected.im])).toBeLessThan(f.tolerance.relativeToMax);
    }
  });

  it('transpose and copyColumns move complex values exactly (element (y, x) to (x, y); columns to rows and back)', () => {
    const n = 64;
    withOperands([8 * n * n, 8 * n * 7], (arrays) => {
      const [grid, columns] = [arrays[0].float32(), arrays[1].float32()];
      const original = Float32Array.from({ length: 2 * n * n }, (_, i) => i);
      grid.set(original);
      fftKernels()!.transpose(arrays[0].pointer, n, 8);
      for (let y = 0; y < n; y++) {
        for (let x = 0; x < n; x++) {
          expect([grid[2 * (x * n + y)], grid[2 * (x * n + y) + 1]]).toEqual([original[2 * (y * n + x)], original[2 * (y * n + x) + 1]]);
        }
      }
      grid.set(original);
      // Columns 5…11 (an odd start and an odd count) into rows 0…6.
      fftKernels()!.copyColumns(arrays[0].pointer, n, 5, 7, arrays[1].pointer, 1);
      for (let k = 0; k < 7; k++) {
        for (let y = 0; y < n; y++) expect(columns[2 * (k * n + y) + 1]).toBe(original[2 * (y * n + 5 + k) + 1]);
      }
      columns.fill(-1);
      fftKernels()!.copyColumns(arrays[0].pointer, n, 5, 7, arrays[1].pointer, 0);
      for (let i = 0; i < n * n; i++) {
        const x = i % n;
        expect(grid[2 * i]).toBe(x >= 5 && x < 12 ? -1 : original[2 * i]);
      }
    });
  });

  it("copyBlocks moves blocks of four values stored as four real parts, then four imaginary parts (PFFFT's internal layout) into interleaved columns and back exactly", () => {
    const n = 64;
    withOperands([8 * n * n, 8 * n * 8], (arrays) => {
      const [grid, columns] = [arrays[0].float32(), arrays[1].float32()];
      const original = Float32Array.from({ length: 2 * n * n }, (_, i) => i);
      grid.set(original);
      // Blocks 3 and 4: row positions 12…19 into rows 0…7 of the strip.
      const re = (y: number, p: number) => original[2 * n * y + 8 * (p >> 2) + (p & 3)];
      const im = (y: number, p: number) => original[2 * n * y + 8 * (p >> 2) + (p & 3) + 4];
      fftKernels()!.copyBlocks(arrays[0].pointer, n, 3, 2, arrays[1].pointer, 1);
      for (let k = 0; k < 8; k++) {
        for (let y = 0; y < n; y++) expect([columns[2 * (k * n + y)], columns[2 * (k * n + y) + 1]]).toEqual([re(y, 12 + k), im(y, 12 + k)]);
      }
      columns.fill(-1);
      fftKernels()!.copyBlocks(arrays[0].pointer, n, 3, 2, arrays[1].pointer, 0);
      for (let i = 0; i < 2 * n * n; i++) {
        const block = (i % (2 * n)) >> 3;
        expect(grid[i]).toBe(block === 3 || block === 4 ? -1 : original[i]);
      }
    });
  });

  // Independent reference: numpy complex128, the published update rules written out (target in the centred
  // layout moved to FFT order by ifftshift, scaled so that Σ T² = N²·Σ a², as the engine does in FFT units).
  const numpyRetrieval = [
    'import json, sys, numpy as np',
    'd = json.load(sys.stdin); n = d["n"]; algorithm = d["algorithm"]; m = d["mixing"]',
    'T = np.fft.ifftshift(np.array(d["target"]).reshape(n, n))',
    'W = np.fft.ifftshift(np.array(d["window"]).reshape(n, n)) > 0',
    'T = T * np.sqrt(n ** 4 / np.sum(T ** 2))',
    'g = np.exp(1j * np.array(d["start"]).reshape(n, n))',
    'w = np.ones((n, n)); mean = 0.0; errors = []; efficiency = []',
    'for _ in range(d["iterations"]):',
    '    G = np.fft.fft2(g); A = np.abs(G); phase = np.exp(1j * np.angle(G))',
    '    errors.append(float(np.sqrt(np.sum((A - T) ** 2) / np.sum(T ** 2))))',
    '    efficiency.append(float(np.sum(A[W] ** 2) / np.sum(T ** 2)))',
    '    if algorithm == "gs":',
    '        G = np.where(W, T * phase, 0)',
    '    elif algorithm == "mraf":',
    '        G = np.where(W, m * T * phase, (1 - m) * G)',
    '    else:',
    '        bright = W & (T > 0) & (A > 0)',
    '        ratio = np.where(bright, A / np.where(bright, T, 1), 0)',
    '        if mean > 0: w = np.where(bright, w * mean / np.where(bright, ratio, 1), w)',
    '        mean = ratio[bright].mean()',
    '        G = np.where(W, w * T * phase, 0)',
    '    g = np.exp(1j * np.angle(np.fft.ifft2(G)))',
    'print(json.dumps({"phase": np.angle(g).ravel().tolist(), "errors": errors, "efficiency": efficiency}))',
  ].join('\n');

  for (const [algorithm, source] of [
    ['gs', 'Gerchberg & Saxton 1972, error reduction'],
    ['weighted-gs', 'Di Leonardo, Ianni & Ruocco 2007'],
    ['mraf', 'Pasienski & DeMarco 2008, m = 0.6'],
  ] as const) {
    it(`${algorithm} on the kernels follows numpy.fft iteration by iteration: phase, Fourier error, window efficiency (${source})`, () => {
      const lambda = 633e-9;
      const n = 64;
      const grid = { n, period: lambda, lambda };
      const size = 16;
      const pixels = new Uint8Array(size * size).map((_, i) => ((i % size) * 7 + Math.floor(i / size) * 3) % 256);
      const target = buildTargetPlane(grid, { width: size, height: size, pixels }, { units: 'cells', width: size, centerX: 12, centerY: -9 });
      const { x0, y0, width, height } = target.window;
      const window = Array.from({ length: n * n }, (_, i) => (i % n >= x0 && i % n < x0 + width && Math.floor(i / n) >= y0 && Math.floor(i / n) < y0 + height ? 1 : 0));
      const random = mulberry32(3);
      const start = Float64Array.from({ length: n * n }, () => 2 * Math.PI * random() - Math.PI);
      const iterations = 5;
      const mixing = 0.6;
      const result = retrievePhase({ grid, target, algorithm, mixing, iterations, initialPhase: start });
      const input = JSON.stringify({ n, iterations, algorithm, mixing, window, target: Array.from(target.amplitude), start: Array.from(start) });
      const expected = JSON.parse(execFileSync(PYTHON, ['-c', numpyRetrieval], { input, encoding: 'utf8' })) as { phase: number[]; errors: number[]; efficiency: number[] };
      let error = 0;
      for (let i = 0; i < n * n; i++) {
        const d = Math.abs(result.phase[i] - expected.phase[i]) % (2 * Math.PI);
        error = Math.max(error, Math.min(d, 2 * Math.PI - d));
      }
      // Float32 FFTs and kernels against float64 over five iterations.
      expect(error).toBeLessThan(5e-4);
      for (let k = 0; k < iterations; k++) {
        expect(Math.abs(result.fourierError[k] - expected.errors[k])).toBeLessThan(1e-5 * expected.errors[k]);
        expect(Math.abs(result.windowEfficiency[k] - expected.efficiency[k])).toBeLessThan(1e-5 * expected.efficiency[k]);
      }
    });
  }
});
