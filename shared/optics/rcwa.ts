/**
 * Rigorous coupled-wave analysis (RCWA, the Fourier modal method) of a periodic layer stack at normal
 * incidence: a square (or rectangular) lattice of period P, layers stacked along z, each either uniform or
 * patterned with rectangles of one material in a background (a pillar; an elliptical pillar as a staircase of
 * rectangles). Fields are expanded in Nx × Ny plane-wave harmonics.
 *
 * - Eigenmodes of a patterned layer from the second-order system d²E/dz² = −P·Q·E in the normalized form of
 *   Moharam & Gaylord (JOSA 71, 811 (1981)) generalized to crossed gratings, with the permittivity matrices
 *   factorized by Li's rules for crossed gratings (L. Li, JOSA A 14, 2758 (1997)): ε_xx = ⌈⌊ε⌋⌉ (inverse
 *   rule along x, Laurent along y), ε_yy = ⌊⌈ε⌉⌋ (the reverse), and 1/ε_zz by the inverse of the Laurent
 *   matrix [[ε]].
 * - Layers are joined by the enhanced transmittance matrix approach (Moharam, Grann, Pommet & Gaylord,
 *   JOSA A 12, 1077 (1995)), which only ever multiplies by decaying exponentials: stable for tall pillars.
 * - A centred pillar is symmetric under x → −x and y → −y: `computeAtom` solves x- and y-polarized input each
 *   in its own symmetry sector (fields of one parity class per component), a quarter of the unknowns, which is
 *   why an atom's cross terms t_xy, t_yx are exactly 0; `solveRcwaStack` without `mirrorSymmetric` solves the
 *   full coupled problem (tests compare the two).
 * - Time dependence exp(−iωt): a lossy material has n + ik with k > 0; a forward wave is exp(+i k_z z) with
 *   Im k_z ≥ 0. Lengths in metres; phases in radians.
 *
 * `computeAtom` gives one meta-atom's result (zeroth-order Jones matrix, phases against a bare cell as
 * MetaAtom defines α, total and zeroth-order powers) from a cell description; `solveRcwaStack` is the general
 * solver under it.
 */
import { cEig, cIdentity, cInverse, cLu, cLuSolve, cMul, cZeros, type CMatrix, type Complex } from './complex-linalg';
import { refractiveIndex, type SellmeierMaterial } from './materials';
import { tabulatedIndex, type NkTable } from './nk-table';

// ---------------------------------------------------------------------------------------------------------
// Materials

/** A material: a constant complex index n + ik (k ≥ 0 absorbs), a published Sellmeier fit (materials.ts), or a table of n, k(λ) (nk-table.ts). */
export type RcwaMaterial =
  | { kind: 'constant'; n: number; k?: number; name?: string }
  | { kind: 'sellmeier'; material: SellmeierMaterial }
  | { kind: 'table'; table: NkTable };

/** Complex index n + ik of a material at vacuum wavelength λ (metres). Throws RangeError outside a fit's or a table's range. */
export function materialIndex(material: RcwaMaterial, lambda: number): Complex {
  if (material.kind === 'sellmeier') return { re: refractiveIndex(material.material, lambda), im: 0 };
  if (material.kind === 'table') {
    const { n, k } = tabulatedIndex(material.table, lambda);
    return { re: n, im: k };
  }
  const k = material.k ?? 0;
  if (!Number.isFinite(material.n) || !(material.n > 0) || !Number.isFinite(k) || k < 0) {
    throw new RangeError(`material ${material.name ?? ''}: need n > 0 and k ≥ 0, got n = ${material.n}, k = ${k}`.replace('  ', ' '));
  }
  return { re: material.n, im: k };
}

/** Short description of a material for result notes. */
export function materialLabel(material: RcwaMaterial): string {
  if (material.kind === 'sellmeier') return `${material.material.name} (${material.material.source})`;
  if (material.kind === 'table') {
    const { name, source, points } = material.table;
    return `${name || 'tabulated material'} (n, k tabulated ${points[0][0]}–${points[points.length - 1][0]} nm${source ? `, ${source}` : ''})`;
  }
  const k = material.k ?? 0;
  return material.name ?? (k > 0 ? `n = ${material.n} + ${k}i` : `n = ${material.n}`);
}

const csq = (z: Complex): Complex => ({ re: z.re * z.re - z.im * z.im, im: 2 * z.re * z.im });

// ---------------------------------------------------------------------------------------------------------
// The general stack

/** An axis-aligned rectangle [x0, x1] × [y0, y1] in one period (metres; the cell may be taken as [−P/2, P/2)). */
export interface RcwaRect {
  x0: number;
  x1: number;
  y0: number;
  y1: number;
}

/** A layer of the stack: uniform, or rectangles (not overlapping) of `inclusion` in `background`. */
export type RcwaLayer =
  | { kind: 'uniform'; thickness: number; epsilon: Complex }
  | { kind: 'patterned'; thickness: number; background: Complex; inclusion: Complex; rects: RcwaRect[] };

/** A stack between two half-spaces, layers listed in the direction the light travels. */
export interface RcwaStack {
  /** Lattice periods along x and y, metres. */
  periodX: number;
  periodY: number;
  /** Relative permittivity of the half-space the light comes from (should be lossless). */
  incident: Complex;
  /** Relative permittivity of the half-space the light leaves into (should be lossless). */
  exit: Complex;
  layers: RcwaLayer[];
}

/** Powers of one input polarization, as fractions of the incident power. */
export interface RcwaPowers {
  /** Total transmitted power (all propagating orders). */
  transmitted: number;
  /** Total reflected power. */
  reflected: number;
  /** Transmitted power in the zeroth order (both output polarizations). */
  zeroOrderTransmitted: number;
  /** Reflected power in the zeroth order. */
  zeroOrderReflected: number;
  /** Transmitted power in all other orders: transmitted − zeroOrderTransmitted. */
  otherOrdersTransmitted: number;
  /** Per order (same order as `orders`): transmitted and reflected power. */
  perOrderTransmitted: Float64Array;
  perOrderReflected: Float64Array;
}

