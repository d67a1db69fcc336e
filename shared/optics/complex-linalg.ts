/**
 * Dense complex linear algebra for the RCWA engine (rcwa.ts): products, LU solves with partial pivoting,
 * and the general eigendecomposition A = X·diag(λ)·X⁻¹ by balancing, Householder reduction to Hessenberg
 * form and shifted complex QR (Wilkinson shifts, Givens rotations), then eigenvectors of the Schur form by
 * back-substitution (the same steps as LAPACK's zgebal/zgehrd/zhseqr/ztrevc; Golub & Van Loan, Matrix
 * Computations, 4th ed., §7.4–7.6). Matrices are row-major with split real and imaginary parts.
 *
 * Why our own: candidates from npm, measured on this machine (node 20, one thread, random complex matrices)
 * before writing this module:
 * - mathjs 15.2.0 `eigs` takes complex matrices and is correct (residual 2e-12) but slow: 1.0 s at 20×20 and
 *   38 s at 60×60 (cubic growth puts 242×242, the size at 11×11 harmonics, beyond half an hour);
 * - ml-matrix 6.15.1 `EigenvalueDecomposition` refuses complex input ("Input data contains non-numeric
 *   values"); real 242×242 took 0.70 s;
 * - numeric 1.2.6 `numeric.eig` works on real matrices only (complex input refused) and took 19.7 s for a real
 *   242×242; unmaintained since 2012.
 * This module: 38 ms at 20, 0.81 s at 242, 3.9 s at 450 (15×15 harmonics) for eigenvalues and eigenvectors, with
 * max|A·X − X·Λ| / max|A| ≈ 3e-14 (tests in tests/unit/complex-linalg.test.ts, including numpy's zgeev).
 */

/** A dense complex matrix, row-major: element (i, j) is re[i·cols + j] + i·im[i·cols + j]. */
export interface CMatrix {
  rows: number;
  cols: number;
  re: Float64Array;
  im: Float64Array;
}

/** A complex number as a pair. */
export interface Complex {
  re: number;
  im: number;
}

/** A zero matrix. Example: cZeros(2, 3).re.length → 6. */
export function cZeros(rows: number, cols: number): CMatrix {
  return { rows, cols, re: new Float64Array(rows * cols), im: new Float64Array(rows * cols) };
}

/** The n×n identity. */
export function cIdentity(n: number): CMatrix {
  const m = cZeros(n, n);
  for (let i = 0; i < n; i++) m.re[i * n + i] = 1;
  return m;
}

/** A copy. */
export function cClone(a: CMatrix): CMatrix {
  return { rows: a.rows, cols: a.cols, re: a.re.slice(), im: a.im.slice() };
}

/** Builds a matrix from nested arrays of [re, im] pairs or real numbers (tests and small cases). */
export function cFromArray(rows: readonly (readonly (number | readonly [number, number])[])[]): CMatrix {
  const m = cZeros(rows.length, rows[0]?.length ?? 0);
  rows.forEach((row, i) =>
    row.forEach((v, j) => {
      const k = i * m.cols + j;
      if (typeof v === 'number') m.re[k] = v;
      else {
        m.re[k] = v[0];
        m.im[k] = v[1];
      }
    }),
  );
  return m;
}

/** Product A·B. Example: cMul(cIdentity(2), b) equals b. */
export function cMul(a: CMatrix, b: CMatrix): CMatrix {
  if (a.cols !== b.rows) throw new RangeError(`cMul: ${a.rows}×${a.cols} times ${b.rows}×${b.cols}`);
  const n = a.rows;
  const m = b.cols;
  const p = a.cols;
  const c = cZeros(n, m);
  const { re: cr, im: ci } = c;
  const { re: br, im: bi } = b;
  for (let i = 0; i < n; i++) {
    const row = i * m;
    for (let k = 0; k < p; k++) {
      const ar = a.re[i * p + k];
      const ai = a.im[i * p + k];
      if (ar === 0 && ai === 0) continue;
      const brow = k * m;
      for (let j = 0; j < m; j++) {
        const xr = br[brow + j];
        const xi = bi[brow + j];
        cr[row + j] += ar * xr - ai * xi;
        ci[row + j] += ar * xi + ai * xr;
      }
    }
  }
  return c;
}

