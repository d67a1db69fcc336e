/**
 * Jones-matrix synthesis for two orthogonal polarization states and its decomposition into two
 * propagation phases and a rotation (Mueller et al., Phys. Rev. Lett. 118, 113901 (2017)).
 *
 * Conventions: exp(−iωt); output = J · input; R(θ) = [[cosθ, −sinθ], [sinθ, cosθ]] rotates the
 * cell's fast/slow axes counter-clockwise from x towards y; phases in radians.
 *
 * Decomposition ambiguities and how they are resolved. A symmetric unitary J equals
 * R(θ)·diag(e^{iδx}, e^{iδy})·R(θ)ᵀ for (δx, δy, θ), (δx, δy, θ + π) and (δy, δx, θ + π/2) alike,
 * and δ is defined mod 2π. The canonical form returned here has θ ∈ (−π/4, π/4] and
 * δx, δy ∈ (−π, π]. A cell with δx = δy (|e^{iδx} − e^{iδy}| < 1e-12) has no preferred axis: θ = 0.
 */
import { float64Array, type ArrayMemory } from './arrays';
import { wrapPhase } from './phase-terms';
import type { CancelSignal, ComplexField, JonesField, JonesVector, ProgressCallback } from './types';
import type { Handedness, PolarizationPair } from './polarization';


/** One 2×2 complex Jones matrix, entries as [re, im]: output = J · input. */
export interface JonesMatrix {
  xx: [number, number];
  xy: [number, number];
  yx: [number, number];
  yy: [number, number];
}

/** Per-cell propagation phases δx, δy (radians) and rotation θ (radians), row-major N×N. */
export interface JonesDecomposition {
  n: number;
  deltaX: Float64Array;
  deltaY: Float64Array;
  theta: Float64Array;
}

/** Progress and cancellation hooks for the per-cell loops. */
export interface CellLoopOptions {
  onProgress?: ProgressCallback;
  signal?: CancelSignal;
  /** Where the output planes are allocated (arrays.ts); default 'private'. */
  memory?: ArrayMemory;
}

/** A per-cell quantity given either as one number for all cells or as an N×N row-major plane. */
export type CellValues = number | Float64Array;

const TWO_PI = 2 * Math.PI;
const DEGENERATE_LIMIT = 1e-12;


function sideOf(length: number, what: string): number {
  const n = Math.round(Math.sqrt(length));
  if (n < 1 || n * n !== length) throw new RangeError(`${what}: length ${length} is not a square N×N grid`);
  return n;
}

function emptyComplexField(n: number): ComplexField {
  return { n, re: new Float64Array(n * n), im: new Float64Array(n * n) };
}

/** Allocates an all-zero N×N Jones field. Example: emptyJonesField(2).xx.re.length → 4. */
export function emptyJonesField(n: number): JonesField {
  if (!Number.isInteger(n) || n < 1) throw new RangeError(`emptyJonesField: n must be a positive integer, got ${n}`);
  return { n, xx: emptyComplexField(n), xy: emptyComplexField(n), yx: emptyComplexField(n), yy: emptyComplexField(n) };
}

/**
 * Applies a Jones matrix to a Jones vector: J · v.
 * Example: applyJones(retarderJones(1, 0, 1, Math.PI, 0), [[0, 0], [1, 0]]) → [[0, 0], [−1, ≈0]].
 */
export function applyJones(m: JonesMatrix, v: JonesVector): JonesVector {
  const [[xr, xi], [yr, yi]] = v;
  return [
    [m.xx[0] * xr - m.xx[1] * xi + m.xy[0] * yr - m.xy[1] * yi, m.xx[0] * xi + m.xx[1] * xr + m.xy[0] * yi + m.xy[1] * yr],
    [m.yx[0] * xr - m.yx[1] * xi + m.yy[0] * yr - m.yy[1] * yi, m.yx[0] * xi + m.yx[1] * xr + m.yy[0] * yi + m.yy[1] * yr],
  ];
}

/** Reads cell `index` of a Jones field as a JonesMatrix. Example: jonesAt(field, 0).xx → [re, im]. */
export function jonesAt(field: JonesField, index: number): JonesMatrix {
  return {
    xx: [field.xx.re[index], field.xx.im[index]],
    xy: [field.xy.re[index], field.xy.im[index]],
    yx: [field.yx.re[index], field.yx.im[index]],
    yy: [field.yy.re[index], field.yy.im[index]],
  };
}

