import { describe, expect, it } from 'vitest';
import {
  applyJones,
  buildJonesField,
  canonicalDecomposition,
  circularClosedForm,
  decomposeJones,
  decomposeJonesField,
  geometricPhaseResponse,
  jonesAt,
  jonesForPhases,
  linearClosedForm,
  retarderJones,
  synthesizeDecomposition,
  synthesizeJones,
} from '../../shared/optics/jones';
import { wrapPhase } from '../../shared/optics/phase-terms';
import type { JonesMatrix } from '../../shared/optics/jones';
import { circularState, innerProduct, polarizationPair } from '../../shared/optics/polarization';
import type { PolarizationSpec } from '../../shared/optics/polarization';
import type { JonesVector } from '../../shared/optics/types';
import { mulberry32 } from '../../shared/optics/random';

const conj = (v: JonesVector): JonesVector => [
  [v[0][0], -v[0][1]],
  [v[1][0], -v[1][1]],
];
const times = (phi: number, v: JonesVector): JonesVector => {
  const c = Math.cos(phi);
  const s = Math.sin(phi);
  return v.map(([re, im]) => [re * c - im * s, re * s + im * c]) as JonesVector;
};
const vectorDistance = (u: JonesVector, v: JonesVector): number =>
  Math.hypot(u[0][0] - v[0][0], u[0][1] - v[0][1], u[1][0] - v[1][0], u[1][1] - v[1][1]);
const matrixDistance = (a: JonesMatrix, b: JonesMatrix): number =>
  Math.hypot(
    a.xx[0] - b.xx[0], a.xx[1] - b.xx[1], a.xy[0] - b.xy[0], a.xy[1] - b.xy[1],
    a.yx[0] - b.yx[0], a.yx[1] - b.yx[1], a.yy[0] - b.yy[0], a.yy[1] - b.yy[1],
  );
const phaseDistance = (a: number, b: number): number => Math.abs(wrapPhase(a - b));

function randomSpecs(rand: () => number): PolarizationSpec[] {
  const specs: PolarizationSpec[] = [
    { kind: 'circular', handedness: 'left' },
    { kind: 'circular', handedness: 'right' },
    { kind: 'linear', angle: 0 },
  ];
  for (let i = 0; i < 10; i++) specs.push({ kind: 'linear', angle: (rand() - 0.5) * 2 * Math.PI });
  for (let i = 0; i < 20; i++) {
    specs.push({ kind: 'elliptical', psi: (rand() - 0.5) * 2 * Math.PI, chi: (rand() - 0.5) * (Math.PI / 2) });
  }
  return specs;
}

describe('Jones synthesis (Mueller et al., PRL 118, 113901 (2017))', () => {
  const rand = mulberry32(2017);
  const specs = randomSpecs(rand);

  it('sends λA → e^{iφA} λA* and λB → e^{iφB} λB* to 1e-9 for linear, circular and elliptical pairs', () => {
    for (const spec of specs) {
      const pair = polarizationPair(spec);
      for (let t = 0; t < 20; t++) {
        const phiA = (rand() - 0.5) * 4 * Math.PI;
        const phiB = (rand() - 0.5) * 4 * Math.PI;
        const j = jonesForPhases(phiA, phiB, pair);
        expect(vectorDistance(applyJones(j, pair.a), times(phiA, conj(pair.a)))).toBeLessThan(1e-9);
        expect(vectorDistance(applyJones(j, pair.b), times(phiB, conj(pair.b)))).toBeLessThan(1e-9);
      }
    }
  });

  it('J is symmetric and unitary (Mueller et al. 2017)', () => {
    for (const spec of specs) {
      const pair = polarizationPair(spec);
      const j = jonesForPhases(rand() * 6, rand() * 6, pair);
      expect(Math.hypot(j.xy[0] - j.yx[0], j.xy[1] - j.yx[1])).toBeLessThan(1e-12);
      // J·J† = I: columns orthonormal.
      const c1: JonesVector = [j.xx, j.yx];
      const c2: JonesVector = [j.xy, j.yy];
      const [n1] = innerProduct(c1, c1);
      const [n2] = innerProduct(c2, c2);
      const [re, im] = innerProduct(c1, c2);
      expect(n1).toBeCloseTo(1, 12);
      expect(n2).toBeCloseTo(1, 12);
      expect(Math.hypot(re, im)).toBeLessThan(1e-12);
    }
  });

  it('field version equals the per-cell synthesis', () => {
    const pair = polarizationPair({ kind: 'elliptical', psi: 0.3, chi: 0.2 });
    const n = 8;
    const phiA = Float64Array.from({ length: n * n }, () => rand() * 2 * Math.PI);
    const phiB = Float64Array.from({ length: n * n }, () => rand() * 2 * Math.PI);
    const field = synthesizeJones(phiA, phiB, pair);
    for (let i = 0; i < n * n; i++) {
      expect(matrixDistance(jonesAt(field, i), jonesForPhases(phiA[i], phiB[i], pair))).toBeLessThan(1e-14);
    }
    expect(() => synthesizeJones(new Float64Array(3), new Float64Array(3), pair)).toThrow(RangeError);
  });
});