/** A + s·B (s complex, default 1). */
export function cAdd(a: CMatrix, b: CMatrix, s: Complex = { re: 1, im: 0 }): CMatrix {
  const c = cClone(a);
  for (let k = 0; k < c.re.length; k++) {
    c.re[k] += s.re * b.re[k] - s.im * b.im[k];
    c.im[k] += s.re * b.im[k] + s.im * b.re[k];
  }
  return c;
}

/** LU factors with partial pivoting, P·A = L·U packed in one matrix. */
export interface CLu {
  n: number;
  lu: CMatrix;
  pivot: Int32Array;
}

/** LU factorization with partial pivoting. Throws RangeError for an exactly singular matrix. */
export function cLu(a: CMatrix): CLu {
  if (a.rows !== a.cols) throw new RangeError(`cLu: matrix is ${a.rows}×${a.cols}, not square`);
  const n = a.rows;
  const lu = cClone(a);
  const { re, im } = lu;
  const pivot = new Int32Array(n);
  for (let k = 0; k < n; k++) {
    let p = k;
    let best = -1;
    for (let i = k; i < n; i++) {
      const v = Math.abs(re[i * n + k]) + Math.abs(im[i * n + k]);
      if (v > best) {
        best = v;
        p = i;
      }
    }
    pivot[k] = p;
    if (best === 0) throw new RangeError(`cLu: matrix is singular (column ${k})`);
    if (p !== k) {
      for (let j = 0; j < n; j++) {
        const a1 = k * n + j;
        const a2 = p * n + j;
        let t = re[a1];
        re[a1] = re[a2];
        re[a2] = t;
        t = im[a1];
        im[a1] = im[a2];
        im[a2] = t;
      }
    }
    const dr = re[k * n + k];
    const di = im[k * n + k];
    const dd = dr * dr + di * di;
    const ir = dr / dd;
    const ii = -di / dd;
    for (let i = k + 1; i < n; i++) {
      const lr0 = re[i * n + k];
      const li0 = im[i * n + k];
      if (lr0 === 0 && li0 === 0) continue;
      const lr = lr0 * ir - li0 * ii;
      const li = lr0 * ii + li0 * ir;
      re[i * n + k] = lr;
      im[i * n + k] = li;
      const ri = i * n;
      const rk = k * n;
      for (let j = k + 1; j < n; j++) {
        const ur = re[rk + j];
        const ui = im[rk + j];
        re[ri + j] -= lr * ur - li * ui;
        im[ri + j] -= lr * ui + li * ur;
      }
    }
  }
  return { n, lu, pivot };
}

/** Solves A·X = B from A's LU factors (B: n×m, any m). */
export function cLuSolve(f: CLu, b: CMatrix): CMatrix {
  const { n, pivot } = f;
  const { re: lr, im: li } = f.lu;
  if (b.rows !== n) throw new RangeError(`cLuSolve: right-hand side has ${b.rows} rows, need ${n}`);
  const m = b.cols;
  const x = cClone(b);
  const { re, im } = x;
  for (let k = 0; k < n; k++) {
    const p = pivot[k];
    if (p !== k) {
      for (let j = 0; j < m; j++) {
        let t = re[k * m + j];
        re[k * m + j] = re[p * m + j];
        re[p * m + j] = t;
        t = im[k * m + j];
        im[k * m + j] = im[p * m + j];
        im[p * m + j] = t;
      }
    }
  }
  // Forward: L has a unit diagonal.
  for (let i = 0; i < n; i++) {
    for (let k = 0; k < i; k++) {
      const ar = lr[i * n + k];
      const ai = li[i * n + k];
      if (ar === 0 && ai === 0) continue;
      for (let j = 0; j < m; j++) {
        const xr = re[k * m + j];
        const xi = im[k * m + j];
        re[i * m + j] -= ar * xr - ai * xi;
        im[i * m + j] -= ar * xi + ai * xr;
      }
    }
  }
  for (let i = n - 1; i >= 0; i--) {
    for (let k = i + 1; k < n; k++) {
      const ar = lr[i * n + k];
      const ai = li[i * n + k];
      if (ar === 0 && ai === 0) continue;
      for (let j = 0; j < m; j++) {
        const xr = re[k * m + j];
        const xi = im[k * m + j];
        re[i * m + j] -= ar * xr - ai * xi;
        im[i * m + j] -= ar * xi + ai * xr;
      }
    }
    const dr = lr[i * n + i];
    const di = li[i * n + i];
    const dd = dr * dr + di * di;
    for (let j = 0; j < m; j++) {
      const xr = re[i * m + j];
      const xi = im[i * m + j];
      re[i * m + j] = (xr * dr + xi * di) / dd;
      im[i * m + j] = (xi * dr - xr * di) / dd;
    }
  }
  return x;
}

