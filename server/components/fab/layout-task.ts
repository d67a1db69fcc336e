/**
 * The layout jobs of finished runs, on a worker thread of layout-jobs.ts (never the request thread): decode
 * the stored atom index and rotations (npy-decode.ts) and the atom library (atoms.csv), then answer a layout
 * region with its pillars and violations, check the design rules of the whole layout again (runs from
 * before drc.json existed), or write a GDSII with other options to a file. The decoded layout of the last
 * few runs stays in this thread; the main thread sends a run's bytes only when asked (`need-data`).
 */
import { createWriteStream } from 'node:fs';
import { once } from 'node:events';
import { parseAtomLibraryCsv, placementAngle, type AtomLibrary } from '../../../shared/optics/atoms';
import { checkDesignRules, type DrcKind } from '../../../shared/optics/drc';
import { gdsiiChunks } from '../../../shared/optics/gdsii';
import { decodeNpy, readNpyHeader, type DecodedNpy } from '../../../shared/optics/npy-decode';
import type { Design } from '../../../shared/schemas/design';
import type { DesignRuleViolationView, LayoutPillar, LayoutRegion, ProjectDesignRules } from '../../../shared/schemas/fab';
import { violationView } from '../../cli/drc-record';

/** A run's stored files the jobs read. */
export interface LayoutData {
  designJson: string;
  atomsCsv: string;
  atomIndexNpy: Uint8Array;
  thetaNpy: Uint8Array;
}

/** The design-rule record of a run, as drc.json holds it. */
export interface StoredDrc {
  rules: ProjectDesignRules;
  counts: Record<DrcKind, number>;
  total: number;
  truncated: boolean;
  closestGapNm: number | null;
  violations: DesignRuleViolationView[];
}

export interface GdsOptions {
  layer: number;
  datatype: number;
  dbUnitNm: number;
}

export type LayoutJob = {
  runId: number;
  /** Names the run's stored files (their ids): a cached layout is used only for the very same files. */
  key: string;
  data?: LayoutData;
} & ({ kind: 'region'; x0: number; y0: number; size: number } | { kind: 'check' } | { kind: 'gds'; options: GdsOptions; outFile: string });

export type LayoutJobResult =
  | { ok: 'need-data' }
  | { ok: true; region: LayoutRegion }
  | { ok: true; check: StoredDrc }
  | { ok: true; gdsBytes: number }
  /** A problem of the request or of the run's files, with the status and message the caller answers. */
  | { ok: false; status: 400 | 409; message: string; details?: Record<string, string> };

/** A finished run's layout as the GDSII writer and the design-rule check take it (lengths in metres). */
interface RunLayout {
  n: number;
  period: number;
  atomIndex: Int32Array;
  theta: Float64Array;
  library: AtomLibrary;
  design: Design;
}

class JobProblem extends Error {
  constructor(
    readonly status: 400 | 409,
    message: string,
    readonly details?: Record<string, string>,
  ) {
    super(message);
  }
}

/** The layouts of the last few runs (a 2048² layout is ~50 MB, a 4096² one ~200 MB). */
const cache = new Map<string, RunLayout>();
const CACHE_ENTRIES = 2;

/**
 * A .npy array as a view of its own bytes when they are little-endian int32 or float64 in C order and aligned, as
 * the run's files are (numpy pads the header to 64 bytes): a 4096² layout is then held once, not twice.
 * Anything else is decoded into a copy.
 */
function npyArray(bytes: Uint8Array): DecodedNpy {
  const header = readNpyHeader(bytes);
  const offset = bytes.byteOffset + header.dataOffset;
  if (!header.fortranOrder && offset % header.itemSize === 0) {
    if (header.descr === '<i4') return { descr: header.descr, shape: header.shape, data: new Int32Array(bytes.buffer, offset, header.count) };
    if (header.descr === '<f8') return { descr: header.descr, shape: header.shape, data: new Float64Array(bytes.buffer, offset, header.count) };
  }
  return decodeNpy(bytes);
}

