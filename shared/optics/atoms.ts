/**
 * Meta-atom libraries: types, validation, best-atom mapping per cell, the realized device, and a
 * CSV form of a library.
 *
 * An atom is a pillar in its own frame: `width` along its x axis, `length` along its y axis. In the
 * device the pillar of a cell is rotated by the cell's θ (counter-clockwise, x towards y), so its
 * Jones matrix is R(θ)·diag(tx e^{iαx}, ty e^{iαy})·R(θ)ᵀ (exp(−iωt), radians, metres).
 */
import { DESIGN_VALUE_WORDS } from '../design-values';
import { LIGHT_SIDES } from '../schemas/design';
import { float64Array, int32Array, type ArrayMemory } from './arrays';
import type { CancelSignal, ComplexField, JonesField, ProgressCallback } from './types';
import type { JonesDecomposition } from './jones';
import { emptyJonesField } from './jones';


/** 'rect': rectangular pillar; 'empty': bare cell without a pillar (width = length = 0). */
export type AtomShape = 'rect' | 'empty';

/** One meta-atom: geometry in metres and per-axis complex transmission t·e^{iα} (α radians). */
export interface MetaAtom {
  id: string;
  shape: AtomShape;
  /** Pillar size along the atom's x axis, metres (0 for 'empty'). */
  width: number;
  /** Pillar size along the atom's y axis, metres (0 for 'empty'). */
  length: number;
  /** Pillar height, metres (0 allowed for 'empty'). */
  height: number;
  /** Lattice period the atom was characterised in, metres. */
  period: number;
  /** Amplitude transmission for x-polarized light in the atom frame, 0…1. */
  tx: number;
  /** Transmission phase for x-polarized light, radians. */
  alphaX: number;
  /** Amplitude transmission for y-polarized light in the atom frame, 0…1. */
  ty: number;
  /** Transmission phase for y-polarized light, radians. */
  alphaY: number;
}

/** Library-level facts shown wherever the library is used. */
export interface AtomLibraryMeta {
  name: string;
  /** Design wavelength λ in metres (vacuum). */
  lambda: number;
  /** Lattice period P in metres. */
  period: number;
  /** Nominal pillar height in metres. */
  height: number;
  /** Material / platform note, e.g. "Si₃N₄ pillars on fused silica". */
  material: string;
  /** True when the transmissions come from an approximate model rather than full-wave data. */
  approximate: boolean;
  /** Where the numbers come from. */
  source?: string;
}

/** Where the light enters a cell: through the substrate (exiting into the superstrate), or onto the pillars from the superstrate. */
export type LightSide = (typeof LIGHT_SIDES)[number];
export { LIGHT_SIDES };

/** How a side is named to a person (the design's words for setup.lightFrom). */
export const LIGHT_SIDE_LABELS = DESIGN_VALUE_WORDS.lightFrom as Readonly<Record<LightSide, string>>;

/** What a library says about its cell: the light's side and the half-spaces' indices, each when known. */
export interface LibraryMedia {
  lightFrom?: LightSide;
  substrateIndex?: number;
  superstrateIndex?: number;
}

/**
 * The words a library's source line uses for its cell, which `libraryMedia` reads back: the library's source is
 * kept wherever the library goes (CSV, the server's library rows, a run's atoms.csv), so no other field is needed.
 * Example: mediaPhrase({ lightFrom: 'substrate', substrateIndex: 1.457012, superstrateIndex: 1 }) →
 * 'light from the substrate side (substrate n = 1.4570, superstrate n = 1.0000)'.
 */
export function mediaPhrase(media: Required<LibraryMedia>): string {
  return `light from the ${media.lightFrom} side (substrate n = ${media.substrateIndex.toFixed(4)}, superstrate n = ${media.superstrateIndex.toFixed(4)})`;
}

/**
 * The light's side and the half-spaces' indices a library's source line states in `mediaPhrase`'s words (the side
 * alone when the indices are missing; nothing when the line does not say). Example: libraryMedia({ source: 'RCWA …;
 * light from the superstrate side (substrate n = 1.4570, superstrate n = 1.0000)' }) → { lightFrom: 'superstrate',
 * substrateIndex: 1.457, superstrateIndex: 1 }.
 */
export function libraryMedia(library: { source?: string | null }): LibraryMedia {
  const m = /light from the (substrate|superstrate) side(?: \(substrate n = ([0-9.]+), superstrate n = ([0-9.]+)\))?/i.exec(library.source ?? '');
  if (!m) return {};
  const out: LibraryMedia = { lightFrom: m[1].toLowerCase() as LightSide };
  const sub = Number(m[2]);
  const sup = Number(m[3]);
  if (m[2] && Number.isFinite(sub) && sub > 0 && m[3] && Number.isFinite(sup) && sup > 0) {
    out.substrateIndex = sub;
    out.superstrateIndex = sup;
  }
  return out;
}

/** A typed library: metadata plus atoms. */
export interface AtomLibrary extends AtomLibraryMeta {
  atoms: MetaAtom[];
}

/** One problem found in a library. `row` is the 1-based atom position (0: the library itself). */
export interface LibraryIssue {
  severity: 'error' | 'warning';
  row: number;
  atomId?: string;
  field: string;
  message: string;
  /** 1-based line of the CSV text, when the library came from CSV. */
  line?: number;
  /** CSV column (or metadata key) the problem is in, when the library came from CSV. */
  column?: string;
}