/**
 * Per-pair constants of the synthesis: J_jk = e^{iφA}·P_jk + e^{iφB}·Q_jk with
 * P_jk = λA_j*·(M⁻¹)_0k, Q_jk = λB_j*·(M⁻¹)_1k and M = [λA, λB] (columns).
 */
interface SynthesisCoefficients {
  p: Float64Array; // [xx re, xx im, xy re, xy im, yx re, yx im, yy re, yy im]
  q: Float64Array;
}

function synthesisCoefficients(pair: PolarizationPair): SynthesisCoefficients {
  const [[axr, axi], [ayr, ayi]] = pair.a;
  const [[bxr, bxi], [byr, byi]] = pair.b;
  // M = [[ax, bx], [ay, by]]; det = ax·by − bx·ay.
  const detRe = axr * byr - axi * byi - (bxr * ayr - bxi * ayi);
  const detIm = axr * byi + axi * byr - (bxr * ayi + bxi * ayr);
  const det2 = detRe * detRe + detIm * detIm;
  const scale = Math.hypot(axr, axi, ayr, ayi) * Math.hypot(bxr, bxi, byr, byi);
  if (!(det2 > 1e-24 * scale * scale)) {
    throw new RangeError('Jones synthesis: the two polarization states are not linearly independent');
  }
  // 1/det
  const idRe = detRe / det2;
  const idIm = -detIm / det2;
  const mul = (ar: number, ai: number, br: number, bi: number): [number, number] => [ar * br - ai * bi, ar * bi + ai * br];
  // M⁻¹ = (1/det)·[[by, −bx], [−ay, ax]]
  const inv00 = mul(byr, byi, idRe, idIm);
  const inv01 = mul(-bxr, -bxi, idRe, idIm);
  const inv10 = mul(-ayr, -ayi, idRe, idIm);
  const inv11 = mul(axr, axi, idRe, idIm);
  const p = new Float64Array(8);
  const q = new Float64Array(8);
  const aConj: [number, number][] = [
    [axr, -axi],
    [ayr, -ayi],
  ];
  const bConj: [number, number][] = [
    [bxr, -bxi],
    [byr, -byi],
  ];
  const row0 = [inv00, inv01];
  const row1 = [inv10, inv11];
  for (let j = 0; j < 2; j++) {
    for (let k = 0; k < 2; k++) {
      const slot = 2 * (2 * j + k);
      const pv = mul(aConj[j][0], aConj[j][1], row0[k][0], row0[k][1]);
      const qv = mul(bConj[j][0], bConj[j][1], row1[k][0], row1[k][1]);
      p[slot] = pv[0];
      p[slot + 1] = pv[1];
      q[slot] = qv[0];
      q[slot + 1] = qv[1];
    }
  }
  return { p, q };
}

/**
 * Jones matrix of one cell that sends λA → e^{iφA} λA* and λB → e^{iφB} λB*:
 * J = [e^{iφA} λA*, e^{iφB} λB*]·[λA, λB]⁻¹ (Mueller et al., PRL 118, 113901 (2017)). Phases in radians.
 * Example: jonesForPhases(0.5, 1.2, polarizationPair({ kind: 'linear', angle: 0 })) → xx = e^{0.5i}, yy = e^{1.2i}, xy = yx = 0.
 */
export function jonesForPhases(phiA: number, phiB: number, pair: PolarizationPair): JonesMatrix {
  const { p, q } = synthesisCoefficients(pair);
  const ca = Math.cos(phiA);
  const sa = Math.sin(phiA);
  const cb = Math.cos(phiB);
  const sb = Math.sin(phiB);
  const entry = (slot: number): [number, number] => [
    ca * p[slot] - sa * p[slot + 1] + cb * q[slot] - sb * q[slot + 1],
    ca * p[slot + 1] + sa * p[slot] + cb * q[slot + 1] + sb * q[slot],
  ];
  return { xx: entry(0), xy: entry(2), yx: entry(4), yy: entry(6) };
}

function checkPhasePlanes(phiA: Float64Array, phiB: Float64Array, what: string): number {
  if (phiA.length !== phiB.length) {
    throw new RangeError(`${what}: phiA has ${phiA.length} cells but phiB has ${phiB.length}`);
  }
  return sideOf(phiA.length, what);
}

function progressStride(count: number): number {
  return Math.max(1, Math.ceil(count / 64));
}