describe('decomposition J = R(θ)·diag(e^{iδx}, e^{iδy})·R(θ)ᵀ', () => {
  const rand = mulberry32(42);

  it('round-trips to J to 1e-9 for random pairs and phases, incl. degenerate cells', () => {
    for (const spec of randomSpecs(rand)) {
      const pair = polarizationPair(spec);
      for (let t = 0; t < 30; t++) {
        const phiA = (rand() - 0.5) * 4 * Math.PI;
        // every 5th cell: φB chosen so that the cell is degenerate or nearly so
        const phiB = t % 5 === 0 ? phiA + (t % 10 === 0 ? 0 : 1e-9) : (rand() - 0.5) * 4 * Math.PI;
        const j = jonesForPhases(phiA, phiB, pair);
        const d = decomposeJones(j);
        expect(d.theta).toBeGreaterThan(-Math.PI / 4 - 1e-15);
        expect(d.theta).toBeLessThanOrEqual(Math.PI / 4 + 1e-15);
        expect(matrixDistance(retarderJones(1, d.deltaX, 1, d.deltaY, d.theta), j)).toBeLessThan(1e-9);
      }
    }
  });

  it('circular basis gives the closed form δx = (φA+φB)/2, δy = δx − π, θ = (φA−φB)/4 (Mueller et al. 2017)', () => {
    for (const handedness of ['left', 'right'] as const) {
      const pair = polarizationPair({ kind: 'circular', handedness });
      for (let t = 0; t < 200; t++) {
        const phiA = rand() * 2 * Math.PI;
        const phiB = rand() * 2 * Math.PI;
        const closed = circularClosedForm(phiA, phiB, handedness);
        const j = jonesForPhases(phiA, phiB, pair);
        // The closed form itself builds J …
        expect(matrixDistance(retarderJones(1, closed.deltaX, 1, closed.deltaY, closed.theta), j)).toBeLessThan(1e-12);
        // … and the general decomposition returns the same (δx, δy, θ) after the documented reduction.
        const expected = canonicalDecomposition(closed.deltaX, closed.deltaY, closed.theta);
        const got = decomposeJones(j);
        expect(phaseDistance(got.deltaX, expected.deltaX)).toBeLessThan(1e-9);
        expect(phaseDistance(got.deltaY, expected.deltaY)).toBeLessThan(1e-9);
        expect(Math.abs(got.theta - expected.theta)).toBeLessThan(1e-9);
      }
    }
  });

  it('linear x/y basis gives δx = φA, δy = φB, θ = 0 directly (Mueller et al. 2017)', () => {
    const pair = polarizationPair({ kind: 'linear', angle: 0 });
    const n = 16;
    const phiA = Float64Array.from({ length: n * n }, () => (rand() - 0.5) * 2 * Math.PI);
    const phiB = Float64Array.from({ length: n * n }, () => (rand() - 0.5) * 2 * Math.PI);
    const d = synthesizeDecomposition(phiA, phiB, pair);
    for (let i = 0; i < n * n; i++) {
      const closed = linearClosedForm(phiA[i], phiB[i]);
      expect(phaseDistance(d.deltaX[i], closed.deltaX)).toBeLessThan(1e-12);
      expect(phaseDistance(d.deltaY[i], closed.deltaY)).toBeLessThan(1e-12);
      expect(Math.abs(d.theta[i])).toBeLessThan(1e-12);
    }
  });

  it('linear basis at ψ gives θ = ψ (mod the documented reduction)', () => {
    const psi = 0.3;
    const pair = polarizationPair({ kind: 'linear', angle: psi });
    for (let t = 0; t < 50; t++) {
      const phiA = rand() * 2 * Math.PI;
      const phiB = rand() * 2 * Math.PI;
      const got = decomposeJones(jonesForPhases(phiA, phiB, pair));
      const expected = canonicalDecomposition(phiA, phiB, psi);
      expect(phaseDistance(got.deltaX, expected.deltaX)).toBeLessThan(1e-9);
      expect(phaseDistance(got.deltaY, expected.deltaY)).toBeLessThan(1e-9);
      expect(Math.abs(got.theta - expected.theta)).toBeLessThan(1e-9);
    }
  });

  it('one-pass synthesis+decomposition equals decomposing the stored field; ideal field rebuilds J', () => {
    const pair = polarizationPair({ kind: 'elliptical', psi: -0.8, chi: 0.35 });
    const n = 12;
    const phiA = Float64Array.from({ length: n * n }, () => rand() * 2 * Math.PI);
    const phiB = Float64Array.from({ length: n * n }, () => rand() * 2 * Math.PI);
    const field = synthesizeJones(phiA, phiB, pair);
    const a = decomposeJonesField(field);
    const b = synthesizeDecomposition(phiA, phiB, pair);
    const ideal = buildJonesField(1, b.deltaX, 1, b.deltaY, b.theta);
    for (let i = 0; i < n * n; i++) {
      expect(phaseDistance(a.deltaX[i], b.deltaX[i])).toBeLessThan(1e-12);
      expect(phaseDistance(a.deltaY[i], b.deltaY[i])).toBeLessThan(1e-12);
      expect(Math.abs(a.theta[i] - b.theta[i])).toBeLessThan(1e-12);
      expect(matrixDistance(jonesAt(ideal, i), jonesAt(field, i))).toBeLessThan(1e-9);
    }
  });

  it('a degenerate cell (δx = δy) gets θ = 0', () => {
    const d = decomposeJones(retarderJones(1, 0.7, 1, 0.7, 0.4));
    expect(d.theta).toBe(0);
    expect(d.deltaX).toBeCloseTo(0.7, 14);
    expect(d.deltaY).toBeCloseTo(0.7, 14);
  });

  it('a half-wave plate at 45° swaps x and y (Jones calculus, textbook)', () => {
    const j = retarderJones(1, 0, 1, Math.PI, Math.PI / 4);
    expect(j.xx[0]).toBeCloseTo(0, 15);
    expect(j.xy[0]).toBeCloseTo(1, 15);
    expect(j.yy[0]).toBeCloseTo(0, 15);
  });
});