/** Options of `validateAtomLibrary`. */
export interface ValidationOptions {
  /**
   * Coverage criterion: the phases of each axis, taken mod 2π, must leave no gap wider than
   * 2π/minPhaseLevels, and the library must hold at least minPhaseLevels atoms. Default 8 levels
   * (gap ≤ π/4), where a blazed phase profile keeps sinc²(1/8) = 0.95 of the first order
   * (Swanson, MIT Lincoln Lab. Tech. Rep. 854 (1989)).
   */
  minPhaseLevels?: number;
}

const TWO_PI = 2 * Math.PI;
const GEOMETRY_TOLERANCE = 1e-12; // metres: two sizes closer than 0.001 nm count as equal

/** True when the atom places no pillar. Example: isEmptyAtom({ shape: 'empty', … }) → true. */
export function isEmptyAtom(atom: MetaAtom): boolean {
  return atom.shape === 'empty';
}

/**
 * Rotation (radians, counter-clockwise, in [0, π)) at which a cell's pillar is drawn for a cell
 * rotation θ: θ mod π for a rectangle (it is symmetric under a half turn); 0 for a square pillar,
 * whose normal-incidence response does not depend on rotation (C4 symmetry: a symmetric Jones
 * matrix that commutes with a quarter turn is a multiple of the identity); 0 for an empty cell.
 * Used by both the GDSII writer and the design-rule check so they agree.
 * Example: placementAngle(rect100x300, -Math.PI / 6) → 5π/6.
 */
export function placementAngle(atom: MetaAtom, theta: number): number {
  if (atom.shape !== 'rect' || Math.abs(atom.width - atom.length) <= GEOMETRY_TOLERANCE) return 0;
  const r = theta - Math.PI * Math.floor(theta / Math.PI);
  return r >= Math.PI ? 0 : r;
}

function wrapPositive(phi: number): number {
  const r = phi - TWO_PI * Math.floor(phi / TWO_PI);
  return r >= TWO_PI ? 0 : r;
}

/**
 * Largest circular gap (radians) between the phases `alphas`, taken mod 2π; 2π for fewer than 2.
 * Example: largestPhaseGap([0, Math.PI / 2, Math.PI, 3 * Math.PI / 2]) → π/2.
 */
export function largestPhaseGap(alphas: readonly number[]): number {
  if (alphas.length < 2) return TWO_PI;
  const sorted = alphas.map(wrapPositive).sort((a, b) => a - b);
  let gap = sorted[0] + TWO_PI - sorted[sorted.length - 1];
  for (let i = 1; i < sorted.length; i++) gap = Math.max(gap, sorted[i] - sorted[i - 1]);
  return gap;
}

/**
 * Checks a library; returns every problem found (empty list: valid). Errors name the 1-based atom
 * row, its id and the field. Checks: finite numbers; tx, ty in 0…1; positive sizes no larger than
 * the period for 'rect', zero sizes for 'empty'; atom period equal to the library period; unique
 * ids; no duplicate geometry (sizes equal to 0.001 nm); phase coverage per axis (see
 * `ValidationOptions.minPhaseLevels`). Warning (not an error): a pillar height other than the
 * library's nominal height.
 * Example: validateAtomLibrary({ …, atoms: [] }) → [{ severity: 'error', field: 'atoms', … }].
 */
export function validateAtomLibrary(library: AtomLibrary, options: ValidationOptions = {}): LibraryIssue[] {
  return checkAtomLibrary(library, options).issues;
}

/** Options of `checkAtomLibrary`: those of `validateAtomLibrary`, a cap on the issues listed, and cells to leave out. */
export interface CheckOptions extends ValidationOptions {
  /** Issues listed in full; further ones are only counted (their messages are never built). Default: all. */
  maxIssues?: number;
  /** Cells (1-based atom row, MetaAtom field) whose issues the caller has already reported: neither listed nor counted. */
  skip?: (row: number, field: string) => boolean;
}

/**
 * `validateAtomLibrary` with a budget: the first `maxIssues` issues in full, the counts of all. Linear in the
 * number of atoms (plus a sort of the phases). Example: checkAtomLibrary(lib, { maxIssues: 0 }).count → the
 * length of validateAtomLibrary(lib).
 */
