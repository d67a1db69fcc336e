/**
 * The Gerchberg–Saxton family's behaviour (gerchberg-saxton.ts), as a suite run twice: by
 * tests/unit/gerchberg-saxton.test.ts with the engine's JavaScript per-pixel steps (initFft without the SIMD
 * kernels) and by tests/unit/gerchberg-saxton-kernels.test.ts on the WebAssembly SIMD kernels — the same
 * published properties must hold on both paths.
 */
import { describe, expect, it } from 'vitest';
import { retrievePhase, windowSpectrumRows } from '../../shared/optics/gerchberg-saxton';
import { correlation, uniformity } from '../../shared/optics/metrics';
import { angularSpectrumPropagate, farField, intensityOf } from '../../shared/optics/propagation';
import { buildTargetPlane, type GrayImage } from '../../shared/optics/target';
import type { CancelSignal, CellGrid, ComplexField } from '../../shared/optics/types';

const lambda = 633e-9;
const grid: CellGrid = { n: 128, period: lambda, lambda };

/** Our own test picture: a ring and a bar on a dark background, 32×32 Uint8. */
function ringAndBar(): GrayImage {
  const size = 32;
  const pixels = new Uint8Array(size * size);
  for (let y = 0; y < size; y++) {
    for (let x = 0; x < size; x++) {
      const r = Math.hypot(x - 15.5, y - 15.5);
      if ((r > 9 && r < 13) || (x > 13 && x < 18 && y > 4 && y < 27)) pixels[y * size + x] = 255;
      else if (r < 5) pixels[y * size + x] = 128;
    }
  }
  return { width: size, height: size, pixels };
}

/** Spot array picture: 4×4 bright pixels on a 16×16 dark grid. */
function spotArray(): GrayImage {
  const pixels = new Uint8Array(16 * 16);
  for (let j = 0; j < 4; j++) for (let i = 0; i < 4; i++) pixels[(2 + 4 * j) * 16 + 2 + 4 * i] = 255;
  return { width: 16, height: 16, pixels };
}

function deviceField(phase: Float64Array): ComplexField {
  return { n: Math.sqrt(phase.length), re: phase.map(Math.cos), im: phase.map(Math.sin) };
}

