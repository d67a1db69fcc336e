/**
 * The atom-library builder: a build spec (materials, cell, sweep, harmonics), its validation, the sweep of a
 * width × length grid of rectangular pillars by RCWA (`computeAtom`, rcwa.ts), a proposed subset of atoms that
 * covers the (α_x, α_y) torus at high transmission, and a cost estimate.
 *
 * The spec is plain JSON with lengths in nanometres; `parseLibrarySpec` checks it field by field and throws
 * LibrarySpecError listing every problem with the field's path (e.g. `sweep.stepNm`).
 */
import { FUSED_SILICA, refractiveIndex, SILICON_NITRIDE } from './materials';
import { checkNkPoints, NK_TABLE_LIMITS, NK_TABLE_TEXT_LIMITS, NkTableError, tabulatedIndex, type NkPoint, type NkTableLimits } from './nk-table';
import { computeAtom, latticeDiffraction, materialIndex, materialLabel, type LatticeDiffraction, type RcwaAtomResult, type RcwaCell, type RcwaIllumination, type RcwaMaterial } from './rcwa';
import { LIGHT_SIDE_LABELS, libraryMedia, mediaPhrase, type AtomLibrary, type LightSide, type MetaAtom } from './atoms';

// ---------------------------------------------------------------------------------------------------------
// Materials by name

/** One material of the list: a dispersion model with its published source and range, or none (give n, k). */
export interface CatalogMaterial {
  id: string;
  name: string;
  source: string;
  /** Valid vacuum wavelengths, metres (undefined: needs the film's own n, k). */
  minLambda?: number;
  maxLambda?: number;
  /** Complex index n + ik at λ (metres), inside the range. */
  index?: (lambda: number) => { n: number; k: number };
  /** Said when the model's coefficients were written down from memory rather than copied from the paper. */
  fromMemory?: boolean;
  /** Why a name alone is not enough (materials whose index depends on deposition). */
  needsIndex?: string;
}

const um2 = (lambda: number): number => (lambda * 1e6) ** 2;

/** The materials a spec may name. Fused silica and Si₃N₄ reuse materials.ts (coefficients checked there). */
export const LIBRARY_MATERIALS: readonly CatalogMaterial[] = [
  { id: 'air', name: 'air', source: 'n = 1 (vacuum value; air differs by 3e-4)', minLambda: 0, maxLambda: Infinity, index: () => ({ n: 1, k: 0 }) },
  {
    id: 'fused-silica',
    name: FUSED_SILICA.name,
    source: FUSED_SILICA.source,
    minLambda: FUSED_SILICA.minLambda,
    maxLambda: FUSED_SILICA.maxLambda,
    index: (lambda) => ({ n: refractiveIndex(FUSED_SILICA, lambda), k: 0 }),
  },
  {
    id: 'silicon-nitride',
    name: SILICON_NITRIDE.name,
    source: SILICON_NITRIDE.source,
    minLambda: SILICON_NITRIDE.minLambda,
    maxLambda: SILICON_NITRIDE.maxLambda,
    index: (lambda) => ({ n: refractiveIndex(SILICON_NITRIDE, lambda), k: 0 }),
  },
  {
    // Rutile, ordinary ray: n² = 5.913 + 0.2441/(λ² − 0.0803), λ in µm (coefficients and range from memory).
    // Atomic-layer-deposited amorphous TiO₂, common in visible metasurfaces, is lower (about 2.4 at 633 nm,
    // Devlin et al., PNAS 113, 10473 (2016); from memory): give that film's n, k when it is what you make.
    id: 'titanium-dioxide',
    name: 'titanium dioxide (TiO₂, rutile, ordinary ray)',
    source: 'J. R. DeVore, J. Opt. Soc. Am. 41, 416 (1951)',
    minLambda: 0.43e-6,
    maxLambda: 1.53e-6,
    fromMemory: true,
    index: (lambda) => ({ n: Math.sqrt(5.913 + 0.2441 / (um2(lambda) - 0.0803)), k: 0 }),
  },
  {
    // Wurtzite GaN, ordinary ray: n² = 3.60 + 1.75 λ²/(λ² − 0.256²) + 4.1 λ²/(λ² − 17.86²), λ in µm
    // (coefficients from memory; the range starts above the band edge at 365 nm, also from memory).
    id: 'gallium-nitride',
    name: 'gallium nitride (GaN, ordinary ray)',
    source: 'A. S. Barker Jr. & M. Ilegems, Phys. Rev. B 7, 743 (1973)',
    minLambda: 0.4e-6,
    maxLambda: 10e-6,
    fromMemory: true,
    index: (lambda) => {
      const l2 = um2(lambda);
      return { n: Math.sqrt(3.6 + (1.75 * l2) / (l2 - 0.256 ** 2) + (4.1 * l2) / (l2 - 17.86 ** 2)), k: 0 };
    },
  },
  {
    id: 'amorphous-silicon',
    name: 'amorphous silicon (a-Si)',
    source: 'D. T. Pierce & W. E. Spicer, Phys. Rev. B 5, 3017 (1972) (evaporated a-Si; hydrogenated films differ)',
    needsIndex:
      'the index of amorphous silicon depends on how the film is deposited (hydrogen content, anneal) and it absorbs in the visible: ' +
      'give your film\'s measured index as { "name": "amorphous-silicon", "n": …, "k": … }',
  },
];