export function checkAtomLibrary(library: AtomLibrary, options: CheckOptions = {}): { issues: LibraryIssue[]; count: number; errorCount: number } {
  const minLevels = options.minPhaseLevels ?? 8;
  const maxIssues = options.maxIssues ?? Infinity;
  const issues: LibraryIssue[] = [];
  let count = 0;
  let errorCount = 0;
  /** Counts an issue; true when it is to be listed (its message is built only then). */
  const listed = (severity: LibraryIssue['severity'], row: number, field: string): boolean => {
    if (options.skip && row > 0 && options.skip(row, field)) return false;
    count++;
    if (severity === 'error') errorCount++;
    return issues.length < maxIssues;
  };
  const libError = (field: string, message: string): void => {
    if (listed('error', 0, field)) issues.push({ severity: 'error', row: 0, field, message });
  };
  if (typeof library.name !== 'string' || library.name.trim() === '') libError('name', 'library name is empty');
  for (const field of ['lambda', 'period', 'height'] as const) {
    const v = library[field];
    if (!Number.isFinite(v) || v <= 0) libError(field, `library ${field} must be a positive finite length in metres, got ${v}`);
  }
  if (typeof library.approximate !== 'boolean') libError('approximate', 'library must say whether it is approximate');
  if (!Array.isArray(library.atoms) || library.atoms.length === 0) {
    libError('atoms', 'library holds no atoms');
    return { issues, count, errorCount };
  }

  const seenIds = new Map<string, number>();
  const geometries = new Map<string, { row: number; atom: MetaAtom }>();
  const geometryKey = (a: MetaAtom): string =>
    a.shape === 'empty'
      ? 'empty'
      : [a.width, a.length, a.height].map((v) => Math.round(v / GEOMETRY_TOLERANCE)).join(':');
  library.atoms.forEach((atom, index) => {
    const row = index + 1;
    const atomId = typeof atom.id === 'string' ? atom.id : undefined;
    const err = (field: string, message: string | (() => string)): void => {
      if (!listed('error', row, field)) return;
      const text = typeof message === 'string' ? message : message();
      issues.push({ severity: 'error', row, atomId, field, message: `atom ${atomId ?? '?'} (row ${row}): ${text}` });
    };
    if (atomId === undefined || atomId.trim() === '') err('id', 'id is empty');
    else if (seenIds.has(atomId)) err('id', () => `id repeats row ${seenIds.get(atomId)}`);
    else seenIds.set(atomId, row);
    if (atom.shape !== 'rect' && atom.shape !== 'empty') err('shape', () => `shape must be 'rect' or 'empty', got ${String(atom.shape)}`);

    let finite = true;
    for (const field of ['width', 'length', 'height', 'period', 'tx', 'alphaX', 'ty', 'alphaY'] as const) {
      if (!Number.isFinite(atom[field])) {
        err(field, () => `${field} is not a finite number (${atom[field]})`);
        finite = false;
      }
    }
    for (const field of ['tx', 'ty'] as const) {
      if (Number.isFinite(atom[field]) && (atom[field] < 0 || atom[field] > 1)) {
        err(field, () => `${field} = ${atom[field]} lies outside 0…1`);
      }
    }
    if (atom.shape === 'rect') {
      for (const field of ['width', 'length', 'height'] as const) {
        if (Number.isFinite(atom[field]) && atom[field] <= 0) err(field, () => `${field} must be positive, got ${atom[field]} m`);
      }
      for (const field of ['width', 'length'] as const) {
        if (Number.isFinite(atom[field]) && Number.isFinite(atom.period) && atom[field] > atom.period) {
          err(field, () => `${field} ${atom[field]} m exceeds the period ${atom.period} m`);
        }
      }
    } else if (atom.shape === 'empty') {
      for (const field of ['width', 'length'] as const) {
        if (atom[field] !== 0) err(field, () => `an empty atom must have ${field} 0, got ${atom[field]}`);
      }
    }
    if (Number.isFinite(atom.period) && Number.isFinite(library.period) && Math.abs(atom.period - library.period) > 1e-9 * library.period) {
      err('period', () => `period ${atom.period} m differs from the library period ${library.period} m`);
    }
    if (finite) {
      const key = geometryKey(atom);
      const twin = geometries.get(key);
      if (twin) err('geometry', () => `same geometry as atom ${twin.atom.id} (row ${twin.row})`);
      else geometries.set(key, { row, atom });
      if (atom.shape === 'rect' && Number.isFinite(library.height) && Math.abs(atom.height - library.height) > GEOMETRY_TOLERANCE && listed('warning', row, 'height')) {
        issues.push({
          severity: 'warning',
          row,
          atomId,
          field: 'height',
          message: `atom ${atomId ?? '?'} (row ${row}): height ${atom.height} m differs from the library height ${library.height} m`,
        });
      }
    }
  });

  const usable = library.atoms.filter((a) => Number.isFinite(a.alphaX) && Number.isFinite(a.alphaY));
  if (library.atoms.length < minLevels) {
    libError('atoms', `library holds ${library.atoms.length} atoms; at least ${minLevels} are needed to cover 2π in steps of 2π/${minLevels}`);
  }
  const limit = TWO_PI / minLevels;
  for (const [axis, field] of [
    ['x', 'alphaX'],
    ['y', 'alphaY'],
  ] as const) {
    const gap = largestPhaseGap(usable.map((a) => a[field]));
    if (gap > limit + 1e-12) {
      libError(field, `phases on the ${axis} axis leave a gap of ${gap.toFixed(3)} rad, more than 2π/${minLevels} = ${limit.toFixed(3)} rad`);
    }
  }
  return { issues, count, errorCount };
}

// ---------------------------------------------------------------------------------------------
// Mapping

/**
 * Precomputed search structure for the best-atom mapping. The (δx, δy) torus is cut into
 * bins × bins cells; each bin keeps the atoms that can be the exact minimum anywhere inside it
 * (interval bounds of the cost over the bin), so the per-cell search is exact yet only visits a
 * few candidates.
 */
export interface AtomLookup {
  bins: number;
  atomCount: number;
  /** CSR offsets into `candidates`, length bins² + 1; bin index = ix·bins + iy over (δx, δy). */
  offsets: Int32Array;
  candidates: Int32Array;
  /** Per atom: tx cos αx, tx sin αx, ty cos αy, ty sin αy, tx² + ty². */
  ax: Float64Array;
  bx: Float64Array;
  ay: Float64Array;
  by: Float64Array;
  norm2: Float64Array;
}

/**
 * Builds the exact candidate lookup for `mapAtoms`. Cost per atom over a bin is bounded with the
 * exact range of cos(α − δ) on the bin's δ interval; an atom is kept when its lower bound does not
 * exceed the smallest upper bound. Default 256 bins per axis.
 * Example: buildAtomLookup(library).offsets.length → 256² + 1.
 */