/** Result of `solveRcwaStack` for x- and y-polarized unit plane waves at normal incidence. */
export interface RcwaStackResult {
  /** Harmonic orders (m, n) in the order of the per-order arrays. */
  orders: { m: number; n: number }[];
  /**
   * Zeroth-order transmitted field (Ex, Ey) per input polarization, at the last interface, for a unit incident
   * field at the first: raw field ratios (not power-normalized).
   */
  zeroOrder: { x: { ex: Complex; ey: Complex }; y: { ex: Complex; ey: Complex } };
  /** Zeroth-order reflected field (Ex, Ey) per input polarization at the first interface. */
  zeroOrderReflection: { x: { ex: Complex; ey: Complex }; y: { ex: Complex; ey: Complex } };
  x: RcwaPowers;
  y: RcwaPowers;
}

/** Harmonics per axis (odd), from a number N (N × N) or a pair. */
export function harmonicCounts(harmonics: number | readonly [number, number]): [number, number] {
  const pair: [number, number] = typeof harmonics === 'number' ? [harmonics, harmonics] : [harmonics[0], harmonics[1]];
  for (const h of pair) {
    if (!Number.isInteger(h) || h < 1 || h % 2 === 0 || h > 61) {
      throw new RangeError(`harmonics must be odd integers from 1 to 61 per axis (e.g. 11 for 11×11), got ${h}`);
    }
  }
  return pair;
}

/** Fourier coefficient of the indicator of [a, b] over period p: (1/p)∫_a^b e^{−i2πqx/p} dx. */
function intervalCoefficient(a: number, b: number, q: number, p: number): Complex {
  if (q === 0) return { re: (b - a) / p, im: 0 };
  const u = (2 * Math.PI * q) / p;
  // (e^{−iub} − e^{−iua}) · i / (2πq)
  const dr = Math.cos(u * b) - Math.cos(u * a);
  const di = -Math.sin(u * b) + Math.sin(u * a);
  const s = 1 / (2 * Math.PI * q);
  return { re: -di * s, im: dr * s };
}

/** Coefficient table c[q + (N − 1)] for q = −(N − 1)…N − 1 of a union of intervals. */
function intervalTable(intervals: readonly [number, number][], n: number, p: number): { re: Float64Array; im: Float64Array } {
  const re = new Float64Array(2 * n - 1);
  const im = new Float64Array(2 * n - 1);
  for (let q = -(n - 1); q <= n - 1; q++) {
    for (const [a, b] of intervals) {
      const c = intervalCoefficient(a, b, q, p);
      re[q + n - 1] += c.re;
      im[q + n - 1] += c.im;
    }
  }
  return { re, im };
}

const cdiv = (a: Complex, b: Complex): Complex => {
  const d = b.re * b.re + b.im * b.im;
  return { re: (a.re * b.re + a.im * b.im) / d, im: (a.im * b.re - a.re * b.im) / d };
};

/**
 * Inverse-rule matrix of one band: inv(toeplitz[1/ε]) along an axis with `n` harmonics, where ε is `inc` on
 * the intervals and `bg` elsewhere, minus bg·I (the band's departure from the background).
 */
function inverseRuleBand(intervals: readonly [number, number][], inc: Complex, bg: Complex, n: number, p: number): CMatrix {
  const table = intervalTable(intervals, n, p);
  const one = { re: 1, im: 0 };
  const ib = cdiv(one, bg);
  const ii = cdiv(one, inc);
  const dr = ii.re - ib.re;
  const di = ii.im - ib.im;
  const t = cZeros(n, n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      const q = i - j + n - 1;
      const cr = table.re[q];
      const ci = table.im[q];
      t.re[i * n + j] = dr * cr - di * ci + (i === j ? ib.re : 0);
      t.im[i * n + j] = dr * ci + di * cr + (i === j ? ib.im : 0);
    }
  }
  const a = cInverse(t);
  for (let i = 0; i < n; i++) {
    a.re[i * n + i] -= bg.re;
    a.im[i * n + i] -= bg.im;
  }
  return a;
}

/** Bands along one axis: consecutive edges of all rectangles, each with the intervals covering it on the other axis. */
function bands(rects: readonly RcwaRect[], axis: 'x' | 'y'): { lo: number; hi: number; across: [number, number][] }[] {
  const lo = (r: RcwaRect): number => (axis === 'y' ? r.y0 : r.x0);
  const hi = (r: RcwaRect): number => (axis === 'y' ? r.y1 : r.x1);
  const edges = [...new Set(rects.flatMap((r) => [lo(r), hi(r)]))].sort((a, b) => a - b);
  const out: { lo: number; hi: number; across: [number, number][] }[] = [];
  for (let k = 0; k + 1 < edges.length; k++) {
    const a = edges[k];
    const b = edges[k + 1];
    const mid = 0.5 * (a + b);
    const across = rects
      .filter((r) => lo(r) < mid && hi(r) > mid)
      .map((r): [number, number] => (axis === 'y' ? [r.x0, r.x1] : [r.y0, r.y1]));
    if (across.length > 0) out.push({ lo: a, hi: b, across });
  }
  return out;
}

interface Modes {
  /** Electric-field mode matrix W (2M × 2M) and magnetic V (h = i·Z0·H, normalized). */
  w: CMatrix;
  v: CMatrix;
  /** Normalized k_z per mode (k_z / k0). */
  kzRe: Float64Array;
  kzIm: Float64Array;
}

/** Principal square root, turned so the wave decays or propagates forward (Im ≥ 0; Re ≥ 0 when propagating). */
function forwardSqrt(zr: number, zi: number): Complex {
  const mod = Math.hypot(zr, zi);
  let re = Math.sqrt(Math.max(0, (mod + zr) / 2));
  let im = Math.sqrt(Math.max(0, (mod - zr) / 2));
  if (zi < 0) im = -im;
  if (im < -1e-10 * Math.hypot(re, im)) {
    re = -re;
    im = -im;
  }
  return { re, im };
}