describe('geometric phase', () => {
  it('circular in → opposite handedness with phase ±2θ and power sin²(Γ/2); the rest cos²(Γ/2) keeps its state (PRODUCT.md, Pancharatnam–Berry)', () => {
    const rand = mulberry32(7);
    for (let t = 0; t < 100; t++) {
      const deltaX = (rand() - 0.5) * 2 * Math.PI;
      const deltaY = (rand() - 0.5) * 2 * Math.PI;
      const theta = (rand() - 0.5) * Math.PI;
      const Gamma = deltaX - deltaY;
      const Sigma = (deltaX + deltaY) / 2;
      const j = retarderJones(1, deltaX, 1, deltaY, theta);
      const j0 = retarderJones(1, deltaX, 1, deltaY, 0);
      for (const handedness of ['left', 'right'] as const) {
        const input = circularState(handedness);
        const opposite = circularState(handedness === 'left' ? 'right' : 'left');
        const out = applyJones(j, input);
        const cross = innerProduct(opposite, out);
        const co = innerProduct(input, out);
        expect(cross[0] ** 2 + cross[1] ** 2).toBeCloseTo(Math.sin(Gamma / 2) ** 2, 12);
        expect(co[0] ** 2 + co[1] ** 2).toBeCloseTo(Math.cos(Gamma / 2) ** 2, 12);
        // Phase of the converted light relative to θ = 0 is +2θ (left in) or −2θ (right in).
        const cross0 = innerProduct(opposite, applyJones(j0, input));
        if (Math.abs(Math.sin(Gamma / 2)) > 1e-3) {
          const rel = Math.atan2(cross[1], cross[0]) - Math.atan2(cross0[1], cross0[0]);
          expect(phaseDistance(rel, handedness === 'left' ? 2 * theta : -2 * theta)).toBeLessThan(1e-9);
        }
        // The co-polarized part does not depend on θ.
        const co0 = innerProduct(input, applyJones(j0, input));
        expect(Math.hypot(co[0] - co0[0], co[1] - co0[1])).toBeLessThan(1e-12);
        // The closed-form response agrees in amplitude and phase.
        const r = geometricPhaseResponse(Gamma, theta, handedness, Sigma);
        expect(Math.hypot(r.cross[0] - cross[0], r.cross[1] - cross[1])).toBeLessThan(1e-12);
        expect(Math.hypot(r.co[0] - co[0], r.co[1] - co[1])).toBeLessThan(1e-12);
        expect(r.crossPower + r.coPower).toBeCloseTo(1, 14);
      }
    }
  });

  it('a half-wave cell (Γ = π) converts all power', () => {
    const r = geometricPhaseResponse(Math.PI, 0.3, 'left');
    expect(r.crossPower).toBeCloseTo(1, 15);
    expect(r.coPower).toBeCloseTo(0, 15);
    expect(r.geometricPhase).toBeCloseTo(0.6, 15);
  });
});

describe('helpers', () => {
  it('wrapPhase maps to (−π, π]', () => {
    expect(wrapPhase(3 * Math.PI / 2)).toBeCloseTo(-Math.PI / 2, 14);
    expect(wrapPhase(-Math.PI)).toBeCloseTo(Math.PI, 14);
    expect(wrapPhase(Math.PI)).toBeCloseTo(Math.PI, 14);
  });

  it('canonicalDecomposition reduces θ into (−π/4, π/4] by swapping axes', () => {
    const c = canonicalDecomposition(1, 2, Math.PI / 2);
    expect(c).toEqual({ deltaX: 2, deltaY: 1, theta: 0 });
    const d = canonicalDecomposition(1, 2, -0.3 + Math.PI);
    expect(d.deltaX).toBe(1);
    expect(d.theta).toBeCloseTo(-0.3, 14);
  });

  it('buildJonesField needs n when every value is a constant', () => {
    expect(() => buildJonesField(1, 0, 1, 0, 0)).toThrow(RangeError);
    expect(buildJonesField(1, 0, 1, 0, 0, 2).n).toBe(2);
  });
});