/** Solves A·X = B. Example: cSolve(a, cIdentity(n)) is A⁻¹. */
export function cSolve(a: CMatrix, b: CMatrix): CMatrix {
  return cLuSolve(cLu(a), b);
}

/** A⁻¹. */
export function cInverse(a: CMatrix): CMatrix {
  return cSolve(a, cIdentity(a.rows));
}

/** Result of `cEig`: eigenvalues and unit-norm eigenvectors (column j of `vectors` belongs to values[j]). */
export interface CEig {
  valuesRe: Float64Array;
  valuesIm: Float64Array;
  vectors: CMatrix;
}

const EPS = 2.220446049250313e-16;

/**
 * Diagonal similarity D⁻¹·A·D with D of powers of 2 making row and column norms alike (Parlett & Reinsch,
 * Numer. Math. 13, 293 (1969); no permutations). Returns the scale factors; A is changed in place.
 */
function balance(a: CMatrix): Float64Array {
  const n = a.rows;
  const { re, im } = a;
  const d = new Float64Array(n).fill(1);
  let done = false;
  for (let sweep = 0; sweep < 100 && !done; sweep++) {
    done = true;
    for (let i = 0; i < n; i++) {
      let c = 0;
      let r = 0;
      for (let j = 0; j < n; j++) {
        if (j === i) continue;
        c += Math.abs(re[j * n + i]) + Math.abs(im[j * n + i]);
        r += Math.abs(re[i * n + j]) + Math.abs(im[i * n + j]);
      }
      if (c === 0 || r === 0) continue;
      let f = 1;
      const s = c + r;
      let cc = c;
      let rr = r;
      while (cc < rr / 2) {
        cc *= 2;
        rr /= 2;
        f *= 2;
      }
      while (cc >= rr * 2) {
        cc /= 2;
        rr *= 2;
        f /= 2;
      }
      if ((cc + rr) / f < 0.95 * s) {
        done = false;
        d[i] *= f;
        for (let j = 0; j < n; j++) {
          re[i * n + j] /= f;
          im[i * n + j] /= f;
          re[j * n + i] *= f;
          im[j * n + i] *= f;
        }
      }
    }
  }
  return d;
}

