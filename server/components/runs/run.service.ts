import type { Transaction } from 'sequelize';
import type { Design } from '../../../shared/schemas/design';
import { FINISHED_STATUSES, type ListRunsQuery, type RunDetail, type RunHeadline, type RunSummary } from '../../../shared/schemas/runs';
import type { AppContext } from '../../context';
import { jsonColumn, jsonColumnText, select } from '../../db/select';
import { AppError } from '../../lib/app-error';
import { requireMemoryBudget, withRunSlot } from '../quotas/quota.service';
import { uploadIdsOf } from '../revisions/design-assets';
import { findRevision } from '../revisions/revision.service';
import { touchProject } from '../projects/project.model';
import { UploadModel } from '../uploads/upload.model';
import { UserModel } from '../users/user.model';
import { findArtifact, listArtifacts } from './run-artifacts';
import { keepRunDetail, keptRunDetail, runAnswerOf, runDetailWrites } from './run-detail-cache';
import { RunArtifactModel, RunEventModel, RunModel } from './run.model';
import { runStatusName, runStatusPhrase } from '../../../shared/display-names';

const EMPTY_HEADLINE: RunHeadline = { efficiencyA: null, efficiencyB: null, crosstalkDb: null, zeroOrder: null };
const includes = [
  { association: 'revision', attributes: ['id', 'number'] },
  { model: UserModel, as: 'startedBy', attributes: ['id', 'name'] },
];

const iso = (d: Date | null | undefined) => (d ? d.toISOString() : null);

/**
 * The columns of a run's summary as `select` reads them: the row's plain values with its revision's number
 * and its starter's name joined in, no model instances — building those costs several times what the rest of
 * the request does. A run nobody started has `startedById` null.
 */
interface RunSummaryRow {
  id: number;
  status: RunSummary['status'];
  progress: number;
  stage: string;
  attempts: number;
  error: string | null;
  queuedAt: Date;
  startedAt: Date | null;
  finishedAt: Date | null;
  durationMs: number | null;
  headline: unknown;
  filesDeletedAt: Date | null;
  revisionNumber: number;
  startedById: number | null;
  startedByName: string | null;
}

const SUMMARY_SELECT = `SELECT r.id, r.status, r.progress, r.stage, r.attempts, r.error, r.queued_at AS queuedAt,
  r.started_at AS startedAt, r.finished_at AS finishedAt, r.duration_ms AS durationMs, r.headline,
  r.files_deleted_at AS filesDeletedAt, v.number AS revisionNumber, u.id AS startedById, u.name AS startedByName`;
const SUMMARY_FROM = `FROM runs r JOIN revisions v ON v.id = r.revision_id LEFT JOIN users u ON u.id = r.started_by_id`;

function toSummary(run: RunSummaryRow): RunSummary {
  return {
    id: run.id,
    revisionNumber: run.revisionNumber,
    status: run.status,
    progress: run.progress,
    stage: run.stage,
    attempts: run.attempts,
    error: run.error ?? null,
    startedBy: run.startedById !== null ? { id: run.startedById, name: run.startedByName ?? '' } : null,
    queuedAt: run.queuedAt.toISOString(),
    startedAt: iso(run.startedAt),
    finishedAt: iso(run.finishedAt),
    durationMs: run.durationMs ?? null,
    headline: jsonColumn<RunHeadline>(run.headline) ?? EMPTY_HEADLINE,
    filesDeletedAt: iso(run.filesDeletedAt),
  };
}

/** The run `runId` of the project (for routes that need its row), or 404. */
export async function findRun(projectId: number, runId: number): Promise<RunModel> {
  const run = await RunModel.findOne({ where: { id: runId, projectId }, include: includes });
  if (!run) throw new AppError(404, `This project has no run ${runId}`);
  return run;
}

/** The run's `updated_at` (ms), or null when the project has no such run. */
async function runStamp(projectId: number, runId: number): Promise<number | null> {
  const [row] = await select<{ updatedAt: Date }>('SELECT updated_at AS updatedAt FROM runs WHERE id = ? AND project_id = ?', [runId, projectId]);
  return row ? row.updatedAt.getTime() : null;
}

/** A finished run's detail kept in memory (run-detail-cache.ts), its stamp checked when due; null: read it. */
function keptDetail(projectId: number, runId: number) {
  return keptRunDetail(projectId, runId, () => runStamp(projectId, runId));
}

/** A run's detail (RunDetail) as JSON text, for the routes that send it as it is. */
export async function getRunJson(projectId: number, runId: number): Promise<string> {
  return (await keptDetail(projectId, runId))?.text ?? readRunJson(projectId, runId);
}