export function buildAtomLookup(library: AtomLibrary, bins = 256): AtomLookup {
  if (!Number.isInteger(bins) || bins < 1 || bins > 4096) throw new RangeError(`buildAtomLookup: bins must be 1…4096, got ${bins}`);
  const atoms = library.atoms;
  const k = atoms.length;
  if (k === 0) throw new RangeError('buildAtomLookup: the library holds no atoms');
  const ax = new Float64Array(k);
  const bx = new Float64Array(k);
  const ay = new Float64Array(k);
  const by = new Float64Array(k);
  const norm2 = new Float64Array(k);
  for (let j = 0; j < k; j++) {
    const a = atoms[j];
    if (![a.tx, a.ty, a.alphaX, a.alphaY].every(Number.isFinite)) {
      throw new RangeError(`buildAtomLookup: atom ${a.id} (row ${j + 1}) has a non-finite transmission`);
    }
    ax[j] = a.tx * Math.cos(a.alphaX);
    bx[j] = a.tx * Math.sin(a.alphaX);
    ay[j] = a.ty * Math.cos(a.alphaY);
    by[j] = a.ty * Math.sin(a.alphaY);
    norm2[j] = a.tx * a.tx + a.ty * a.ty;
  }
  const width = TWO_PI / bins;
  const h = width / 2;
  // Per axis and bin: lower/upper bound of  t² − 2t·cos(α − δ)  over the bin.
  const axisBounds = (t: (a: MetaAtom) => number, alpha: (a: MetaAtom) => number): [Float64Array, Float64Array] => {
    const lo = new Float64Array(bins * k);
    const hi = new Float64Array(bins * k);
    for (let i = 0; i < bins; i++) {
      const centre = (i + 0.5) * width;
      for (let j = 0; j < k; j++) {
        const tj = t(atoms[j]);
        let d = alpha(atoms[j]) - centre;
        d -= TWO_PI * Math.floor((d + Math.PI) / TWO_PI);
        const ad = Math.abs(d);
        const cosMax = ad <= h ? 1 : Math.cos(ad - h);
        const cosMin = ad >= Math.PI - h ? -1 : Math.cos(ad + h);
        lo[i * k + j] = tj * tj - 2 * tj * cosMax;
        hi[i * k + j] = tj * tj - 2 * tj * cosMin;
      }
    }
    return [lo, hi];
  };
  const [loX, hiX] = axisBounds(
    (a) => a.tx,
    (a) => a.alphaX,
  );
  const [loY, hiY] = axisBounds(
    (a) => a.ty,
    (a) => a.alphaY,
  );
  const offsets = new Int32Array(bins * bins + 1);
  let candidates = new Int32Array(Math.max(1024, bins * bins * 4));
  let used = 0;
  for (let i = 0; i < bins; i++) {
    const rx = i * k;
    for (let m = 0; m < bins; m++) {
      const ry = m * k;
      let minUpper = Infinity;
      for (let j = 0; j < k; j++) {
        const u = hiX[rx + j] + hiY[ry + j];
        if (u < minUpper) minUpper = u;
      }
      const threshold = minUpper + 1e-12;
      for (let j = 0; j < k; j++) {
        if (loX[rx + j] + loY[ry + j] <= threshold) {
          if (used === candidates.length) {
            const grown = new Int32Array(candidates.length * 2);
            grown.set(candidates);
            candidates = grown;
          }
          candidates[used++] = j;
        }
      }
      offsets[i * bins + m + 1] = used;
    }
  }
  return { bins, atomCount: k, offsets, candidates: candidates.slice(0, used), ax, bx, ay, by, norm2 };
}

/** Result of `mapAtoms`. Errors are in the atom frame: e_x = tx e^{iαx} − e^{iδx}. */
export interface AtomMapping {
  n: number;
  /** Index into library.atoms per cell. */
  atomIndex: Int32Array;
  /** Rotation to place the atom with, radians: θ, or θ + π/2 where the axes were swapped. */
  theta: Float64Array;
  /** 1 where the atom was placed with swapped axes (only with `allowAxisSwap`). */
  swapped: Uint8Array;
  /** |e_x|² + |e_y|² per cell (PRODUCT.md "Atom mapping"). */
  cost: Float32Array;
  /** Complex error e_x per cell (omitted when `complexError` is false). */
  errorX?: ComplexField;
  /** Complex error e_y per cell (omitted when `complexError` is false). */
  errorY?: ComplexField;
}

/** Options of `mapAtoms`. */
export interface MappingOptions {
  /** Also try (δy, δx, θ + π/2), the same Jones matrix with the atom turned by 90°; keep the better. */
  allowAxisSwap?: boolean;
  /** Return the complex per-axis errors (two complex planes); default true. */
  complexError?: boolean;
  /** A lookup already built for this library. */
  lookup?: AtomLookup;
  onProgress?: ProgressCallback;
  signal?: CancelSignal;
  /** Where atomIndex and theta are allocated (arrays.ts); default 'private'. */
  memory?: ArrayMemory;
}