/**
 * A material in a spec: a name from LIBRARY_MATERIALS, a constant n + ik (optionally named), or a table of
 * [wavelength nm, n, k] rows (ascending wavelength, linearly interpolated; nk-table.ts) with its name and source.
 */
export type SpecMaterial = string | { name?: string; n: number; k?: number } | SpecTableMaterial;

/** A tabulated material in a spec, e.g. { "name": "PECVD SiN", "source": "ellipsometry 2026-10", "table": [[500, 2.02, 0], …] }. */
export interface SpecTableMaterial {
  name: string;
  source?: string;
  table: NkPoint[];
}

const isTableMaterial = (m: SpecMaterial): m is SpecTableMaterial => typeof m === 'object' && 'table' in m;

// ---------------------------------------------------------------------------------------------------------
// The spec

/** A library build, lengths in nanometres as in the JSON file. */
export interface LibrarySpec {
  name: string;
  wavelengthNm: number;
  periodNm: number;
  heightNm: number;
  pillar: SpecMaterial;
  substrate: SpecMaterial;
  /** Default 'air'. */
  superstrate: SpecMaterial;
  /** Where the light comes from: 'substrate' (exits into the superstrate) or 'superstrate' (onto the pillars). */
  illumination: RcwaIllumination;
  /** Widths and lengths from minFeatureNm to periodNm − minGapNm in steps of stepNm. */
  sweep: { minFeatureNm: number; minGapNm: number; stepNm: number };
  /** Harmonics per axis (odd), N for N × N. */
  harmonics: number;
}

/** One problem of a spec: the field's path and what to fix. */
export interface SpecProblem {
  field: string;
  message: string;
}

/** A spec that cannot be built; `problems` lists every field at fault, the message all of them. */
export class LibrarySpecError extends Error {
  constructor(readonly problems: SpecProblem[]) {
    super(problems.map((p) => `${p.field}: ${p.message}`).join('; '));
    this.name = 'LibrarySpecError';
  }
}

/** Most atoms one build may hold (a 40 × 40 grid). */
export const MAX_LIBRARY_ATOMS = 1600;

const SPEC_KEYS = ['format', 'name', 'wavelengthNm', 'periodNm', 'heightNm', 'pillar', 'substrate', 'superstrate', 'illumination', 'sweep', 'harmonics'];

/** Resolves a tabulated spec material (an object with `table`); pushes problems and returns undefined when it cannot. */
function resolveTable(o: Record<string, unknown>, field: string, lambda: number, problems: SpecProblem[], limits: NkTableLimits): RcwaMaterial | undefined {
  const before = problems.length;
  const extra = Object.keys(o).filter((key) => !['name', 'source', 'table'].includes(key));
  if (extra.length > 0) problems.push({ field, message: `unknown key${extra.length > 1 ? 's' : ''} ${extra.join(', ')} (a tabulated material has name, source, table)` });
  if (typeof o.name !== 'string' || o.name.trim() === '' || o.name.length > NK_TABLE_TEXT_LIMITS.name) {
    problems.push({ field: `${field}.name`, message: `a tabulated material needs a name of 1 to ${NK_TABLE_TEXT_LIMITS.name} characters` });
  }
  if (o.source !== undefined && (typeof o.source !== 'string' || o.source.length > NK_TABLE_TEXT_LIMITS.source)) {
    problems.push({ field: `${field}.source`, message: `must be text of at most ${NK_TABLE_TEXT_LIMITS.source} characters (where the n, k values come from)` });
  }
  const table = o.table;
  if (!Array.isArray(table)) {
    problems.push({ field: `${field}.table`, message: 'must be a list of [wavelength nm, n, k] rows' });
    return undefined;
  }
  // The row count first, before anything walks the rows.
  if (table.length > limits.maxRows) {
    problems.push({ field: `${field}.table`, message: `${table.length} rows is more than ${limits.maxRows}: thin the table` });
    return undefined;
  }
  const bad = table.findIndex((row) => !Array.isArray(row) || row.length !== 3 || row.some((v) => typeof v !== 'number'));
  if (bad >= 0) {
    problems.push({ field: `${field}.table[${bad}]`, message: `each row is [wavelength nm, n, k], three numbers; got ${JSON.stringify(table[bad]).slice(0, 60)}` });
    return undefined;
  }
  const points = table as NkPoint[];
  try {
    checkNkPoints(points, limits, (i) => i);
  } catch (error) {
    if (!(error instanceof NkTableError)) throw error;
    problems.push({ field: error.line === undefined ? `${field}.table` : `${field}.table[${error.line}]`, message: error.message.replace(/^line \d+: /, '') });
  }
  if (problems.length > before) return undefined;
  const nkTable = { name: (o.name as string).trim(), source: typeof o.source === 'string' ? o.source.trim() : '', points };
  if (Number.isFinite(lambda)) {
    try {
      tabulatedIndex(nkTable, lambda);
    } catch (error) {
      problems.push({ field: `${field}.table`, message: (error as Error).message });
      return undefined;
    }
  }
  return { kind: 'table', table: nkTable };
}