/** The suite under `title`; the caller loads the FFT backend (with or without the kernels) in beforeAll. */
export function describeRetrieval(title: string): void {
describe(title, () => {
  const target = buildTargetPlane(grid, ringAndBar(), { units: 'cells', width: 32, centerX: 24, centerY: -20 });
  const targetIntensity = target.amplitude.map((a) => a * a);

  it('error reduction: the full-plane Fourier-domain error of plain GS never increases (Fienup, Appl. Opt. 21, 2758 (1982))', () => {
    for (const illumination of [{ kind: 'flat' as const }, { kind: 'gaussian' as const, waist: 40 * lambda }]) {
      const result = retrievePhase({ grid, target, iterations: 60, seed: 11, illumination });
      const e = result.fourierError;
      for (let k = 1; k < e.length; k++) {
        // Monotone up to float32 rounding of the FFT: 1e-5 relative.
        expect(e[k]).toBeLessThanOrEqual(e[k - 1] * (1 + 1e-5));
      }
      expect(e[e.length - 1]).toBeLessThan(0.8 * e[0]);
    }
  });

  it('skipping the spectrum columns outside the window changes nothing: GS equals MRAF with m = 1, which computes every column', () => {
    // MRAF with m = 1 applies exactly the GS constraint (Pasienski & DeMarco 2008, eq. 2) without skipping.
    const skipping = retrievePhase({ grid, target, iterations: 8, seed: 4 });
    const full = retrievePhase({ grid, target, iterations: 8, seed: 4, algorithm: 'mraf', mixing: 1 });
    let phaseError = 0;
    for (let i = 0; i < skipping.phase.length; i++) {
      const d = Math.abs(skipping.phase[i] - full.phase[i]);
      phaseError = Math.max(phaseError, Math.min(d, 2 * Math.PI - d));
    }
    expect(phaseError).toBeLessThan(1e-4);
    for (let k = 0; k < 8; k++) {
      // The skipped columns' power comes from Parseval: equal to float32 rounding of the sums.
      expect(skipping.fourierError[k]).toBeCloseTo(full.fourierError[k], 5);
      expect(skipping.windowEfficiency[k]).toBeCloseTo(full.windowEfficiency[k], 6);
    }
  });

  it('windowSpectrumRows: the kx rows of the window columns, unshifted, wrapping around the zero order', () => {
    expect(windowSpectrumRows({ x0: 5, y0: 0, width: 2, height: 1 }, 8)).toEqual([1, 3]);
    // Columns 2…5 of n = 8 are kx 6, 7, 0, 1.
    expect(windowSpectrumRows({ x0: 2, y0: 0, width: 4, height: 1 }, 8)).toEqual([0, 2, 6, 8]);
  });

  it('retrieved phase reproduces the picture in the far-field window', () => {
    const result = retrievePhase({ grid, target, iterations: 40, seed: 3 });
    const far = intensityOf(farField(deviceField(result.phase), grid));
    // Common practice, no published source: GS image correlation above 0.9 after 40 iterations.
    expect(correlation(far, targetIntensity, grid.n, target.window)).toBeGreaterThan(0.9);
    // windowEfficiency of the last iteration is the simulated fraction of power in the window.
    const windowPowerSimulated = (() => {
      let s = 0;
      const { x0, y0, width, height } = target.window;
      for (let y = y0; y < y0 + height; y++) for (let x = x0; x < x0 + width; x++) s += far[y * grid.n + x];
      return s / (grid.n * grid.n);
    })();
    expect(Math.abs(windowPowerSimulated - result.windowEfficiency[39])).toBeLessThan(0.05);
  });

  it('a single bright pixel is reached by a tilt after one iteration (closed form: a plane wave)', () => {
    const spot = buildTargetPlane(grid, { width: 1, height: 1, pixels: [1] }, { units: 'cells', width: 1, centerX: 8, centerY: 0 });
    const result = retrievePhase({ grid, target: spot, iterations: 2, seed: 1 });
    expect(result.windowEfficiency[0]).toBeLessThan(0.01);
    expect(result.windowEfficiency[1]).toBeGreaterThan(0.999);
    // Neighbouring cells along x differ by 2π·8/N (the tilt's phase step).
    const step = result.phase[1] - result.phase[0];
    expect(Math.abs(Math.atan2(Math.sin(step), Math.cos(step)) - (2 * Math.PI * 8) / grid.n)).toBeLessThan(1e-4);
  });

  it('is reproducible for a seed and differs between seeds', () => {
    const a = retrievePhase({ grid, target, iterations: 3, seed: 5 });
    const b = retrievePhase({ grid, target, iterations: 3, seed: 5 });
    const c = retrievePhase({ grid, target, iterations: 3, seed: 6 });
    expect(Array.from(a.phase)).toEqual(Array.from(b.phase));
    expect(Array.from(a.phase)).not.toEqual(Array.from(c.phase));
    for (const v of a.phase) expect(v > -Math.PI && v <= Math.PI).toBe(true);
  });

  it('weighted GS makes a spot array more uniform than GS (Di Leonardo, Ianni & Ruocco, Opt. Express 15, 1913 (2007))', () => {
    const spots = buildTargetPlane(grid, spotArray(), { units: 'cells', width: 16, centerX: 20, centerY: 12 });
    const spotIntensity = spots.amplitude.map((a) => a * a);
    const measure = (algorithm: 'gs' | 'weighted-gs') => {
      const result = retrievePhase({ grid, target: spots, algorithm, iterations: 30, seed: 2 });
      return uniformity(intensityOf(farField(deviceField(result.phase), grid)), spotIntensity, grid.n, spots.window);
    };
    const plain = measure('gs');
    const weighted = measure('weighted-gs');
    expect(weighted).toBeGreaterThan(plain);
    // The paper reports near-perfect uniformity for spot arrays; 0.9 is our acceptance (common practice).
    expect(weighted).toBeGreaterThan(0.9);
  });

  it('MRAF trades efficiency for accuracy in the signal window (Pasienski & DeMarco, Opt. Express 16, 2176 (2008))', () => {
    const gs = retrievePhase({ grid, target, iterations: 40, seed: 9 });
    const mraf = retrievePhase({ grid, target, algorithm: 'mraf', mixing: 0.4, iterations: 40, seed: 9 });
    expect(mraf.windowError[39]).toBeLessThan(gs.windowError[39]);
    expect(mraf.windowEfficiency[39]).toBeLessThan(gs.windowEfficiency[39]);
  });

  it('Fresnel geometry: the propagated device field forms the picture at distance z', () => {
    // z = 100λ for a 128λ device: the band-limited transfer function keeps angles up to sinθ ≈ 0.54, enough to
    // reach the whole 40-cell window from the whole device (at z = 400λ the limit 0.16 caps the image quality).
    const z = 100 * lambda;
    const fresnelTarget = buildTargetPlane(grid, ringAndBar(), { units: 'cells', width: 40, centerX: 0, centerY: 0 }, { geometry: 'fresnel' });
    const result = retrievePhase({ grid, target: fresnelTarget, iterations: 40, seed: 4, fresnelDistance: z });
    const image = intensityOf(angularSpectrumPropagate(deviceField(result.phase), grid, z));
    const intensity = fresnelTarget.amplitude.map((a) => a * a);
    // Common practice, no published source: correlation above 0.9 at the image plane.
    expect(correlation(image, intensity, grid.n, fresnelTarget.window)).toBeGreaterThan(0.9);
    expect(() => retrievePhase({ grid, target: fresnelTarget, iterations: 2 })).toThrow(RangeError);
  });

  it('Fresnel geometry on a zero-padded grid: the efficiency it reports is what padded angular-spectrum propagation finds', () => {
    // Angular spectrum (Goodman, Introduction to Fourier Optics, §3.10) on an FFT grid is periodic: without
    // padding, light leaving the aperture re-enters from the other side, and GS counts it in an off-axis window.
    const z = 150e-6;
    const sampled: CellGrid = { n: 128, period: 450e-9, lambda };
    const offAxis = buildTargetPlane(sampled, ringAndBar(), { units: 'cells', width: 40, centerX: 30, centerY: 0 }, { geometry: 'fresnel' });
    const windowShare = (phase: Float64Array) => {
      const image = intensityOf(angularSpectrumPropagate(deviceField(phase), sampled, z, { padding: 2 }));
      const { x0, y0, width, height } = offAxis.window;
      let power = 0;
      for (let y = y0; y < y0 + height; y++) for (let x = x0; x < x0 + width; x++) power += image[y * 128 + x];
      return power / (128 * 128);
    };
    const padded = retrievePhase({ grid: sampled, target: offAxis, iterations: 40, seed: 2, fresnelDistance: z, padding: 2 });
    expect(windowShare(padded.phase)).toBeCloseTo(padded.windowEfficiency[39], 2);
    for (let k = 1; k < 40; k++) expect(padded.fourierError[k]).toBeLessThanOrEqual(padded.fourierError[k - 1] * (1 + 1e-5));
    const periodic = retrievePhase({ grid: sampled, target: offAxis, iterations: 40, seed: 2, fresnelDistance: z, padding: 1 });
    expect(periodic.windowEfficiency[39] - windowShare(periodic.phase)).toBeGreaterThan(0.1);
    expect(() => retrievePhase({ grid: sampled, target: offAxis, iterations: 2, fresnelDistance: z, padding: 3 })).toThrow(RangeError);
  });

  it('reports progress and stops when cancelled', () => {
    const stages: number[] = [];
    let aborted = false;
    const signal: CancelSignal = {
      get aborted() {
        return aborted;
      },
      throwIfAborted() {
        if (aborted) throw new Error('cancelled');
      },
    };
    expect(() =>
      retrievePhase({
        grid,
        target,
        iterations: 50,
        signal,
        onProgress: (fraction, _stage, detail) => {
          stages.push(fraction);
          if (detail?.iteration === 3) aborted = true;
        },
      }),
    ).toThrow('cancelled');
    expect(stages).toEqual([1 / 50, 2 / 50, 3 / 50]);
    // The shared plan is usable again after a cancelled run.
    expect(retrievePhase({ grid, target, iterations: 2 }).phase.length).toBe(grid.n * grid.n);
  });
});
}