/** Q matrix blocks for a uniform medium and V = −i·Q·diag(1/k_z) with W = I. */
function uniformModes(eps: Complex, kx: Float64Array, ky: Float64Array): Modes {
  const m = kx.length;
  const n = 2 * m;
  const w = cIdentity(n);
  const v = cZeros(n, n);
  const kzRe = new Float64Array(n);
  const kzIm = new Float64Array(n);
  for (let i = 0; i < m; i++) {
    const kz = forwardSqrt(eps.re - kx[i] * kx[i] - ky[i] * ky[i], eps.im);
    kzRe[i] = kzRe[i + m] = kz.re;
    kzIm[i] = kzIm[i + m] = kz.im;
    // −i/kz
    const d = kz.re * kz.re + kz.im * kz.im;
    const fr = -kz.im / d;
    const fi = -kz.re / d;
    const set = (r: number, c: number, qr: number, qi: number): void => {
      v.re[r * n + c] = qr * fr - qi * fi;
      v.im[r * n + c] = qr * fi + qi * fr;
    };
    set(i, i, kx[i] * ky[i], 0);
    set(i, i + m, eps.re - kx[i] * kx[i], eps.im);
    set(i + m, i, ky[i] * ky[i] - eps.re, -eps.im);
    set(i + m, i + m, -kx[i] * ky[i], 0);
  }
  return { w, v, kzRe, kzIm };
}

/** Eigenmodes of a patterned layer (Li's factorization, see module comment). */
function patternedModes(
  layer: Extract<RcwaLayer, { kind: 'patterned' }>,
  nx: number,
  ny: number,
  px: number,
  py: number,
  kx: Float64Array,
  ky: Float64Array,
  basis: SectorBasis | null,
): Modes {
  const m = nx * ny;
  const bg = layer.background;
  const inc = layer.inclusion;
  // ε_xx: inverse rule along x in each y band, Laurent along y.
  const exx = cZeros(m, m);
  const eyy = cZeros(m, m);
  for (let i = 0; i < m; i++) {
    exx.re[i * m + i] = eyy.re[i * m + i] = bg.re;
    exx.im[i * m + i] = eyy.im[i * m + i] = bg.im;
  }
  for (const band of bands(layer.rects, 'y')) {
    const a = inverseRuleBand(band.across, inc, bg, nx, px);
    const cy = intervalTable([[band.lo, band.hi]], ny, py);
    for (let iy = 0; iy < ny; iy++) {
      for (let jy = 0; jy < ny; jy++) {
        const cr = cy.re[iy - jy + ny - 1];
        const ci = cy.im[iy - jy + ny - 1];
        for (let ix = 0; ix < nx; ix++) {
          const row = (ix + nx * iy) * m + nx * jy;
          for (let jx = 0; jx < nx; jx++) {
            const ar = a.re[ix * nx + jx];
            const ai = a.im[ix * nx + jx];
            exx.re[row + jx] += ar * cr - ai * ci;
            exx.im[row + jx] += ar * ci + ai * cr;
          }
        }
      }
    }
  }
  for (const band of bands(layer.rects, 'x')) {
    const b = inverseRuleBand(band.across, inc, bg, ny, py);
    const cx = intervalTable([[band.lo, band.hi]], nx, px);
    for (let iy = 0; iy < ny; iy++) {
      for (let jy = 0; jy < ny; jy++) {
        const br = b.re[iy * ny + jy];
        const bi = b.im[iy * ny + jy];
        for (let ix = 0; ix < nx; ix++) {
          const row = (ix + nx * iy) * m + nx * jy;
          for (let jx = 0; jx < nx; jx++) {
            const cr = cx.re[ix - jx + nx - 1];
            const ci = cx.im[ix - jx + nx - 1];
            eyy.re[row + jx] += br * cr - bi * ci;
            eyy.im[row + jx] += br * ci + bi * cr;
          }
        }
      }
    }
  }
  // [[ε]] by Laurent's rule, then its inverse.
  const ezz = cZeros(m, m);
  const dr = inc.re - bg.re;
  const di = inc.im - bg.im;
  const tx = layer.rects.map((r) => intervalTable([[r.x0, r.x1]], nx, px));
  const ty = layer.rects.map((r) => intervalTable([[r.y0, r.y1]], ny, py));
  for (let iy = 0; iy < ny; iy++) {
    for (let jy = 0; jy < ny; jy++) {
      for (let ix = 0; ix < nx; ix++) {
        const row = (ix + nx * iy) * m + nx * jy;
        for (let jx = 0; jx < nx; jx++) {
          let sr = 0;
          let si = 0;
          for (let r = 0; r < tx.length; r++) {
            const ar = tx[r].re[ix - jx + nx - 1];
            const ai = tx[r].im[ix - jx + nx - 1];
            const br = ty[r].re[iy - jy + ny - 1];
            const bi = ty[r].im[iy - jy + ny - 1];
            sr += ar * br - ai * bi;
            si += ar * bi + ai * br;
          }
          ezz.re[row + jx] = dr * sr - di * si + (row + jx === (ix + nx * iy) * (m + 1) ? bg.re : 0);
          ezz.im[row + jx] = dr * si + di * sr + (row + jx === (ix + nx * iy) * (m + 1) ? bg.im : 0);
        }
      }
    }
  }
  const ezi = basis ? parityInverse(ezz, nx, ny) : cInverse(ezz);
  // P = [[Kx Ezi Ky, I − Kx Ezi Kx], [Ky Ezi Ky − I, −Ky Ezi Kx]], Q = [[Kx Ky, Eyy − Kx²], [Ky² − Exx, −Ky Kx]].
  const n = 2 * m;
  const p = cZeros(n, n);
  const q = cZeros(n, n);
  for (let i = 0; i < m; i++) {
    for (let j = 0; j < m; j++) {
      const er = ezi.re[i * m + j];
      const ei = ezi.im[i * m + j];
      const id = i === j ? 1 : 0;
      const top = i * n + j;
      const bottom = (i + m) * n + j;
      const s11 = kx[i] * ky[j];
      const s12 = -kx[i] * kx[j];
      const s21 = ky[i] * ky[j];
      const s22 = -ky[i] * kx[j];
      p.re[top] = s11 * er;
      p.im[top] = s11 * ei;
      p.re[top + m] = s12 * er + id;
      p.im[top + m] = s12 * ei;
      p.re[bottom] = s21 * er - id;
      p.im[bottom] = s21 * ei;
      p.re[bottom + m] = s22 * er;
      p.im[bottom + m] = s22 * ei;
      q.re[i * n + j + m] = eyy.re[i * m + j] - (id ? kx[i] * kx[i] : 0);
      q.im[i * n + j + m] = eyy.im[i * m + j];
      q.re[(i + m) * n + j] = (id ? ky[i] * ky[i] : 0) - exx.re[i * m + j];
      q.im[(i + m) * n + j] = -exx.im[i * m + j];
    }
    q.re[i * n + i] = kx[i] * ky[i];
    q.re[(i + m) * n + i + m] = -ky[i] * kx[i];
  }
  const pr = basis ? project(p, basis.e, basis.h) : p;
  const qr = basis ? project(q, basis.h, basis.e) : q;
  const nr = pr.rows;
  const omega2 = cMul(pr, qr);
  const eig = cEig(omega2);
  const w = eig.vectors;
  const kzRe = new Float64Array(nr);
  const kzIm = new Float64Array(nr);
  // V = Q·W·diag(−i/kz)
  const v = cMul(qr, w);
  for (let j = 0; j < nr; j++) {
    const kz = forwardSqrt(-eig.valuesRe[j], -eig.valuesIm[j]);
    kzRe[j] = kz.re;
    kzIm[j] = kz.im;
    const d = kz.re * kz.re + kz.im * kz.im;
    if (d === 0) throw new Error('RCWA: a mode of the patterned layer has k_z = 0 (a grazing order); change the period or wavelength slightly');
    const fr = -kz.im / d;
    const fi = -kz.re / d;
    for (let i = 0; i < nr; i++) {
      const ar = v.re[i * nr + j];
      const ai = v.im[i * nr + j];
      v.re[i * nr + j] = ar * fr - ai * fi;
      v.im[i * nr + j] = ar * fi + ai * fr;
    }
  }
  return { w, v, kzRe, kzIm };
}

