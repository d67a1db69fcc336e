import { execFileSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import { fresnelTransmittance, pillarEffectiveIndices, pillarTransmission, slabModeIndex } from '../../shared/optics/effective-index';
import { demoAtomLibrary, demoLibraryRules } from '../../shared/optics/demo-library';
import { largestPhaseGap, validateAtomLibrary } from '../../shared/optics/atoms';
import { fusedSilicaIndex, siliconNitrideIndex } from '../../shared/optics/materials';
import { PYTHON } from '../support/python';

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

  it('meets published points of the normalized TE dispersion curve b(V) (Kogelnik & Ramaswamy, Appl. Opt. 13, 1857 (1974))', () => {
    // Symmetric guide (asymmetry a = 0), fundamental TE mode: V√(1 − b) = 2·atan√(b/(1 − b)), with
    // V = k·d·√(n1² − n2²) and b = (n² − n2²)/(n1² − n2²). Exact points: b = 1/4 at V = 2π/(3√3),
    // b = 1/2 at V = π/√2, b = 3/4 at V = 4π/3. Checked for a high-contrast (Si₃N₄/air) and a
    // low-contrast (1.50/1.45) slab.
    const k = (2 * Math.PI) / lambda;
    const points: [number, number][] = [
      [0.25, (2 * Math.PI) / (3 * Math.sqrt(3))],
      [0.5, Math.PI / Math.SQRT2],
      [0.75, (4 * Math.PI) / 3],
    ];
    for (const [n1, n2] of [
      [nCore, 1],
      [1.5, 1.45],
    ]) {
      for (const [b, V] of points) {
        const d = V / (k * Math.sqrt(n1 * n1 - n2 * n2));
        const expected = Math.sqrt(n2 * n2 + b * (n1 * n1 - n2 * n2));
        // 1e-10: the bisection's own tolerance is 1e-14 in n.
        expect(Math.abs(slabModeIndex(d, n1, n2, lambda, 'TE') - expected)).toBeLessThan(1e-10);
      }
    }
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
    expect(t.tx).toBeGreaterThan(0.95);
    expect(t.tx).toBeLessThanOrEqual(1);
  });

  it('pillar indices, phases and transmissions agree with an independent scipy solution of the same method', () => {
    // Reference: the slab eigenvalue equations in normalized form (Kogelnik & Ramaswamy 1974:
    // V√(1 − b) = 2·atan(ρ·√(b/(1 − b)))) solved with scipy.optimize.brentq, the effective-index method in
    // both orders averaged, α = k(n − 1)H and t = √(T(n_sub→n)·T(n→1)) with Fresnel's T = 4n₁n₂/(n₁+n₂)².
    const nSub = fusedSilicaIndex(lambda);
    const sizes = [
      [100e-9, 300e-9],
      [200e-9, 200e-9],
      [320e-9, 150e-9],
    ];
    const script = [
      'import json, sys, math',
      'from scipy.optimize import brentq',
      'lam, n_core, n_sub, height = 633e-9, float(sys.argv[1]), float(sys.argv[2]), 1.2e-6',
      'k = 2 * math.pi / lam',
      'def slab(d, n1, n2, tm):',
      '    V = k * d * math.sqrt(n1 * n1 - n2 * n2)',
      '    rho = (n1 * n1) / (n2 * n2) if tm else 1.0',
      '    f = lambda b: V * math.sqrt(1 - b) - 2 * math.atan(rho * math.sqrt(b / (1 - b)))',
      '    b = brentq(f, 1e-15, 1 - 1e-15, xtol=1e-16, rtol=1e-15)',
      '    return math.sqrt(n2 * n2 + b * (n1 * n1 - n2 * n2))',
      'def along(across, other):',
      '    first = slab(other, slab(across, n_core, 1.0, True), 1.0, False)',
      '    second = slab(across, slab(other, n_core, 1.0, False), 1.0, True)',
      '    return 0.5 * (first + second)',
      'T = lambda a, b: 4 * a * b / (a + b) ** 2',
      'out = []',
      'for w, l in json.loads(sys.argv[3]):',
      '    nx, ny = along(w, l), along(l, w)',
      '    out.append([nx, ny, k * (nx - 1) * height, k * (ny - 1) * height, math.sqrt(T(n_sub, nx) * T(nx, 1)), math.sqrt(T(n_sub, ny) * T(ny, 1))])',
      'print(json.dumps(out))',
    ].join('\n');
    const expected = JSON.parse(execFileSync(PYTHON, ['-c', script, String(nCore), String(nSub), JSON.stringify(sizes)], { encoding: 'utf8' })) as number[][];
    sizes.forEach(([width, length], i) => {
      const t = pillarTransmission({ width, length, height: 1.2e-6, lambda, nPillar: nCore, nSubstrate: nSub, nAmbient: 1 });
      const [nx, ny, alphaX, alphaY, tx, ty] = expected[i];
      // 1e-9: both solve to ~1e-14 in the index; the phase multiplies by kH ≈ 1.2e7 m⁻¹·m ≈ 12.
      expect(Math.abs(t.nx - nx)).toBeLessThan(1e-9);
      expect(Math.abs(t.ny - ny)).toBeLessThan(1e-9);
      expect(Math.abs(t.alphaX - alphaX)).toBeLessThan(1e-8);
      expect(Math.abs(t.alphaY - alphaY)).toBeLessThan(1e-8);
      expect(Math.abs(t.tx - tx)).toBeLessThan(1e-9);
      expect(Math.abs(t.ty - ty)).toBeLessThan(1e-9);
    });
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