/**
 * Per-cell Jones field for phase maps φA, φB (radians, row-major N×N): the synthesis of
 * `jonesForPhases` applied to every cell (Mueller et al., PRL 118, 113901 (2017)).
 * Memory: 8 Float64 planes of N² (268 MB at N = 2048); prefer `synthesizeDecomposition` when only
 * δx, δy, θ are needed.
 * Example: synthesizeJones(Float64Array.of(0), Float64Array.of(Math.PI), pairXY).yy.re[0] → −1.
 */
export function synthesizeJones(
  phiA: Float64Array,
  phiB: Float64Array,
  pair: PolarizationPair,
  options: CellLoopOptions = {},
): JonesField {
  const n = checkPhasePlanes(phiA, phiB, 'synthesizeJones');
  const { p, q } = synthesisCoefficients(pair);
  const field = emptyJonesField(n);
  const planes = [field.xx, field.xy, field.yx, field.yy];
  const count = n * n;
  const stride = progressStride(count);
  for (let i = 0; i < count; i++) {
    if (i % stride === 0) {
      options.signal?.throwIfAborted();
      options.onProgress?.(i / count, 'jones-synthesis');
    }
    const ca = Math.cos(phiA[i]);
    const sa = Math.sin(phiA[i]);
    const cb = Math.cos(phiB[i]);
    const sb = Math.sin(phiB[i]);
    for (let e = 0; e < 4; e++) {
      const s = 2 * e;
      planes[e].re[i] = ca * p[s] - sa * p[s + 1] + cb * q[s] - sb * q[s + 1];
      planes[e].im[i] = ca * p[s + 1] + sa * p[s] + cb * q[s + 1] + sb * q[s];
    }
  }
  options.onProgress?.(1, 'jones-synthesis');
  return field;
}

/** Output slot for decomposeInto. */
interface DecompositionSink {
  deltaX: Float64Array;
  deltaY: Float64Array;
  theta: Float64Array;
}

/**
 * Decomposes J = [[a, b], [b, d]] (b = mean of the off-diagonals) as R(θ)·diag(ex, ey)·R(θ)ᵀ:
 * a − d = w·cos2θ, 2b = w·sin2θ, a + d = ex + ey with w = ex − ey. The real vectors
 * (Re(a−d), Re 2b) and (Im(a−d), Im 2b) are both parallel to (cos2θ, sin2θ); the longer one fixes 2θ.
 */
function decomposeInto(
  aRe: number,
  aIm: number,
  bRe: number,
  bIm: number,
  dRe: number,
  dIm: number,
  out: DecompositionSink,
  i: number,
): void {
  const uRe = aRe - dRe;
  const uIm = aIm - dIm;
  const vRe = 2 * bRe;
  const vIm = 2 * bIm;
  const np = uRe * uRe + vRe * vRe;
  const nq = uIm * uIm + vIm * vIm;
  const sRe = aRe + dRe;
  const sIm = aIm + dIm;
  if (np + nq < DEGENERATE_LIMIT * DEGENERATE_LIMIT) {
    const delta = Math.atan2(sIm, sRe);
    out.deltaX[i] = delta;
    out.deltaY[i] = delta;
    out.theta[i] = 0;
    return;
  }
  let twoTheta = np >= nq ? Math.atan2(vRe, uRe) : Math.atan2(vIm, uIm);
  if (twoTheta > Math.PI / 2) twoTheta -= Math.PI;
  else if (twoTheta <= -Math.PI / 2) twoTheta += Math.PI;
  const c2 = Math.cos(twoTheta);
  const s2 = Math.sin(twoTheta);
  const wRe = uRe * c2 + vRe * s2;
  const wIm = uIm * c2 + vIm * s2;
  out.deltaX[i] = Math.atan2(sIm + wIm, sRe + wRe);
  out.deltaY[i] = Math.atan2(sIm - wIm, sRe - wRe);
  out.theta[i] = twoTheta / 2;
}

/**
 * Decomposes one symmetric Jones matrix into R(θ)·diag(e^{iδx}, e^{iδy})·R(θ)ᵀ; canonical form
 * θ ∈ (−π/4, π/4], δ ∈ (−π, π] (module comment). For a non-unitary but symmetric matrix of the same
 * form (a lossy cell), δ are the arguments of its eigenvalues.
 * Example: decomposeJones(retarderJones(1, 1, 1, −0.5, 0.3)) → { deltaX: 1, deltaY: −0.5, theta: 0.3 }.
 */
