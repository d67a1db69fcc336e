import { execFileSync } from 'node:child_process';
import { beforeAll, describe, expect, it } from 'vitest';
import { initFft } from '../../shared/optics/fft';
import {
  BESSEL_FIRST_MAXIMA,
  besselCoreRadius,
  besselFirstMaximum,
  besselIntensity,
  besselNonDiffractingLength,
  besselRingRadius,
  correlation,
  crosstalkDb,
  measuredFirstMaximum,
  measuredFirstMinimum,
  measuredNonDiffractingLength,
  normalizedRmse,
  phaseQuantizationRmsError,
  quantizePhase,
  signalEfficiency,
  uniformity,
  windowCrosstalkDb,
  windowPower,
  zeroOrderFraction,
} from '../../shared/optics/metrics';
import { tiltPhase } from '../../shared/optics/phase-terms';
import { farField, intensityOf } from '../../shared/optics/propagation';
import { mulberry32 } from '../../shared/optics/random';
import type { CellGrid } from '../../shared/optics/types';
import { PYTHON } from '../support/python';

beforeAll(async () => {
  await initFft();
});

describe('N-level blazed grating (Swanson, MIT Lincoln Lab. Tech. Rep. 854 (1989))', () => {
  // The grating period spans 64 samples, so each of the N phase steps is 64/N samples wide: the samples resolve
  // the staircase (sampling correction (π/64)²/3 ≈ 8e-4, inside the 1% tolerance).
  const published: Record<number, number> = { 2: 0.405, 4: 0.811, 8: 0.95, 16: 0.987 };
  for (const levels of [2, 4, 8, 16]) {
    it(`${levels} levels: first-order efficiency sinc²(1/N) = ${published[levels]} within 1%`, () => {
      const lambda = 1e-6;
      const grid: CellGrid = { n: 256, period: lambda, lambda };
      const samplesPerPeriod = 64;
      const phase = quantizePhase(tiltPhase(grid, Math.asin(lambda / (samplesPerPeriod * grid.period)), 0), levels);
      const field = { n: grid.n, re: phase.map(Math.cos), im: phase.map(Math.sin) };
      const far = intensityOf(farField(field, grid));
      const n = grid.n;
      const firstOrder = far[(n / 2) * n + n / 2 + n / samplesPerPeriod];
      const efficiency = firstOrder / (n * n);
      const x = 1 / levels;
      const sinc2 = (Math.sin(Math.PI * x) / (Math.PI * x)) ** 2;
      // Published value (Swanson 1989) and the closed form sinc²(1/N).
      expect(Math.abs(efficiency / published[levels] - 1)).toBeLessThan(0.01);
      expect(Math.abs(efficiency / sinc2 - 1)).toBeLessThan(0.01);
    });
  }
});

describe('phase quantization', () => {
  it('RMS error of uniformly spread phases tends to π/(N√3) (uniform quantization noise, step²/12)', () => {
    const random = mulberry32(8);
    const phase = Array.from({ length: 100_000 }, () => 2 * Math.PI * random() - Math.PI);
    for (const levels of [2, 4, 8, 16]) {
      expect(Math.abs(phaseQuantizationRmsError(phase, levels) / (Math.PI / (levels * Math.sqrt(3))) - 1)).toBeLessThan(0.01);
    }
    expect(quantizePhase([1.0], 4)[0]).toBeCloseTo(Math.PI / 2, 12);
    expect(quantizePhase([-3.1], 2)[0]).toBeCloseTo(Math.PI, 12);
  });
});

