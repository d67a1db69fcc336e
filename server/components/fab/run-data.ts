/**
 * What the layout preview, the design check and the fab package read back from a finished run's stored
 * artifacts: the atom index and rotation arrays (decoded with npy-decode.ts), the atom library (atoms.csv),
 * the design (design.json, whose designRules are the project's rules at run time) and drc.json.
 */
import { Readable } from 'node:stream';
import { parseAtomLibraryCsv, type AtomLibrary } from '../../../shared/optics/atoms';
import { checkDesignRules, type DrcKind } from '../../../shared/optics/drc';
import { decodeNpy } from '../../../shared/optics/npy-decode';
import type { Design } from '../../../shared/schemas/design';
import type { DesignRuleViolationView, ProjectDesignRules, RunDesignCheck } from '../../../shared/schemas/fab';
import { violationView } from '../../cli/drc-record';
import { AppError } from '../../lib/app-error';
import { findArtifact } from '../runs/run-artifacts';
import { RunArtifactChunkModel } from '../runs/run.model';
import type { RunModel } from '../runs/run.model';
import { UserModel } from '../users/user.model';
import { ExportOverrideModel } from './fab.model';

/** Yields an artifact's stored chunks in order, one in memory at a time. */
export async function* artifactChunks(artifactId: number): AsyncGenerator<Buffer> {
  const chunks = await RunArtifactChunkModel.findAll({ where: { artifactId }, attributes: ['id'], order: [['seq', 'ASC']] });
  for (const { id } of chunks) {
    const chunk = await RunArtifactChunkModel.findByPk(id, { attributes: ['bytes'] });
    if (!chunk) throw new Error(`artifact chunk ${id} disappeared while reading`);
    yield chunk.bytes;
  }
}

export function artifactStream(artifactId: number): Readable {
  return Readable.from(artifactChunks(artifactId), { objectMode: false });
}

/** The whole artifact in one buffer (arrays and small records only), or null when the run lacks it. */
export async function readArtifact(runId: number, name: string): Promise<Buffer | null> {
  const artifact = await findArtifact(runId, name);
  if (!artifact) return null;
  const parts: Buffer[] = [];
  for await (const chunk of artifactChunks(artifact.id)) parts.push(chunk);
  return Buffer.concat(parts);
}

async function requiredArtifact(run: RunModel, name: string): Promise<Buffer> {
  const bytes = await readArtifact(run.id, name);
  if (!bytes) throw new AppError(409, `Run ${run.id} has no ${name}; start the run again to produce it`);
  return bytes;
}

/** A finished run's layout as the GDSII writer and the design-rule check take it (lengths in metres). */
export interface RunLayout {
  runId: number;
  n: number;
  period: number;
  atomIndex: Int32Array;
  theta: Float64Array;
  library: AtomLibrary;
  design: Design;
}

export function requireSucceeded(run: RunModel): void {
  if (run.status !== 'succeeded') {
    throw new AppError(409, `Run ${run.id} is ${run.status}; only a run that succeeded has a layout to show or export`);
  }
  if (run.filesDeletedAt) {
    throw new AppError(409, `The files of run ${run.id} were deleted; start the revision again to lay it out, check it or export it`);
  }
}

/** The last few layouts read (artifacts never change after a run succeeded); two 2048² layouts are ~100 MB. */
const cache = new Map<number, RunLayout>();
const CACHE_ENTRIES = 2;

export async function loadRunLayout(run: RunModel): Promise<RunLayout> {
  requireSucceeded(run);
  const cached = cache.get(run.id);
  if (cached) {
    cache.delete(run.id);
    cache.set(run.id, cached);
    return cached;
  }
  const design = JSON.parse((await requiredArtifact(run, 'design.json')).toString('utf8')) as Design;
  const { library } = parseAtomLibraryCsv((await requiredArtifact(run, 'atoms.csv')).toString('utf8'));
  const index = decodeNpy(new Uint8Array(await requiredArtifact(run, 'atom_index.npy')));
  const theta = decodeNpy(new Uint8Array(await requiredArtifact(run, 'theta.npy')));
  const n = design.setup.cells;
  const square = (shape: number[]) => shape.length === 2 && shape[0] === n && shape[1] === n;
  if (!square(index.shape) || !square(theta.shape) || !(index.data instanceof Int32Array) || !(theta.data instanceof Float64Array)) {
    throw new AppError(409, `Run ${run.id}'s atom_index.npy / theta.npy are not int32 / float64 ${n}×${n} arrays`);
  }
  const layout: RunLayout = { runId: run.id, n, period: design.setup.periodNm * 1e-9, atomIndex: index.data, theta: theta.data, library, design };
  cache.set(run.id, layout);
  while (cache.size > CACHE_ENTRIES) cache.delete(cache.keys().next().value!);
  return layout;
}

export const rulesInMetres = (r: ProjectDesignRules) => ({ minGap: r.minGapNm * 1e-9, minFeature: r.minFeatureNm * 1e-9, maxAspectRatio: r.maxAspectRatio });

/**
 * Violations with at least one cell in the region [x0, x0+w) × [y0, y0+h), recomputed exactly: the check runs
 * on the region plus a one-cell margin, so pairs across the region's edge are found as in the whole layout.
 */
export function regionViolations(layout: RunLayout, rules: ProjectDesignRules, x0: number, y0: number, w: number, h: number): DesignRuleViolationView[] {
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

interface StoredDrc {
  rules: ProjectDesignRules;
  counts: Record<DrcKind, number>;
  total: number;
  truncated: boolean;
  closestGapNm: number | null;
  violations: DesignRuleViolationView[];
}

/** drc.json of the run; for a run from before drc.json existed, the check is run again on its arrays. */
async function storedDrc(run: RunModel): Promise<StoredDrc> {
  const bytes = await readArtifact(run.id, 'drc.json');
  if (bytes) return JSON.parse(bytes.toString('utf8')) as StoredDrc;
  const layout = await loadRunLayout(run);
  const rules = layout.design.designRules;
  const report = checkDesignRules(layout, rulesInMetres(rules), { maxViolations: 200 });
  const total = report.counts.gap + report.counts.feature + report.counts['aspect-ratio'];
  return {
    rules,
    counts: report.counts,
    total,
    truncated: report.truncated,
    closestGapNm: report.closestGap === null ? null : report.closestGap * 1e9,
    violations: report.violations.map(violationView),
  };
}

export async function listOverrides(runId: number) {
  const rows = await ExportOverrideModel.findAll({
    where: { runId },
    include: [{ model: UserModel, as: 'user', attributes: ['id', 'name'] }],
    order: [['at', 'ASC'], ['id', 'ASC']],
  });
  return rows;
}

/** The run's design-rule result with the owners' overrides; export is allowed when clean or overridden. */
export async function designCheckOf(run: RunModel): Promise<RunDesignCheck & { latestOverrideId: number | null }> {
  requireSucceeded(run);
  const drc = await storedDrc(run);
  const overrides = await listOverrides(run.id);
  const latest = overrides.at(-1) ?? null;
  return {
    rules: drc.rules,
    counts: drc.counts,
    total: drc.total,
    truncated: drc.truncated,
    closestGapNm: drc.closestGapNm,
    violations: drc.violations,
    overrides: overrides.map((o) => ({ id: o.id, reason: o.reason, at: o.at.toISOString(), by: o.user ? { id: o.user.id, name: o.user.name } : null })),
    exportAllowed: drc.total === 0 || latest !== null,
    latestOverrideId: latest?.id ?? null,
  };
}
