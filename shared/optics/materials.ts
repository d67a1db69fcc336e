/**
 * Material dispersion from published Sellmeier fits, n² − 1 = Σ B_i λ² / (λ² − C_i²), λ in µm
 * inside the fit, metres at the interface.
 */

/** A Sellmeier fit with its published validity range. */
export interface SellmeierMaterial {
  /** Short identifier used in library metadata. */
  id: 'fused-silica' | 'silicon-nitride';
  /** Human-readable name. */
  name: string;
  /** The publication the coefficients come from. */
  source: string;
  /** Oscillator strengths B_i (dimensionless). */
  b: readonly number[];
  /** Resonance wavelengths C_i in µm (the fit uses C_i²). */
  c: readonly number[];
  /** Validity range in metres (vacuum wavelength). */
  minLambda: number;
  maxLambda: number;
}

/** Fused silica, 20 °C, valid 0.21–3.71 µm (Malitson, JOSA 55, 1205 (1965)). */
export const FUSED_SILICA: SellmeierMaterial = {
  id: 'fused-silica',
  name: 'fused silica (SiO₂)',
  source: 'I. H. Malitson, J. Opt. Soc. Am. 55, 1205 (1965)',
  b: [0.6961663, 0.4079426, 0.8974794],
  c: [0.0684043, 0.1162414, 9.896161],
  minLambda: 0.21e-6,
  maxLambda: 3.71e-6,
};

/** Stoichiometric LPCVD silicon nitride, valid 0.31–5.504 µm (Luke et al., Opt. Lett. 40, 4823 (2015)). */
export const SILICON_NITRIDE: SellmeierMaterial = {
  id: 'silicon-nitride',
  name: 'silicon nitride (Si₃N₄)',
  source: 'K. Luke et al., Opt. Lett. 40, 4823 (2015)',
  b: [3.0249, 40314],
  c: [0.1353406, 1239.842],
  minLambda: 0.31e-6,
  maxLambda: 5.504e-6,
};

/**
 * Refractive index n(λ) of a Sellmeier material at vacuum wavelength `lambda` in metres.
 * Throws RangeError outside the fit's published validity range.
 * Example: refractiveIndex(FUSED_SILICA, 632.8e-9) → 1.457018 (Malitson 1965).
 */
export function refractiveIndex(material: SellmeierMaterial, lambda: number): number {
  if (!Number.isFinite(lambda) || lambda < material.minLambda || lambda > material.maxLambda) {
    throw new RangeError(
      `${material.name}: wavelength ${lambda} m is outside the valid range ` +
        `${material.minLambda}–${material.maxLambda} m of ${material.source}`,
    );
  }
  const um = lambda * 1e6;
  const l2 = um * um;
  let n2 = 1;
  for (let i = 0; i < material.b.length; i++) {
    n2 += (material.b[i] * l2) / (l2 - material.c[i] * material.c[i]);
  }
  return Math.sqrt(n2);
}

/**
 * Fused-silica index (Malitson 1965), λ in metres, valid 0.21–3.71 µm.
 * Example: fusedSilicaIndex(587.6e-9) → 1.458462.
 */
export function fusedSilicaIndex(lambda: number): number {
  return refractiveIndex(FUSED_SILICA, lambda);
}

/**
 * Silicon-nitride index (Luke et al. 2015), λ in metres, valid 0.31–5.504 µm.
 * Example: siliconNitrideIndex(1550e-9) → 1.99628.
 */
export function siliconNitrideIndex(lambda: number): number {
  return refractiveIndex(SILICON_NITRIDE, lambda);
}