/** Householder reduction to upper Hessenberg form in place; returns the accumulated unitary Q (A = Q·H·Qᴴ). */
function hessenberg(a: CMatrix): CMatrix {
  const n = a.rows;
  const { re, im } = a;
  const q = cIdentity(n);
  const vr = new Float64Array(n);
  const vi = new Float64Array(n);
  const wr = new Float64Array(n);
  const wi = new Float64Array(n);
  for (let k = 0; k < n - 2; k++) {
    let norm2 = 0;
    for (let i = k + 1; i < n; i++) norm2 += re[i * n + k] ** 2 + im[i * n + k] ** 2;
    const x0r = re[(k + 1) * n + k];
    const x0i = im[(k + 1) * n + k];
    const tail = norm2 - x0r * x0r - x0i * x0i;
    if (tail === 0) continue;
    const norm = Math.sqrt(norm2);
    const x0abs = Math.hypot(x0r, x0i);
    const pr = x0abs === 0 ? 1 : x0r / x0abs;
    const pi = x0abs === 0 ? 0 : x0i / x0abs;
    // v = x + e^{i arg x0}·‖x‖·e1, H = I − 2 v vᴴ / (vᴴ v).
    for (let i = k + 1; i < n; i++) {
      vr[i] = re[i * n + k];
      vi[i] = im[i * n + k];
    }
    vr[k + 1] += pr * norm;
    vi[k + 1] += pi * norm;
    let vv = 0;
    for (let i = k + 1; i < n; i++) vv += vr[i] * vr[i] + vi[i] * vi[i];
    const beta = 2 / vv;
    // Left: A[k+1:, :] −= beta·v·(vᴴ A[k+1:, :]).
    wr.fill(0, 0, n);
    wi.fill(0, 0, n);
    for (let i = k + 1; i < n; i++) {
      const cr = vr[i];
      const ci = -vi[i];
      const row = i * n;
      for (let j = k; j < n; j++) {
        const ar = re[row + j];
        const ai = im[row + j];
        wr[j] += cr * ar - ci * ai;
        wi[j] += cr * ai + ci * ar;
      }
    }
    for (let i = k + 1; i < n; i++) {
      const sr = beta * vr[i];
      const si = beta * vi[i];
      const row = i * n;
      for (let j = k; j < n; j++) {
        re[row + j] -= sr * wr[j] - si * wi[j];
        im[row + j] -= sr * wi[j] + si * wr[j];
      }
    }
    // Right: M[:, k+1:] −= beta·(M v)·vᴴ, for M = A and M = Q.
    for (const m of [a, q]) {
      const mr = m.re;
      const mi = m.im;
      for (let i = 0; i < n; i++) {
        const row = i * n;
        let sr = 0;
        let si = 0;
        for (let j = k + 1; j < n; j++) {
          sr += mr[row + j] * vr[j] - mi[row + j] * vi[j];
          si += mr[row + j] * vi[j] + mi[row + j] * vr[j];
        }
        if (sr === 0 && si === 0) continue;
        sr *= beta;
        si *= beta;
        for (let j = k + 1; j < n; j++) {
          // (s)·conj(v_j)
          mr[row + j] -= sr * vr[j] + si * vi[j];
          mi[row + j] -= si * vr[j] - sr * vi[j];
        }
      }
    }
    for (let i = k + 2; i < n; i++) {
      re[i * n + k] = 0;
      im[i * n + k] = 0;
    }
  }
  return q;
}

/**
 * Complex Schur form of an upper Hessenberg matrix in place (H ← Zᴴ·H·Z upper triangular), accumulating
 * the rotations into `z`. Single-shift QR with Wilkinson shifts and exceptional shifts after 10 and 20
 * iterations without deflation (Golub & Van Loan §7.5). Throws when an eigenvalue needs more than 60·n
 * iterations in all.
 */
