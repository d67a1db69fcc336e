/**
 * What one person and one project may make the server do: queued + running runs, tolerance studies and
 * library builds (RUNS_PER_USER, RUNS_PER_PROJECT), stored bytes (PROJECT_STORAGE_MB: uploads + run files) and
 * the memory one run may take (RUN_MEMORY_BUDGET_MB).
 *
 * Counting and inserting happen in one transaction that first locks the person's row and then the project's
 * (always in that order, so two such transactions never wait on each other crosswise) and reads at READ
 * COMMITTED: a second request for the same person or project waits for the first to commit and then counts
 * its insert, so two simultaneous requests can never both slip under a limit.
 */
import { QueryTypes, Transaction } from 'sequelize';
import type { AppConfig } from '../../config';
import type { AppContext } from '../../context';
import { AppError } from '../../lib/app-error';
import { ProjectModel } from '../projects/project.model';
import { UserModel } from '../users/user.model';
import { retryOnDeadlock } from '../../db/retry';
import { estimateRunMemory, type MemoryDesign, type RunMemoryEstimate } from '../../../shared/optics/run-memory';

const MIB = 1024 * 1024;

/** Bytes a project may store under PROJECT_STORAGE_MB. */
export const storageQuotaBytes = (config: Pick<AppConfig, 'PROJECT_STORAGE_MB'>) => Math.floor(config.PROJECT_STORAGE_MB * MIB);

/** Example: 1536 → '1.5 KiB'; 3 * 1024 ** 3 → '3 GiB'. */
export function formatBytes(bytes: number): string {
  const units = ['bytes', 'KiB', 'MiB', 'GiB', 'TiB'];
  let value = bytes;
  let unit = 0;
  while (value >= 1024 && unit < units.length - 1) {
    value /= 1024;
    unit += 1;
  }
  return `${unit === 0 ? value : Number(value.toFixed(1))} ${units[unit]}`;
}

/** Locks the person's row, then the project's, for the rest of `transaction`. */
async function lockOwners(userId: number | null, projectId: number, transaction: Transaction) {
  if (userId !== null) await UserModel.findByPk(userId, { attributes: ['id'], lock: transaction.LOCK.UPDATE, transaction });
  await ProjectModel.findByPk(projectId, { attributes: ['id'], lock: transaction.LOCK.UPDATE, transaction });
}

const ACTIVE = `('queued', 'running')`;

/** Queued + running runs, tolerance studies and library builds of a person (over all projects) and of a project. */
async function activeWork(userId: number, projectId: number, transaction?: Transaction): Promise<{ user: number; project: number }> {
  const [row] = await ProjectModel.sequelize!.query<{ user: number | string; project: number | string }>(
    `SELECT
       (SELECT COUNT(*) FROM runs WHERE started_by_id = :userId AND status IN ${ACTIVE})
     + (SELECT COUNT(*) FROM tolerance_studies WHERE started_by_id = :userId AND status IN ${ACTIVE})
     + (SELECT COUNT(*) FROM library_builds WHERE created_by_id = :userId AND status IN ${ACTIVE}) AS user,
       (SELECT COUNT(*) FROM runs WHERE project_id = :projectId AND status IN ${ACTIVE})
     + (SELECT COUNT(*) FROM tolerance_studies s JOIN runs r ON r.id = s.run_id WHERE r.project_id = :projectId AND s.status IN ${ACTIVE})
     + (SELECT COUNT(*) FROM library_builds WHERE project_id = :projectId AND status IN ${ACTIVE}) AS project`,
    { replacements: { userId, projectId }, type: QueryTypes.SELECT, transaction },
  );
  return { user: Number(row.user), project: Number(row.project) };
}

/** Bytes the project stores: its uploads and the files of its runs. */
async function storedBytes(projectId: number, transaction?: Transaction): Promise<number> {
  const [row] = await ProjectModel.sequelize!.query<{ uploads: number | string | null; runs: number | string | null }>(
    `SELECT
       (SELECT SUM(size) FROM uploads WHERE project_id = :projectId) AS uploads,
       (SELECT SUM(a.size) FROM run_artifacts a JOIN runs r ON r.id = a.run_id WHERE r.project_id = :projectId) AS runs`,
    { replacements: { projectId }, type: QueryTypes.SELECT, transaction },
  );
  return Number(row.uploads ?? 0) + Number(row.runs ?? 0);
}

