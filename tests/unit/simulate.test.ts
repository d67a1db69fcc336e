import { beforeAll, describe, expect, it } from 'vitest';
import { initFft } from '../../shared/optics/fft';
import { illuminationAmplitude } from '../../shared/optics/illumination';
import { windowCrosstalkDb, windowPower } from '../../shared/optics/metrics';
import { tiltPhase } from '../../shared/optics/phase-terms';
import { directionCosineStep } from '../../shared/optics/propagation';
import { applyJones, projectField, simulateDevice } from '../../shared/optics/simulate';
import type { CellGrid, ComplexField, JonesField, JonesVector } from '../../shared/optics/types';

beforeAll(async () => {
  await initFft();
});

const lambda = 1e-6;
const grid: CellGrid = { n: 64, period: lambda, lambda };
const size = grid.n * grid.n;
const X: JonesVector = [
  [1, 0],
  [0, 0],
];
const Y: JonesVector = [
  [0, 0],
  [1, 0],
];
const D45: JonesVector = [
  [Math.SQRT1_2, 0],
  [Math.SQRT1_2, 0],
];

const constant = (re: number, im = 0): ComplexField => ({ n: grid.n, re: new Float64Array(size).fill(re), im: new Float64Array(size).fill(im) });
const phaseField = (phase: Float64Array): ComplexField => ({ n: grid.n, re: phase.map(Math.cos), im: phase.map(Math.sin) });

/** Linear x/y multiplexer: J = diag(e^{iφA}, e^{iφB}) (Mueller et al., PRL 118, 113901 (2017), linear basis, θ = 0). */
function linearMultiplexer(phiA: Float64Array, phiB: Float64Array): JonesField {
  return { n: grid.n, xx: phaseField(phiA), xy: constant(0), yx: constant(0), yy: phaseField(phiB) };
}

describe('device simulation', () => {
  it('a half-wave plate at 45° turns x into y (Jones calculus closed form)', () => {
    const hwp: JonesField = { n: grid.n, xx: constant(0), xy: constant(1), yx: constant(1), yy: constant(0) };
    const out = simulateDevice(hwp, { grid, input: X });
    const c = (grid.n / 2) * grid.n + grid.n / 2;
    expect(out.farField.y.intensity[c]).toBeCloseTo(size, 6);
    expect(out.farField.x.intensity[c]).toBe(0);
    expect(out.incidentPower).toBe(size);
  });

  it('two tilts multiplexed on x and y: input selects the image, 45° shows both, analyser separates them', () => {
    const u = directionCosineStep(grid);
    const phiA = tiltPhase(grid, Math.asin(8 * u), 0);
    const phiB = tiltPhase(grid, Math.asin(-8 * u), 0);
    const device = linearMultiplexer(phiA, phiB);
    const n = grid.n;
    const windowA = { x0: n / 2 + 7, y0: n / 2 - 1, width: 3, height: 3 };
    const windowB = { x0: n / 2 - 9, y0: n / 2 - 1, width: 3, height: 3 };
    const underA = simulateDevice(device, { grid, input: X, analyser: [X, Y] });
    expect(windowPower(underA.totalIntensity, n, windowA) / underA.incidentPower).toBeCloseTo(1, 5);
    expect(windowPower(underA.totalIntensity, n, windowB)).toBeLessThan(1e-9 * size);
    const both = simulateDevice(device, { grid, input: D45, analyser: [X, Y] });
    expect(windowPower(both.totalIntensity, n, windowA) / both.incidentPower).toBeCloseTo(0.5, 5);
    expect(windowPower(both.totalIntensity, n, windowB) / both.incidentPower).toBeCloseTo(0.5, 5);
    const [onX, onY] = both.projections!;
    // The x analyser sees only image A: crosstalk from the y output into window A is at float32 noise level.
    expect(windowCrosstalkDb(onX.intensity, onY.intensity, n, windowA)).toBeLessThan(-100);
  });

  it('projection is ⟨a|E⟩ with normalized a, and the analyser must be orthogonal', () => {
    const ex = constant(1);
    const ey = constant(0, 1);
    const same = projectField(ex, ey, [
      [1, 0],
      [0, 1],
    ]);
    // Closed form: ⟨(1, i)/√2 | (1, i)⟩ = (1 + (−i)(i))/√2 = √2.
    expect(same.re[0]).toBeCloseTo(Math.SQRT2, 12);
    expect(same.im[0]).toBeCloseTo(0, 12);
    const partner = projectField(ex, ey, [
      [1, 0],
      [0, -1],
    ]);
    // ⟨(1, −i)/√2 | (1, i)⟩ = (1 + (i)(i))/√2 = 0: the orthogonal state sees nothing.
    expect(Math.hypot(partner.re[0], partner.im[0])).toBeLessThan(1e-15);
    const device = linearMultiplexer(new Float64Array(size), new Float64Array(size));
    expect(() => simulateDevice(device, { grid, input: X, analyser: [X, D45] })).toThrow(RangeError);
  });

  it('Gaussian illumination multiplies the near field', () => {
    const device = linearMultiplexer(new Float64Array(size), new Float64Array(size));
    const amplitude = illuminationAmplitude(grid, { kind: 'gaussian', waist: 10 * lambda });
    const near = applyJones(device, X, amplitude);
    expect(near.x.re[0]).toBeCloseTo(amplitude[0], 15);
    expect(near.x.re[32 * 64 + 32]).toBeCloseTo(Math.exp(-(0.25 + 0.25) / 100), 12);
  });
});
