import { literal, Op, type OrderItem, type Transaction, type WhereOptions } from 'sequelize';
import type { Design } from '../../../shared/schemas/design';
import type { ListRunsQuery, RunDetail, RunHeadline, RunSummary } from '../../../shared/schemas/runs';
import type { AppContext } from '../../context';
import { AppError } from '../../lib/app-error';
import { withRunSlot } from '../quotas/quota.service';
import { uploadIdsOf } from '../revisions/design-assets';
import { findRevision } from '../revisions/revision.service';
import { touchProject } from '../projects/project.model';
import { UploadModel } from '../uploads/upload.model';
import { UserModel } from '../users/user.model';
import { findArtifact, listArtifacts } from './run-artifacts';
import { RunArtifactModel, RunEventModel, RunModel } from './run.model';

const EMPTY_HEADLINE: RunHeadline = { efficiencyA: null, efficiencyB: null, crosstalkDb: null, zeroOrder: null };
const SUMMARY_ATTRIBUTES = { exclude: ['convergence', 'metrics', 'plots'] };
const includes = [
  { association: 'revision', attributes: ['id', 'number'] },
  { model: UserModel, as: 'startedBy', attributes: ['id', 'name'] },
];

const iso = (d: Date | null | undefined) => (d ? d.toISOString() : null);

type SummaryColumns = 'id' | 'status' | 'progress' | 'stage' | 'attempts' | 'error' | 'queuedAt' | 'startedAt' | 'finishedAt' | 'durationMs' | 'headline' | 'filesDeletedAt';

/**
 * A run as `listRuns` reads it: the row's plain values with the included columns nested (`raw`, `nest`), no
 * model instances — building those costs about as much CPU as the rest of the request. A run nobody
 * started has `startedBy` all null.
 */
type RunListRow = Pick<RunModel, SummaryColumns> & {
  revision: { number: number };
  startedBy: { id: number; name: string } | { id: null; name: null };
};

function toSummary(run: RunModel | RunListRow): RunSummary {
  const startedBy = run.startedBy;
  return {
    id: run.id,
    revisionNumber: run.revision!.number,
    status: run.status,
    progress: run.progress,
    stage: run.stage,
    attempts: run.attempts,
    error: run.error ?? null,
    startedBy: startedBy && startedBy.id !== null ? { id: startedBy.id, name: startedBy.name } : null,
    queuedAt: run.queuedAt.toISOString(),
    startedAt: iso(run.startedAt),
    finishedAt: iso(run.finishedAt),
    durationMs: run.durationMs ?? null,
    headline: run.headline ?? EMPTY_HEADLINE,
    filesDeletedAt: iso(run.filesDeletedAt),
  };
}

/** The run `runId` of the project (for routes that need its row), or 404. */
export async function findRun(projectId: number, runId: number): Promise<RunModel> {
  const run = await RunModel.findOne({ where: { id: runId, projectId }, include: includes });
  if (!run) throw new AppError(404, `This project has no run ${runId}`);
  return run;
}

export async function getRun(projectId: number, runId: number): Promise<RunDetail> {
  const run = await findRun(projectId, runId);
  const events = await RunEventModel.findAll({ where: { runId }, attributes: ['at', 'status', 'stage', 'message'], order: [['at', 'ASC'], ['id', 'ASC']], raw: true });
  return {
    ...toSummary(run),
    convergence: run.convergence ?? { a: [], b: [] },
    metrics: run.metrics ?? null,
    plots: run.plots ?? null,
    events: events.map((e) => ({ at: e.at.toISOString(), status: e.status, stage: e.stage, message: e.message })),
    artifacts: await listArtifacts(runId),
  };
}

/** Polling-friendly view of a run without its large JSON columns. */
export async function getRunSummary(projectId: number, runId: number): Promise<RunSummary> {
  const run = await RunModel.findOne({ where: { id: runId, projectId }, attributes: SUMMARY_ATTRIBUTES, include: includes });
  if (!run) throw new AppError(404, `This project has no run ${runId}`);
  return toSummary(run);
}

const SORT_COLUMNS: Record<ListRunsQuery['sort'], string | ReturnType<typeof literal>> = {
  queuedAt: 'queuedAt',
  durationMs: 'durationMs',
  status: 'status',
  revisionNumber: literal('`revision`.`number`'),
};

export async function listRuns(projectId: number, query: ListRunsQuery): Promise<RunSummary[]> {
  const where: WhereOptions[] = [{ projectId }];
  if (query.status !== 'all') where.push({ status: query.status });
  if (query.revision !== undefined) where.push({ '$revision.number$': query.revision });
  const dir = query.dir.toUpperCase();
  const runs = await RunModel.findAll({
    where: { [Op.and]: where },
    attributes: SUMMARY_ATTRIBUTES,
    include: includes,
    order: [[SORT_COLUMNS[query.sort], dir] as OrderItem, ['id', dir]],
    limit: 500,
    raw: true,
    nest: true,
  });
  return (runs as unknown as RunListRow[]).map(toSummary);
}

/**
 * Queues a run of revision `number`; the queue picks it up off the request thread. 429 past the person's
 * or the project's limit of runs at once, 413 while the project's storage is full (quota.service.ts).
 */
export async function startRun(ctx: AppContext, projectId: number, number: number, userId: number): Promise<RunDetail> {
  const revision = await findRevision(projectId, number);
  const missing = await deletedUploadsOf(projectId, JSON.parse(revision.design) as Design);
  if (missing) throw new AppError(409, `Revision ${number} ${missing}`);
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
  if (run.status !== 'queued' && run.status !== 'running') throw new AppError(409, `This run has already finished (${run.status}); there is nothing to cancel`);
  if (!(await ctx.runQueue.cancel(runId))) {
    const now = await findRun(projectId, runId);
    throw new AppError(409, `This run finished (${now.status}) before it could be cancelled`);
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
    throw new AppError(409, `Run ${runId} is ${run.status}; cancel it or wait for it to finish before deleting its files`);
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
    const why = run.filesDeletedAt ? ' (its files were deleted)' : run.status === 'succeeded' ? '' : ` (the run is ${run.status})`;
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