function decodeLayout(runId: number, data: LayoutData): RunLayout {
  const design = JSON.parse(data.designJson) as Design;
  const { library } = parseAtomLibraryCsv(data.atomsCsv);
  const index = npyArray(data.atomIndexNpy);
  const theta = npyArray(data.thetaNpy);
  const n = design.setup.cells;
  const square = (shape: number[]) => shape.length === 2 && shape[0] === n && shape[1] === n;
  if (!square(index.shape) || !square(theta.shape) || !(index.data instanceof Int32Array) || !(theta.data instanceof Float64Array)) {
    throw new JobProblem(409, `Run ${runId}'s atom_index.npy / theta.npy are not int32 / float64 ${n}×${n} arrays`);
  }
  return { n, period: design.setup.periodNm * 1e-9, atomIndex: index.data, theta: theta.data, library, design };
}

const rulesInMetres = (r: ProjectDesignRules) => ({ minGap: r.minGapNm * 1e-9, minFeature: r.minFeatureNm * 1e-9, maxAspectRatio: r.maxAspectRatio });

/**
 * Violations with at least one cell in the region [x0, x0+w) × [y0, y0+h), recomputed exactly: the check runs
 * on the region plus a one-cell margin, so pairs across the region's edge are found as in the whole layout.
 */
function regionViolations(layout: RunLayout, rules: ProjectDesignRules, x0: number, y0: number, w: number, h: number): DesignRuleViolationView[] {
  const { n } = layout;
  const sx0 = Math.max(0, x0 - 1);
  const sy0 = Math.max(0, y0 - 1);
  const sx1 = Math.min(n, x0 + w + 1);
  const sy1 = Math.min(n, y0 + h + 1);
  // checkDesignRules takes a square grid; pad the sub-grid with the library's empty atom, or a placeholder.
  const side = Math.max(sx1 - sx0, sy1 - sy0);
  let empty = layout.library.atoms.findIndex((a) => a.shape === 'empty');
  const library = empty >= 0 ? layout.library : { ...layout.library, atoms: [...layout.library.atoms, { ...layout.library.atoms[0], id: 'padding', shape: 'empty' as const, width: 0, length: 0 }] };
  if (empty < 0) empty = library.atoms.length - 1;
  const atomIndex = new Int32Array(side * side).fill(empty);
  const theta = new Float64Array(side * side);
  for (let iy = sy0; iy < sy1; iy++) {
    for (let ix = sx0; ix < sx1; ix++) {
      const j = (iy - sy0) * side + (ix - sx0);
      atomIndex[j] = layout.atomIndex[iy * n + ix];
      theta[j] = layout.theta[iy * n + ix];
    }
  }
  const report = checkDesignRules({ n: side, period: layout.period, atomIndex, theta, library }, rulesInMetres(rules), { maxViolations: 1_000_000 });
  const inside = (ix: number, iy: number) => ix >= x0 && ix < x0 + w && iy >= y0 && iy < y0 + h;
  const out: DesignRuleViolationView[] = [];
  for (const v of report.violations) {
    const ix = v.ix + sx0;
    const iy = v.iy + sy0;
    const neighbour = v.neighbour ? { ix: v.neighbour.ix + sx0, iy: v.neighbour.iy + sy0 } : undefined;
    if (!inside(ix, iy) && !(neighbour && inside(neighbour.ix, neighbour.iy))) continue;
    out.push(violationView({ ...v, ix, iy, neighbour }));
  }
  return out;
}