/**
 * A symmetry sector of a cell with mirror lines x = 0 and y = 0 (a centred rectangle or ellipse) at normal
 * incidence: x-polarized light keeps Ex even and Ey odd in both x and y (and hx odd, hy even), y-polarized the
 * reverse; each sector has about a quarter of the 2·Nx·Ny unknowns. Columns are orthonormal real combinations
 * of the orders (±m, ±n) of one component, listed as full-vector indices and coefficients.
 */
interface SectorBasis {
  e: BasisColumn[];
  h: BasisColumn[];
}
interface BasisColumn {
  idx: number[];
  coef: number[];
}

function parityColumns(nx: number, ny: number, oddX: boolean, oddY: boolean, offset: number): BasisColumn[] {
  const hx = (nx - 1) / 2;
  const hy = (ny - 1) / 2;
  const cols: BasisColumn[] = [];
  for (let n = oddY ? 1 : 0; n <= hy; n++) {
    for (let m = oddX ? 1 : 0; m <= hx; m++) {
      const pts: [number, number, number][] = [];
      for (const sm of m === 0 ? [1] : [1, -1]) {
        for (const sn of n === 0 ? [1] : [1, -1]) {
          const sign = (oddX && sm < 0 ? -1 : 1) * (oddY && sn < 0 ? -1 : 1);
          pts.push([sm * m, sn * n, sign]);
        }
      }
      const norm = 1 / Math.sqrt(pts.length);
      cols.push({ idx: pts.map(([a, b]) => offset + a + hx + nx * (b + hy)), coef: pts.map(([, , sg]) => sg * norm) });
    }
  }
  return cols;
}

function sectorBasis(nx: number, ny: number, sector: 'x' | 'y'): SectorBasis {
  const m = nx * ny;
  const even = sector === 'x';
  // x input: Ex even-even, Ey odd-odd; hx odd-odd, hy even-even. y input: the reverse.
  return {
    e: [...parityColumns(nx, ny, !even, !even, 0), ...parityColumns(nx, ny, even, even, m)],
    h: [...parityColumns(nx, ny, even, even, 0), ...parityColumns(nx, ny, !even, !even, m)],
  };
}

/** Lᵀ·A·R for basis column lists L (rows) and R (columns). */
function project(a: CMatrix, left: BasisColumn[], right: BasisColumn[]): CMatrix {
  const out = cZeros(left.length, right.length);
  const n = a.cols;
  for (let i = 0; i < left.length; i++) {
    const li = left[i];
    for (let j = 0; j < right.length; j++) {
      const rj = right[j];
      let sr = 0;
      let si = 0;
      for (let p = 0; p < li.idx.length; p++) {
        const row = li.idx[p] * n;
        for (let q = 0; q < rj.idx.length; q++) {
          const w = li.coef[p] * rj.coef[q];
          sr += w * a.re[row + rj.idx[q]];
          si += w * a.im[row + rj.idx[q]];
        }
      }
      out.re[i * right.length + j] = sr;
      out.im[i * right.length + j] = si;
    }
  }
  return out;
}

/** S·X: reduced coordinates (rows of X, one per basis column) back to the full vector of `size`. */
function expand(x: CMatrix, basis: BasisColumn[], size: number): CMatrix {
  const out = cZeros(size, x.cols);
  for (let j = 0; j < basis.length; j++) {
    const col = basis[j];
    for (let p = 0; p < col.idx.length; p++) {
      const row = col.idx[p] * x.cols;
      for (let k = 0; k < x.cols; k++) {
        out.re[row + k] += col.coef[p] * x.re[j * x.cols + k];
        out.im[row + k] += col.coef[p] * x.im[j * x.cols + k];
      }
    }
  }
  return out;
}

/**
 * Inverse of a matrix that commutes with the mirrors x → −x and y → −y (the Laurent matrix of a mirror-
 * symmetric pattern), block by block in the four parity classes of a scalar function: four inversions of a
 * quarter of the size instead of one.
 */
function parityInverse(a: CMatrix, nx: number, ny: number): CMatrix {
  const out = cZeros(a.rows, a.cols);
  const n = a.cols;
  for (const [oddX, oddY] of [
    [false, false],
    [true, false],
    [false, true],
    [true, true],
  ] as const) {
    const cols = parityColumns(nx, ny, oddX, oddY, 0);
    if (cols.length === 0) continue;
    const b = cInverse(project(a, cols, cols));
    const r = cols.length;
    for (let i = 0; i < r; i++) {
      for (let j = 0; j < r; j++) {
        const vr = b.re[i * r + j];
        const vi = b.im[i * r + j];
        const ci = cols[i];
        const cj = cols[j];
        for (let p = 0; p < ci.idx.length; p++) {
          for (let q = 0; q < cj.idx.length; q++) {
            const w = ci.coef[p] * cj.coef[q];
            const k = ci.idx[p] * n + cj.idx[q];
            out.re[k] += w * vr;
            out.im[k] += w * vi;
          }
        }
      }
    }
  }
  return out;
}

