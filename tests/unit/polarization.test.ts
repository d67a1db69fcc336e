import { describe, expect, it } from 'vitest';
import {
  areOrthogonal,
  circularState,
  ellipseParameters,
  ellipticalState,
  innerProduct,
  jonesNorm,
  linearState,
  orthogonalPartner,
  polarizationPair,
} from '../../shared/optics/polarization';
import type { JonesVector } from '../../shared/optics/types';
import { mulberry32 } from '../../shared/optics/random';

/** Physical field Re{E e^{−iωt}} at phase ωt. */
function fieldAt(v: JonesVector, wt: number): [number, number] {
  const c = Math.cos(wt);
  const s = Math.sin(wt);
  // Re{(a + ib)(cos − i sin)} = a cos + b sin
  return [v[0][0] * c + v[0][1] * s, v[1][0] * c + v[1][1] * s];
}

/** Sign of the turning of the field vector seen with x right, y up (z towards the viewer): +1 counter-clockwise. */
function turningSense(v: JonesVector): number {
  const [x0, y0] = fieldAt(v, 0);
  const [x1, y1] = fieldAt(v, 1e-3);
  return Math.sign(x0 * y1 - y0 * x1);
}

describe('Jones vectors', () => {
  it('λ(ψ, χ) has unit norm and its partner λ(ψ+π/2, −χ) is orthogonal (Azzam & Bashara)', () => {
    const rand = mulberry32(11);
    for (let t = 0; t < 200; t++) {
      const psi = (rand() - 0.5) * 2 * Math.PI;
      const chi = (rand() - 0.5) * (Math.PI / 2);
      const a = ellipticalState(psi, chi);
      const b = orthogonalPartner(psi, chi);
      expect(jonesNorm(a)).toBeCloseTo(1, 14);
      expect(jonesNorm(b)).toBeCloseTo(1, 14);
      const [re, im] = innerProduct(a, b);
      expect(Math.hypot(re, im)).toBeLessThan(1e-15);
      expect(areOrthogonal(a, b)).toBe(true);
    }
  });

  it('λ(ψ, χ) matches its written components (PRODUCT.md formula, Azzam & Bashara)', () => {
    const psi = 0.7;
    const chi = -0.3;
    const v = ellipticalState(psi, chi);
    // [cosψ cosχ − i sinψ sinχ, sinψ cosχ + i cosψ sinχ]
    expect(v[0][0]).toBeCloseTo(Math.cos(psi) * Math.cos(chi), 15);
    expect(v[0][1]).toBeCloseTo(-Math.sin(psi) * Math.sin(chi), 15);
    expect(v[1][0]).toBeCloseTo(Math.sin(psi) * Math.cos(chi), 15);
    expect(v[1][1]).toBeCloseTo(Math.cos(psi) * Math.sin(chi), 15);
  });

  it('right-circular [1, −i]/√2 turns clockwise seen by the receiver under exp(−iωt) (Born & Wolf convention, from memory)', () => {
    expect(turningSense(circularState('right'))).toBe(-1);
    expect(turningSense(circularState('left'))).toBe(1);
    // χ > 0 is left-handed with this convention.
    expect(turningSense(ellipticalState(0.4, 0.2))).toBe(1);
    expect(turningSense(ellipticalState(0.4, -0.2))).toBe(-1);
    expect(circularState('right')[1][1]).toBeCloseTo(-Math.SQRT1_2, 15);
  });

  it('χ = ±π/4 gives the circular states up to a global phase; the circular pair is orthogonal', () => {
    const left = ellipticalState(0, Math.PI / 4);
    const [re, im] = innerProduct(circularState('left'), left);
    expect(Math.hypot(re, im)).toBeCloseTo(1, 14);
    const pair = polarizationPair({ kind: 'circular', handedness: 'right' });
    expect(pair.a).toEqual(circularState('right'));
    expect(pair.b).toEqual(circularState('left'));
    expect(areOrthogonal(pair.a, pair.b)).toBe(true);
  });

  it('linear pair at ψ is [cosψ, sinψ] and [−sinψ, cosψ]', () => {
    const psi = 0.35;
    const { a, b } = polarizationPair({ kind: 'linear', angle: psi });
    const l = linearState(psi);
    expect(a[0][0]).toBeCloseTo(l[0][0], 15);
    expect(a[1][0]).toBeCloseTo(l[1][0], 15);
    expect(b[0][0]).toBeCloseTo(-Math.sin(psi), 15);
    expect(b[1][0]).toBeCloseTo(Math.cos(psi), 15);
    expect(Math.abs(b[0][1]) + Math.abs(b[1][1]) + Math.abs(a[0][1]) + Math.abs(a[1][1])).toBe(0);
  });

  it('rejects an ellipticity outside [−π/4, π/4]', () => {
    expect(() => polarizationPair({ kind: 'elliptical', psi: 0, chi: 1 })).toThrow(RangeError);
    expect(() => polarizationPair({ kind: 'linear', angle: Number.NaN })).toThrow(RangeError);
  });
});

describe('polarization ellipse', () => {
  it('recovers ψ and χ of λ(ψ, χ) (Stokes parameters, Azzam & Bashara)', () => {
    const rand = mulberry32(5);
    for (let t = 0; t < 200; t++) {
      const psi = (rand() - 0.5) * 0.98 * Math.PI; // inside (−π/2, π/2)
      const chi = (rand() - 0.5) * 0.98 * (Math.PI / 2);
      const amp = 0.5 + rand();
      const phase = rand() * 2 * Math.PI;
      const v = ellipticalState(psi, chi);
      const scaled: JonesVector = v.map(([re, im]) => [
        amp * (re * Math.cos(phase) - im * Math.sin(phase)),
        amp * (re * Math.sin(phase) + im * Math.cos(phase)),
      ]) as JonesVector;
      const e = ellipseParameters(scaled);
      expect(e.psi).toBeCloseTo(psi, 10);
      expect(e.chi).toBeCloseTo(chi, 10);
      expect(e.majorAxis).toBeCloseTo(amp * Math.cos(chi), 10);
      expect(e.minorAxis).toBeCloseTo(amp * Math.abs(Math.sin(chi)), 10);
      expect(e.s0).toBeCloseTo(amp * amp, 10);
      expect(e.handedness).toBe(chi > 0 ? 'left' : 'right');
    }
  });

  it('the semi-axes are the extreme lengths of the traced field Re{E e^{−iωt}}', () => {
    const v = ellipticalState(0.9, 0.25);
    let max = 0;
    let min = Infinity;
    for (let k = 0; k < 20000; k++) {
      const [x, y] = fieldAt(v, (k / 20000) * 2 * Math.PI);
      const r = Math.hypot(x, y);
      max = Math.max(max, r);
      min = Math.min(min, r);
    }
    const e = ellipseParameters(v);
    expect(e.majorAxis).toBeCloseTo(max, 6);
    expect(e.minorAxis).toBeCloseTo(min, 6);
  });

  it('labels linear light as linear', () => {
    expect(ellipseParameters(linearState(0.2)).handedness).toBe('linear');
    expect(ellipseParameters(circularState('right')).chi).toBeCloseTo(-Math.PI / 4, 12);
  });
});