function schur(h: CMatrix, z: CMatrix): void {
  const n = h.rows;
  const { re, im } = h;
  const zr = z.re;
  const zi = z.im;
  const cs = new Float64Array(n);
  const snr = new Float64Array(n);
  const sni = new Float64Array(n);
  let hi = n - 1;
  let iter = 0;
  let total = 0;
  const abs1 = (i: number, j: number): number => Math.abs(re[i * n + j]) + Math.abs(im[i * n + j]);
  let anorm = 0;
  for (let k = 0; k < n * n; k++) anorm = Math.max(anorm, Math.abs(re[k]) + Math.abs(im[k]));
  while (hi >= 0) {
    // Find the start of the unreduced block ending at hi.
    let lo = hi;
    while (lo > 0) {
      const s = abs1(lo - 1, lo - 1) + abs1(lo, lo);
      if (abs1(lo, lo - 1) <= EPS * (s === 0 ? anorm : s)) {
        re[lo * n + lo - 1] = 0;
        im[lo * n + lo - 1] = 0;
        break;
      }
      lo--;
    }
    if (lo === hi) {
      hi--;
      iter = 0;
      continue;
    }
    iter++;
    total++;
    if (total > 60 * n) throw new Error('cEig: QR iteration did not converge');
    // Shift.
    let mr: number;
    let mi: number;
    const ar = re[(hi - 1) * n + hi - 1];
    const ai = im[(hi - 1) * n + hi - 1];
    const br = re[(hi - 1) * n + hi];
    const bi = im[(hi - 1) * n + hi];
    const cr = re[hi * n + hi - 1];
    const ci = im[hi * n + hi - 1];
    const dr = re[hi * n + hi];
    const di = im[hi * n + hi];
    if (iter % 10 === 0) {
      mr = dr + 0.75 * Math.abs(cr);
      mi = di + 0.75 * Math.abs(ci);
    } else {
      // Eigenvalue of [[a, b], [c, d]] closest to d: m = (a + d)/2 ± √(((a − d)/2)² + b c).
      const hr = (ar - dr) / 2;
      const hii = (ai - di) / 2;
      const qr = hr * hr - hii * hii + (br * cr - bi * ci);
      const qi = 2 * hr * hii + (br * ci + bi * cr);
      const mod = Math.hypot(qr, qi);
      let sr = Math.sqrt(Math.max(0, (mod + qr) / 2));
      let si = Math.sqrt(Math.max(0, (mod - qr) / 2));
      if (qi < 0) si = -si;
      // Choose the sign making (a + d)/2 + s closest to d, i.e. s closest to −h.
      if (sr * hr + si * hii > 0) {
        sr = -sr;
        si = -si;
      }
      mr = (ar + dr) / 2 + sr;
      mi = (ai + di) / 2 + si;
    }
    for (let k = lo; k <= hi; k++) {
      re[k * n + k] -= mr;
      im[k * n + k] -= mi;
    }
    // QR of the shifted block by Givens rotations on rows (whole rows, for the full Schur form).
    for (let k = lo; k < hi; k++) {
      const xr = re[k * n + k];
      const xi = im[k * n + k];
      const yr = re[(k + 1) * n + k];
      const yi = im[(k + 1) * n + k];
      const xa = Math.hypot(xr, xi);
      const nrm = Math.hypot(xa, Math.hypot(yr, yi));
      let c: number;
      let sr: number;
      let si: number;
      if (nrm === 0) {
        c = 1;
        sr = 0;
        si = 0;
      } else if (xa === 0) {
        c = 0;
        sr = 1;
        si = 0;
      } else {
        c = xa / nrm;
        // s = (x/|x|)·conj(y)/nrm
        const ur = xr / xa;
        const ui = xi / xa;
        sr = (ur * yr + ui * yi) / nrm;
        si = (ui * yr - ur * yi) / nrm;
      }
      cs[k] = c;
      snr[k] = sr;
      sni[k] = si;
      const r0 = k * n;
      const r1 = (k + 1) * n;
      for (let j = k; j < n; j++) {
        const pr = re[r0 + j];
        const pi = im[r0 + j];
        const qr = re[r1 + j];
        const qi = im[r1 + j];
        // row k: c·p + s·q ; row k+1: −conj(s)·p + c·q
        re[r0 + j] = c * pr + (sr * qr - si * qi);
        im[r0 + j] = c * pi + (sr * qi + si * qr);
        re[r1 + j] = c * qr - (sr * pr + si * pi);
        im[r1 + j] = c * qi - (sr * pi - si * pr);
      }
    }
    // R·Qᴴ: column rotations, and the same on Z.
    for (let k = lo; k < hi; k++) {
      const c = cs[k];
      const sr = snr[k];
      const si = sni[k];
      rotateColumns(re, im, n, k, Math.min(k + 2, hi) + 1, c, sr, si);
      rotateColumns(zr, zi, n, k, n, c, sr, si);
    }
    for (let k = lo; k <= hi; k++) {
      re[k * n + k] += mr;
      im[k * n + k] += mi;
    }
  }
}

/**
 * Eigenvalues and eigenvectors of a general complex square matrix (see module comment). Eigenvectors are
 * scaled to unit 2-norm. Example: cEig(cFromArray([[2, 0], [0, 3]])).valuesRe → [2, 3] (in some order).
 */
