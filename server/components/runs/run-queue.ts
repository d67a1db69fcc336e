/**
 * The run queue: one interface for whatever executes runs. The default is embedded — a piscina pool of
 * worker threads (one per core) inside the server process, so runs never use the request thread. A queue on
 * a distributed engine can take its place behind the same interface when one machine is outgrown.
 *
 * The run row is the source of truth (run-state.ts): the queue only moves it along. A server stop leaves
 * running runs as they are; `recover()` at the next start queues them again.
 */
import { EventEmitter } from 'node:events';
import { mkdtemp, rm } from 'node:fs/promises';
import { availableParallelism, tmpdir } from 'node:os';
import { join } from 'node:path';
import { MessageChannel } from 'node:worker_threads';
import { Op, type Transaction } from 'sequelize';
import { Piscina } from 'piscina';
import type { Logger } from 'pino';
import type { Design } from '../../../shared/schemas/design';
import type { AppConfig } from '../../config';
import { workerExecArgv, workerFile } from '../../lib/worker-pool';
import { rulesForRun } from '../fab/design-rules.service';
import { libraryForRun } from '../atom-libraries/atom-library.service';
import { reserveRunFiles, timeLimitMessage } from '../quotas/quota.service';
import { uploadIdsOf } from '../revisions/design-assets';
import { UploadModel } from '../uploads/upload.model';
import { createToleranceExecutor } from '../tolerance/tolerance-executor';
import { deleteArtifacts, storeArtifacts } from './run-artifacts';
import { addEvent, markCancelled, markFailed, markStarted, markSucceeded, recordProgress, recoverInterrupted } from './run-state';
import type { RunProgressMessage, RunTask, RunTaskResult } from './run-task';
import { RunArtifactModel, RunModel } from './run.model';
import { deletedUploadsMessage } from './run.service';

export interface RunQueue {
  /** Recovers interrupted runs, then accepts work. */
  start(): Promise<void>;
  /** Stops accepting; running tasks are abandoned as they are and picked up again by the next start. */
  stop(): Promise<void>;
  /** Queues a run whose row is in status 'queued'. */
  enqueue(runId: number): void;
  /** Cancels a queued or running run; false when it had already finished. */
  cancel(runId: number): Promise<boolean>;
  /** Runs left queued or running by a previous process: queued again, or failed after too many attempts. */
  recover(): Promise<{ requeued: number[]; failed: number[] }>;
  /** Called whenever a run's row changed (progress, status); returns the unsubscribe function. */
  onUpdate(listener: (runId: number) => void): () => void;
  /** Queues a tolerance study (row in status 'queued') on the same worker pool. */
  enqueueTolerance(studyId: number): void;
  /** What the queue is doing now, for the health check; answers at once (no database). */
  state(): RunQueueState;
}

export interface RunQueueState {
  accepting: boolean;
  threads: number;
  /** Runs on a worker thread now. */
  running: number;
  /** Tasks (runs and tolerance studies) waiting for a thread. */
  waiting: number;
}

export interface EmbeddedRunQueueOptions {
  logger: Logger;
  /** Worker threads; default os.availableParallelism(), at least 1. */
  threads?: number;
  /** Helper threads inside each run (run-worker.ts); default `parallelWithinRuns(threads)`. */
  parallelWithinRuns?: boolean;
  /** Least time between two progress writes of one run, ms (default 500: at most 2 writes/s). */
  progressIntervalMs?: number;
  /** The run time limit and the projects' storage quota (default: none). */
  limits?: Pick<AppConfig, 'RUN_TIME_LIMIT_MINUTES' | 'PROJECT_STORAGE_MB'>;
  /** Nice value of the pool's threads (0–19, default 0): see `createRunPool`. */
  nice?: number;
}

const WORKER_FILE = workerFile('run-worker', import.meta.url);

/**
 * Whether runs may use helper threads (two for the channels' retrieval, one for the previews while writing)
 * by default: only when every pool thread can have a second core, 2·threads ≤ cores — on two cores only
 * with a single pool thread, so concurrent runs never oversubscribe the machine.
 */
export function parallelWithinRuns(threads: number, cores = availableParallelism()): boolean {
  return 2 * threads <= cores;
}

/** What every pool thread gets as piscina's `workerData`. */
export interface RunPoolThreadData {
  nice: number;
}

/**
 * The pool that executes run tasks (also used by bench/server-run.ts). With `nice` > 0 each of its threads
 * lowers its own scheduling priority when it takes its first task (`lowerPoolThreadPriority`), so a computing
 * run takes the cores only while requests and the database leave them idle.
 */
export function createRunPool(threads: number, nice = 0): Piscina<RunTask, RunTaskResult> {
  const workerData: RunPoolThreadData = { nice };
  return new Piscina<RunTask, RunTaskResult>({
    filename: WORKER_FILE.href,
    maxThreads: threads,
    minThreads: 0,
    idleTimeout: 60_000,
    execArgv: workerExecArgv(WORKER_FILE),
    workerData,
  });
}