/**
 * Best atom per cell: argmin over atoms of |tx e^{iαx} − e^{iδx}|² + |ty e^{iαy} − e^{iδy}|²
 * (PRODUCT.md "Atom mapping"); exact (candidate lookup, ties → lowest index). δ, θ radians.
 * Measured on this 2-core VM (shared, one thread): 2048² cells with the demo library in 1.2–1.6 s.
 * Example: with an atom of t = 1, α = (0.3, 1.2), a cell with δ = (0.3, 1.2) maps to it with cost 0.
 */
export function mapAtoms(decomposition: JonesDecomposition, library: AtomLibrary, options: MappingOptions = {}): AtomMapping {
  const { n, deltaX, deltaY, theta } = decomposition;
  const count = n * n;
  if (deltaX.length !== count || deltaY.length !== count || theta.length !== count) {
    throw new RangeError(`mapAtoms: planes must hold ${n}² cells`);
  }
  const lookup = options.lookup ?? buildAtomLookup(library);
  if (lookup.atomCount !== library.atoms.length) throw new RangeError('mapAtoms: lookup was built for another library');
  const { bins, offsets, candidates, ax, bx, ay, by, norm2 } = lookup;
  const allowSwap = options.allowAxisSwap === true;
  const withError = options.complexError !== false;
  const atomIndex = int32Array(count, options.memory);
  const thetaOut = float64Array(count, options.memory);
  const swapped = new Uint8Array(count);
  const cost = new Float32Array(count);
  const errorX = withError ? { n, re: new Float64Array(count), im: new Float64Array(count) } : undefined;
  const errorY = withError ? { n, re: new Float64Array(count), im: new Float64Array(count) } : undefined;
  const binScale = bins / TWO_PI;
  const binOf = (phi: number): number => {
    let b = Math.floor((phi - TWO_PI * Math.floor(phi / TWO_PI)) * binScale);
    if (b >= bins) b = bins - 1;
    else if (b < 0) b = 0;
    return b;
  };
  const stride = Math.max(1, Math.ceil(count / 64));
  for (let i = 0; i < count; i++) {
    if (i % stride === 0) {
      options.signal?.throwIfAborted();
      options.onProgress?.(i / count, 'atom-mapping');
    }
    const dx = deltaX[i];
    const dy = deltaY[i];
    if (!Number.isFinite(dx) || !Number.isFinite(dy)) throw new RangeError(`mapAtoms: cell ${i} has a non-finite phase`);
    const cx = Math.cos(dx);
    const sx = Math.sin(dx);
    const cy = Math.cos(dy);
    const sy = Math.sin(dy);
    const bX = binOf(dx);
    const bY = binOf(dy);
    // cost + 2 = norm2 − 2(ax cx + bx sx + ay cy + by sy) + 2; the constant 2 is added at the end.
    let best = -1;
    let bestCost = Infinity;
    let cell = bX * bins + bY;
    for (let c = offsets[cell], end = offsets[cell + 1]; c < end; c++) {
      const j = candidates[c];
      const v = norm2[j] - 2 * (ax[j] * cx + bx[j] * sx + ay[j] * cy + by[j] * sy);
      if (v < bestCost || (v === bestCost && j < best)) {
        bestCost = v;
        best = j;
      }
    }
    let isSwapped = 0;
    if (allowSwap) {
      cell = bY * bins + bX;
      for (let c = offsets[cell], end = offsets[cell + 1]; c < end; c++) {
        const j = candidates[c];
        const v = norm2[j] - 2 * (ax[j] * cy + bx[j] * sy + ay[j] * cx + by[j] * sx);
        if (v < bestCost) {
          bestCost = v;
          best = j;
          isSwapped = 1;
        }
      }
    }
    atomIndex[i] = best;
    swapped[i] = isSwapped;
    thetaOut[i] = isSwapped ? theta[i] + Math.PI / 2 : theta[i];
    cost[i] = Math.max(0, bestCost + 2);
    if (errorX && errorY) {
      errorX.re[i] = ax[best] - (isSwapped ? cy : cx);
      errorX.im[i] = bx[best] - (isSwapped ? sy : sx);
      errorY.re[i] = ay[best] - (isSwapped ? cx : cy);
      errorY.im[i] = by[best] - (isSwapped ? sx : sy);
    }
  }
  options.onProgress?.(1, 'atom-mapping');
  const mapping: AtomMapping = { n, atomIndex, theta: thetaOut, swapped, cost };
  if (errorX && errorY) {
    mapping.errorX = errorX;
    mapping.errorY = errorY;
  }
  return mapping;
}

/**
 * The realized device: per cell R(θ)·diag(tx e^{iαx}, ty e^{iαy})·R(θ)ᵀ from the chosen atom's own
 * t and α (PRODUCT.md "Atom mapping"), so losses and leakage reach the preview. θ radians.
 * Example: realizeDevice(mapping.atomIndex, mapping.theta, library) equals the ideal J for a perfect library.
 */