/** Resolves a spec material at λ (metres) to an RcwaMaterial; pushes a problem and returns undefined when it cannot. */
function resolveMaterial(value: unknown, field: string, lambda: number, problems: SpecProblem[], limits: NkTableLimits): RcwaMaterial | undefined {
  const names = LIBRARY_MATERIALS.map((m) => m.id).join(', ');
  if (typeof value === 'string') {
    const entry = LIBRARY_MATERIALS.find((m) => m.id === value);
    if (!entry) {
      problems.push({ field, message: `unknown material '${value}': use one of ${names}, or { "n": …, "k": … }` });
      return undefined;
    }
    if (!entry.index) {
      problems.push({ field, message: entry.needsIndex ?? `${entry.name} needs n and k` });
      return undefined;
    }
    if (Number.isFinite(lambda) && (lambda < entry.minLambda! || lambda > entry.maxLambda!)) {
      problems.push({
        field,
        message: `${entry.name}: the wavelength ${(lambda * 1e9).toFixed(1)} nm is outside the range ${(entry.minLambda! * 1e9).toFixed(0)}–${(entry.maxLambda! * 1e9).toFixed(0)} nm of ${entry.source}; give { "n": …, "k": … } instead`,
      });
      return undefined;
    }
    if (entry.id === 'fused-silica') return { kind: 'sellmeier', material: FUSED_SILICA };
    if (entry.id === 'silicon-nitride') return { kind: 'sellmeier', material: SILICON_NITRIDE };
    if (entry.id === 'air') return { kind: 'constant', n: 1, name: 'air' };
    if (!Number.isFinite(lambda)) return undefined;
    const { n, k } = entry.index(lambda);
    const memo = entry.fromMemory ? ', coefficients from memory' : '';
    return { kind: 'constant', n, k, name: `${entry.name} n = ${n.toFixed(4)} (${entry.source}${memo})` };
  }
  if (value !== null && typeof value === 'object' && !Array.isArray(value) && 'nkCsv' in value) {
    problems.push({ field: `${field}.nkCsv`, message: 'a file name is read by the command line only: give the rows here as "table": [[λ nm, n, k], …] with a "name"' });
    return undefined;
  }
  if (value !== null && typeof value === 'object' && !Array.isArray(value) && 'table' in value) {
    return resolveTable(value as Record<string, unknown>, field, lambda, problems, limits);
  }
  if (value !== null && typeof value === 'object' && !Array.isArray(value)) {
    const o = value as Record<string, unknown>;
    const extra = Object.keys(o).filter((key) => !['name', 'n', 'k'].includes(key));
    if (extra.length > 0) problems.push({ field, message: `unknown key${extra.length > 1 ? 's' : ''} ${extra.join(', ')} (a constant material has name, n, k)` });
    if (typeof o.name === 'string' && LIBRARY_MATERIALS.some((m) => m.id === o.name && m.index)) {
      problems.push({ field: `${field}.name`, message: `'${o.name}' is a listed material: give its name alone, or a different name for your own n, k` });
    }
    if (o.name !== undefined && typeof o.name !== 'string') problems.push({ field: `${field}.name`, message: 'must be text' });
    const nOk = typeof o.n === 'number' && Number.isFinite(o.n) && o.n >= 1 && o.n <= 10;
    if (!nOk) problems.push({ field: `${field}.n`, message: `must be a number from 1 to 10, got ${JSON.stringify(o.n)}` });
    const k = o.k ?? 0;
    const kOk = typeof k === 'number' && Number.isFinite(k) && k >= 0 && k <= 10;
    if (!kOk) problems.push({ field: `${field}.k`, message: `must be a number from 0 to 10 (0: no absorption), got ${JSON.stringify(o.k)}` });
    if (!nOk || !kOk) return undefined;
    const label = typeof o.name === 'string' && o.name.trim() ? o.name.trim() : undefined;
    const text = `${label ? label + ' ' : ''}n = ${o.n}${(k as number) > 0 ? ` + ${k}i` : ''} (constant, given in the spec)`;
    return { kind: 'constant', n: o.n as number, k: k as number, name: text };
  }
  problems.push({ field, message: `must be a material name (${names}), { "n": …, "k": … } or { "name": …, "source": …, "table": [[λ nm, n, k], …] }` });
  return undefined;
}