export function decomposeJones(m: JonesMatrix): { deltaX: number; deltaY: number; theta: number } {
  const out = { deltaX: new Float64Array(1), deltaY: new Float64Array(1), theta: new Float64Array(1) };
  decomposeInto(m.xx[0], m.xx[1], (m.xy[0] + m.yx[0]) / 2, (m.xy[1] + m.yx[1]) / 2, m.yy[0], m.yy[1], out, 0);
  return { deltaX: out.deltaX[0], deltaY: out.deltaY[0], theta: out.theta[0] };
}

/**
 * Decomposes every cell of a Jones field (see `decomposeJones`).
 * Example: decomposeJonesField(buildJonesField(1, 0.4, 1, −2, 0.1, 1)).theta[0] → 0.1.
 */
export function decomposeJonesField(field: JonesField, options: CellLoopOptions = {}): JonesDecomposition {
  const n = field.n;
  const count = n * n;
  const out: JonesDecomposition = {
    n,
    deltaX: new Float64Array(count),
    deltaY: new Float64Array(count),
    theta: new Float64Array(count),
  };
  const stride = progressStride(count);
  const { xx, xy, yx, yy } = field;
  for (let i = 0; i < count; i++) {
    if (i % stride === 0) {
      options.signal?.throwIfAborted();
      options.onProgress?.(i / count, 'jones-decomposition');
    }
    decomposeInto(xx.re[i], xx.im[i], (xy.re[i] + yx.re[i]) / 2, (xy.im[i] + yx.im[i]) / 2, yy.re[i], yy.im[i], out, i);
  }
  options.onProgress?.(1, 'jones-decomposition');
  return out;
}

/**
 * Synthesis and decomposition in one pass, without storing J: per cell
 * J = [e^{iφA} λA*, e^{iφB} λB*]·[λA, λB]⁻¹ (Mueller et al. 2017) → (δx, δy, θ), canonical form.
 * Phases in radians, row-major N×N.
 * Example: synthesizeDecomposition(Float64Array.of(0.3), Float64Array.of(−1), pairXY) → δx = 0.3, δy = −1, θ = 0.
 */
export function synthesizeDecomposition(
  phiA: Float64Array,
  phiB: Float64Array,
  pair: PolarizationPair,
  options: CellLoopOptions = {},
): JonesDecomposition {
  const n = checkPhasePlanes(phiA, phiB, 'synthesizeDecomposition');
  const { p, q } = synthesisCoefficients(pair);
  const count = n * n;
  const out: JonesDecomposition = {
    n,
    deltaX: float64Array(count, options.memory),
    deltaY: float64Array(count, options.memory),
    theta: float64Array(count, options.memory),
  };
  const stride = progressStride(count);
  for (let i = 0; i < count; i++) {
    if (i % stride === 0) {
      options.signal?.throwIfAborted();
      options.onProgress?.(i / count, 'jones-decomposition');
    }
    const ca = Math.cos(phiA[i]);
    const sa = Math.sin(phiA[i]);
    const cb = Math.cos(phiB[i]);
    const sb = Math.sin(phiB[i]);
    const aRe = ca * p[0] - sa * p[1] + cb * q[0] - sb * q[1];
    const aIm = ca * p[1] + sa * p[0] + cb * q[1] + sb * q[0];
    const bRe = 0.5 * (ca * (p[2] + p[4]) - sa * (p[3] + p[5]) + cb * (q[2] + q[4]) - sb * (q[3] + q[5]));
    const bIm = 0.5 * (ca * (p[3] + p[5]) + sa * (p[2] + p[4]) + cb * (q[3] + q[5]) + sb * (q[2] + q[4]));
    const dRe = ca * p[6] - sa * p[7] + cb * q[6] - sb * q[7];
    const dIm = ca * p[7] + sa * p[6] + cb * q[7] + sb * q[6];
    decomposeInto(aRe, aIm, bRe, bIm, dRe, dIm, out, i);
  }
  options.onProgress?.(1, 'jones-decomposition');
  return out;
}

/**
 * Brings one (δx, δy, θ) into the canonical form of this module: θ ∈ (−π/4, π/4] using
 * (δx, δy, θ) ≡ (δx, δy, θ + π) ≡ (δy, δx, θ + π/2), δ wrapped to (−π, π], θ = 0 when δx ≡ δy.
 * Example: canonicalDecomposition(1, 2, Math.PI / 2) → { deltaX: 2, deltaY: 1, theta: 0 }.
 */