/** The run route's answer `{"run":…}` as bytes: a finished run's from memory after its first read. */
export async function getRunAnswer(projectId: number, runId: number): Promise<Buffer> {
  const kept = await keptDetail(projectId, runId);
  return kept ? runAnswerOf(kept) : Buffer.from(`{"run":${await readRunJson(projectId, runId)}}`);
}

/** Reads a run's detail from the database; a finished run's is kept (run-detail-cache.ts) under the `updated_at` read with it. */
async function readRunJson(projectId: number, runId: number): Promise<string> {
  const writesBefore = runDetailWrites();
  const [run] = await select<RunSummaryRow & { updatedAt: Date }>(`${SUMMARY_SELECT}, r.updated_at AS updatedAt ${SUMMARY_FROM} WHERE r.id = ? AND r.project_id = ?`, [runId, projectId]);
  if (!run) throw new AppError(404, `This project has no run ${runId}`);
  const [large, events, artifacts] = await Promise.all([
    select<{ convergence: unknown; metrics: unknown; plots: unknown }>('SELECT convergence, metrics, plots FROM runs WHERE id = ?', [runId]).then(
      ([row]) => `"convergence":${jsonColumnText(row?.convergence, '{"a":[],"b":[]}')},"metrics":${jsonColumnText(row?.metrics, 'null')},"plots":${jsonColumnText(row?.plots, 'null')}`,
    ),
    select<{ at: Date; status: RunSummary['status']; stage: string; message: string }>('SELECT at, status, stage, message FROM run_events WHERE run_id = ? ORDER BY at ASC, id ASC', [runId]),
    // A run's files are shown only once it succeeded: never a partial set of a run still going or cut short.
    run.status === 'succeeded' ? listArtifacts(runId) : [],
  ]);
  const small = JSON.stringify({
    ...toSummary(run),
    events: events.map((e) => ({ at: e.at.toISOString(), status: e.status, stage: e.stage, message: e.message })),
    artifacts,
  });
  const text = `${small.slice(0, -1)},${large}}`;
  if (FINISHED_STATUSES.includes(run.status)) keepRunDetail(projectId, runId, run.updatedAt.getTime(), text, writesBefore);
  return text;
}

export async function getRun(projectId: number, runId: number): Promise<RunDetail> {
  return JSON.parse(await getRunJson(projectId, runId)) as RunDetail;
}

/** Polling-friendly view of a run without its large JSON columns. */
export async function getRunSummary(projectId: number, runId: number): Promise<RunSummary> {
  const [run] = await select<RunSummaryRow>(`${SUMMARY_SELECT} ${SUMMARY_FROM} WHERE r.id = ? AND r.project_id = ?`, [runId, projectId]);
  if (!run) throw new AppError(404, `This project has no run ${runId}`);
  return toSummary(run);
}

const SORT_COLUMNS: Record<ListRunsQuery['sort'], string> = {
  queuedAt: 'r.queued_at',
  durationMs: 'r.duration_ms',
  status: 'r.status',
  revisionNumber: 'v.number',
};

export async function listRuns(projectId: number, query: ListRunsQuery): Promise<RunSummary[]> {
  const where = ['r.project_id = ?'];
  const params: unknown[] = [projectId];
  if (query.status !== 'all') {
    where.push('r.status = ?');
    params.push(query.status);
  }
  if (query.revision !== undefined) {
    where.push('v.number = ?');
    params.push(query.revision);
  }
  // Both come from closed lists (the query schema), never from the request's text.
  const dir = query.dir === 'asc' ? 'ASC' : 'DESC';
  const rows = await select<RunSummaryRow>(
    `${SUMMARY_SELECT} ${SUMMARY_FROM} WHERE ${where.join(' AND ')} ORDER BY ${SORT_COLUMNS[query.sort]} ${dir}, r.id ${dir} LIMIT 500`,
    params,
  );
  return rows.map(toSummary);
}

/**
 * Queues a run of revision `number`; the queue picks it up off the request thread. 429 past the person's
 * or the project's limit of runs at once, 413 while the project's storage is full or when the design's estimated
 * memory exceeds RUN_MEMORY_BUDGET_MB (quota.service.ts).
 */
export async function startRun(ctx: AppContext, projectId: number, number: number, userId: number): Promise<RunDetail> {
  const revision = await findRevision(projectId, number);
  const design = JSON.parse(revision.design) as Design;
  const missing = await deletedUploadsOf(projectId, design);
  if (missing) throw new AppError(409, `Revision ${number} ${missing}`);
  requireMemoryBudget(ctx.config, design);
  const runId = await withRunSlot(ctx, { userId, projectId, needsStorage: true }, (transaction) => createQueuedRun(projectId, revision.id, userId, transaction));
  ctx.runQueue.enqueue(runId);
  return getRun(projectId, runId);
}