/** A spec checked and resolved: the materials as RcwaMaterial and the sweep's sizes in metres. */
export interface ResolvedSpec {
  spec: LibrarySpec;
  lambda: number;
  period: number;
  height: number;
  pillar: RcwaMaterial;
  substrate: RcwaMaterial;
  superstrate: RcwaMaterial;
  /** Widths (and lengths: the same list), metres, ascending. */
  sizes: number[];
}

/** Options of `parseLibrarySpec`. */
export interface SpecOptions {
  /** Limits of tabulated materials (the server passes its configuration); default NK_TABLE_LIMITS. */
  nkLimits?: Partial<NkTableLimits>;
}

/** For a spec the server has checked against its configured limits already (its workers parse it again). */
export const CHECKED_SPEC: SpecOptions = { nkLimits: { maxRows: Number.MAX_SAFE_INTEGER, maxLineChars: Number.MAX_SAFE_INTEGER } };

/**
 * Checks a spec (parsed JSON) field by field; throws LibrarySpecError listing every problem with its field.
 * Example: parseLibrarySpec({ ...spec, periodNm: -1 }) throws "periodNm: must be a number from 50 to 5000 nm, got -1".
 */
export function parseLibrarySpec(raw: unknown, options: SpecOptions = {}): ResolvedSpec {
  const nkLimits: NkTableLimits = { ...NK_TABLE_LIMITS, ...options.nkLimits };
  const problems: SpecProblem[] = [];
  if (raw === null || typeof raw !== 'object' || Array.isArray(raw)) throw new LibrarySpecError([{ field: 'spec', message: 'must be a JSON object' }]);
  const o = raw as Record<string, unknown>;
  for (const key of Object.keys(o)) if (!SPEC_KEYS.includes(key)) problems.push({ field: key, message: `unknown key (the spec has ${SPEC_KEYS.join(', ')})` });
  if (o.format !== undefined && o.format !== 'phasewright-library-spec/1') problems.push({ field: 'format', message: `must be 'phasewright-library-spec/1', got ${JSON.stringify(o.format)}` });
  const num = (value: unknown, field: string, lo: number, hi: number, unit = 'nm'): number => {
    if (typeof value !== 'number' || !Number.isFinite(value) || value < lo || value > hi) {
      problems.push({ field, message: `must be a number from ${lo} to ${hi}${unit ? ' ' + unit : ''}, got ${value === undefined ? 'nothing' : JSON.stringify(value)}` });
      return NaN;
    }
    return value;
  };
  const name = o.name === undefined ? '' : typeof o.name === 'string' ? o.name.trim() : (problems.push({ field: 'name', message: 'must be text' }), '');
  const wavelengthNm = num(o.wavelengthNm, 'wavelengthNm', 200, 20000);
  const periodNm = num(o.periodNm, 'periodNm', 50, 5000);
  const heightNm = num(o.heightNm, 'heightNm', 1, 20000);
  const harmonics = o.harmonics === undefined ? 11 : num(o.harmonics, 'harmonics', 1, 31, '');
  if (Number.isFinite(harmonics) && (!Number.isInteger(harmonics) || harmonics % 2 === 0)) {
    problems.push({ field: 'harmonics', message: `must be an odd whole number (e.g. 11 for 11×11 harmonics), got ${harmonics}` });
  }
  const illumination = (o.illumination ?? 'substrate') as RcwaIllumination;
  if (illumination !== 'substrate' && illumination !== 'superstrate') {
    problems.push({ field: 'illumination', message: `must be 'substrate' (light enters through the substrate) or 'superstrate' (onto the pillars), got ${JSON.stringify(o.illumination)}` });
  }
  const lambda = wavelengthNm * 1e-9;
  const pillar = resolveMaterial(o.pillar, 'pillar', lambda, problems, nkLimits);
  const substrate = resolveMaterial(o.substrate, 'substrate', lambda, problems, nkLimits);
  const superstrate = resolveMaterial(o.superstrate ?? 'air', 'superstrate', lambda, problems, nkLimits);
  let sweep = { minFeatureNm: NaN, minGapNm: NaN, stepNm: NaN };
  let sizes: number[] = [];
  if (o.sweep === null || typeof o.sweep !== 'object' || Array.isArray(o.sweep)) {
    problems.push({ field: 'sweep', message: 'must be { "minFeatureNm": …, "minGapNm": …, "stepNm": … }' });
  } else {
    const s = o.sweep as Record<string, unknown>;
    for (const key of Object.keys(s)) if (!['minFeatureNm', 'minGapNm', 'stepNm'].includes(key)) problems.push({ field: `sweep.${key}`, message: 'unknown key (the sweep has minFeatureNm, minGapNm, stepNm)' });
    sweep = {
      minFeatureNm: num(s.minFeatureNm, 'sweep.minFeatureNm', 1, 5000),
      minGapNm: num(s.minGapNm, 'sweep.minGapNm', 0, 5000),
      stepNm: num(s.stepNm, 'sweep.stepNm', 0.5, 5000),
    };
    const largest = periodNm - sweep.minGapNm;
    if (Number.isFinite(largest) && Number.isFinite(sweep.minFeatureNm) && sweep.minFeatureNm > largest) {
      problems.push({ field: 'sweep.minFeatureNm', message: `the smallest feature ${sweep.minFeatureNm} nm exceeds period − smallest gap = ${largest} nm: no pillar fits` });
    } else if (Number.isFinite(largest) && Number.isFinite(sweep.minFeatureNm) && Number.isFinite(sweep.stepNm)) {
      const count = Math.floor((largest - sweep.minFeatureNm) / sweep.stepNm + 1e-9) + 1;
      if (count * count > MAX_LIBRARY_ATOMS) {
        problems.push({ field: 'sweep.stepNm', message: `${count} × ${count} = ${count * count} atoms is more than ${MAX_LIBRARY_ATOMS}: take a larger step` });
      } else {
        sizes = Array.from({ length: count }, (_, i) => Math.round((sweep.minFeatureNm + i * sweep.stepNm) * 1e4) / 1e4 / 1e9);
      }
    }
  }
  if (problems.length > 0) throw new LibrarySpecError(problems);
  const spec: LibrarySpec = {
    name,
    wavelengthNm,
    periodNm,
    heightNm,
    pillar: o.pillar as SpecMaterial,
    substrate: o.substrate as SpecMaterial,
    superstrate: (o.superstrate ?? 'air') as SpecMaterial,
    illumination,
    sweep,
    harmonics,
  };
  return { spec, lambda, period: periodNm * 1e-9, height: heightNm * 1e-9, pillar: pillar!, substrate: substrate!, superstrate: superstrate!, sizes };
}

