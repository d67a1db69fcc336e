/**
 * The APPROXIMATE demo meta-atom library: silicon-nitride rectangular pillars on fused silica,
 * in air, at 633 nm. Transmissions come from the effective-index waveguide model of
 * effective-index.ts, not from full-wave simulation; the library says so in its metadata
 * (`approximate: true`) and every place that shows it must say so too.
 *
 * Geometry rules of the sweep (chosen so that any rotation of any atom next to any other keeps the
 * minimum gap, hence a layout from this library passes the default design-rule check):
 * - square pillars (width = length) are placed unrotated (C4 symmetry: their normal-incidence
 *   response does not depend on rotation), so they need width ≤ P − minGap;
 * - other rectangles may be rotated freely, so their circumscribed circle must fit:
 *   √(W² + L²) ≤ P − minGap (derivation in `demoLibraryRules`);
 * - height / smallest side ≤ height / minSize (10 with the defaults).
 */
import { mediaPhrase, type AtomLibrary, type MetaAtom } from './atoms';
import { pillarTransmission } from './effective-index';
import { fusedSilicaIndex, siliconNitrideIndex } from './materials';

/** Parameters of the demo sweep (all lengths in metres). */
export interface DemoLibraryOptions {
  /** Design wavelength, default 633e-9. */
  lambda?: number;
  /** Lattice period, default 450e-9. */
  period?: number;
  /** Pillar height, default 1200e-9. */
  height?: number;
  /** Smallest pillar side, default 120e-9 (aspect ratio 10 at 1200 nm). */
  minSize?: number;
  /** Sweep step of width and length, default 10e-9. */
  step?: number;
  /** Smallest edge-to-edge gap any placement may produce, default 50e-9. */
  minGap?: number;
  /** Include a bare cell ('empty' atom, phase 0 by definition of the reference), default true. */
  includeEmpty?: boolean;
}

/** The size limits the sweep applies, derived from the options. */
export interface DemoLibraryRules {
  minSize: number;
  /** Largest side of a (never rotated) square pillar. */
  maxSquare: number;
  /** Largest diagonal √(W² + L²) of a non-square pillar. */
  maxDiagonal: number;
  maxAspectRatio: number;
}

const DEFAULTS = {
  lambda: 633e-9,
  period: 450e-9,
  height: 1200e-9,
  minSize: 120e-9,
  step: 10e-9,
  minGap: 50e-9,
  includeEmpty: true,
};

/**
 * Size limits that keep every pair of neighbours at least `minGap` apart for any rotations:
 * two rotated rectangles (circumradius r each) need P − 2r ≥ minGap → diagonal ≤ P − minGap;
 * an unrotated square of side S beside a rotated rectangle needs P − S/2 − r ≥ minGap →
 * S ≤ 2(P − minGap) − diagonal_max = P − minGap (same bound); two squares need P − S ≥ minGap.
 * Diagonal neighbours are √2·P apart and always clear when the axis neighbours are.
 * Example: demoLibraryRules({}) → { maxSquare: 400e-9, maxDiagonal: 400e-9, minSize: 120e-9, maxAspectRatio: 10 }.
 */
export function demoLibraryRules(options: DemoLibraryOptions = {}): DemoLibraryRules {
  const o = { ...DEFAULTS, ...options };
  return {
    minSize: o.minSize,
    maxSquare: o.period - o.minGap,
    maxDiagonal: o.period - o.minGap,
    maxAspectRatio: o.height / o.minSize,
  };
}

/**
 * Generates the APPROXIMATE demo library (pure function): Si₃N₄ (Luke et al., Opt. Lett. 40, 4823
 * (2015)) pillars on fused silica (Malitson, JOSA 55, 1205 (1965)) in air, width × length swept on
 * a `step` grid within `demoLibraryRules`, transmissions from `pillarTransmission` (phase relative
 * to a bare cell, single-pass Fresnel amplitude). Atom ids: 'w<width>-l<length>' in nm, 'empty'.
 * Example: demoAtomLibrary().approximate → true; .atoms.length → 498 (the empty cell + 497 pillars, 30 square).
 */