/** Uniform-medium modes in a sector: W = I, V projected, k_z of each column's orders (all alike). */
function reduceUniform(modes: Modes, basis: SectorBasis | null): Modes {
  if (!basis) return modes;
  const r = basis.e.length;
  return {
    w: cIdentity(r),
    v: project(modes.v, basis.h, basis.e),
    kzRe: Float64Array.from(basis.e, (c) => modes.kzRe[c.idx[0]]),
    kzIm: Float64Array.from(basis.e, (c) => modes.kzIm[c.idx[0]]),
  };
}

/** z-component of the Poynting flux per order (arbitrary common units): Re(i·(Ex·hy* − Ey·hx*)). */
function fluxPerOrder(e: CMatrix, h: CMatrix, col: number, m: number): Float64Array {
  const out = new Float64Array(m);
  const c = e.cols;
  for (let i = 0; i < m; i++) {
    const exr = e.re[i * c + col];
    const exi = e.im[i * c + col];
    const eyr = e.re[(i + m) * c + col];
    const eyi = e.im[(i + m) * c + col];
    const hxr = h.re[i * c + col];
    const hxi = h.im[i * c + col];
    const hyr = h.re[(i + m) * c + col];
    const hyi = h.im[(i + m) * c + col];
    // w = Ex·conj(hy) − Ey·conj(hx); Re(i·w) = −Im(w)
    const wi = exi * hyr - exr * hyi - (eyi * hxr - eyr * hxi);
    out[i] = -wi;
  }
  return out;
}

/**
/** Throws unless every patterned layer's rectangles are symmetric under x → −x and y → −y. */
function checkMirrorSymmetric(stack: RcwaStack): void {
  const tol = 1e-12 * Math.max(stack.periodX, stack.periodY);
  const same = (a: RcwaRect, b: RcwaRect): boolean =>
    Math.abs(a.x0 - b.x0) <= tol && Math.abs(a.x1 - b.x1) <= tol && Math.abs(a.y0 - b.y0) <= tol && Math.abs(a.y1 - b.y1) <= tol;
  for (const layer of stack.layers) {
    if (layer.kind !== 'patterned') continue;
    for (const rect of layer.rects) {
      const mx = { x0: -rect.x1, x1: -rect.x0, y0: rect.y0, y1: rect.y1 };
      const my = { x0: rect.x0, x1: rect.x1, y0: -rect.y1, y1: -rect.y0 };
      if (!layer.rects.some((o) => same(o, mx)) || !layer.rects.some((o) => same(o, my))) {
        throw new RangeError('mirrorSymmetric: a patterned layer is not symmetric under x → −x and y → −y');
      }
    }
  }
}

/**
 * Solves a stack at normal incidence for x- and y-polarized unit plane waves (enhanced transmittance matrix,
 * see module comment). `harmonics`: N (N × N) or [Nx, Ny], odd. `mirrorSymmetric`: every patterned layer is
 * symmetric under x → −x and y → −y (checked); then each input polarization is solved in its own symmetry
 * sector with about a quarter of the unknowns, with the same result (t_xy = t_yx = 0 exactly).
 */
