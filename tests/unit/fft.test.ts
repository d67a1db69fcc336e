import { readFileSync } from 'node:fs';
import FFT from 'fft.js';
import { beforeAll, describe, expect, it } from 'vitest';
import {
  createFft2d,
  fft2,
  fftBackend,
  fftshift2d,
  getFft2d,
  ifft2,
  ifftshift2d,
  initFft,
} from '../../shared/optics/fft';
import { mulberry32 } from '../../shared/optics/random';
import type { ComplexField } from '../../shared/optics/types';

interface ComplexJson {
  re: number[];
  im: number[];
}
interface TransformFixture {
  source: string;
  n: number;
  input: ComplexJson;
  expected: ComplexJson;
  tolerance: { relativeToMax: number };
}

const fixture = <T>(name: string): T => JSON.parse(readFileSync(new URL(`../fixtures/${name}`, import.meta.url), 'utf8')) as T;

function toField(n: number, c: ComplexJson): ComplexField {
  return { n, re: Float64Array.from(c.re), im: Float64Array.from(c.im) };
}

function randomField(n: number, seed: number): ComplexField {
  const random = mulberry32(seed);
  const re = new Float64Array(n * n);
  const im = new Float64Array(n * n);
  for (let i = 0; i < n * n; i++) {
    re[i] = random() - 0.5;
    im[i] = random() - 0.5;
  }
  return { n, re, im };
}

/** Largest |a − b| over both planes, divided by the largest |b|. */
function relativeMaxError(a: ComplexField, b: { re: ArrayLike<number>; im: ArrayLike<number> }): number {
  let error = 0;
  let scale = 0;
  for (let i = 0; i < a.re.length; i++) {
    error = Math.max(error, Math.hypot(a.re[i] - b.re[i], a.im[i] - b.im[i]));
    scale = Math.max(scale, Math.hypot(b.re[i], b.im[i]));
  }
  return error / scale;
}

/** Independent 2-D forward FFT in float64 with fft.js 4.0.4 (rows, then columns; exp(−2πi kn/N), unscaled). */
function referenceFft2(field: ComplexField): { re: Float64Array; im: Float64Array } {
  const n = field.n;
  const f = new FFT(n);
  const input = f.createComplexArray() as number[];
  const output = f.createComplexArray() as number[];
  const re = Float64Array.from(field.re);
  const im = Float64Array.from(field.im);
  for (let pass = 0; pass < 2; pass++) {
    for (let line = 0; line < n; line++) {
      const index = (k: number) => (pass === 0 ? line * n + k : k * n + line);
      for (let k = 0; k < n; k++) {
        input[2 * k] = re[index(k)];
        input[2 * k + 1] = im[index(k)];
      }
      f.transform(output, input);
      for (let k = 0; k < n; k++) {
        re[index(k)] = output[2 * k];
        im[index(k)] = output[2 * k + 1];
      }
    }
  }
  return { re, im };
}

beforeAll(async () => {
  await initFft();
});

describe('fft2 / ifft2 against numpy (fixtures from tests/fixtures/make-fft-fixtures.py)', () => {
  it('loads the SIMD WebAssembly backend', () => {
    expect(fftBackend()).toBe('pffft-wasm-simd');
  });

  it('forward 64×64 matches numpy.fft.fft2', () => {
    const f = fixture<TransformFixture>('fft-64-forward.json');
    const out = fft2(toField(f.n, f.input));
    // Source: numpy.fft.fft2 complex128 (fixture); tolerance from the fixture (float32 engine).
    expect(relativeMaxError(out, f.expected)).toBeLessThan(f.tolerance.relativeToMax);
  });

  it('inverse 64×64 matches numpy.fft.ifft2 (sign +, scaled 1/N²)', () => {
    const f = fixture<TransformFixture>('fft-64-inverse.json');
    const out = ifft2(toField(f.n, f.input));
    // Source: numpy.fft.ifft2 complex128 (fixture).
    expect(relativeMaxError(out, f.expected)).toBeLessThan(f.tolerance.relativeToMax);
  });

  it('fftshift2d / ifftshift2d match numpy for odd and even sizes', () => {
    const f = fixture<{ cases: { n: number; input: number[]; fftshift: number[]; ifftshift: number[] }[] }>('fft-shift.json');
    for (const c of f.cases) {
      const input = Float64Array.from(c.input);
      // Source: numpy.fft.fftshift / ifftshift (fixture), exact.
      expect(Array.from(fftshift2d(input, c.n))).toEqual(c.fftshift);
      expect(Array.from(ifftshift2d(input, c.n))).toEqual(c.ifftshift);
      expect(Array.from(ifftshift2d(fftshift2d(input, c.n), c.n))).toEqual(c.input);
    }
  });
});

describe('fft2 against an independent float64 FFT (fft.js 4.0.4) at larger sizes', () => {
  for (const n of [128, 512, 2048]) {
    it(`${n}×${n} forward transform agrees`, () => {
      const field = randomField(n, n);
      const expected = referenceFft2(field);
      // Source: fft.js (independent implementation). float32 rounding grows ~√log N: 1e-6 of the peak.
      expect(relativeMaxError(fft2(field), expected)).toBeLessThan(1e-6);
    });
  }
});

