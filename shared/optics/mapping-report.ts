/**
 * The mapping report of a run: how well the atom library realized the ideal cells. Pure functions over the
 * per-cell outputs of `mapAtoms` (atoms.ts); the summary figures (mean error, mean transmission, retardance
 * far from π) are those of pipeline.ts `mappingStatistics`, which uses `atomUsage` from here, so the run's
 * metrics and its report always agree.
 */
import type { AtomLibrary } from './atoms';

/** Cells per atom: counts[j] = number of cells whose chosen atom is library.atoms[j]. Example: [0, 0, 2] → [2, 0, 1]. */
export function atomUsage(atomIndex: Int32Array, atomCount: number): Float64Array {
  const counts = new Float64Array(atomCount);
  for (let i = 0; i < atomIndex.length; i++) {
    const j = atomIndex[i];
    if (!(j >= 0 && j < atomCount)) throw new RangeError(`Cell ${i} refers to atom ${j}, the library has ${atomCount}`);
    counts[j]++;
  }
  return counts;
}

/** A histogram over equal bins [edges[b], edges[b + 1]); the last bin includes its upper edge. */
export interface Histogram {
  /** bins + 1 increasing edges. */
  edges: number[];
  counts: number[];
}

/**
 * Histogram of the per-cell complex mapping error |tx e^{iαx} − e^{iδx}|² + |ty e^{iαy} − e^{iδy}|² (the
 * `cost` of mapAtoms, unit |t|², 0 = exact; 8 is the largest possible for passive atoms), `bins` equal bins
 * from 0 to the largest error seen (at least 1e-6 wide in all). Counts sum to the number of cells.
 * Example: errorHistogram(Float32Array.of(0, 0.5, 1), 2) → edges [0, 0.5, 1], counts [1, 2].
 */
export function errorHistogram(cost: Float32Array, bins = 24): Histogram {
  if (!Number.isInteger(bins) || bins < 1) throw new RangeError(`bins must be a positive integer, got ${bins}`);
  let max = 0;
  for (let i = 0; i < cost.length; i++) if (cost[i] > max) max = cost[i];
  const top = Math.max(max, 1e-6);
  const width = top / bins;
  const counts = new Array<number>(bins).fill(0);
  for (let i = 0; i < cost.length; i++) {
    const b = Math.min(bins - 1, Math.max(0, Math.floor(cost[i] / width)));
    counts[b]++;
  }
  const edges = Array.from({ length: bins + 1 }, (_, b) => (b === bins ? top : b * width));
  return { edges, counts };
}

/** One atom's share of the layout. */
export interface AtomUse {
  /** Row of the library (0-based, as in atom_index.npy). */
  index: number;
  id: string;
  widthNm: number;
  lengthNm: number;
  cells: number;
}

export interface MappingReport {
  cells: number;
  errorHistogram: Histogram;
  /** The most used atoms, most used first (ties: lower row first). */
  topAtoms: AtomUse[];
  /** Cells mapped to atoms outside `topAtoms`. */
  otherCells: number;
  distinctAtoms: number;
  /** Retardance threshold of `retardanceFarFromPi`, radians (π/4). */
  retardanceThreshold: number;
}

/** |αx − αy − π| (wrapped) beyond which a cell counts as "far from π" in the mapping statistics: π/4. */
export const RETARDANCE_THRESHOLD = Math.PI / 4;

/**
 * The report's distributions: error histogram and atom usage (top `top` atoms plus the rest).
 * Usage cells plus otherCells sum to the number of cells.
 * Example: three cells on atoms [0, 0, 2] → topAtoms [{index 0, cells 2}, {index 2, cells 1}], otherCells 0.
 */
export function mappingReport(atomIndex: Int32Array, cost: Float32Array, library: AtomLibrary, options: { bins?: number; top?: number } = {}): MappingReport {
  if (cost.length !== atomIndex.length) throw new RangeError('cost and atomIndex must hold the same cells');
  const counts = atomUsage(atomIndex, library.atoms.length);
  const order = Array.from(counts.keys())
    .filter((j) => counts[j] > 0)
    .sort((p, q) => counts[q] - counts[p] || p - q);
  const top = order.slice(0, options.top ?? 20);
  const topAtoms = top.map((j) => {
    const atom = library.atoms[j];
    return { index: j, id: atom.id, widthNm: atom.width * 1e9, lengthNm: atom.length * 1e9, cells: counts[j] };
  });
  const inTop = topAtoms.reduce((s, a) => s + a.cells, 0);
  return {
    cells: atomIndex.length,
    errorHistogram: errorHistogram(cost, options.bins ?? 24),
    topAtoms,
    otherCells: atomIndex.length - inTop,
    distinctAtoms: order.length,
    retardanceThreshold: RETARDANCE_THRESHOLD,
  };
}