describe('image metrics (closed forms)', () => {
  const n = 8;
  const window = { x0: 2, y0: 3, width: 3, height: 2 };
  const target = new Float64Array(n * n);
  for (let y = 3; y < 5; y++) for (let x = 2; x < 5; x++) target[y * n + x] = (x + y) % 2 ? 1 : 0.2;

  it('window power and efficiency', () => {
    const ones = new Float64Array(n * n).fill(1);
    expect(windowPower(ones, n, window)).toBe(6);
    expect(signalEfficiency(ones, n, window, 20)).toBeCloseTo(0.3, 15);
    expect(() => windowPower(ones, n, { x0: 6, y0: 0, width: 3, height: 1 })).toThrow(RangeError);
  });

  it('uniformity 1 − (max − min)/(max + min) over target-bright pixels', () => {
    const intensity = target.map((t) => (t === 1 ? 1 : 0));
    intensity[3 * n + 3] = 3; // (3 + 3) % 2 = 0 → dark pixel of the target, ignored
    expect(uniformity(intensity, target, n, window)).toBe(1);
    intensity[3 * n + 2] = 3; // bright pixel with 3× the intensity of the others
    expect(uniformity(intensity, target, n, window)).toBeCloseTo(0.5, 15);
  });

  it('Pearson correlation and normalized RMSE', () => {
    const scaled = target.map((t) => 2 * t + 1);
    expect(correlation(scaled, target, n, window)).toBeCloseTo(1, 12);
    expect(normalizedRmse(target.map((t) => 5 * t), target, n, window)).toBeCloseTo(0, 12);
    const inverted = target.map((t) => 1.2 - t);
    expect(correlation(inverted, target, n, window)).toBeCloseTo(-1, 12);
    expect(normalizedRmse(inverted, target, n, window)).toBeGreaterThan(0.3);
  });

  it('crosstalk in dB and zero-order fraction', () => {
    expect(crosstalkDb(1, 0.01)).toBeCloseTo(-20, 12);
    const wanted = new Float64Array(n * n).fill(1);
    const unwanted = new Float64Array(n * n).fill(0.001);
    expect(windowCrosstalkDb(wanted, unwanted, n, window)).toBeCloseTo(-30, 10);
    const spot = new Float64Array(n * n);
    spot[(n / 2) * n + n / 2] = 2;
    spot[(n / 2) * n + n / 2 + 1] = 1;
    expect(zeroOrderFraction(spot, n, 4)).toBe(0.5);
    expect(zeroOrderFraction(spot, n, 4, 1)).toBe(0.75);
  });
});

describe('Bessel beam formulas', () => {
  it('core radius, ring radius and z_max by formula', () => {
    // r₀ = 2.404826/(k sinβ) (A&S Table 9.5), λ = 1 µm, sinβ = 0.1 → 3.827399 µm.
    expect(besselCoreRadius(1e-6, 0.1)).toBeCloseTo(3.827399e-6, 11);
    expect(besselRingRadius(1e-6, 0.1, -1)).toBeCloseTo(2.930335e-6, 11);
    // z_max = R/tanβ (Durnin 1987): R = 1 mm, sinβ = 0.1 → 9.949874 mm.
    expect(besselNonDiffractingLength(1e-3, 0.1)).toBeCloseTo(9.949874e-3, 9);
    expect(measuredNonDiffractingLength([0, 1, 2, 3], [0.5, 1, 0.8, 0.2])).toBeCloseTo(2.5, 12);
  });

  it('first maxima of J_ℓ: table (A&S 9.5) and numerical search agree with scipy.special.jnp_zeros', () => {
    const scipy = JSON.parse(
      execFileSync(PYTHON, ['-c', 'import json; from scipy.special import jnp_zeros; print(json.dumps([float(jnp_zeros(l, 1)[0]) for l in range(1, 9)]))'], {
        encoding: 'utf8',
      }),
    ) as number[];
    for (let l = 1; l <= 8; l++) {
      // Reference: scipy.special.jnp_zeros (first zero of J'_ℓ); A&S Table 9.5 gives 6 decimals for ℓ ≤ 3.
      expect(besselFirstMaximum(l)).toBeCloseTo(scipy[l - 1], l <= 3 ? 5 : 7);
    }
    expect(BESSEL_FIRST_MAXIMA[2]).toBe(3.054237);
    expect(() => besselFirstMaximum(0)).toThrow(RangeError);
  });

  it('measured extrema of the analytic J₀² and J₁² curves land on the tabulated zeros and maxima', () => {
    const lambda = 1e-6;
    const sinBeta = 0.2;
    const radius = Float64Array.from({ length: 400 }, (_, i) => i * 2e-8);
    const profile0 = { radius, value: besselIntensity(radius, lambda, sinBeta, 0), count: new Uint32Array(400) };
    const profile1 = { radius, value: besselIntensity(radius, lambda, sinBeta, 1), count: new Uint32Array(400) };
    // bessel package J₀ first zero at 2.404826 (A&S 9.5); parabolic refinement on 20 nm steps.
    expect(measuredFirstMinimum(profile0) / besselCoreRadius(lambda, sinBeta)).toBeCloseTo(1, 3);
    expect(measuredFirstMaximum(profile1) / besselRingRadius(lambda, sinBeta, 1)).toBeCloseTo(1, 3);
  });
});