export function demoAtomLibrary(options: DemoLibraryOptions = {}): AtomLibrary {
  const o = { ...DEFAULTS, ...options };
  for (const key of ['lambda', 'period', 'height', 'minSize', 'step', 'minGap'] as const) {
    if (!(o[key] > 0) || !Number.isFinite(o[key])) throw new RangeError(`demoAtomLibrary: ${key} must be positive, got ${o[key]}`);
  }
  const rules = demoLibraryRules(o);
  const nPillar = siliconNitrideIndex(o.lambda);
  const nSubstrate = fusedSilicaIndex(o.lambda);
  const nAmbient = 1;
  const atoms: MetaAtom[] = [];
  if (o.includeEmpty) {
    const tBare = Math.sqrt((4 * nSubstrate * nAmbient) / ((nSubstrate + nAmbient) * (nSubstrate + nAmbient)));
    atoms.push({ id: 'empty', shape: 'empty', width: 0, length: 0, height: 0, period: o.period, tx: tBare, alphaX: 0, ty: tBare, alphaY: 0 });
  }
  const stepsUp = Math.floor((rules.maxSquare - rules.minSize) / o.step + 1e-9);
  const sizes: number[] = [];
  for (let i = 0; i <= stepsUp; i++) sizes.push(Math.round((rules.minSize + i * o.step) * 1e12) / 1e12);
  const tolerance = 1e-15;
  for (const width of sizes) {
    for (const length of sizes) {
      const square = Math.abs(width - length) < tolerance;
      if (square ? width > rules.maxSquare + tolerance : Math.hypot(width, length) > rules.maxDiagonal + tolerance) continue;
      const t = pillarTransmission({ width, length, height: o.height, lambda: o.lambda, nPillar, nSubstrate, nAmbient });
      const wrap = (a: number): number => a - 2 * Math.PI * Math.floor(a / (2 * Math.PI));
      atoms.push({
        id: `w${Math.round(width * 1e9)}-l${Math.round(length * 1e9)}`,
        shape: 'rect',
        width,
        length,
        height: o.height,
        period: o.period,
        tx: t.tx,
        alphaX: wrap(t.alphaX),
        ty: t.ty,
        alphaY: wrap(t.alphaY),
      });
    }
  }
  const nm = (m: number): string => `${Math.round(m * 1e9)} nm`;
  // Light enters through the substrate (the model's Fresnel factors go substrate → pillar → air). When P ≥ λ/n_sub
  // the substrate side diffracts the reflected light; the air side (P < λ) does not, so all transmitted light
  // stays in the zeroth order, but RCWA gives less of it than this model (README "Demo library against RCWA").
  // The source stays within the 500 characters a stored library keeps.
  const limit = o.lambda / nSubstrate;
  const cell = ` Computed for ${mediaPhrase({ lightFrom: 'substrate', substrateIndex: nSubstrate, superstrateIndex: nAmbient })}.`;
  const lattice = o.period >= limit ? ` P ≥ λ/n = ${(limit * 1e9).toFixed(1)} nm in the substrate: reflected light diffracts there; RCWA transmits less (README).` : '';
  return {
    name: `Demo Si₃N₄ pillars, ${nm(o.lambda)} (approximate)`,
    lambda: o.lambda,
    period: o.period,
    height: o.height,
    material: `Si₃N₄ pillars (Luke et al. 2015), ${nm(o.height)} tall, on fused silica (Malitson 1965), in air`,
    approximate: true,
    source:
      'APPROXIMATE model, not full-wave data: effective-index method for the fundamental mode of each ' +
      'polarization (Knox & Toulios 1970; Marcatili 1969), phase k·(n_eff − 1)·H relative to a bare cell, ' +
      'single-pass Fresnel transmission. For demonstration only.' +
      cell +
      lattice,
    atoms,
  };
}