export function cEig(input: CMatrix): CEig {
  if (input.rows !== input.cols) throw new RangeError(`cEig: matrix is ${input.rows}×${input.cols}, not square`);
  const n = input.rows;
  const a = cClone(input);
  for (let k = 0; k < a.re.length; k++) {
    if (!Number.isFinite(a.re[k]) || !Number.isFinite(a.im[k])) throw new RangeError('cEig: matrix has a non-finite element');
  }
  const d = balance(a);
  const z = hessenberg(a);
  schur(a, z);
  const { re: tr, im: ti } = a;
  const valuesRe = new Float64Array(n);
  const valuesIm = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    valuesRe[k] = tr[k * n + k];
    valuesIm[k] = ti[k * n + k];
  }
  let tnorm = 0;
  for (let k = 0; k < n * n; k++) tnorm = Math.max(tnorm, Math.abs(tr[k]) + Math.abs(ti[k]));
  const small = Math.max(tnorm * EPS, Number.MIN_VALUE * 1e10);
  // Eigenvectors of the triangular T: column k, v_k = 1, back-substitution above (ztrevc).
  const v = cZeros(n, n);
  const xr = new Float64Array(n);
  const xi = new Float64Array(n);
  for (let k = n - 1; k >= 0; k--) {
    xr.fill(0);
    xi.fill(0);
    xr[k] = 1;
    const lr = valuesRe[k];
    const li = valuesIm[k];
    for (let i = k - 1; i >= 0; i--) {
      let sr = 0;
      let si = 0;
      const row = i * n;
      for (let j = i + 1; j <= k; j++) {
        const ar = tr[row + j];
        const ai = ti[row + j];
        sr += ar * xr[j] - ai * xi[j];
        si += ar * xi[j] + ai * xr[j];
      }
      let dr = tr[row + i] - lr;
      let di = ti[row + i] - li;
      if (Math.abs(dr) + Math.abs(di) < small) {
        dr = small;
        di = 0;
      }
      const dd = dr * dr + di * di;
      xr[i] = -(sr * dr + si * di) / dd;
      xi[i] = -(si * dr - sr * di) / dd;
      // Rescale to avoid overflow on nearly equal eigenvalues.
      const big = Math.abs(xr[i]) + Math.abs(xi[i]);
      if (big > 1e100) {
        for (let j = i; j <= k; j++) {
          xr[j] /= big;
          xi[j] /= big;
        }
      }
    }
    for (let i = 0; i <= k; i++) {
      v.re[i * n + k] = xr[i];
      v.im[i * n + k] = xi[i];
    }
  }
  // Back to A: X = D·Z·V (V upper triangular), then unit columns.
  const x = cZeros(n, n);
  for (let i = 0; i < n; i++) {
    const row = i * n;
    for (let j = 0; j < n; j++) {
      const zr0 = z.re[row + j];
      const zi0 = z.im[row + j];
      if (zr0 === 0 && zi0 === 0) continue;
      const vrow = j * n;
      for (let k = j; k < n; k++) {
        const br = v.re[vrow + k];
        const bi = v.im[vrow + k];
        x.re[row + k] += zr0 * br - zi0 * bi;
        x.im[row + k] += zr0 * bi + zi0 * br;
      }
    }
    const s = d[i];
    if (s !== 1) {
      for (let k = 0; k < n; k++) {
        x.re[row + k] *= s;
        x.im[row + k] *= s;
      }
    }
  }
  for (let k = 0; k < n; k++) {
    let s = 0;
    for (let i = 0; i < n; i++) s += x.re[i * n + k] ** 2 + x.im[i * n + k] ** 2;
    s = 1 / Math.sqrt(s);
    for (let i = 0; i < n; i++) {
      x.re[i * n + k] *= s;
      x.im[i * n + k] *= s;
    }
  }
  return { valuesRe, valuesIm, vectors: x };
}

/**
 * Rotates columns k and k+1 of the row-major n × n matrix (re, im) in rows 0 … rows−1 by the Givens rotation
 * (c, s = sr + i·si) from the right: column k ← c·p + conj(s)·q, column k+1 ← −s·p + c·q.
 */
function rotateColumns(re: Float64Array, im: Float64Array, n: number, k: number, rows: number, c: number, sr: number, si: number) {
  for (let i = 0; i < rows; i++) {
    const p = i * n + k;
    const pr = re[p];
    const pi = im[p];
    const qr = re[p + 1];
    const qi = im[p + 1];
    re[p] = c * pr + (sr * qr + si * qi);
    im[p] = c * pi + (sr * qi - si * qr);
    re[p + 1] = c * qr - (sr * pr - si * pi);
    im[p + 1] = c * qi - (sr * pi + si * pr);
  }
}