/** Pillars and design-rule violations of a square region of at most `size` cells a side. */
function region(layout: RunLayout, x0: number, y0: number, size: number): LayoutRegion {
  const { n, atomIndex, theta, library } = layout;
  if (x0 >= n || y0 >= n) {
    throw new JobProblem(400, `x0 and y0 must be less than the layout's ${n} cells`, x0 >= n ? { x0: `must be 0…${n - 1}` } : { y0: `must be 0…${n - 1}` });
  }
  const width = Math.min(size, n - x0);
  const height = Math.min(size, n - y0);
  const centre = (n - 1) / 2;
  const periodNm = layout.design.setup.periodNm;
  const pillars: LayoutPillar[] = [];
  for (let iy = y0; iy < y0 + height; iy++) {
    for (let ix = x0; ix < x0 + width; ix++) {
      const i = iy * n + ix;
      const atom = library.atoms[atomIndex[i]];
      if (!atom || atom.shape === 'empty') continue;
      pillars.push({
        ix,
        iy,
        xNm: (ix - centre) * periodNm,
        yNm: (iy - centre) * periodNm,
        widthNm: atom.width * 1e9,
        lengthNm: atom.length * 1e9,
        angleDeg: (placementAngle(atom, theta[i]) * 180) / Math.PI,
        atom: atomIndex[i],
      });
    }
  }
  return { n, periodNm, x0, y0, width, height, pillars, violations: regionViolations(layout, layout.design.designRules, x0, y0, width, height) };
}

/** The whole layout's check under the rules the run used, as drc.json records it. */
function fullCheck(layout: RunLayout): StoredDrc {
  const rules = layout.design.designRules;
  const report = checkDesignRules(layout, rulesInMetres(rules), { maxViolations: 200 });
  return {
    rules,
    counts: report.counts,
    total: report.counts.gap + report.counts.feature + report.counts['aspect-ratio'],
    truncated: report.truncated,
    closestGapNm: report.closestGap === null ? null : report.closestGap * 1e9,
    violations: report.violations.map(violationView),
  };
}

/** Writes the GDSII with `options` to `outFile`, chunk by chunk; returns its size in bytes. */
async function writeGds(layout: RunLayout, options: GdsOptions, outFile: string): Promise<number> {
  const dbu = options.dbUnitNm * 1e-9;
  // Every coordinate must fit a 32-bit signed integer of database units (manual, "XY" record: 4-byte integers).
  const extent = ((layout.n - 1) / 2) * layout.period + layout.library.atoms.reduce((m, a) => Math.max(m, a.width, a.length), 0);
  if (extent / dbu > 2147483647) {
    throw new JobProblem(400, `dbUnitNm ${options.dbUnitNm} is too small for this ${layout.n}² layout: coordinates would not fit 32-bit integers`, { dbUnitNm: 'choose a larger database unit' });
  }
  const smallest = Math.min(...layout.library.atoms.filter((a) => a.shape !== 'empty').map((a) => Math.min(a.width, a.length)));
  if (smallest / dbu < 1) throw new JobProblem(400, `dbUnitNm ${options.dbUnitNm} is larger than the smallest pillar side`, { dbUnitNm: 'choose a smaller database unit' });
  const out = createWriteStream(outFile);
  let bytes = 0;
  for (const chunk of gdsiiChunks({ ...layout, layer: options.layer, datatype: options.datatype, databaseUnit: dbu, usedAtomsOnly: true })) {
    bytes += chunk.length;
    if (!out.write(chunk)) await once(out, 'drain');
  }
  out.end();
  await once(out, 'finish');
  return bytes;
}

export default async function layoutTask(job: LayoutJob): Promise<LayoutJobResult> {
  try {
    let layout = cache.get(job.key);
    if (!layout) {
      if (!job.data) return { ok: 'need-data' };
      layout = decodeLayout(job.runId, job.data);
    }
    cache.delete(job.key);
    cache.set(job.key, layout);
    while (cache.size > CACHE_ENTRIES) cache.delete(cache.keys().next().value!);
    if (job.kind === 'region') return { ok: true, region: region(layout, job.x0, job.y0, job.size) };
    if (job.kind === 'check') return { ok: true, check: fullCheck(layout) };
    return { ok: true, gdsBytes: await writeGds(layout, job.options, job.outFile) };
  } catch (error) {
    if (error instanceof JobProblem) return { ok: false, status: error.status, message: error.message, details: error.details };
    if (error instanceof RangeError || error instanceof SyntaxError) {
      return { ok: false, status: 409, message: `Run ${job.runId}'s stored layout files cannot be read (${error.message}); start the revision again` };
    }
    throw error;
  }
}