export function realizeDevice(
  atomIndex: Int32Array,
  theta: Float64Array,
  library: AtomLibrary,
  options: { onProgress?: ProgressCallback; signal?: CancelSignal } = {},
): JonesField {
  const count = atomIndex.length;
  const n = Math.round(Math.sqrt(count));
  if (n * n !== count || theta.length !== count) throw new RangeError('realizeDevice: atomIndex and theta must be the same N×N grid');
  const k = library.atoms.length;
  const aRe = new Float64Array(k);
  const aIm = new Float64Array(k);
  const bRe = new Float64Array(k);
  const bIm = new Float64Array(k);
  library.atoms.forEach((a, j) => {
    aRe[j] = a.tx * Math.cos(a.alphaX);
    aIm[j] = a.tx * Math.sin(a.alphaX);
    bRe[j] = a.ty * Math.cos(a.alphaY);
    bIm[j] = a.ty * Math.sin(a.alphaY);
  });
  const field = emptyJonesField(n);
  const stride = Math.max(1, Math.ceil(count / 64));
  for (let i = 0; i < count; i++) {
    if (i % stride === 0) {
      options.signal?.throwIfAborted();
      options.onProgress?.(i / count, 'realized-device');
    }
    const j = atomIndex[i];
    if (!(j >= 0 && j < k)) throw new RangeError(`realizeDevice: cell ${i} refers to atom ${j}, library has ${k}`);
    const c = Math.cos(theta[i]);
    const s = Math.sin(theta[i]);
    const cc = c * c;
    const ss = s * s;
    const cs = c * s;
    field.xx.re[i] = cc * aRe[j] + ss * bRe[j];
    field.xx.im[i] = cc * aIm[j] + ss * bIm[j];
    const offRe = cs * (aRe[j] - bRe[j]);
    const offIm = cs * (aIm[j] - bIm[j]);
    field.xy.re[i] = offRe;
    field.xy.im[i] = offIm;
    field.yx.re[i] = offRe;
    field.yx.im[i] = offIm;
    field.yy.re[i] = ss * aRe[j] + cc * bRe[j];
    field.yy.im[i] = ss * aIm[j] + cc * bIm[j];
  }
  options.onProgress?.(1, 'realized-device');
  return field;
}

// ---------------------------------------------------------------------------------------------
// CSV

/** Column names of the library CSV, in order. Lengths in nm, phases in radians. */
export const ATOM_CSV_COLUMNS = [
  'atom_id',
  'shape',
  'width_nm',
  'length_nm',
  'height_nm',
  'period_nm',
  't_x',
  'phase_x_rad',
  't_y',
  'phase_y_rad',
] as const;

const META_KEYS = {
  name: 'name',
  lambda: 'design_wavelength_nm',
  period: 'period_nm',
  height: 'height_nm',
  material: 'material',
  approximate: 'approximate',
  source: 'source',
} as const;

const CSV_COLUMN_OF_FIELD: Record<string, string> = {
  id: 'atom_id',
  shape: 'shape',
  geometry: 'width_nm/length_nm/height_nm',
  lambda: 'design_wavelength_nm',
  width: 'width_nm',
  length: 'length_nm',
  height: 'height_nm',
  period: 'period_nm',
  tx: 't_x',
  alphaX: 'phase_x_rad',
  ty: 't_y',
  alphaY: 'phase_y_rad',
};

function nm(metres: number): string {
  return String(Math.round(metres * 1e13) / 1e4);
}

/**
 * A cell as written: quoted (quotes doubled) when it holds a comma, quote or line break, starts with `#` (it
 * would read as a comment line), or starts or ends with white space (unquoted cells are trimmed on reading), so
 * that every text reads back exactly. Example: csvField('#1') → '"#1"'.
 */