function storageUse(config: Pick<AppConfig, 'PROJECT_STORAGE_MB'>, used: number): string {
  return `This project stores ${formatBytes(used)} of its ${formatBytes(storageQuotaBytes(config))} quota (PROJECT_STORAGE_MB = ${config.PROJECT_STORAGE_MB})`;
}

const fits = (config: Pick<AppConfig, 'PROJECT_STORAGE_MB'>, used: number, adding: number) => used + adding <= storageQuotaBytes(config);

/**
 * Keeps a finished run's files (`adding` bytes) in the project's storage only when they fit its quota: under
 * the project's lock (as uploads and run starts take it), checks the room and runs `createRows`, which
 * creates the files' rows with their sizes, so two runs finishing at once, or a run and an upload, cannot
 * both take the same room. The message the run fails with when they do not fit (nothing created), else the rows.
 */
export async function reserveRunFiles<T>(
  config: Pick<AppConfig, 'PROJECT_STORAGE_MB'>,
  projectId: number,
  adding: number,
  createRows: (transaction: Transaction) => Promise<T>,
): Promise<{ refusal: string } | { rows: T }> {
  return retryOnDeadlock(() => ProjectModel.sequelize!.transaction({ isolationLevel: Transaction.ISOLATION_LEVELS.READ_COMMITTED }, async (transaction) => {
    await lockOwners(null, projectId, transaction);
    const used = await storedBytes(projectId, transaction);
    if (!fits(config, used, adding)) {
      return { refusal: `${storageUse(config, used)}; this run's files (${formatBytes(adding)}) do not fit, so they were not kept. Delete uploads or the files of old runs, then start the run again.` };
    }
    return { rows: await createRows(transaction) };
  }));
}

/** 413 unless `adding` more bytes fit the project's storage quota. */
function requireRoom(config: AppConfig, used: number, adding: number, what: string) {
  if (fits(config, used, adding)) return;
  throw new AppError(413, `${storageUse(config, used)}; ${what} does not fit. Delete uploads or the files of old runs (on the run's page), then try again.`, {
    storage: `${formatBytes(used)} of ${formatBytes(storageQuotaBytes(config))} used`,
  });
}

/** The quota checked without a lock, before a file is decoded: a full project refuses at once (413), cheaply. */
export async function requireStorageRoom(config: AppConfig, projectId: number, bytes: number, what: string): Promise<void> {
  requireRoom(config, await storedBytes(projectId), bytes, what);
}

/**
 * Runs `insert` (which stores `bytes` more in the project) inside a transaction that holds the project's
 * lock, after checking the storage quota; 413 naming the quota when they do not fit.
 */
export async function withStorage<T>(ctx: AppContext, projectId: number, bytes: number, what: string, insert: (transaction: Transaction) => Promise<T>): Promise<T> {
  return retryOnDeadlock(() => ctx.sequelize.transaction({ isolationLevel: Transaction.ISOLATION_LEVELS.READ_COMMITTED }, async (transaction) => {
    await lockOwners(null, projectId, transaction);
    requireRoom(ctx.config, await storedBytes(projectId, transaction), bytes, what);
    return insert(transaction);
  }));
}

/**
 * Runs `insert` (which queues one run, tolerance study or library build for the person in the project) only while both
 * stay under their limits; 429 naming the limit and its variable otherwise. `needsStorage`: a run, which
 * stores files, is refused (413) while the project's storage quota is already used up.
 */
