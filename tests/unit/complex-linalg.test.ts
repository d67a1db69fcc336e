import { execFileSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import { cEig, cFromArray, cIdentity, cInverse, cMul, cSolve, cZeros, type CMatrix } from '../../shared/optics/complex-linalg';
import { mulberry32 } from '../../shared/optics/random';
import { PYTHON } from '../support/python';

function randomMatrix(n: number, seed: number): CMatrix {
  const rand = mulberry32(seed);
  const a = cZeros(n, n);
  for (let k = 0; k < n * n; k++) {
    a.re[k] = rand() - 0.5;
    a.im[k] = rand() - 0.5;
  }
  return a;
}

const maxAbs = (a: CMatrix): number => {
  let m = 0;
  for (let k = 0; k < a.re.length; k++) m = Math.max(m, Math.hypot(a.re[k], a.im[k]));
  return m;
};

/** ‖A·X − X·Λ‖_max / ‖A‖_max. */
function eigResidual(a: CMatrix): number {
  const e = cEig(a);
  const n = a.rows;
  const ax = cMul(a, e.vectors);
  let res = 0;
  for (let i = 0; i < n; i++) {
    for (let k = 0; k < n; k++) {
      const xr = e.vectors.re[i * n + k];
      const xi = e.vectors.im[i * n + k];
      const lr = e.valuesRe[k];
      const li = e.valuesIm[k];
      res = Math.max(res, Math.hypot(ax.re[i * n + k] - (xr * lr - xi * li), ax.im[i * n + k] - (xr * li + xi * lr)));
    }
  }
  return res / maxAbs(a);
}

describe('complex LU', () => {
  it('solves A·X = B to round-off and inverts (definition of the inverse)', () => {
    const a = randomMatrix(60, 7);
    const b = randomMatrix(60, 8);
    const x = cSolve(a, b);
    const ax = cMul(a, x);
    for (let k = 0; k < ax.re.length; k++) {
      expect(Math.abs(ax.re[k] - b.re[k])).toBeLessThan(1e-11);
      expect(Math.abs(ax.im[k] - b.im[k])).toBeLessThan(1e-11);
    }
    const id = cMul(a, cInverse(a));
    const e = cIdentity(60);
    for (let k = 0; k < id.re.length; k++) expect(Math.hypot(id.re[k] - e.re[k], id.im[k] - e.im[k])).toBeLessThan(1e-11);
  });

  it('refuses an exactly singular matrix with a message', () => {
    expect(() => cSolve(cFromArray([[1, 2], [2, 4]]), cIdentity(2))).toThrow(/singular/);
  });
});

describe('complex eigendecomposition', () => {
  it('finds the known eigenvalues of a companion matrix: roots 1, −2, 3i, 0.5 − 0.5i (constructed)', () => {
    // Companion matrix of (z − 1)(z + 2)(z − 3i)(z − 0.5 + 0.5i).
    const roots: [number, number][] = [[1, 0], [-2, 0], [0, 3], [0.5, -0.5]];
    let poly: [number, number][] = [[1, 0]]; // coefficients, highest first
    for (const [rr, ri] of roots) {
      const next: [number, number][] = poly.map(() => [0, 0] as [number, number]).concat([[0, 0]]);
      poly.forEach(([pr, pi], i) => {
        next[i][0] += pr;
        next[i][1] += pi;
        next[i + 1][0] -= pr * rr - pi * ri;
        next[i + 1][1] -= pr * ri + pi * rr;
      });
      poly = next;
    }
    const n = roots.length;
    const c = cZeros(n, n);
    for (let j = 0; j < n; j++) {
      c.re[j] = -poly[j + 1][0];
      c.im[j] = -poly[j + 1][1];
    }
    for (let i = 1; i < n; i++) c.re[i * n + i - 1] = 1;
    const e = cEig(c);
    for (const [rr, ri] of roots) {
      const nearest = Math.min(...Array.from(e.valuesRe, (v, k) => Math.hypot(v - rr, e.valuesIm[k] - ri)));
      expect(nearest).toBeLessThan(1e-12);
    }
    expect(eigResidual(c)).toBeLessThan(1e-13);
  });

  it('A·X = X·Λ to 1e-12 for random complex matrices of 10, 80 and 200 (definition of the eigenpairs)', () => {
    for (const [n, seed] of [[10, 1], [80, 2], [200, 3]]) expect(eigResidual(randomMatrix(n, seed))).toBeLessThan(1e-12);
  });

  it('handles a badly scaled matrix (balancing) and a repeated eigenvalue', () => {
    const a = randomMatrix(30, 5);
    // D·A·D⁻¹ with D spanning 1e-6 … 1e6: same eigenvalues, badly scaled entries.
    for (let i = 0; i < 30; i++) {
      for (let j = 0; j < 30; j++) {
        const s = 10 ** ((12 * (i - j)) / 29);
        a.re[i * 30 + j] *= s;
        a.im[i * 30 + j] *= s;
      }
    }
    const plain = cEig(randomMatrix(30, 5));
    const scaled = cEig(a);
    const sorted = (e: typeof plain): number[] => Array.from(e.valuesRe, (v, k) => v * 1000 + e.valuesIm[k]).sort((x, y) => x - y);
    const p = sorted(plain);
    const s = sorted(scaled);
    for (let k = 0; k < 30; k++) expect(Math.abs(p[k] - s[k])).toBeLessThan(1e-8);
    const d = cEig(cFromArray([[2, 0, 0], [0, 2, 0], [0, 0, 5]]));
    expect(Array.from(d.valuesRe).sort()).toEqual([2, 2, 5]);
    expect(eigResidual(cFromArray([[2, 0, 0], [0, 2, 0], [0, 0, 5]]))).toBe(0);
  });

  it('agrees with numpy.linalg.eigvals (LAPACK zgeev) on a random 50×50 complex matrix (independent library)', () => {
    const a = randomMatrix(50, 11);
    const script = [
      'import sys, json, numpy as np',
      'd = json.load(sys.stdin)',
      'a = np.array(d["re"]).reshape(50, 50) + 1j * np.array(d["im"]).reshape(50, 50)',
      'w = np.linalg.eigvals(a)',
      'print(json.dumps({"re": w.real.tolist(), "im": w.imag.tolist()}))',
    ].join('\n');
    const out = execFileSync(PYTHON, ['-c', script], { input: JSON.stringify({ re: Array.from(a.re), im: Array.from(a.im) }), encoding: 'utf8' });
    const ref = JSON.parse(out) as { re: number[]; im: number[] };
    const e = cEig(a);
    for (let k = 0; k < 50; k++) {
      const nearest = Math.min(...ref.re.map((r, j) => Math.hypot(r - e.valuesRe[k], ref.im[j] - e.valuesIm[k])));
      expect(nearest).toBeLessThan(1e-11);
    }
  });
});
