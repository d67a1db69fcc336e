import { describe, expect, it } from 'vitest';
import { fresnelTransmittance, pillarEffectiveIndices, pillarTransmission, slabModeIndex } from '../../shared/optics/effective-index';
import { demoAtomLibrary, demoLibraryRules } from '../../shared/optics/demo-library';
import { largestPhaseGap, validateAtomLibrary } from '../../shared/optics/atoms';
import { fusedSilicaIndex, siliconNitrideIndex } from '../../shared/optics/materials';

const lambda = 633e-9;
const nCore = siliconNitrideIndex(lambda);

describe('symmetric slab, fundamental mode', () => {
  it('finds the analytic root u = π/4 of u·tan u = ρ·w, u² + w² = V² (slab dispersion relation, e.g. Marcuse ch. 1)', () => {
    // Choose the thickness so that u = κd/2 = π/4 solves the TE equation: then w = u·tan u = π/4 and V = π√2/4.
    const k = (2 * Math.PI) / lambda;
    const nClad = 1;
    const V = (Math.PI * Math.SQRT2) / 4;
    const d = (2 * V) / (k * Math.sqrt(nCore * nCore - nClad * nClad));
    const expectedTE = Math.sqrt(nCore * nCore - ((2 * (Math.PI / 4)) / (k * d)) ** 2);
    expect(slabModeIndex(d, nCore, nClad, lambda, 'TE')).toBeCloseTo(expectedTE, 12);
    // TM: u·tan u = (n1²/n2²)·w; with u = π/4, w = (π/4)/ρ.
    const rho = (nCore * nCore) / (nClad * nClad);
    const w = Math.PI / 4 / rho;
    const dTM = (2 * Math.hypot(Math.PI / 4, w)) / (k * Math.sqrt(nCore * nCore - nClad * nClad));
    const expectedTM = Math.sqrt(nCore * nCore - ((2 * (Math.PI / 4)) / (k * dTM)) ** 2);
    expect(slabModeIndex(dTM, nCore, nClad, lambda, 'TM')).toBeCloseTo(expectedTM, 12);
  });

  it('TE index exceeds TM index for the same slab; thick slab → core, thin slab → cladding (waveguide theory)', () => {
    for (const d of [50e-9, 150e-9, 400e-9, 1e-6]) {
      expect(slabModeIndex(d, nCore, 1, lambda, 'TE')).toBeGreaterThan(slabModeIndex(d, nCore, 1, lambda, 'TM'));
    }
    expect(slabModeIndex(20e-6, nCore, 1, lambda, 'TE')).toBeGreaterThan(nCore - 1e-3);
    expect(slabModeIndex(5e-9, nCore, 1, lambda, 'TE')).toBeLessThan(1.01);
  });
});

describe('effective-index method for a rectangular pillar', () => {
  it('lies between cladding and core index and grows with width, for both polarizations', () => {
    let previous = { nx: 1, ny: 1 };
    for (let w = 60e-9; w <= 420e-9; w += 20e-9) {
      const n = pillarEffectiveIndices(w, 250e-9, nCore, 1, lambda);
      expect(n.nx).toBeGreaterThan(1);
      expect(n.ny).toBeGreaterThan(1);
      expect(n.nx).toBeLessThan(nCore);
      expect(n.ny).toBeLessThan(nCore);
      expect(n.nx).toBeGreaterThan(previous.nx);
      expect(n.ny).toBeGreaterThan(previous.ny);
      previous = n;
    }
  });

  it('is symmetric: n_x(W, L) = n_y(L, W); a square is isotropic; the long axis has the higher index', () => {
    const a = pillarEffectiveIndices(120e-9, 340e-9, nCore, 1, lambda);
    const b = pillarEffectiveIndices(340e-9, 120e-9, nCore, 1, lambda);
    expect(a.nx).toBeCloseTo(b.ny, 13);
    expect(a.ny).toBeCloseTo(b.nx, 13);
    expect(a.ny).toBeGreaterThan(a.nx);
    const s = pillarEffectiveIndices(250e-9, 250e-9, nCore, 1, lambda);
    expect(s.nx).toBeCloseTo(s.ny, 13);
  });

  it('Fresnel normal-incidence transmittance 4n1n2/(n1+n2)² (Born & Wolf §1.5) and pillar estimate', () => {
    expect(fresnelTransmittance(1.5, 1)).toBeCloseTo(0.96, 14);
    const nSub = fusedSilicaIndex(lambda);
    const t = pillarTransmission({ width: 200e-9, length: 200e-9, height: 1e-6, lambda, nPillar: nCore, nSubstrate: nSub, nAmbient: 1 });
    expect(t.alphaX).toBeCloseTo(((2 * Math.PI) / lambda) * (t.nx - 1) * 1e-6, 12);
    expect(t.tx).toBeCloseTo(Math.sqrt(fresnelTransmittance(nSub, t.nx) * fresnelTransmittance(t.nx, 1)), 14);
    expect(t.tx).toBeGreaterThan(0.95);
    expect(t.tx).toBeLessThanOrEqual(1);
  });
});

