import { describe, expect, it } from 'vitest';
import {
  axiconPhase,
  cellCoordinates,
  customPhase,
  lensPhase,
  phaseOfTerm,
  sumPhaseTerms,
  tiltPhase,
  vortexPhase,
  wrapPhase,
} from '../../shared/optics/phase-terms';
import type { CellGrid } from '../../shared/optics/types';

const lambda = 1e-6;
const grid: CellGrid = { n: 64, period: lambda / 2, lambda };
const k = (2 * Math.PI) / lambda;
const c = cellCoordinates(grid);
const close = (a: number, b: number) => Math.abs(wrapPhase(a - b)) < 1e-9;

describe('phase terms (closed forms, PRODUCT.md physics section)', () => {
  it('wraps to (−π, π]', () => {
    expect(wrapPhase(Math.PI)).toBe(Math.PI);
    expect(wrapPhase(-Math.PI)).toBe(Math.PI);
    expect(wrapPhase((3 * Math.PI) / 2)).toBeCloseTo(-Math.PI / 2, 15);
    expect(wrapPhase(7)).toBeCloseTo(7 - 2 * Math.PI, 15);
  });

  it('cell centres are (i − (N−1)/2)·P', () => {
    expect(c[0]).toBeCloseTo(-31.5 * grid.period, 18);
    expect(c[63]).toBeCloseTo(31.5 * grid.period, 18);
  });

  it('axicon φ = −k r sinβ, from NA or from the cone half-angle', () => {
    const a = axiconPhase(grid, { numericalAperture: 0.3 });
    const b = axiconPhase(grid, { coneHalfAngle: Math.asin(0.3) });
    for (const i of [0, 100, 2080, 4095]) {
      const r = Math.hypot(c[i % 64], c[Math.floor(i / 64)]);
      expect(close(a[i], -k * r * 0.3)).toBe(true);
      expect(close(b[i], a[i])).toBe(true);
    }
    expect(() => axiconPhase(grid, {})).toThrow(RangeError);
    expect(() => axiconPhase(grid, { numericalAperture: 1.2 })).toThrow(RangeError);
  });

  it('vortex φ = ℓ·atan2(y, x): the phase winds 2πℓ around the axis, either sign', () => {
    for (const charge of [1, -2, 3]) {
      const v = vortexPhase(grid, charge);
      // Walk a closed square loop around the axis, summing wrapped phase steps.
      const loop: number[] = [];
      for (let x = 20; x < 44; x++) loop.push(20 * 64 + x);
      for (let y = 20; y < 44; y++) loop.push(y * 64 + 44);
      for (let x = 44; x > 20; x--) loop.push(44 * 64 + x);
      for (let y = 44; y > 20; y--) loop.push(y * 64 + 20);
      let winding = 0;
      for (let i = 0; i < loop.length; i++) winding += wrapPhase(v[loop[(i + 1) % loop.length]] - v[loop[i]]);
      expect(winding / (2 * Math.PI)).toBeCloseTo(charge, 9);
    }
    expect(() => vortexPhase(grid, 1.5)).toThrow(RangeError);
  });

  it('lens φ = −k(√(r² + f²) − f) and tilt φ = k(x sinθx + y sinθy)', () => {
    const f = 50e-6;
    const lens = lensPhase(grid, f);
    const tilt = tiltPhase(grid, 0.1, -0.2);
    for (const i of [0, 777, 4095]) {
      const x = c[i % 64];
      const y = c[Math.floor(i / 64)];
      expect(close(lens[i], -k * (Math.sqrt(x * x + y * y + f * f) - f))).toBe(true);
      expect(close(tilt[i], k * (x * Math.sin(0.1) + y * Math.sin(-0.2)))).toBe(true);
    }
    expect(() => lensPhase(grid, 0)).toThrow(RangeError);
  });

  it('custom map is validated, and the sum of terms is the wrapped sum', () => {
    expect(() => customPhase(grid, new Float64Array(10))).toThrow(RangeError);
    const custom = new Float64Array(64 * 64).fill(5);
    const sum = sumPhaseTerms(grid, [
      { kind: 'custom', phase: custom },
      { kind: 'vortex', charge: 1 },
      { kind: 'tilt', thetaX: 0.05, thetaY: 0 },
    ]);
    const v = phaseOfTerm(grid, { kind: 'vortex', charge: 1 });
    const t = phaseOfTerm(grid, { kind: 'tilt', thetaX: 0.05, thetaY: 0 });
    for (let i = 0; i < sum.length; i += 97) {
      expect(close(sum[i], 5 + v[i] + t[i])).toBe(true);
      expect(sum[i] > -Math.PI && sum[i] <= Math.PI).toBe(true);
    }
    expect(Array.from(sumPhaseTerms(grid, []))).toEqual(new Array(64 * 64).fill(0));
  });
});