export function canonicalDecomposition(
  deltaX: number,
  deltaY: number,
  theta: number,
): { deltaX: number; deltaY: number; theta: number } {
  let dx = wrapPhase(deltaX);
  let dy = wrapPhase(deltaY);
  if (Math.hypot(Math.cos(dx) - Math.cos(dy), Math.sin(dx) - Math.sin(dy)) < DEGENERATE_LIMIT) {
    return { deltaX: dx, deltaY: dx, theta: 0 };
  }
  // θ mod π into (−π/2, π/2]
  let t = theta - Math.PI * Math.floor((theta + Math.PI / 2) / Math.PI);
  if (t <= -Math.PI / 2) t += Math.PI;
  if (t > Math.PI / 4) {
    t -= Math.PI / 2;
    [dx, dy] = [dy, dx];
  } else if (t <= -Math.PI / 4) {
    t += Math.PI / 2;
    [dx, dy] = [dy, dx];
  }
  return { deltaX: dx, deltaY: dy, theta: t };
}

/**
 * Closed form for the circular basis (Mueller et al. 2017), with A = left-circular [1, i]/√2 and
 * B = right-circular [1, −i]/√2 (polarization.ts convention): δx = (φA + φB)/2, δy = δx − π,
 * θ = (φA − φB)/4. With A right-circular the roles swap: θ = (φB − φA)/4. Not wrapped.
 * Example: circularClosedForm(1, 0.2, 'left') → { deltaX: 0.6, deltaY: 0.6 − π, theta: 0.2 }.
 */
export function circularClosedForm(
  phiA: number,
  phiB: number,
  handednessA: Handedness,
): { deltaX: number; deltaY: number; theta: number } {
  const deltaX = (phiA + phiB) / 2;
  const theta = handednessA === 'left' ? (phiA - phiB) / 4 : (phiB - phiA) / 4;
  return { deltaX, deltaY: deltaX - Math.PI, theta };
}

/**
 * Closed form for a linear basis at angle ψ (A = [cosψ, sinψ], B its partner): δx = φA, δy = φB,
 * θ = ψ (ψ = 0 is the x/y basis of Mueller et al. 2017). Not wrapped.
 * Example: linearClosedForm(0.4, −1.1) → { deltaX: 0.4, deltaY: −1.1, theta: 0 }.
 */
export function linearClosedForm(
  phiA: number,
  phiB: number,
  psi = 0,
): { deltaX: number; deltaY: number; theta: number } {
  return { deltaX: phiA, deltaY: phiB, theta: psi };
}

/**
 * Jones matrix of a rotated retarder cell: R(θ)·diag(tx e^{iαx}, ty e^{iαy})·R(θ)ᵀ
 * = [[c²A + s²B, cs(A − B)], [cs(A − B), s²A + c²B]], A = tx e^{iαx}, B = ty e^{iαy}, c = cosθ, s = sinθ.
 * tx, ty amplitude transmissions (0…1), αx, αy and θ in radians.
 * Example: retarderJones(1, 0, 1, Math.PI, Math.PI / 4) → xx ≈ 0, xy = yx = 1, yy ≈ 0 (half-wave plate at 45°).
 */
export function retarderJones(tx: number, alphaX: number, ty: number, alphaY: number, theta: number): JonesMatrix {
  const c = Math.cos(theta);
  const s = Math.sin(theta);
  const aRe = tx * Math.cos(alphaX);
  const aIm = tx * Math.sin(alphaX);
  const bRe = ty * Math.cos(alphaY);
  const bIm = ty * Math.sin(alphaY);
  const cs = c * s;
  return {
    xx: [c * c * aRe + s * s * bRe, c * c * aIm + s * s * bIm],
    xy: [cs * (aRe - bRe), cs * (aIm - bIm)],
    yx: [cs * (aRe - bRe), cs * (aIm - bIm)],
    yy: [s * s * aRe + c * c * bRe, s * s * aIm + c * c * bIm],
  };
}

/**
 * Writes R(θ)·diag(tx e^{iαx}, ty e^{iαy})·R(θ)ᵀ into cell `index` of `field` (units as
 * `retarderJones`). Used by the per-cell builders; no allocation.
 * Example: writeRetarderCell(field, 0, 1, 0, 1, 0, 0) makes cell 0 the identity.
 */