function csvField(text: string): string {
  return /[",\n\r]|^[\s#]|\s$/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/**
 * CSV text of a library: the header row of ATOM_CSV_COLUMNS first, then `# key: value` metadata
 * lines (name, design_wavelength_nm, period_nm, height_nm, material, approximate, source), then one
 * row per atom. Lengths in nm (rounded to 1e-4 nm), phases in radians (shortest exact decimal).
 * The header comes first so that np.genfromtxt(path, delimiter=',', names=True, comments='#',
 * dtype=None) and pandas.read_csv(path, comment='#') both read it directly.
 * Example: atomLibraryToCsv(lib).split('\n')[0] → 'atom_id,shape,width_nm,…,phase_y_rad'.
 */
export function atomLibraryToCsv(library: AtomLibrary): string {
  const lines: string[] = [ATOM_CSV_COLUMNS.join(','), '# Phasewright meta-atom library'];
  const oneLine = (s: string): string => s.replace(/[\r\n]+/g, ' ');
  lines.push(`# ${META_KEYS.name}: ${oneLine(library.name)}`);
  lines.push(`# ${META_KEYS.lambda}: ${nm(library.lambda)}`);
  lines.push(`# ${META_KEYS.period}: ${nm(library.period)}`);
  lines.push(`# ${META_KEYS.height}: ${nm(library.height)}`);
  lines.push(`# ${META_KEYS.material}: ${oneLine(library.material)}`);
  lines.push(`# ${META_KEYS.approximate}: ${library.approximate ? 'true' : 'false'}`);
  if (library.source) lines.push(`# ${META_KEYS.source}: ${oneLine(library.source)}`);
  for (const a of library.atoms) {
    lines.push(
      [
        csvField(a.id),
        a.shape,
        nm(a.width),
        nm(a.length),
        nm(a.height),
        nm(a.period),
        String(a.tx),
        String(a.alphaX),
        String(a.ty),
        String(a.alphaY),
      ].join(','),
    );
  }
  return lines.join('\n') + '\n';
}

/** The numeric columns of an atom row, in MetaAtom order, with the factor to SI units. */
const NUMBER_COLUMNS = [
  ['width_nm', 1e-9],
  ['length_nm', 1e-9],
  ['height_nm', 1e-9],
  ['period_nm', 1e-9],
  ['t_x', 1],
  ['phase_x_rad', 1],
  ['t_y', 1],
  ['phase_y_rad', 1],
] as const;

/** The MetaAtom fields of NUMBER_COLUMNS, in the same order. */
const NUMBER_FIELDS = ['width', 'length', 'height', 'period', 'tx', 'alphaX', 'ty', 'alphaY'] as const;
type NumberField = (typeof NUMBER_FIELDS)[number];

/** Limits of reading a library CSV, checked while reading: the first excess stops the reader. */
export interface CsvLimits {
  /** Most atom rows after the header. */
  maxRows: number;
  /** Most cells in one row. */
  maxColumns: number;
  /** Longest record in characters (a quoted cell spanning lines counts whole). */
  maxLineChars: number;
  /** Issues returned in full; the rest are only counted. */
  maxIssues: number;
}

/** No limits: for files the program wrote itself. */
const UNLIMITED: CsvLimits = { maxRows: Infinity, maxColumns: Infinity, maxLineChars: Infinity, maxIssues: Infinity };

/** A reading limit was exceeded at `line` of the file; nothing after it was read. */
export class CsvLimitError extends RangeError {
  constructor(
    readonly limit: 'rows' | 'columns' | 'line length',
    readonly line: number,
    message: string,
  ) {
    super(message);
    this.name = 'CsvLimitError';
  }
}

type CsvRecord = { line: number; comment: string } | { line: number; cells: string[]; unclosed: boolean };

const SPECIAL = /[",\n]/g;

/**
 * The records of CSV text (RFC 4180: quoted cells may hold commas, doubled quotes and line breaks), one pass,
 * linear in the text. A line whose first non-blank character is `#` is a comment. Unquoted text of a cell is
 * trimmed, quoted text kept as it is. Blank lines are skipped. Throws CsvLimitError at the first record longer
 * than `maxLineChars` or with more than `maxColumns` cells.
 */
function* csvRecords(text: string, limits: CsvLimits): Generator<CsvRecord> {
  const n = text.length;
  let at = 0;
  let line = 1;
  const tooLong = (startLine: number) =>
    new CsvLimitError('line length', startLine, `line ${startLine} is longer than ${limits.maxLineChars} characters`);
  while (at < n) {
    const start = at;
    const startLine = line;
    let k = at;
    while (k < n && (text[k] === ' ' || text[k] === '\t')) k++;
    if (text[k] === '#') {
      let end = text.indexOf('\n', k);
      if (end < 0) end = n;
      if (end - start > limits.maxLineChars) throw tooLong(startLine);
      yield { line: startLine, comment: text.slice(k, end).trim() };
      at = end + 1;
      line++;
      continue;
    }
    const cells: string[] = [];
    let cell = '';
    let quoteStart = -1;
    let quoteEnd = -1;
    let quoted = false;
    const finish = () => {
      cells.push(quoteStart < 0 ? cell.trim() : cell.slice(0, quoteStart).trimStart() + cell.slice(quoteStart, quoteEnd) + cell.slice(quoteEnd).trimEnd());
      if (cells.length > limits.maxColumns) {
        throw new CsvLimitError('columns', startLine, `line ${startLine} has more than ${limits.maxColumns} columns`);
      }
      cell = '';
      quoteStart = quoteEnd = -1;
    };
    let ended = false;
    while (!ended) {
      SPECIAL.lastIndex = at;
      const found = SPECIAL.exec(text);
      const stop = found ? found.index : n;
      if (stop - start > limits.maxLineChars) throw tooLong(startLine);
      cell += text.slice(at, stop);
      at = stop + 1;
      if (!found) {
        ended = true;
        break;
      }
      const ch = found[0];
      if (quoted) {
        if (ch === '\n') {
          cell += '\n';
          line++;
        } else if (ch === '"' && text[at] === '"') {
          cell += '"';
          at++;
        } else if (ch === '"') {
          quoted = false;
          quoteEnd = cell.length;
        } else cell += ch;
      } else if (ch === '"') {
        quoted = true;
        if (quoteStart < 0) quoteStart = cell.length;
      } else if (ch === ',') finish();
      else ended = true;
    }
    if (quoted) quoteEnd = cell.length;
    finish();
    line++;
    if (cells.length === 1 && cells[0] === '' && quoteStart < 0) continue;
    yield { line: startLine, cells, unclosed: quoted };
  }
}

/**
 * Parses library CSV (the format of `atomLibraryToCsv`; metadata lines optional, `meta` fills or
 * overrides them). Returns the library and its issues: CSV problems name the line and column,
 * then `validateAtomLibrary` runs on the result; every issue carries the CSV `column` it is about,
 * and messages name lines of the file (not atom rows). Without an `approximate` line or `meta.approximate`
 * the library counts as approximate (data of unknown provenance is not presented as exact).
 * `options.limits` bound the reading (CsvLimitError at the first excess) and the issues kept: `issues` holds
 * the first `maxIssues`, `issueCount` and `errorCount` count them all. Linear in the text.
 * Example: parseAtomLibraryCsv(atomLibraryToCsv(lib)).library.atoms.length → lib.atoms.length.
 */
export function parseAtomLibraryCsv(
  text: string,
  meta: Partial<AtomLibraryMeta> = {},
  options: ValidationOptions & { limits?: Partial<CsvLimits> } = {},
): { library: AtomLibrary; issues: LibraryIssue[]; issueCount: number; errorCount: number } {
  const limits: CsvLimits = { ...UNLIMITED, ...options.limits };
  const issues: LibraryIssue[] = [];
  let issueCount = 0;
  let errorCount = 0;
  /** Counts an issue; true when it is among the first `maxIssues`, to be listed (built only then). */
  const keep = (severity: LibraryIssue['severity']): boolean => {
    issueCount++;
    if (severity === 'error') errorCount++;
    return issues.length < limits.maxIssues;
  };
  const add = (issue: LibraryIssue) => {
    if (keep(issue.severity)) issues.push(issue);
  };
  const found: Record<string, string> = {};
  const rows: { line: number; cells: string[] }[] = [];
  let header: string[] | undefined;
  let unclosedAt: number | undefined;
  for (const record of csvRecords(text, limits)) {
    if ('comment' in record) {
      const m = /^#\s*([a-z_]+)\s*:\s*(.*)$/.exec(record.comment);
      if (m) found[m[1]] = m[2].trim();
      continue;
    }
    if (record.unclosed) unclosedAt = record.line;
    if (!header) header = record.cells;
    else if (rows.length >= limits.maxRows) {
      throw new CsvLimitError('rows', record.line, `the file holds more than ${limits.maxRows} atom rows (line ${record.line} would be row ${rows.length + 1})`);
    } else rows.push(record);
  }
  const numberMeta = (key: string, scale: number): number | undefined => {
    if (found[key] === undefined) return undefined;
    const v = Number(found[key]);
    return Number.isFinite(v) ? v * scale : NaN;
  };
  const library: AtomLibrary = {
    name: meta.name ?? found[META_KEYS.name] ?? '',
    lambda: meta.lambda ?? numberMeta(META_KEYS.lambda, 1e-9) ?? NaN,
    period: meta.period ?? numberMeta(META_KEYS.period, 1e-9) ?? NaN,
    height: meta.height ?? numberMeta(META_KEYS.height, 1e-9) ?? NaN,
    material: meta.material ?? found[META_KEYS.material] ?? '',
    approximate: meta.approximate ?? (found[META_KEYS.approximate] === undefined ? true : found[META_KEYS.approximate] === 'true'),
    atoms: [],
  };
  const source = meta.source ?? found[META_KEYS.source];
  if (source !== undefined) library.source = source;
  const done = () => ({ library, issues, issueCount, errorCount });
  if (!header) {
    add({ severity: 'error', row: 0, field: 'header', column: 'header', message: 'no header row found' });
    return done();
  }
  if (unclosedAt !== undefined) {
    add({ severity: 'error', row: 0, field: 'file', line: unclosedAt, column: 'file', message: `line ${unclosedAt}: a quoted cell is never closed (a " is missing)` });
  }
  const columnIndex = new Map<string, number>();
  header.forEach((name, i) => columnIndex.set(name, i));
  const missing = ATOM_CSV_COLUMNS.filter((c) => c !== 'shape' && !columnIndex.has(c));
  if (missing.length > 0) {
    add({ severity: 'error', row: 0, field: 'header', column: missing.join(', '), message: `missing columns: ${missing.join(', ')}` });
    return done();
  }
  const at = NUMBER_COLUMNS.map(([column]) => columnIndex.get(column)!);
  const idAt = columnIndex.get('atom_id')!;
  const shapeAt = columnIndex.get('shape');
  const values = new Array<number>(NUMBER_COLUMNS.length);
  for (let index = 0; index < rows.length; index++) {
    const { line, cells } = rows[index];
    const row = index + 1;
    const id = cells[idAt] ?? '';
    for (let c = 0; c < NUMBER_COLUMNS.length; c++) {
      const [column, scale] = NUMBER_COLUMNS[c];
      const rawValue = cells[at[c]];
      const v = rawValue === undefined || rawValue === '' ? NaN : Number(rawValue);
      values[c] = v * scale;
      if (Number.isFinite(v)) continue;
      if (keep('error')) {
        issues.push({ severity: 'error', row, atomId: id, field: column, line, column, message: `line ${line}, atom ${id || '?'}: ${column} is not a number (${rawValue ?? 'missing'})` });
      }
    }
    const shapeCell = shapeAt === undefined ? 'rect' : cells[shapeAt];
    const [width, length, height, period, tx, alphaX, ty, alphaY] = values;
    library.atoms.push({ id, shape: shapeCell === 'empty' ? 'empty' : (shapeCell as AtomShape), width, length, height, period, tx, alphaX, ty, alphaY });
  }
  const lineOfRow = (row: number): number | undefined => rows[row - 1]?.line;
  const checked = checkAtomLibrary(library, {
    ...options,
    maxIssues: Math.max(0, limits.maxIssues - issues.length),
    // A numeric cell is not finite exactly when it was reported above as not a number: the validator does not report it again.
    skip: (row, field) => NUMBER_FIELDS.includes(field as NumberField) && !Number.isFinite(library.atoms[row - 1][field as NumberField]),
  });
  issueCount += checked.count;
  errorCount += checked.errorCount;
  for (const issue of checked.issues) {
    const column = CSV_COLUMN_OF_FIELD[issue.field] ?? issue.field;
    const line = issue.row > 0 ? lineOfRow(issue.row) : undefined;
    // The validator counts atoms (row 1 = first atom); a CSV reader counts lines of the file.
    const message = issue.message.replace(/\brow (\d+)\b/g, (text, n: string) => {
      const atLine = lineOfRow(Number(n));
      return atLine === undefined ? text : `line ${atLine}`;
    });
    issues.push(line === undefined ? { ...issue, message, column } : { ...issue, message, line, column });
  }
  return done();
}