/** The RCWA cell of one w × l pillar of a resolved spec. */
export function specCell(r: ResolvedSpec, width: number, length: number): RcwaCell {
  return {
    period: r.period,
    superstrate: r.superstrate,
    substrate: r.substrate,
    pillar: { shape: 'rect', width, length, height: r.height, material: r.pillar },
  };
}

/** A cell's two half-spaces and the side the light enters from. */
export interface CellMedia {
  lightFrom: LightSide;
  substrateIndex: number;
  superstrateIndex: number;
}

/**
 * Lattice diffraction of a square lattice of period P (metres) at λ between a substrate and a superstrate lit from
 * `media.lightFrom` (P ≥ λ/n in the incident or exit medium), each with a message naming the medium and the
 * numbers. The one rule the builder, the composer and the runs use. Example: cellDiffraction(450e-9, 633e-9,
 * { lightFrom: 'substrate', substrateIndex: 1.457, superstrateIndex: 1 }) → one entry, the substrate (incident).
 */
export function cellDiffraction(period: number, lambda: number, media: CellMedia) {
  const sub = 'the substrate';
  const top = media.superstrateIndex === 1 ? 'the air above the pillars' : 'the medium above the pillars';
  return media.lightFrom === 'superstrate'
    ? latticeDiffraction(period, lambda, media.superstrateIndex, media.substrateIndex, { incident: top, exit: sub })
    : latticeDiffraction(period, lambda, media.substrateIndex, media.superstrateIndex, { incident: sub, exit: top });
}

/** The half-spaces' indices (real parts, at λ) and the light's side of a resolved spec. */
export function specMedia(r: ResolvedSpec): CellMedia {
  return { lightFrom: r.spec.illumination, substrateIndex: materialIndex(r.substrate, r.lambda).re, superstrateIndex: materialIndex(r.superstrate, r.lambda).re };
}

/** Lattice diffraction of a resolved spec (P ≥ λ/n in the incident or exit medium), with the numbers. */
export function specDiffraction(r: ResolvedSpec) {
  return cellDiffraction(r.period, r.lambda, specMedia(r));
}

/**
 * The library's source line: method, harmonics, the light's side with the half-spaces' indices (in the form
 * `libraryMedia` reads back, early in the line so that a shortened copy keeps it), λ, P, height, materials.
 */
