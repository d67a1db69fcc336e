/**
 * Polarization states as Jones vectors, the orthogonal pair of a design, and the polarization
 * ellipse of a vector (for drawings).
 *
 * Time convention exp(−iωt) (see types.ts): the physical field is Re{[Ex, Ey] e^{−iωt}}.
 *
 * Handedness convention (used everywhere in Phasewright): the optics convention of Born & Wolf —
 * a state is RIGHT-circular when its field vector turns CLOCKWISE as seen by the receiver looking
 * towards the source, LEFT-circular when it turns counter-clockwise. Under exp(−iωt):
 *   right-circular = [1, −i]/√2   (negative helicity; χ = −π/4 in λ(ψ, χ)),
 *   left-circular  = [1, +i]/√2   (positive helicity; χ = +π/4 in λ(ψ, χ)).
 * (The receiver sees x to the right and y up, z pointing at the viewer; [1, i] gives
 * Ex = cos ωt, Ey = sin ωt, which turns from x towards y: counter-clockwise.)
 */
import type { JonesVector } from './types';

/** Handedness of a circular or elliptical state; see the module comment for the convention. */
export type Handedness = 'left' | 'right';

/** How the user describes the first state A of the pair; B is always its orthogonal partner. */
export type PolarizationSpec =
  | { kind: 'linear'; /** ψ, radians from x towards y */ angle: number }
  | { kind: 'circular'; handedness: Handedness }
  | { kind: 'elliptical'; /** orientation ψ, radians */ psi: number; /** ellipticity χ, radians in [−π/4, π/4] */ chi: number };

/** The two orthogonal states of a design: channel A gets state `a`, channel B its partner `b`. */
export interface PolarizationPair {
  a: JonesVector;
  b: JonesVector;
}

/** Parameters of the polarization ellipse traced by Re{E e^{−iωt}}. */
export interface EllipseParameters {
  /** Orientation ψ of the major axis, radians in (−π/2, π/2], from x towards y. */
  psi: number;
  /** Ellipticity angle χ, radians in [−π/4, π/4]; tan|χ| = minor/major; χ > 0 is left-handed. */
  chi: number;
  /** Semi-major axis of the field ellipse (same unit as the vector's amplitude). */
  majorAxis: number;
  /** Semi-minor axis of the field ellipse. */
  minorAxis: number;
  /** 'linear' when |χ| ≤ 1e-9, otherwise the sense of rotation seen by the receiver. */
  handedness: Handedness | 'linear';
  /** Stokes parameters, S3 = 2·Im(Ex* Ey) (positive for left-circular under our convention). */
  s0: number;
  s1: number;
  s2: number;
  s3: number;
}

/**
 * Elliptical state λ(ψ, χ) = [cosψ cosχ − i sinψ sinχ, sinψ cosχ + i cosψ sinχ]ᵀ, unit norm
 * (Azzam & Bashara, Ellipsometry and Polarized Light). ψ orientation, χ ellipticity, radians.
 * With exp(−iωt), χ > 0 is left-handed (counter-clockwise seen by the receiver).
 * Example: ellipticalState(0, Math.PI / 4) → [[0.70711, 0], [0, 0.70711]] (left-circular).
 */
export function ellipticalState(psi: number, chi: number): JonesVector {
  const cPsi = Math.cos(psi);
  const sPsi = Math.sin(psi);
  const cChi = Math.cos(chi);
  const sChi = Math.sin(chi);
  return [
    [cPsi * cChi, -sPsi * sChi],
    [sPsi * cChi, cPsi * sChi],
  ];
}

/**
 * Exact orthogonal partner λ(ψ + π/2, −χ) of the elliptical state λ(ψ, χ) (Azzam & Bashara).
 * Example: orthogonalPartner(0, 0) → [[≈0, 0], [1, 0]] (y-linear partner of x-linear).
 */
export function orthogonalPartner(psi: number, chi: number): JonesVector {
  return ellipticalState(psi + Math.PI / 2, -chi);
}

/**
 * Linear state at angle ψ (radians, from x towards y): [cosψ, sinψ].
 * Example: linearState(Math.PI / 4) → [[0.70711, 0], [0.70711, 0]].
 */
export function linearState(psi: number): JonesVector {
  return [
    [Math.cos(psi), 0],
    [Math.sin(psi), 0],
  ];
}

/**
 * Circular state with the module's handedness convention, exp(−iωt):
 * right = [1, −i]/√2, left = [1, +i]/√2.
 * Example: circularState('right') → [[0.70711, 0], [0, −0.70711]].
 */
export function circularState(handedness: Handedness): JonesVector {
  const h = Math.SQRT1_2;
  return [
    [h, 0],
    [0, handedness === 'left' ? h : -h],
  ];
}