describe('demo library (approximate)', () => {
  const library = demoAtomLibrary();

  it('is labelled approximate and passes validation', () => {
    expect(library.approximate).toBe(true);
    expect(library.name).toMatch(/approximate/);
    expect(library.source).toMatch(/APPROXIMATE/);
    expect(validateAtomLibrary(library).filter((i) => i.severity === 'error')).toEqual([]);
  });

  it('covers 2π on both axes: largest phase gap below 2π/16 (criterion: 8-level coverage, Swanson 1989)', () => {
    expect(largestPhaseGap(library.atoms.map((a) => a.alphaX))).toBeLessThan((2 * Math.PI) / 16);
    expect(largestPhaseGap(library.atoms.map((a) => a.alphaY))).toBeLessThan((2 * Math.PI) / 16);
    // unwrapped phase span of the pillars exceeds 2π (from the model itself)
    const nSub = fusedSilicaIndex(lambda);
    const big = pillarTransmission({ width: 400e-9, length: 400e-9, height: library.height, lambda, nPillar: nCore, nSubstrate: nSub, nAmbient: 1 });
    const small = pillarTransmission({ width: 120e-9, length: 120e-9, height: library.height, lambda, nPillar: nCore, nSubstrate: nSub, nAmbient: 1 });
    expect(big.alphaX - small.alphaX).toBeGreaterThan(2 * Math.PI);
  });

  it('offers retardance up to about a half wave for the geometric phase', () => {
    let maxRetardance = 0;
    for (const a of library.atoms) {
      const d = Math.abs(Math.atan2(Math.sin(a.alphaX - a.alphaY), Math.cos(a.alphaX - a.alphaY)));
      maxRetardance = Math.max(maxRetardance, d);
    }
    expect(maxRetardance).toBeGreaterThan(0.9 * Math.PI);
  });

  it('keeps sensible geometry: side ≥ 120 nm, aspect ratio ≤ 10, rotation-safe size (common practice, no published source)', () => {
    const rules = demoLibraryRules();
    expect(rules.maxAspectRatio).toBeCloseTo(10, 12);
    for (const a of library.atoms) {
      if (a.shape === 'empty') continue;
      expect(Math.min(a.width, a.length)).toBeGreaterThanOrEqual(120e-9 - 1e-15);
      expect(a.height / Math.min(a.width, a.length)).toBeLessThanOrEqual(10 + 1e-9);
      if (a.width !== a.length) expect(Math.hypot(a.width, a.length)).toBeLessThanOrEqual(library.period - 50e-9 + 1e-15);
      else expect(a.width).toBeLessThanOrEqual(library.period - 50e-9 + 1e-15);
    }
    expect(library.atoms.some((a) => a.shape === 'empty')).toBe(true);
    expect(library.period).toBe(450e-9);
    expect(library.lambda).toBe(633e-9);
  });
});
