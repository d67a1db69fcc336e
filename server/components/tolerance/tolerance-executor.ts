/**
 * Executes tolerance studies on the run queue's worker pool (run-queue.ts owns the pool and delegates here):
 * loads what a study needs from the database (the run's stored arrays, design.json, atoms.csv and the uploads
 * the design names), hands it to a worker thread (tolerance-task.ts), writes its progress at most every
 * `progressIntervalMs`, and stores the results. The study row is the source of truth: a server stop leaves a
 * running study as it is, and `recover()` at the next start queues it again (failed after three starts).
 */
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { MessageChannel } from 'node:worker_threads';
import type { Piscina } from 'piscina';
import type { Logger } from 'pino';
import { Op, type InferAttributes } from 'sequelize';
import { parseAtomLibraryCsv } from '../../../shared/optics/atoms';
import type { Design } from '../../../shared/schemas/design';
import type { ToleranceStatus } from '../../../shared/schemas/tolerance';
import { workerFile } from '../../lib/worker-pool';
import { memoryBudgetRefusal, timeLimitMessage } from '../quotas/quota.service';
import { uploadIdsOf } from '../revisions/design-assets';
import { findArtifact } from '../runs/run-artifacts';
import { RunArtifactChunkModel, RunModel } from '../runs/run.model';
import { UploadModel } from '../uploads/upload.model';
import { TOLERANCE_ARRAYS, type ToleranceArrayName, type ToleranceMessage, type ToleranceTask, type ToleranceTaskResult } from './tolerance-task';
import { ToleranceStudyModel } from './tolerance.model';

const TASK_FILE = workerFile('tolerance-task', import.meta.url);
const MAX_ATTEMPTS = 3;
const INTERNAL_FAILURE = 'The study stopped on an internal error of the server (it has been logged). Start it again; if it fails again, tell your administrator.';

/** A design problem the designer can act on, not an internal failure. */
class StudyInputError extends Error {}

export interface ToleranceExecutor {
  enqueue(studyId: number): void;
  /** Studies left queued or running by a previous process: queued again (failed after too many starts). */
  recover(): Promise<void>;
  /** Aborts running studies (they stay 'running' for the next start) and waits for their handling. */
  stop(): Promise<void>;
}

async function transition(id: number, from: ToleranceStatus[], values: Partial<InferAttributes<ToleranceStudyModel>>): Promise<boolean> {
  const [count] = await ToleranceStudyModel.update(values, { where: { id, status: { [Op.in]: from } } });
  return count > 0;
}

/** The bytes of a run's stored file, or a StudyInputError naming it. */
async function artifactBytes(runId: number, name: string): Promise<Buffer> {
  const artifact = await findArtifact(runId, name);
  if (!artifact) throw new StudyInputError(`run ${runId} has no stored ${name}; run the revision again to make a study possible`);
  const chunks = await RunArtifactChunkModel.findAll({ where: { artifactId: artifact.id }, order: [['seq', 'ASC']] });
  return Buffer.concat(chunks.map((c) => c.bytes));
}

/** The design as the run used it (its stored design.json). */
async function runDesignOf(study: ToleranceStudyModel): Promise<Design> {
  return JSON.parse((await artifactBytes(study.runId, 'design.json')).toString('utf8')) as Design;
}

async function loadTask(study: ToleranceStudyModel, projectId: number, design: Design): Promise<Omit<ToleranceTask, 'port' | 'workDir'>> {
  const ids = uploadIdsOf(design);
  const uploads = ids.length ? await UploadModel.findAll({ where: { id: { [Op.in]: ids }, projectId }, attributes: ['id', 'name', 'mime', 'bytes'] }) : [];
  let atomLibrary: ToleranceTask['atomLibrary'] = null;
  if (design.atomLibrary.source === 'library') {
    const parsed = parseAtomLibraryCsv((await artifactBytes(study.runId, 'atoms.csv')).toString('utf8'));
    if (parsed.issues.some((i) => i.severity === 'error')) throw new StudyInputError(`the atom library stored with run ${study.runId} cannot be read back`);
    atomLibrary = { id: design.atomLibrary.id, library: parsed.library };
  }
  const arrays = {} as Record<ToleranceArrayName, Uint8Array>;
  for (const name of TOLERANCE_ARRAYS) arrays[name] = new Uint8Array(await artifactBytes(study.runId, name));
  return {
    studyId: study.id,
    design,
    uploads: uploads.map((u) => ({ id: u.id, name: u.name, mime: u.mime, bytes: new Uint8Array(u.bytes) })),
    atomLibrary,
    arrays,
    request: study.request,
  };
}