/**
 * What is wrong when a design names uploads the project no longer has (deleted since), or null. Example:
 * 'uses upload 12, which was deleted; choose another file in the design and save a new revision'.
 */
export async function deletedUploadsOf(projectId: number, design: Design): Promise<string | null> {
  const ids = uploadIdsOf(design);
  if (!ids.length) return null;
  return deletedUploadsMessage(ids, (await UploadModel.findAll({ where: { id: ids, projectId }, attributes: ['id'] })).map((u) => u.id));
}

/** `deletedUploadsOf` for uploads already read: `ids` the design names, `presentIds` those the project still has. */
export function deletedUploadsMessage(ids: number[], presentIds: number[]): string | null {
  const present = new Set(presentIds);
  const gone = ids.filter((id) => !present.has(id));
  if (!gone.length) return null;
  const which = gone.length === 1 ? `upload ${gone[0]}, which was` : `uploads ${gone.join(', ')}, which were`;
  return `uses ${which} deleted; choose another file in the design and save a new revision`;
}

/** Records a queued run of a revision; the caller hands it to the queue (or the next server start does). */
export async function createQueuedRun(projectId: number, revisionId: number, userId: number, transaction?: Transaction): Promise<number> {
  const run = await RunModel.create({ projectId, revisionId, startedById: userId, queuedAt: new Date(), stage: 'queued' }, { transaction });
  const by = await UserModel.findByPk(userId, { attributes: ['name'], transaction });
  await RunEventModel.create({ runId: run.id, status: 'queued', stage: 'queued', message: `queued by ${by?.name ?? 'someone'}`, at: new Date() }, { transaction });
  await touchProject(projectId, transaction);
  return run.id;
}

export async function cancelRun(ctx: AppContext, projectId: number, runId: number): Promise<RunDetail> {
  const run = await findRun(projectId, runId);
  if (run.status !== 'queued' && run.status !== 'running') throw new AppError(409, `This run has already ended (${runStatusName(run.status)}); there is nothing to cancel`);
  if (!(await ctx.runQueue.cancel(runId))) {
    const now = await findRun(projectId, runId);
    throw new AppError(409, `This run ended (${runStatusName(now.status)}) before it could be cancelled`);
  }
  return getRun(projectId, runId);
}

/**
 * Deletes the stored files of a finished run to free the project's storage; the run row, its metrics,
 * plots and events stay, and an event records who deleted them. 409 while the run is queued or running.
 */
export async function deleteRunFiles(ctx: AppContext, projectId: number, runId: number, userId: number): Promise<RunDetail> {
  const run = await findRun(projectId, runId);
  if (run.status === 'queued' || run.status === 'running') {
    throw new AppError(409, `Run ${runId} is ${runStatusPhrase(run.status)}; cancel it or wait for it to finish before deleting its files`);
  }
  if (!run.filesDeletedAt) {
    const by = await UserModel.findByPk(userId, { attributes: ['name'] });
    await ctx.sequelize.transaction(async (transaction) => {
      await RunArtifactModel.destroy({ where: { runId }, transaction });
      await RunModel.update({ filesDeletedAt: new Date(), filesDeletedById: userId }, { where: { id: runId }, transaction });
      await RunEventModel.create({ runId, status: run.status, stage: run.stage, message: `files deleted by ${by?.name ?? 'someone'}`, at: new Date() }, { transaction });
    });
  }
  return getRun(projectId, runId);
}

/** An artifact of a finished run with the download name `<project-slug>-r<revision>-run<id>-<name>`. */
export async function artifactForDownload(projectId: number, projectName: string, runId: number, name: string) {
  const run = await findRun(projectId, runId);
  const artifact = await findArtifact(runId, name);
  if (!artifact) {
    const why = run.filesDeletedAt ? ' (its files were deleted)' : run.status === 'succeeded' ? '' : ` (the run ${run.status === 'failed' || run.status === 'cancelled' ? 'was' : 'is'} ${runStatusPhrase(run.status)})`;
    throw new AppError(404, `Run ${runId} has no file "${name}"${why}`);
  }
  return { artifact, fileName: `${slugOf(projectName)}-r${run.revision!.number}-run${run.id}-${artifact.name}` };
}

/** Lower-case ASCII words joined by '-'. Example: 'Twin-image Tag (v2)' → 'twin-image-tag-v2'. */
export function slugOf(name: string): string {
  const slug = name
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, 60)
    .replace(/-+$/, '');
  return slug || 'project';
}