interface ActiveRun {
  controller: AbortController;
  /** Why the task was aborted, if it was. */
  reason?: 'cancel' | 'shutdown' | 'time limit';
  /** Fires at the run time limit once the run has started. */
  deadline?: NodeJS.Timeout;
}

const INTERNAL_FAILURE = 'The run stopped on an internal error of the server (it has been logged). Start the run again; if it fails again, tell your administrator.';

export function createEmbeddedRunQueue(options: EmbeddedRunQueueOptions): RunQueue {
  const { logger } = options;
  const threads = Math.max(1, options.threads ?? availableParallelism());
  const parallel = options.parallelWithinRuns ?? parallelWithinRuns(threads);
  const progressInterval = options.progressIntervalMs ?? 500;
  const limits = options.limits;
  const timeLimitMs = limits ? limits.RUN_TIME_LIMIT_MINUTES * 60_000 : null;
  const nice = options.nice ?? 0;
  const tolerance = createToleranceExecutor({ logger, pool: () => (accepting ? pool : null), progressIntervalMs: progressInterval, timeLimitMs });
  const updates = new EventEmitter();
  updates.setMaxListeners(0);
  const active = new Map<number, ActiveRun>();
  let pool: Piscina<RunTask, RunTaskResult> | null = null;
  let accepting = false;
  /** Submissions in order: loading a run from the database is asynchronous. */
  let submitting: Promise<void> = Promise.resolve();
  /** Result handling of every task not yet settled; stop() waits for them before the database closes. */
  const settling = new Set<Promise<void>>();

  const changed = (runId: number) => updates.emit('update', runId);

  /** Past the time limit: the row is failed first (the truth), then the worker is stopped. */
  async function stopAtTimeLimit(runId: number, entry: ActiveRun) {
    if (!(await markFailed(runId, timeLimitMessage('run', limits!.RUN_TIME_LIMIT_MINUTES), ['running']))) return;
    entry.reason = 'time limit';
    entry.controller.abort('time limit');
    changed(runId);
  }

  /** Serializes one run's database writes and throttles its progress writes. */
  function tracker(runId: number, entry: ActiveRun) {
    const { controller } = entry;
    let chain: Promise<unknown> = Promise.resolve();
    const later = (write: () => Promise<unknown>) => {
      chain = chain.then(write).catch((err: unknown) => logger.error({ err, runId }, 'run progress could not be written'));
      return chain;
    };
    const convergence = { a: [] as number[], b: [] as number[] };
    let pending: { progress: number; stage: string } | null = null;
    let lastStage = '';
    let lastWrite = 0;
    let timer: NodeJS.Timeout | null = null;
    const writeProgress = () => {
      timer = null;
      if (!pending) return;
      const values = { ...pending, convergence: { a: [...convergence.a], b: [...convergence.b] } };
      pending = null;
      lastWrite = Date.now();
      void later(async () => {
        if (await recordProgress(runId, values)) changed(runId);
      });
    };
    return {
      onMessage(message: RunProgressMessage) {
        if (message.type === 'started') {
          void later(async () => {
            if (!(await markStarted(runId))) return controller.abort('cancel');
            changed(runId);
            if (timeLimitMs !== null && !controller.signal.aborted) {
              entry.deadline = setTimeout(() => void later(() => stopAtTimeLimit(runId, entry)), timeLimitMs).unref();
            }
          });
        } else if (message.type === 'note') {
          void later(() => addEvent(runId, 'running', lastStage, `note: ${message.message}`));
        } else {
          convergence.a.push(...message.convergence.a);
          convergence.b.push(...message.convergence.b);
          pending = { progress: message.fraction, stage: message.stage };
          if (message.stage !== lastStage) {
            const stage = message.stage;
            lastStage = stage;
            writeProgress();
            void later(() => addEvent(runId, 'running', stage, stage));
          } else if (!timer) {
            timer = setTimeout(writeProgress, Math.max(0, progressInterval - (Date.now() - lastWrite)));
          }
        }
      },
      /** Stops the timer and waits for every write already made. */
      async settle() {
        if (timer) clearTimeout(timer);
        timer = null;
        await chain;
      },
      later,
    };
  }

  async function loadTask(runId: number): Promise<Omit<RunTask, 'port' | 'workDir' | 'parallel'> | null> {
    const run = await RunModel.findByPk(runId, { include: [{ association: 'revision', attributes: ['design', 'projectId'] }] });
    if (!run || run.status !== 'queued' || !run.revision) return null;
    const design = JSON.parse(run.revision.design) as Design;
    const ids = uploadIdsOf(design);
    const uploads = ids.length
      ? await UploadModel.findAll({ where: { id: { [Op.in]: ids }, projectId: run.projectId }, attributes: ['id', 'name', 'mime', 'bytes'] })
      : [];
    const deleted = deletedUploadsMessage(ids, uploads.map((u) => u.id));
    if (deleted) {
      if (await markFailed(runId, `The design ${deleted}.`, ['queued'])) changed(runId);
      return null;
    }
    // The project's design rules at run time (not the revision's): design.json and drc.json then record them.
    design.designRules = await rulesForRun(run.projectId);
    const libraryRef = design.atomLibrary;
    const atomLibrary = libraryRef.source === 'library' ? await libraryForRun(libraryRef.id) : null;
    return {
      runId,
      design,
      uploads: uploads.map((u) => ({ id: u.id, name: u.name, mime: u.mime, bytes: new Uint8Array(u.bytes) })),
      atomLibrary: atomLibrary && libraryRef.source === 'library' ? { id: libraryRef.id, library: atomLibrary } : null,
    };
  }

  async function execute(runId: number) {
    if (!accepting || !pool || active.has(runId)) return;
    const loaded = await loadTask(runId);
    if (!loaded || !accepting) return;
    const workDir = await mkdtemp(join(tmpdir(), `phasewright-run-${runId}-`));
    if (!accepting || !pool || active.has(runId)) {
      await rm(workDir, { recursive: true, force: true });
      return;
    }
    // From here to pool.run nothing awaits, so stop() sees this run in `active` or not at all.
    const controller = new AbortController();
    const entry: ActiveRun = { controller };
    active.set(runId, entry);
    const { port1, port2 } = new MessageChannel();
    const track = tracker(runId, entry);
    port1.on('message', (message: RunProgressMessage) => track.onMessage(message));
    const running = pool.run({ ...loaded, workDir, port: port2, parallel }, { transferList: [port2], signal: controller.signal });
    const handled: Promise<void> = running
      .then(
        async (result) => {
          clearTimeout(entry.deadline);
          await track.settle();
          clearTimeout(entry.deadline);
          if (result.ok) {
            // Cancelled or timed out while finishing: keep nothing.
            const row = await RunModel.findByPk(runId, { attributes: ['status', 'projectId'] });
            if (row?.status !== 'running') return;
            let refusal: string | null = null;
            const reserve = limits
              ? async (createRows: (transaction: Transaction) => Promise<RunArtifactModel[]>) => {
                  const reserved = await reserveRunFiles(limits, row.projectId, result.files.reduce((sum, file) => sum + file.bytes, 0), createRows);
                  if ('rows' in reserved) return reserved.rows;
                  refusal = reserved.refusal;
                  return null;
                }
              : undefined;
            const kept = await track.later(() => storeArtifacts(runId, result.outDir, result.files, undefined, reserve));
            if (!kept) {
              await markFailed(runId, refusal ?? 'The run\'s files could not be kept', ['running']);
              return;
            }
            const stored = await markSucceeded(runId, { metrics: result.metrics, plots: result.plots, headline: result.headline, convergence: result.convergence });
            if (!stored) await deleteArtifacts(runId);
          } else {
            if (!result.designProblem) logger.error({ runId, error: result.message, stack: result.detail }, 'run failed inside the worker');
            await markFailed(runId, result.designProblem ? result.message : INTERNAL_FAILURE);
          }
        },
        async (error: unknown) => {
          clearTimeout(entry.deadline);
          await track.settle();
          if (entry.reason || controller.signal.aborted) return;
          logger.error({ err: error, runId }, 'run worker stopped');
          await markFailed(runId, INTERNAL_FAILURE);
        },
      )
      .catch((err: unknown) => logger.error({ err, runId }, 'run result could not be stored'))
      .finally(async () => {
        changed(runId);
        active.delete(runId);
        port1.close();
        await rm(workDir, { recursive: true, force: true }).catch(() => undefined);
        settling.delete(handled);
      });
    settling.add(handled);
  }

  const queue: RunQueue = {
    async start() {
      if (accepting) return;
      pool = createRunPool(threads, nice);
      accepting = true;
      const { requeued, failed } = await queue.recover();
      await tolerance.recover();
      if (requeued.length || failed.length) logger.info({ requeued, failed }, 'runs interrupted by the last stop');
    },

    async stop() {
      accepting = false;
      for (const entry of active.values()) {
        entry.reason = 'shutdown';
        entry.controller.abort('shutdown');
      }
      await submitting;
      await Promise.allSettled([...settling]);
      await tolerance.stop();
      const closing = pool;
      pool = null;
      if (closing) await closing.destroy();
    },

    enqueue(runId) {
      submitting = submitting.then(() => execute(runId)).catch((err: unknown) => logger.error({ err, runId }, 'run could not be queued'));
    },

    async cancel(runId) {
      const cancelled = await markCancelled(runId);
      const entry = active.get(runId);
      if (cancelled && entry) {
        entry.reason = 'cancel';
        entry.controller.abort('cancel');
      }
      if (cancelled) changed(runId);
      return cancelled;
    },

    async recover() {
      const { requeue, failed } = await recoverInterrupted();
      for (const id of requeue) queue.enqueue(id);
      for (const id of failed) changed(id);
      return { requeued: requeue, failed };
    },

    enqueueTolerance(studyId) {
      tolerance.enqueue(studyId);
    },

    state() {
      return { accepting, threads, running: active.size, waiting: pool?.queueSize ?? 0 };
    },

    onUpdate(listener) {
      updates.on('update', listener);
      return () => updates.off('update', listener);
    },
  };
  return queue;
}
