/**
 * APPROXIMATE model of a rectangular dielectric pillar as a truncated waveguide, for the demo
 * library only. The effective index of the fundamental mode of each polarization comes from the
 * effective-index method (Knox & Toulios, Proc. Symp. Submillimeter Waves, Polytechnic Press (1970);
 * cf. Marcatili, Bell Syst. Tech. J. 48, 2071 (1969)); the transmission from a single-pass Fresnel
 * estimate. It ignores coupling between neighbouring pillars, Fabry–Pérot reflections inside the
 * pillar, higher modes and the mode mismatch at both ends: real libraries come from full-wave
 * simulations. Lengths in metres, phases in radians, exp(−iωt).
 */

/** 'TE': electric field parallel to the slab interfaces; 'TM': electric field normal to them. */
export type SlabPolarization = 'TE' | 'TM';

/**
 * Effective index of the fundamental (even) mode of a symmetric slab of thickness d, core index
 * nCore, cladding nClad, vacuum wavelength λ: the root of
 * κd/2 = atan(ρ·γ/κ), κ = k√(nCore² − n²), γ = k√(n² − nClad²), ρ = 1 (TE) or nCore²/nClad² (TM)
 * (symmetric slab eigenvalue equation, e.g. Marcuse, Theory of Dielectric Optical Waveguides, ch. 1).
 * Solved by bisection on n ∈ (nClad, nCore) to 1e-14. The fundamental mode has no cutoff.
 * Example: slabModeIndex(400e-9, 2, 1, 633e-9, 'TE') → 1.9047.
 */
export function slabModeIndex(d: number, nCore: number, nClad: number, lambda: number, polarization: SlabPolarization): number {
  if (!(d > 0) || !Number.isFinite(d)) throw new RangeError(`slabModeIndex: thickness must be positive, got ${d}`);
  if (!(lambda > 0) || !Number.isFinite(lambda)) throw new RangeError(`slabModeIndex: wavelength must be positive, got ${lambda}`);
  if (!(nCore > nClad) || !(nClad >= 1)) {
    throw new RangeError(`slabModeIndex: need nCore > nClad ≥ 1, got ${nCore}, ${nClad}`);
  }
  const k = (2 * Math.PI) / lambda;
  const rho = polarization === 'TE' ? 1 : (nCore * nCore) / (nClad * nClad);
  const f = (n: number): number => {
    const kappa = k * Math.sqrt(Math.max(0, nCore * nCore - n * n));
    const gamma = k * Math.sqrt(Math.max(0, n * n - nClad * nClad));
    return (kappa * d) / 2 - Math.atan2(rho * gamma, kappa);
  };
  let lo = nClad; // f > 0
  let hi = nCore; // f < 0
  for (let i = 0; i < 200 && hi - lo > 1e-14; i++) {
    const mid = 0.5 * (lo + hi);
    if (f(mid) > 0) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}

/**
 * Effective indices (n_x, n_y) of the fundamental modes of a rectangular pillar, width W along x,
 * length L along y, by the effective-index method. For x-polarized light the field is normal to
 * the faces x = ±W/2 (TM there) and tangential to y = ±L/2 (TE there). The two orders of the
 * method (W first, then L; L first, then W) give slightly different answers; we return their mean
 * (common practice, no published source), which keeps n_x(W, L) = n_y(L, W) exactly.
 * Example: pillarEffectiveIndices(100e-9, 300e-9, 2.04, 1, 633e-9) → { nx: 1.0588, ny: 1.3018 }.
 */
export function pillarEffectiveIndices(
  width: number,
  length: number,
  nCore: number,
  nClad: number,
  lambda: number,
): { nx: number; ny: number } {
  const along = (across: number, other: number): number => {
    // Field normal to the faces `across` apart, tangential to the faces `other` apart.
    const first = slabModeIndex(other, slabModeIndex(across, nCore, nClad, lambda, 'TM'), nClad, lambda, 'TE');
    const second = slabModeIndex(across, slabModeIndex(other, nCore, nClad, lambda, 'TE'), nClad, lambda, 'TM');
    return 0.5 * (first + second);
  };
  return { nx: along(width, length), ny: along(length, width) };
}

/**
 * Power transmittance of a normal-incidence interface between indices n1 and n2 (Fresnel):
 * T = 4 n1 n2 / (n1 + n2)². Example: fresnelTransmittance(1.5, 1) → 0.96.
 */
export function fresnelTransmittance(n1: number, n2: number): number {
  return (4 * n1 * n2) / ((n1 + n2) * (n1 + n2));
}

/** Inputs of `pillarTransmission`. */
export interface PillarSpec {
  width: number;
  length: number;
  height: number;
  lambda: number;
  /** Pillar material index at λ. */
  nPillar: number;
  /** Substrate index at λ (light arrives through the substrate). */
  nSubstrate: number;
  /** Index around and above the pillars (1 for air). */
  nAmbient: number;
}

/**
 * APPROXIMATE per-axis transmission of a pillar (see module comment):
 * α = k·(n_eff − n_ambient)·H, i.e. the phase relative to a bare cell (the same height H of ambient
 * medium), k = 2π/λ; t = √(T(n_sub → n_eff)·T(n_eff → n_ambient)), single pass, normal incidence.
 * Example: pillarTransmission({ width: 200e-9, length: 200e-9, height: 1e-6, lambda: 633e-9, nPillar: 2.04,
 * nSubstrate: 1.457, nAmbient: 1 }) → n_x = n_y = 1.3292, alphaX = alphaY = 3.2676 rad, tx = ty = 0.9889.
 */
export function pillarTransmission(spec: PillarSpec): {
  nx: number;
  ny: number;
  tx: number;
  alphaX: number;
  ty: number;
  alphaY: number;
} {
  const { nx, ny } = pillarEffectiveIndices(spec.width, spec.length, spec.nPillar, spec.nAmbient, spec.lambda);
  const k = (2 * Math.PI) / spec.lambda;
  const t = (nEff: number): number =>
    Math.sqrt(fresnelTransmittance(spec.nSubstrate, nEff) * fresnelTransmittance(nEff, spec.nAmbient));
  return {
    nx,
    ny,
    tx: t(nx),
    alphaX: k * (nx - spec.nAmbient) * spec.height,
    ty: t(ny),
    alphaY: k * (ny - spec.nAmbient) * spec.height,
  };
}