export function solveRcwaStack(
  stack: RcwaStack,
  lambda: number,
  harmonics: number | readonly [number, number],
  options: { mirrorSymmetric?: boolean } = {},
): RcwaStackResult {
  const [nx, ny] = harmonicCounts(harmonics);
  const mirror = options.mirrorSymmetric === true;
  if (mirror) checkMirrorSymmetric(stack);
  if (!(lambda > 0) || !Number.isFinite(lambda)) throw new RangeError(`wavelength must be positive, got ${lambda}`);
  for (const p of [stack.periodX, stack.periodY]) if (!(p > 0) || !Number.isFinite(p)) throw new RangeError(`period must be positive, got ${p}`);
  const m = nx * ny;
  const n2 = 2 * m;
  const kx = new Float64Array(m);
  const ky = new Float64Array(m);
  const orders: { m: number; n: number }[] = [];
  for (let iy = 0; iy < ny; iy++) {
    for (let ix = 0; ix < nx; ix++) {
      const om = ix - (nx - 1) / 2;
      const on = iy - (ny - 1) / 2;
      kx[ix + nx * iy] = (om * lambda) / stack.periodX;
      ky[ix + nx * iy] = (on * lambda) / stack.periodY;
      orders.push({ m: om, n: on });
    }
  }
  const zero = (nx - 1) / 2 + nx * ((ny - 1) / 2);
  const k0 = (2 * Math.PI) / lambda;
  const incident = uniformModes(stack.incident, kx, ky);
  const exit = uniformModes(stack.exit, kx, ky);

  const s = cZeros(n2, 2);
  s.re[zero * 2 + 0] = 1;
  s.re[(zero + m) * 2 + 1] = 1;
  // Enhanced transmittance matrices in the full basis (basis null) or in one mirror-symmetry sector.
  const solveSector = (basis: SectorBasis | null, s: CMatrix): { t: CMatrix; r: CMatrix } => {
    // Backward pass: f, g at the top of each layer; keep Y_l = a_l⁻¹·X_l for the forward pass.
    const inc = reduceUniform(incident, basis);
    const out = reduceUniform(exit, basis);
    const nr = inc.v.rows;
    let f = cIdentity(nr);
    let g = out.v;
    const ys: CMatrix[] = [];
    for (let l = stack.layers.length - 1; l >= 0; l--) {
      const layer = stack.layers[l];
      if (!(layer.thickness >= 0) || !Number.isFinite(layer.thickness)) throw new RangeError(`layer ${l + 1}: thickness must be ≥ 0, got ${layer.thickness}`);
      const modes =
        layer.kind === 'uniform' || layer.rects.length === 0
          ? reduceUniform(uniformModes(layer.kind === 'uniform' ? layer.epsilon : layer.background, kx, ky), basis)
          : patternedModes(layer, nx, ny, stack.periodX, stack.periodY, kx, ky, basis);
      const wf = cLuSolve(cLu(modes.w), f);
      const vg = cLuSolve(cLu(modes.v), g);
      const a = cZeros(nr, nr);
      const b = cZeros(nr, nr);
      for (let k = 0; k < a.re.length; k++) {
        a.re[k] = 0.5 * (wf.re[k] + vg.re[k]);
        a.im[k] = 0.5 * (wf.im[k] + vg.im[k]);
        b.re[k] = 0.5 * (wf.re[k] - vg.re[k]);
        b.im[k] = 0.5 * (wf.im[k] - vg.im[k]);
      }
      // X = diag(exp(i·kz·k0·d))
      const xr = new Float64Array(nr);
      const xi = new Float64Array(nr);
      for (let j = 0; j < nr; j++) {
        const amp = Math.exp(-modes.kzIm[j] * k0 * layer.thickness);
        const ph = modes.kzRe[j] * k0 * layer.thickness;
        xr[j] = amp * Math.cos(ph);
        xi[j] = amp * Math.sin(ph);
      }
      const xm = cZeros(nr, nr);
      for (let j = 0; j < nr; j++) {
        xm.re[j * nr + j] = xr[j];
        xm.im[j * nr + j] = xi[j];
      }
      const y = cLuSolve(cLu(a), xm); // a⁻¹·X
      ys.push(y);
      const by = cMul(b, y); // b·a⁻¹·X
      // X·b·a⁻¹·X: scale rows by X
      for (let i = 0; i < nr; i++) {
        for (let j = 0; j < nr; j++) {
          const k = i * nr + j;
          const r = by.re[k];
          const im = by.im[k];
          by.re[k] = xr[i] * r - xi[i] * im;
          by.im[k] = xr[i] * im + xi[i] * r;
        }
      }
      const plus = cIdentity(nr);
      const minus = cIdentity(nr);
      for (let k = 0; k < by.re.length; k++) {
        plus.re[k] += by.re[k];
        plus.im[k] += by.im[k];
        minus.re[k] -= by.re[k];
        minus.im[k] -= by.im[k];
      }
      f = cMul(modes.w, plus);
      g = cMul(modes.v, minus);
    }
    ys.reverse();
    // Incident side: (g1 + Vi f1)·T1 = 2·Vi·s, r = f1·T1 − s.
    const vif = cMul(inc.v, f);
    for (let k = 0; k < vif.re.length; k++) {
      vif.re[k] += g.re[k];
      vif.im[k] += g.im[k];
    }
    const rhs = cMul(inc.v, s);
    for (let k = 0; k < rhs.re.length; k++) {
      rhs.re[k] *= 2;
      rhs.im[k] *= 2;
    }
    let amp = cLuSolve(cLu(vif), rhs);
    const r = cMul(f, amp);
    for (let k = 0; k < r.re.length; k++) r.re[k] -= s.re[k];
    for (const y of ys) amp = cMul(y, amp);
    return { t: amp, r };
  };
  let t: CMatrix;
  let r: CMatrix;
  if (mirror) {
    t = cZeros(n2, 2);
    r = cZeros(n2, 2);
    (['x', 'y'] as const).forEach((sector, col) => {
      const basis = sectorBasis(nx, ny, sector);
      const source = cZeros(basis.e.length, 1);
      source.re[basis.e.findIndex((c) => c.idx[0] === zero + col * m)] = 1;
      const part = solveSector(basis, source);
      const tf = expand(part.t, basis.e, n2);
      const rf = expand(part.r, basis.e, n2);
      for (let i = 0; i < n2; i++) {
        t.re[i * 2 + col] = tf.re[i];
        t.im[i * 2 + col] = tf.im[i];
        r.re[i * 2 + col] = rf.re[i];
        r.im[i * 2 + col] = rf.im[i];
      }
    });
  } else {
    ({ t, r } = solveSector(null, s));
  }

  const hInc = cMul(incident.v, s);
  const hT = cMul(exit.v, t);
  const hR = cMul(incident.v, r);
  const powers = (col: number): RcwaPowers => {
    const pin = fluxPerOrder(s, hInc, col, m)[zero];
    const pt = fluxPerOrder(t, hT, col, m).map((v) => v / pin);
    // Reflected wave: h = −V·r, so the flux of (r, −V r) is minus that of (r, V r).
    const pr = fluxPerOrder(r, hR, col, m).map((v) => v / pin);
    let transmitted = 0;
    let reflected = 0;
    for (let i = 0; i < m; i++) {
      transmitted += pt[i];
      reflected += pr[i];
    }
    return {
      transmitted,
      reflected,
      zeroOrderTransmitted: pt[zero],
      zeroOrderReflected: pr[zero],
      otherOrdersTransmitted: transmitted - pt[zero],
      perOrderTransmitted: pt,
      perOrderReflected: pr,
    };
  };
  const at = (mat: CMatrix, row: number, col: number): Complex => ({ re: mat.re[row * 2 + col], im: mat.im[row * 2 + col] });
  return {
    orders,
    zeroOrder: {
      x: { ex: at(t, zero, 0), ey: at(t, zero + m, 0) },
      y: { ex: at(t, zero, 1), ey: at(t, zero + m, 1) },
    },
    zeroOrderReflection: {
      x: { ex: at(r, zero, 0), ey: at(r, zero + m, 0) },
      y: { ex: at(r, zero, 1), ey: at(r, zero + m, 1) },
    },
    x: powers(0),
    y: powers(1),
  };
}

// ---------------------------------------------------------------------------------------------------------
// One meta-atom

/** A film between the superstrate and the substrate (cap, anti-reflection or etch-stop layer). */
export interface RcwaFilm {
  thickness: number;
  material: RcwaMaterial;
}

/** Pillar shapes: a w × l rectangle, or an ellipse with axes w and l (a staircase of rectangles). */
export type RcwaPillarShape = 'rect' | 'ellipse';

/**
 * One unit cell: superstrate above, then `filmsAbove` (top down), the pillar layer (pillar of `pillar.material`
 * centred in the cell, surrounded by `surround`, default the superstrate), `filmsBelow` (top down), substrate.
 */
export interface RcwaCell {
  /** Square lattice period P, metres. */
  period: number;
  superstrate: RcwaMaterial;
  substrate: RcwaMaterial;
  pillar: {
    shape: RcwaPillarShape;
    /** Size along x, metres (0 … P). */
    width: number;
    /** Size along y, metres (0 … P). */
    length: number;
    /** Height (thickness of the pillar layer), metres. */
    height: number;
    material: RcwaMaterial;
  };
  /** Medium between the pillars; default the superstrate. */
  surround?: RcwaMaterial;
  filmsAbove?: RcwaFilm[];
  filmsBelow?: RcwaFilm[];
}

/** Where the light comes from: through the substrate (exits into the superstrate), or onto the pillars from the superstrate. */
export type RcwaIllumination = 'substrate' | 'superstrate';