export function createToleranceExecutor(options: {
  logger: Logger;
  /** The run pool while it accepts work, null otherwise. */
  pool: () => Piscina | null;
  progressIntervalMs: number;
  /** Longest a study may run once started (RUN_TIME_LIMIT_MINUTES); null: no limit. */
  timeLimitMs: number | null;
  /** RUN_MEMORY_BUDGET_MB of this worker (a study queued under a larger one fails here); absent: none. */
  memoryBudgetMb?: number;
  /** PREVIEW_TILES_MAX_SIDE, for the run's estimate. */
  tileSide?: number;
}): ToleranceExecutor {
  const { logger } = options;
  const active = new Map<number, AbortController>();
  const settling = new Set<Promise<void>>();
  let submitting: Promise<void> = Promise.resolve();

  async function fail(id: number, message: string) {
    const study = await ToleranceStudyModel.findByPk(id, { attributes: ['id'] });
    if (study) await transition(id, ['queued', 'running'], { status: 'failed', error: message, finishedAt: new Date() });
  }

  async function execute(studyId: number) {
    if (!options.pool() || active.has(studyId)) return;
    const study = await ToleranceStudyModel.findByPk(studyId);
    if (!study || study.status !== 'queued') return;
    const run = await RunModel.findByPk(study.runId, { attributes: ['projectId'] });
    if (!run) return;
    let loaded: Omit<ToleranceTask, 'port' | 'workDir'>;
    try {
      const design = await runDesignOf(study);
      // Checked again here, before the arrays are read, as for runs: the study may have been queued under
      // another budget or by another server.
      const overBudget = options.memoryBudgetMb ? memoryBudgetRefusal(design, options.memoryBudgetMb, options.tileSide ?? 0, 'study') : null;
      if (overBudget) {
        await fail(studyId, overBudget);
        return;
      }
      loaded = await loadTask(study, run.projectId, design);
    } catch (error) {
      if (!(error instanceof StudyInputError)) throw error;
      await fail(studyId, error.message);
      return;
    }
    const workDir = await mkdtemp(join(tmpdir(), `phasewright-tolerance-${studyId}-`));
    const pool = options.pool();
    if (!pool || active.has(studyId)) {
      await rm(workDir, { recursive: true, force: true });
      return;
    }
    const controller = new AbortController();
    active.set(studyId, controller);
    const { port1, port2 } = new MessageChannel();
    let chain: Promise<unknown> = Promise.resolve();
    const later = (write: () => Promise<unknown>) => {
      chain = chain.then(write).catch((err: unknown) => logger.error({ err, studyId }, 'tolerance progress could not be written'));
      return chain;
    };
    let lastWrite = 0;
    let deadline: NodeJS.Timeout | undefined;
    port1.on('message', (message: ToleranceMessage) => {
      if (message.type === 'started') {
        void later(async () => {
          const ok = await transition(studyId, ['queued'], { status: 'running', attempts: study.attempts + 1, startedAt: new Date(), stage: 'loading', progress: 0, error: null });
          if (!ok) return controller.abort('gone');
          const limit = options.timeLimitMs;
          if (limit === null || controller.signal.aborted) return;
          // Past the time limit: the row is failed first (the truth), then the worker is stopped.
          const stop = async () => {
            const error = timeLimitMessage('study', limit / 60_000);
            if (await transition(studyId, ['running'], { status: 'failed', error, finishedAt: new Date() })) controller.abort('time limit');
          };
          deadline = setTimeout(() => void later(stop), limit).unref();
        });
      } else if (Date.now() - lastWrite >= options.progressIntervalMs || message.fraction === 1) {
        lastWrite = Date.now();
        void later(() => transition(studyId, ['running'], { progress: message.fraction, stage: message.stage }));
      }
    });
    const task = { ...loaded, workDir, port: port2 };
    const transferList = [port2, ...Object.values(loaded.arrays).map((a) => a.buffer as ArrayBuffer)];
    const running = pool.run(task, { filename: TASK_FILE.href, transferList, signal: controller.signal }) as Promise<ToleranceTaskResult>;
    const handled: Promise<void> = running
      .then(
        async (result) => {
          await chain;
          if (result.ok) {
            await transition(studyId, ['running'], { status: 'succeeded', progress: 1, stage: 'done', results: result.results, finishedAt: new Date() });
          } else {
            if (!result.designProblem) logger.error({ studyId, error: result.message, stack: result.detail }, 'tolerance study failed inside the worker');
            await fail(studyId, result.designProblem ? result.message : INTERNAL_FAILURE);
          }
        },
        async (error: unknown) => {
          await chain;
          if (controller.signal.aborted) return;
          logger.error({ err: error, studyId }, 'tolerance worker stopped');
          await fail(studyId, INTERNAL_FAILURE);
        },
      )
      .catch((err: unknown) => logger.error({ err, studyId }, 'tolerance result could not be stored'))
      .finally(async () => {
        clearTimeout(deadline);
        active.delete(studyId);
        port1.close();
        await rm(workDir, { recursive: true, force: true }).catch(() => undefined);
        settling.delete(handled);
      });
    settling.add(handled);
  }

  const executor: ToleranceExecutor = {
    enqueue(studyId) {
      submitting = submitting
        .then(() => execute(studyId))
        .catch(async (err: unknown) => {
          logger.error({ err, studyId }, 'tolerance study could not be started');
          await fail(studyId, INTERNAL_FAILURE).catch(() => undefined);
        });
    },
    async recover() {
      const stale = await ToleranceStudyModel.findAll({ where: { status: { [Op.in]: ['queued', 'running'] } }, attributes: ['id', 'status', 'attempts'], order: [['id', 'ASC']] });
      for (const study of stale) {
        if (study.status === 'running') {
          if (study.attempts >= MAX_ATTEMPTS) {
            await fail(study.id, `the server stopped during this study ${study.attempts} times; start a smaller one`);
            continue;
          }
          if (!(await transition(study.id, ['running'], { status: 'queued', progress: 0, stage: 'queued', startedAt: null }))) continue;
        }
        executor.enqueue(study.id);
      }
    },
    async stop() {
      for (const controller of active.values()) controller.abort('shutdown');
      await submitting;
      await Promise.allSettled([...settling]);
    },
  };
  return executor;
}