export function specSource(r: ResolvedSpec): string {
  const nm = (v: number): string => `${Math.round(v * 1e13) / 1e4} nm`;
  const h = r.spec.harmonics;
  const m = specMedia(r);
  return (
    `RCWA (Fourier modal method, Li 1997 factorization), ${h}×${h} harmonics; ${mediaPhrase(m)}; λ = ${nm(r.lambda)}, P = ${nm(r.period)}, ` +
    `height ${nm(r.height)}; pillar ${materialLabel(r.pillar)}, substrate ${materialLabel(r.substrate)}, superstrate ${materialLabel(r.superstrate)}; ` +
    `zeroth-order transmission`
  );
}

// ---------------------------------------------------------------------------------------------------------
// The sweep

/** Per-atom powers kept beside the library (the library itself holds the zeroth-order t and α). */
export interface BuiltAtomPowers {
  id: string;
  /** Zeroth-order transmittance for x and y input. */
  zeroOrderX: number;
  zeroOrderY: number;
  /** Transmitted power in all other orders (lattice diffraction), x and y input. */
  otherOrdersX: number;
  otherOrdersY: number;
  /** Total reflectance, x and y input. */
  reflectedX: number;
  reflectedY: number;
}

export interface BuiltLibrary {
  library: AtomLibrary;
  powers: BuiltAtomPowers[];
  /** Lattice-diffraction warnings with their numbers (empty when P < λ/n on both sides). */
  warnings: string[];
  /** Wall time of the sweep divided by its atoms, seconds (with several lanes: less than one atom's time). */
  secondsPerAtom: number;
}

export interface BuildOptions {
  /** fraction 0…1, stage text, detail { atom, atoms, secondsPerAtom }. */
  onProgress?: (fraction: number, stage: string, detail: { atom: number; atoms: number; secondsPerAtom: number }) => void;
  /** An AbortSignal (or anything with throwIfAborted); checked before each atom. */
  signal?: { readonly aborted: boolean; throwIfAborted(): void };
  /** Clock in ms (tests may pass their own); default performance.now. */
  now?: () => number;
  /** Computes atom `index` elsewhere (e.g. on worker thread `lane`); default computeSweepAtom on this thread. */
  compute?: (index: number, lane: number) => Promise<SweepAtom>;
  /** Atoms in flight at once with `compute` (one per worker); default 1. */
  lanes?: number;
}

/** The atom of a w × l pillar from a computeAtom result. */
export function atomFromResult(r: ResolvedSpec, width: number, length: number, res: RcwaAtomResult): MetaAtom {
  const id = `w${Math.round(width * 1e10) / 10}-l${Math.round(length * 1e10) / 10}`;
  return { id, shape: 'rect', width, length, height: r.height, period: r.period, tx: res.tx, alphaX: res.alphaX, ty: res.ty, alphaY: res.alphaY };
}

// The engine is compiled without DOM or Node typings: the timer and clock both environments have, typed here.
const host = globalThis as unknown as { setTimeout(f: () => void, ms: number): unknown; performance: { now(): number } };
const yieldToEventLoop = (): Promise<void> => new Promise((done) => host.setTimeout(done, 0));
const clock = (): number => host.performance.now();

/** One atom of the sweep with its powers. */
export interface SweepAtom {
  atom: MetaAtom;
  powers: BuiltAtomPowers;
}

/** The sweep's atom number `index` (widths outer, lengths inner: index = i_w · sizes.length + i_l), by computeAtom. */
export function computeSweepAtom(r: ResolvedSpec, index: number): SweepAtom {
  const n = r.sizes.length;
  if (!Number.isInteger(index) || index < 0 || index >= n * n) throw new RangeError(`atom index ${index} is outside the sweep of ${n * n} atoms`);
  const width = r.sizes[Math.floor(index / n)];
  const length = r.sizes[index % n];
  const res = computeAtom(specCell(r, width, length), { lambda: r.lambda, harmonics: r.spec.harmonics, illumination: r.spec.illumination });
  const atom = atomFromResult(r, width, length, res);
  return {
    atom,
    powers: {
      id: atom.id,
      zeroOrderX: res.x.zeroOrderTransmitted,
      zeroOrderY: res.y.zeroOrderTransmitted,
      otherOrdersX: res.x.otherOrdersTransmitted,
      otherOrdersY: res.y.otherOrdersTransmitted,
      reflectedX: res.x.reflected,
      reflectedY: res.y.reflected,
    },
  };
}

/**
 * Sweeps the spec's width × length grid, one computeAtom per pillar (widths outer, lengths inner). By default on
 * this thread, yielding to the event loop between atoms so that `signal` (abort) and progress reach the caller;
 * with `options.compute` (e.g. worker threads) `lanes` atoms at a time, lane k always calling compute(index, k).
 * Returns a library marked not approximate with its source line, and the per-atom powers, in sweep order.
 * Example: (await buildAtomLibrary(parseLibrarySpec(spec))).library.atoms.length → sizes.length².
 */