/** Options of `computeAtom`. */
export interface RcwaOptions {
  /** Vacuum wavelength, metres. */
  lambda: number;
  /** Harmonics per axis: N for N × N (odd), or [Nx, Ny]. */
  harmonics: number | readonly [number, number];
  illumination: RcwaIllumination;
  /** Steps of the staircase that approximates an elliptical pillar (default 16). */
  ellipseSteps?: number;
}

/** The lattice's own diffraction: the first order propagates in a half-space when P ≥ λ/n there. */
export interface LatticeDiffraction {
  medium: 'incident' | 'exit';
  /** Index of that medium. */
  index: number;
  /** λ/n, metres. */
  limit: number;
  message: string;
}

/**
 * Half-spaces in which the square lattice diffracts at normal incidence (P ≥ λ/n), with a message giving the
 * numbers; `names` (e.g. { incident: 'substrate', exit: 'air above the pillars' }) are put beside the medium.
 * In the exit medium the lattice sends transmitted light into orders other than the zeroth; in the incident medium
 * only reflected light (the transmitted light stays in the zeroth order unless the exit medium diffracts too).
 * Example: latticeDiffraction(450e-9, 633e-9, 1, 1.457) → one entry for the exit medium (λ/n = 434 nm).
 */
export function latticeDiffraction(period: number, lambda: number, nIncident: number, nExit: number, names: { incident?: string; exit?: string } = {}): LatticeDiffraction[] {
  const out: LatticeDiffraction[] = [];
  for (const [medium, index] of [
    ['incident', nIncident],
    ['exit', nExit],
  ] as const) {
    const limit = lambda / index;
    if (period >= limit) {
      const nm = (v: number): string => `${(v * 1e9).toFixed(1)} nm`;
      const name = names[medium] ? ` (${names[medium]})` : '';
      out.push({
        medium,
        index,
        limit,
        message:
          `period ${nm(period)} ≥ λ/n = ${nm(lambda)}/${index.toFixed(4)} = ${nm(limit)} in the ${medium} medium${name}: ` +
          (medium === 'exit'
            ? 'the lattice itself diffracts there, and part of the light leaves the cell in orders other than the zeroth'
            : 'the lattice itself diffracts there, so part of the reflected light goes into orders other than the zeroth (the transmitted light is not split by it)'),
      });
    }
  }
  return out;
}

/** Per-atom result of `computeAtom`. Jones entries are zeroth order and power-normalized (|t|² is a transmittance). */
export interface RcwaAtomResult {
  /**
   * Zeroth-order Jones matrix, [Ex_out, Ey_out] = J·[Ex_in, Ey_in]: t_xy is Ex out for y-polarized input.
   * Field ratio times √(n_exit/n_incident), so |t_xx|² + |t_yx|² is the zeroth-order transmittance for x input.
   */
  txx: Complex;
  txy: Complex;
  tyx: Complex;
  tyy: Complex;
  /** |t_xx|, |t_yy| as MetaAtom.tx, ty. */
  tx: number;
  ty: number;
  /** Phases against a bare cell (the same stack with the pillar layer all surround), in [0, 2π), as MetaAtom.alphaX/Y. */
  alphaX: number;
  alphaY: number;
  /** The bare cell's power-normalized zeroth-order transmission (the same for x and y). */
  bare: Complex;
  /** Powers per input polarization. */
  x: Omit<RcwaPowers, 'perOrderTransmitted' | 'perOrderReflected'>;
  y: Omit<RcwaPowers, 'perOrderTransmitted' | 'perOrderReflected'>;
  /** Lattice diffraction in the incident or exit medium (empty when P < λ/n in both). */
  diffraction: LatticeDiffraction[];
  /** Human-readable warnings (the diffraction messages, and any lossy half-space). */
  warnings: string[];
  harmonics: [number, number];
}

const carg = (z: Complex): number => Math.atan2(z.im, z.re);
const wrap2pi = (a: number): number => {
  const r = a - 2 * Math.PI * Math.floor(a / (2 * Math.PI));
  return r >= 2 * Math.PI ? 0 : r;
};

/** The pillar as rectangles centred on the cell origin. */
function pillarRects(cell: RcwaCell, steps: number): RcwaRect[] {
  const { shape, width: w, length: l } = cell.pillar;
  if (w === 0 || l === 0) return [];
  if (shape === 'rect') return [{ x0: -w / 2, x1: w / 2, y0: -l / 2, y1: l / 2 }];
  // Ellipse: `steps` slices of equal height in y, each as wide as the ellipse at its centre line.
  const rects: RcwaRect[] = [];
  for (let k = 0; k < steps; k++) {
    const y0 = -l / 2 + (k * l) / steps;
    const y1 = -l / 2 + ((k + 1) * l) / steps;
    const yc = (y0 + y1) / 2 / (l / 2);
    const half = (w / 2) * Math.sqrt(Math.max(0, 1 - yc * yc));
    if (half > 0) rects.push({ x0: -half, x1: half, y0, y1 });
  }
  return rects;
}

/** The cell as a stack in the direction of the light, with the pillar layer filled by `rects` (empty: bare cell). */
function cellStack(cell: RcwaCell, lambda: number, illumination: RcwaIllumination, rects: RcwaRect[]): RcwaStack {
  const eps = (m: RcwaMaterial): Complex => csq(materialIndex(m, lambda));
  const film = (f: RcwaFilm): RcwaLayer => ({ kind: 'uniform', thickness: f.thickness, epsilon: eps(f.material) });
  const surround = eps(cell.surround ?? cell.superstrate);
  const topDown: RcwaLayer[] = [
    ...(cell.filmsAbove ?? []).map(film),
    rects.length === 0
      ? { kind: 'uniform', thickness: cell.pillar.height, epsilon: surround }
      : { kind: 'patterned', thickness: cell.pillar.height, background: surround, inclusion: eps(cell.pillar.material), rects },
    ...(cell.filmsBelow ?? []).map(film),
  ];
  const top = eps(cell.superstrate);
  const bottom = eps(cell.substrate);
  return illumination === 'superstrate'
    ? { periodX: cell.period, periodY: cell.period, incident: top, exit: bottom, layers: topDown }
    : { periodX: cell.period, periodY: cell.period, incident: bottom, exit: top, layers: topDown.reverse() };
}