export function writeRetarderCell(
  field: JonesField,
  index: number,
  tx: number,
  alphaX: number,
  ty: number,
  alphaY: number,
  theta: number,
): void {
  const c = Math.cos(theta);
  const s = Math.sin(theta);
  const aRe = tx * Math.cos(alphaX);
  const aIm = tx * Math.sin(alphaX);
  const bRe = ty * Math.cos(alphaY);
  const bIm = ty * Math.sin(alphaY);
  const cc = c * c;
  const ss = s * s;
  const cs = c * s;
  field.xx.re[index] = cc * aRe + ss * bRe;
  field.xx.im[index] = cc * aIm + ss * bIm;
  const offRe = cs * (aRe - bRe);
  const offIm = cs * (aIm - bIm);
  field.xy.re[index] = offRe;
  field.xy.im[index] = offIm;
  field.yx.re[index] = offRe;
  field.yx.im[index] = offIm;
  field.yy.re[index] = ss * aRe + cc * bRe;
  field.yy.im[index] = ss * aIm + cc * bIm;
}

/**
 * Per-cell Jones field R(θ)·diag(tx e^{iαx}, ty e^{iαy})·R(θ)ᵀ from per-cell planes or constants
 * (amplitudes 0…1; αx, αy, θ radians). `n` is required when every argument is a number.
 * Example: buildJonesField(1, deltaX, 1, deltaY, theta) is the ideal device of a decomposition.
 */
export function buildJonesField(
  tx: CellValues,
  alphaX: CellValues,
  ty: CellValues,
  alphaY: CellValues,
  theta: CellValues,
  n?: number,
  options: CellLoopOptions = {},
): JonesField {
  let side = n;
  for (const plane of [tx, alphaX, ty, alphaY, theta]) {
    if (typeof plane === 'number') continue;
    const s = sideOf(plane.length, 'buildJonesField');
    if (side !== undefined && side !== s) throw new RangeError(`buildJonesField: planes of ${s}² and ${side}² cells`);
    side = s;
  }
  if (side === undefined) throw new RangeError('buildJonesField: give n when every value is a constant');
  const field = emptyJonesField(side);
  const count = side * side;
  const at = (v: CellValues, i: number): number => (typeof v === 'number' ? v : v[i]);
  const stride = progressStride(count);
  for (let i = 0; i < count; i++) {
    if (i % stride === 0) {
      options.signal?.throwIfAborted();
      options.onProgress?.(i / count, 'jones-field');
    }
    writeRetarderCell(field, i, at(tx, i), at(alphaX, i), at(ty, i), at(alphaY, i), at(theta, i));
  }
  options.onProgress?.(1, 'jones-field');
  return field;
}

/** What a rotated retarder does to a circular input (see `geometricPhaseResponse`). */
export interface GeometricPhaseResponse {
  /** Complex amplitude in the opposite-handed circular state (same canonical vectors as polarization.ts). */
  cross: [number, number];
  /** Complex amplitude left in the input state. */
  co: [number, number];
  /** |cross|² = sin²(Γ/2) (lossless cell). */
  crossPower: number;
  /** |co|² = cos²(Γ/2). */
  coPower: number;
  /** The geometric (Pancharatnam–Berry) phase of the converted part: +2θ for left input, −2θ for right. */
  geometricPhase: number;
}

/**
 * Circular light through a lossless retarder with retardance Γ = δx − δy rotated by θ, with
 * common phase Σ = (δx + δy)/2: J = e^{iΣ}[cos(Γ/2)·I + i sin(Γ/2)·M(2θ)], M(2θ) = R diag(1, −1) Rᵀ.
 * Left-circular [1, i]/√2 → co = e^{iΣ}cos(Γ/2) (stays left, no θ dependence) and
 * cross = i e^{iΣ} sin(Γ/2) e^{+2iθ} (right-circular); right input gets e^{−2iθ}. Radians.
 * Example: geometricPhaseResponse(Math.PI, 0.3, 'left') → crossPower 1, coPower ≈ 0, geometricPhase 0.6.
 */
export function geometricPhaseResponse(
  Gamma: number,
  theta: number,
  inputHandedness: Handedness,
  Sigma = 0,
): GeometricPhaseResponse {
  const geometricPhase = inputHandedness === 'left' ? 2 * theta : -2 * theta;
  const half = Gamma / 2;
  const coMag = Math.cos(half);
  const crossMag = Math.sin(half);
  const crossArg = Sigma + Math.PI / 2 + geometricPhase;
  return {
    co: [coMag * Math.cos(Sigma), coMag * Math.sin(Sigma)],
    cross: [crossMag * Math.cos(crossArg), crossMag * Math.sin(crossArg)],
    coPower: coMag * coMag,
    crossPower: crossMag * crossMag,
    geometricPhase,
  };
}