export async function buildAtomLibrary(r: ResolvedSpec, options: BuildOptions = {}): Promise<BuiltLibrary> {
  const now = options.now ?? clock;
  const total = r.sizes.length * r.sizes.length;
  const results: SweepAtom[] = new Array(total);
  const compute =
    options.compute ??
    (async (index: number): Promise<SweepAtom> => {
      const result = computeSweepAtom(r, index);
      await yieldToEventLoop();
      return result;
    });
  const lanes = options.compute ? Math.max(1, Math.min(options.lanes ?? 1, total)) : 1;
  const start = now();
  let next = 0;
  let done = 0;
  const lane = async (k: number): Promise<void> => {
    while (next < total) {
      options.signal?.throwIfAborted();
      const index = next++;
      results[index] = await compute(index, k);
      done++;
      options.onProgress?.(done / total, 'RCWA sweep', { atom: done, atoms: total, secondsPerAtom: (now() - start) / 1000 / done });
    }
  };
  await Promise.all(Array.from({ length: lanes }, (_, k) => lane(k)));
  options.signal?.throwIfAborted();
  const library: AtomLibrary = {
    name: libraryName(r),
    lambda: r.lambda,
    period: r.period,
    height: r.height,
    material: `${materialShort(r.spec.pillar)} pillars on ${materialShort(r.spec.substrate)} under ${materialShort(r.spec.superstrate)}`,
    approximate: false,
    source: specSource(r),
    atoms: results.map((x) => x.atom),
  };
  return {
    library,
    powers: results.map((x) => x.powers),
    warnings: specDiffraction(r).map((d) => d.message),
    secondsPerAtom: total > 0 ? (now() - start) / 1000 / total : 0,
  };
}

/** The library's name: the spec's, or one saying what was computed. */
export function libraryName(r: ResolvedSpec): string {
  const nm = (v: number): string => `${Math.round(v * 1e10) / 10} nm`;
  return r.spec.name || `RCWA ${materialShort(r.spec.pillar)} pillars, ${nm(r.height)} tall, P = ${nm(r.period)}, λ = ${nm(r.lambda)}`;
}

function materialShort(m: SpecMaterial): string {
  if (typeof m === 'string') return LIBRARY_MATERIALS.find((e) => e.id === m)?.name ?? m;
  if (isTableMaterial(m)) return m.name;
  return m.name ?? `n = ${m.n}${m.k ? ` + ${m.k}i` : ''}`;
}

// ---------------------------------------------------------------------------------------------------------
// Cost

/** Atoms of a spec and the time a build takes at a measured time per atom. */
export interface BuildCost {
  atoms: number;
  secondsPerAtom: number;
  seconds: number;
}

/**
 * Measures the time of one atom at the spec's harmonics (the middle of the sweep, after one untimed warm-up
 * atom) and multiplies by the number of atoms. Costs two atoms' time. Example: estimateBuildCost(r).seconds.
 */
export function estimateBuildCost(r: ResolvedSpec, now: () => number = clock): BuildCost {
  const atoms = r.sizes.length * r.sizes.length;
  if (atoms === 0) return { atoms, secondsPerAtom: 0, seconds: 0 };
  const mid = r.sizes[Math.floor(r.sizes.length / 2)];
  const options = { lambda: r.lambda, harmonics: r.spec.harmonics, illumination: r.spec.illumination };
  computeAtom(specCell(r, r.sizes[0], r.sizes[0]), options);
  const t0 = now();
  computeAtom(specCell(r, mid, mid), options);
  const secondsPerAtom = (now() - t0) / 1000;
  return { atoms, secondsPerAtom, seconds: atoms * secondsPerAtom };
}

// ---------------------------------------------------------------------------------------------------------
// Proposed subset

/** Distance on the (α_x, α_y) torus: each phase difference wrapped into [−π, π], then Euclidean. */
export function torusDistance(a: { alphaX: number; alphaY: number }, b: { alphaX: number; alphaY: number }): number {
  const wrap = (d: number): number => {
    const r = d - 2 * Math.PI * Math.round(d / (2 * Math.PI));
    return Math.abs(r);
  };
  return Math.hypot(wrap(a.alphaX - b.alphaX), wrap(a.alphaY - b.alphaY));
}

export interface SubsetOptions {
  /** Atoms whose mean transmittance (t_x² + t_y²)/2 is below this are left out (default 0.5). */
  minTransmittance?: number;
}