/**
 * The state pair (A, B) for a description. B is the exact orthogonal partner of A:
 * - linear ψ: A = [cosψ, sinψ], B = λ(ψ + π/2, 0) = [−sinψ, cosψ];
 * - elliptical (ψ, χ): A = λ(ψ, χ), B = λ(ψ + π/2, −χ);
 * - circular: A = the named circular vector, B = the opposite-handed circular vector with the
 *   canonical global phase ([1, ∓i]/√2). It equals λ(ψ + π/2, −χ) up to a global factor ±i;
 *   the canonical form is kept so that the circular closed forms of jones.ts hold as written.
 * Throws RangeError on non-finite angles or |χ| > π/4.
 * Example: polarizationPair({ kind: 'circular', handedness: 'left' }).b → [[0.70711, 0], [0, −0.70711]].
 */
export function polarizationPair(spec: PolarizationSpec): PolarizationPair {
  switch (spec.kind) {
    case 'linear':
      if (!Number.isFinite(spec.angle)) throw new RangeError('linear polarization: angle must be finite');
      return { a: ellipticalState(spec.angle, 0), b: orthogonalPartner(spec.angle, 0) };
    case 'circular':
      if (spec.handedness !== 'left' && spec.handedness !== 'right') {
        throw new RangeError("circular polarization: handedness must be 'left' or 'right'");
      }
      return {
        a: circularState(spec.handedness),
        b: circularState(spec.handedness === 'left' ? 'right' : 'left'),
      };
    case 'elliptical':
      if (!Number.isFinite(spec.psi) || !Number.isFinite(spec.chi)) {
        throw new RangeError('elliptical polarization: psi and chi must be finite');
      }
      if (Math.abs(spec.chi) > Math.PI / 4 + 1e-12) {
        throw new RangeError('elliptical polarization: chi must lie in [−π/4, π/4]');
      }
      return { a: ellipticalState(spec.psi, spec.chi), b: orthogonalPartner(spec.psi, spec.chi) };
    default:
      throw new RangeError('unknown polarization kind');
  }
}

/**
 * Hermitian inner product ⟨u|v⟩ = u_x* v_x + u_y* v_y, returned as [re, im].
 * Example: innerProduct(circularState('left'), circularState('right')) → [0, 0].
 */
export function innerProduct(u: JonesVector, v: JonesVector): [number, number] {
  const re = u[0][0] * v[0][0] + u[0][1] * v[0][1] + u[1][0] * v[1][0] + u[1][1] * v[1][1];
  const im = u[0][0] * v[0][1] - u[0][1] * v[0][0] + u[1][0] * v[1][1] - u[1][1] * v[1][0];
  return [re, im];
}

/**
 * Norm √⟨v|v⟩ of a Jones vector (field amplitude units).
 * Example: jonesNorm(ellipticalState(0.3, 0.2)) → 1.
 */
export function jonesNorm(v: JonesVector): number {
  return Math.hypot(v[0][0], v[0][1], v[1][0], v[1][1]);
}

/**
 * True when |⟨u|v⟩| ≤ tolerance·|u|·|v| (relative tolerance, default 1e-12).
 * Example: areOrthogonal(linearState(0.3), linearState(0.3 + Math.PI / 2)) → true.
 */
export function areOrthogonal(u: JonesVector, v: JonesVector, tolerance = 1e-12): boolean {
  const [re, im] = innerProduct(u, v);
  return Math.hypot(re, im) <= tolerance * jonesNorm(u) * jonesNorm(v);
}

/**
 * Polarization ellipse of a Jones vector under exp(−iωt), via the Stokes parameters
 * S0 = |Ex|² + |Ey|², S1 = |Ex|² − |Ey|², S2 = 2 Re(Ex* Ey), S3 = 2 Im(Ex* Ey);
 * 2ψ = atan2(S2, S1), sin 2χ = S3/S0, major = √S0·cosχ, minor = √S0·|sinχ|
 * (Azzam & Bashara; for λ(ψ, χ) this returns ψ and χ back).
 * Example: ellipseParameters(circularState('right')) → { chi: −π/4, handedness: 'right', majorAxis: 0.70711, … }.
 */
export function ellipseParameters(v: JonesVector): EllipseParameters {
  const [[xr, xi], [yr, yi]] = v;
  const ix = xr * xr + xi * xi;
  const iy = yr * yr + yi * yi;
  const s0 = ix + iy;
  const s1 = ix - iy;
  const s2 = 2 * (xr * yr + xi * yi);
  const s3 = 2 * (xr * yi - xi * yr);
  if (s0 === 0) {
    return { psi: 0, chi: 0, majorAxis: 0, minorAxis: 0, handedness: 'linear', s0, s1, s2, s3 };
  }
  let psi = 0.5 * Math.atan2(s2, s1);
  if (psi <= -Math.PI / 2) psi += Math.PI;
  const chi = 0.5 * Math.asin(Math.max(-1, Math.min(1, s3 / s0)));
  const amplitude = Math.sqrt(s0);
  const handedness: EllipseParameters['handedness'] = Math.abs(chi) <= 1e-9 ? 'linear' : chi > 0 ? 'left' : 'right';
  return {
    psi,
    chi,
    majorAxis: amplitude * Math.cos(chi),
    minorAxis: amplitude * Math.abs(Math.sin(chi)),
    handedness,
    s0,
    s1,
    s2,
    s3,
  };
}