describe('properties', () => {
  for (const n of [64, 128, 256, 512, 1024, 2048]) {
    it(`round trip ifft2(fft2(f)) = f and Parseval at N = ${n}`, () => {
      const field = randomField(n, 7 + n);
      const spectrum = fft2(field);
      const back = ifft2(spectrum);
      // Property: inverse of the forward transform; float32 tolerance.
      expect(relativeMaxError(back, field)).toBeLessThan(2e-6);
      let powerField = 0;
      let powerSpectrum = 0;
      for (let i = 0; i < n * n; i++) {
        powerField += field.re[i] ** 2 + field.im[i] ** 2;
        powerSpectrum += spectrum.re[i] ** 2 + spectrum.im[i] ** 2;
      }
      // Parseval (unscaled forward transform): Σ|F|² = N²·Σ|f|².
      expect(Math.abs(powerSpectrum / (n * n * powerField) - 1)).toBeLessThan(1e-5);
    });
  }

  it('impulse and constant: closed forms', () => {
    const n = 64;
    const impulse: ComplexField = { n, re: new Float64Array(n * n), im: new Float64Array(n * n) };
    impulse.re[0] = 1;
    const flat = fft2(impulse);
    // Closed form: DFT of δ is 1 in every bin.
    expect(Math.max(...Array.from(flat.re, (v) => Math.abs(v - 1)))).toBeLessThan(1e-6);
    // A shifted impulse at (x, y) = (1, 0) gives exp(−2πi kx/N): checks the forward sign.
    const shifted: ComplexField = { n, re: new Float64Array(n * n), im: new Float64Array(n * n) };
    shifted.re[1] = 1;
    const ramp = fft2(shifted);
    expect(ramp.re[1]).toBeCloseTo(Math.cos((2 * Math.PI) / n), 6);
    expect(ramp.im[1]).toBeCloseTo(-Math.sin((2 * Math.PI) / n), 6);
  });

  it('forwardTransposed holds the transpose of forward; cycle without operations returns N²·f', () => {
    const n = 128;
    const field = randomField(n, 3);
    const plan = getFft2d(n);
    plan.load(field.re, field.im);
    plan.forward();
    const normal = plan.data.slice();
    plan.load(field.re, field.im);
    plan.forwardTransposed();
    const transposed = plan.data;
    let error = 0;
    for (let ky = 0; ky < n; ky++) {
      for (let kx = 0; kx < n; kx++) {
        error = Math.max(error, Math.abs(normal[2 * (ky * n + kx)] - transposed[2 * (kx * n + ky)]));
      }
    }
    expect(error).toBe(0);
    plan.load(field.re, field.im);
    plan.cycle(null, null, true);
    plan.cycle(null, null, false);
    const out = { n, re: new Float64Array(n * n), im: new Float64Array(n * n) };
    plan.store(out.re, out.im, 1 / (n * n) ** 2);
    expect(relativeMaxError(out, field)).toBeLessThan(2e-6);
  });

  it('a cycle limited to some spectrum rows equals a full cycle whose spectrum operation zeroes the other rows', () => {
    const n = 64;
    const field = randomField(n, 5);
    const plan = getFft2d(n);
    // A few rows (copied out as columns) and most rows (transposed in place): the two ways a limited cycle works.
    for (const spans of [
      [0, 3, 40, 52],
      [0, 30, 33, 64],
    ]) {
      const kept = (row: number) => (row >= spans[0] && row < spans[1]) || (row >= spans[2] && row < spans[3]);
      const seen: number[] = [];
      plan.load(field.re, field.im);
      plan.cycle((_data, _offset, row) => seen.push(row), null, false, spans);
      const limited = plan.data.slice();
      plan.load(field.re, field.im);
      plan.cycle((data, offset, row) => {
        if (!kept(row)) data.fill(0, offset, offset + 2 * n);
      }, null, false);
      const full = plan.data;
      let error = 0;
      let peak = 0;
      for (let i = 0; i < full.length; i++) {
        error = Math.max(error, Math.abs(full[i] - limited[i]));
        peak = Math.max(peak, Math.abs(full[i]));
      }
      expect(error / peak).toBeLessThan(1e-6);
      expect(seen).toEqual(Array.from({ length: n }, (_, row) => row).filter(kept));
    }
    plan.load(field.re, field.im);
    expect(() => plan.cycle(null, null, false, [5, 3])).toThrow(RangeError);
    expect(() => plan.cycle(null, null, false, [0, 4, 2, 8])).toThrow(RangeError);
    expect(() => plan.cycle(null, null, false, [0, n + 1])).toThrow(RangeError);
  });

  it('rejects sizes that are not powers of two in 64…8192', async () => {
    expect(() => createFft2d(100)).toThrow(RangeError);
    expect(() => createFft2d(32)).toThrow(RangeError);
    expect(() => createFft2d(16384)).toThrow(RangeError);
    const plan = createFft2d(64);
    expect(() => plan.load(new Float64Array(10))).toThrow(RangeError);
    plan.dispose();
    expect(() => plan.forward()).toThrow();
  });
});