/**
 * Proposes `n` atoms that cover the (α_x, α_y) torus at high transmission: greedy farthest-point sampling,
 * weighted. The first pick is the atom of highest mean transmittance T = (t_x² + t_y²)/2; each next pick
 * maximizes T · d, where d is its torus distance to the nearest atom picked so far. Atoms with T below
 * `minTransmittance` take part only when fewer than `n` remain otherwise. Ties go to the earlier atom.
 * Greedy farthest-point sampling covers within a factor 2 of the best covering radius (Gonzalez, Theor.
 * Comput. Sci. 38, 293 (1985)); the weight trades that radius for transmission. Returns indices into `atoms`
 * in the order picked. Example: on a 4 × 4 grid of phases at equal T, n = 4 gives the four points spaced π.
 */
export function proposeSubset(atoms: readonly MetaAtom[], n: number, options: SubsetOptions = {}): number[] {
  if (!Number.isInteger(n) || n < 1) throw new RangeError(`subset size must be a whole number ≥ 1, got ${n}`);
  const minT = options.minTransmittance ?? 0.5;
  const T = atoms.map((a) => (a.tx * a.tx + a.ty * a.ty) / 2);
  let pool = atoms.map((_, i) => i).filter((i) => T[i] >= minT);
  if (pool.length < n) pool = atoms.map((_, i) => i);
  if (pool.length <= n) return [...pool].sort((a, b) => T[b] - T[a] || a - b);
  let first = pool[0];
  for (const i of pool) if (T[i] > T[first]) first = i;
  const picked = [first];
  const nearest = new Float64Array(atoms.length).fill(Infinity);
  const taken = new Uint8Array(atoms.length);
  taken[first] = 1;
  while (picked.length < n) {
    const last = atoms[picked[picked.length - 1]];
    let best = -1;
    let bestScore = -Infinity;
    for (const i of pool) {
      if (taken[i]) continue;
      nearest[i] = Math.min(nearest[i], torusDistance(atoms[i], last));
      const score = T[i] * nearest[i];
      if (score > bestScore + 1e-12) {
        bestScore = score;
        best = i;
      }
    }
    taken[best] = 1;
    picked.push(best);
  }
  return picked;
}

/** Largest torus distance from any atom of `atoms` (above `minTransmittance`) to its nearest atom of the subset. */
export function coveringRadius(atoms: readonly MetaAtom[], subset: readonly number[], minTransmittance = 0): number {
  let worst = 0;
  for (const a of atoms) {
    if ((a.tx * a.tx + a.ty * a.ty) / 2 < minTransmittance) continue;
    let d = Infinity;
    for (const j of subset) d = Math.min(d, torusDistance(a, atoms[j]));
    worst = Math.max(worst, d);
  }
  return worst;
}

// ---------------------------------------------------------------------------------------------------------
// A design against its library's cell

/** What a design's light side and lattice mean with its library: the side mismatch and the lattice diffraction. */
export interface DesignCellNotes {
  /** Both sides named when the library was computed for light from the other side; null when they agree or the library does not say. */
  sideMismatch: string | null;
  /** Lattice diffraction in the incident or exit medium for the design's side, with the numbers (P, λ, n, λ/n). */
  diffraction: LatticeDiffraction[];
  /** True when the library records no indices, so the diffraction cannot be checked. */
  mediaUnknown: boolean;
}

/**
 * The notes of a design (λ, P in nm, its light side) with a library's recorded side and indices (`libraryMedia`):
 * the side mismatch and `cellDiffraction` for the design's side. Used by the composer and by every run.
 * Example: designCellNotes({ wavelengthNm: 633, periodNm: 450, lightFrom: 'substrate' }, demo).diffraction[0].limit → 434.5e-9.
 */
export function designCellNotes(design: { wavelengthNm: number; periodNm: number; lightFrom: LightSide }, library: { source?: string | null }): DesignCellNotes {
  const media = libraryMedia(library);
  const sideMismatch =
    media.lightFrom && media.lightFrom !== design.lightFrom
      ? `the design has the light entering ${LIGHT_SIDE_LABELS[design.lightFrom]}, the library was computed for light entering ${LIGHT_SIDE_LABELS[media.lightFrom]}: ` +
        `for mirror-symmetric pillars the zeroth-order t and α are the same from both sides (reciprocity), but the light they lose goes elsewhere ` +
        `(into other transmitted orders instead of reflected ones, or the reverse), so the library's powers and notes describe the other side`
      : null;
  if (media.substrateIndex === undefined || media.superstrateIndex === undefined) return { sideMismatch, diffraction: [], mediaUnknown: true };
  const diffraction = cellDiffraction(design.periodNm * 1e-9, design.wavelengthNm * 1e-9, {
    lightFrom: design.lightFrom,
    substrateIndex: media.substrateIndex,
    superstrateIndex: media.superstrateIndex,
  });
  return { sideMismatch, diffraction, mediaUnknown: false };
}