export async function withRunSlot<T>(
  ctx: AppContext,
  slot: { userId: number; projectId: number; needsStorage: boolean },
  insert: (transaction: Transaction) => Promise<T>,
): Promise<T> {
  const { config } = ctx;
  return retryOnDeadlock(() => ctx.sequelize.transaction({ isolationLevel: Transaction.ISOLATION_LEVELS.READ_COMMITTED }, async (transaction) => {
    await lockOwners(slot.userId, slot.projectId, transaction);
    const active = await activeWork(slot.userId, slot.projectId, transaction);
    if (active.user >= config.RUNS_PER_USER) {
      throw new AppError(
        429,
        `You already have ${active.user} runs, tolerance studies and library builds queued or running, the most one person may have at once (RUNS_PER_USER = ${config.RUNS_PER_USER}). Wait for one to finish or cancel one, then start again.`,
      );
    }
    if (active.project >= config.RUNS_PER_PROJECT) {
      throw new AppError(
        429,
        `This project already has ${active.project} runs, tolerance studies and library builds queued or running, the most one project may have at once (RUNS_PER_PROJECT = ${config.RUNS_PER_PROJECT}). Wait for one to finish or cancel one, then start again.`,
      );
    }
    if (slot.needsStorage) requireRoom(config, await storedBytes(slot.projectId, transaction), 1, 'a new run’s files');
    return insert(transaction);
  }));
}

/** The message of a run or study stopped at RUN_TIME_LIMIT_MINUTES. */
export function timeLimitMessage(what: 'run' | 'study', minutes: number): string {
  return (
    `The ${what} was stopped after the time limit of ${minutes} minute${minutes === 1 ? '' : 's'} (RUN_TIME_LIMIT_MINUTES). ` +
    'Make the design smaller (fewer cells or iterations), or ask your administrator to raise the limit.'
  );
}

/**
 * Why a design may not run under a memory budget of `budgetMb` MiB (RUN_MEMORY_BUDGET_MB), naming its estimated
 * peak (shared/optics/run-memory.ts, with tile pyramids up to `tilesMaxSide`) and the budget; null when it fits.
 * `job` 'study': a bias and detuning sweep of a finished run of `design`, which takes less than the run itself
 * (measured by `npm run bench:large`), so the run's estimate bounds it.
 */
export function memoryBudgetRefusal(design: MemoryDesign, budgetMb: number, tilesMaxSide: number, job: 'run' | 'study' = 'run'): string | null {
  return overBudget(estimateRunMemory(design, { tilesMaxSide }), budgetMb, job);
}

/** The refusal's words for an estimate over `budgetMb`, or null when it fits. */
function overBudget(estimate: RunMemoryEstimate, budgetMb: number, job: 'run' | 'study'): string | null {
  if (estimate.mib <= budgetMb) return null;
  const parts = estimate.parts.map((p) => `${p.what} ${Math.ceil(p.bytes / MIB)} MiB`).join(', ');
  if (job === 'study') {
    return (
      `A bias and detuning sweep of this run needs up to an estimated ${estimate.mib} MiB of memory, as the run did (${parts}), ` +
      `more than the ${budgetMb} MiB a run may now use on this server (RUN_MEMORY_BUDGET_MB). ` +
      'Ask your administrator to raise the budget, or sweep a run of a design with fewer cells.'
    );
  }
  return (
    `This design needs an estimated ${estimate.mib} MiB of memory to run (${parts}), ` +
    `more than the ${budgetMb} MiB a run may use on this server (RUN_MEMORY_BUDGET_MB). ` +
    'Choose fewer cells (or padding 1 for beams and image planes at a distance), or ask your administrator to raise the budget.'
  );
}

/** 413 naming the estimate and the budget when the design does not fit RUN_MEMORY_BUDGET_MB. */
export function requireMemoryBudget(config: Pick<AppConfig, 'RUN_MEMORY_BUDGET_MB' | 'PREVIEW_TILES_MAX_SIDE'>, design: MemoryDesign, job: 'run' | 'study' = 'run'): void {
  const estimate = estimateRunMemory(design, { tilesMaxSide: config.PREVIEW_TILES_MAX_SIDE });
  const refusal = overBudget(estimate, config.RUN_MEMORY_BUDGET_MB, job);
  if (refusal) throw new AppError(413, refusal, { estimatedMiB: String(estimate.mib), budgetMiB: String(config.RUN_MEMORY_BUDGET_MB) });
}