/** Checks a cell's numbers; throws RangeError saying what to fix. */
export function checkCell(cell: RcwaCell): void {
  const positive = (v: number, what: string): void => {
    if (!(v > 0) || !Number.isFinite(v)) throw new RangeError(`${what} must be positive, got ${v}`);
  };
  positive(cell.period, 'period');
  const { width, length, height } = cell.pillar;
  for (const [v, what] of [
    [width, 'pillar width'],
    [length, 'pillar length'],
  ] as const) {
    if (!(v >= 0 && v <= cell.period * (1 + 1e-12))) throw new RangeError(`${what} must be from 0 to the period ${cell.period} m, got ${v}`);
  }
  if (!(height >= 0) || !Number.isFinite(height)) throw new RangeError(`pillar height must be ≥ 0, got ${height}`);
  if (cell.pillar.shape !== 'rect' && cell.pillar.shape !== 'ellipse') throw new RangeError(`pillar shape must be 'rect' or 'ellipse', got ${String(cell.pillar.shape)}`);
  for (const f of [...(cell.filmsAbove ?? []), ...(cell.filmsBelow ?? [])]) {
    if (!(f.thickness >= 0) || !Number.isFinite(f.thickness)) throw new RangeError(`film thickness must be ≥ 0, got ${f.thickness}`);
  }
}

/**
 * One meta-atom by RCWA: zeroth-order Jones matrix, phases against a bare cell, powers, and the lattice
 * diffraction warning. Cost: two eigendecompositions (one per symmetry sector) of about Nx·Ny/2 each
 * (see bench/rcwa.ts for times).
 * Example: computeAtom({ period: 450e-9, superstrate: air, substrate: silica, pillar: { shape: 'rect', width:
 * 200e-9, length: 200e-9, height: 1.2e-6, material: nitride } }, { lambda: 633e-9, harmonics: 11,
 * illumination: 'superstrate' }).txx equals .tyy (square pillar).
 */
export function computeAtom(cell: RcwaCell, options: RcwaOptions): RcwaAtomResult {
  checkCell(cell);
  const { lambda, illumination } = options;
  if (illumination !== 'substrate' && illumination !== 'superstrate') {
    throw new RangeError(`illumination must be 'substrate' or 'superstrate', got ${String(illumination)}`);
  }
  const steps = options.ellipseSteps ?? 16;
  if (!Number.isInteger(steps) || steps < 1 || steps > 256) throw new RangeError(`ellipseSteps must be an integer from 1 to 256, got ${steps}`);
  const harmonics = harmonicCounts(options.harmonics);
  const stack = cellStack(cell, lambda, illumination, pillarRects(cell, steps));
  const res = solveRcwaStack(stack, lambda, harmonics, { mirrorSymmetric: true });
  const bareRes = solveRcwaStack(cellStack(cell, lambda, illumination, []), lambda, 1);
  const nIn = materialIndex(illumination === 'superstrate' ? cell.superstrate : cell.substrate, lambda);
  const nOut = materialIndex(illumination === 'superstrate' ? cell.substrate : cell.superstrate, lambda);
  const scale = Math.sqrt(nOut.re / nIn.re);
  const norm = (z: Complex): Complex => ({ re: z.re * scale, im: z.im * scale });
  const txx = norm(res.zeroOrder.x.ex);
  const tyx = norm(res.zeroOrder.x.ey);
  const txy = norm(res.zeroOrder.y.ex);
  const tyy = norm(res.zeroOrder.y.ey);
  const bare = norm(bareRes.zeroOrder.x.ex);
  const diffraction = latticeDiffraction(cell.period, lambda, nIn.re, nOut.re);
  const warnings = diffraction.map((d) => d.message);
  for (const [z, where] of [
    [nIn, 'incident'],
    [nOut, 'exit'],
  ] as const) {
    if (z.im > 0) warnings.push(`the ${where} medium absorbs (k = ${z.im}): powers there are taken at its interface`);
  }
  const strip = (p: RcwaPowers): RcwaAtomResult['x'] => ({
    transmitted: p.transmitted,
    reflected: p.reflected,
    zeroOrderTransmitted: p.zeroOrderTransmitted,
    zeroOrderReflected: p.zeroOrderReflected,
    otherOrdersTransmitted: p.otherOrdersTransmitted,
  });
  return {
    txx,
    txy,
    tyx,
    tyy,
    tx: Math.hypot(txx.re, txx.im),
    ty: Math.hypot(tyy.re, tyy.im),
    alphaX: wrap2pi(carg(txx) - carg(bare)),
    alphaY: wrap2pi(carg(tyy) - carg(bare)),
    bare,
    x: strip(res.x),
    y: strip(res.y),
    diffraction,
    warnings,
    harmonics,
  };
}

/** One row of `atomConvergence`. */
export interface RcwaConvergenceRow {
  harmonics: [number, number];
  result: RcwaAtomResult;
  /** max over t_xx, t_xy, t_yx, t_yy of |t − t(previous row)|; NaN for the first row. */
  change: number;
  /** The same against the last row (the finest truncation asked for); 0 for the last row. */
  changeFromFinest: number;
}

/** Largest difference between two results' Jones entries. */
export function jonesDifference(a: RcwaAtomResult, b: RcwaAtomResult): number {
  let d = 0;
  for (const key of ['txx', 'txy', 'tyx', 'tyy'] as const) d = Math.max(d, Math.hypot(a[key].re - b[key].re, a[key].im - b[key].im));
  return d;
}

/**
 * Convergence report: the atom at each harmonic count of `ladder` (ascending, e.g. [5, 9, 11, 15]), with the
 * change of the Jones matrix from the previous count and from the finest. Example: rows[rows.length − 1].change
 * below 1e-3 suggests the next-to-last count suffices.
 */
export function atomConvergence(cell: RcwaCell, options: Omit<RcwaOptions, 'harmonics'>, ladder: readonly number[]): RcwaConvergenceRow[] {
  if (ladder.length === 0) throw new RangeError('atomConvergence: give at least one harmonic count');
  const results = ladder.map((h) => computeAtom(cell, { ...options, harmonics: h }));
  const finest = results[results.length - 1];
  return results.map((result, i) => ({
    harmonics: result.harmonics,
    result,
    change: i === 0 ? Number.NaN : jonesDifference(result, results[i - 1]),
    changeFromFinest: jonesDifference(result, finest),
  }));
}
