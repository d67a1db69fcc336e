/**
 * Executes runs on a piscina pool of worker threads, whoever decides what to run: the embedded queue
 * (run-queue.ts) in the server process, or a worker process taking runs from Redis (run-queue-redis.ts).
 * Loads a queued run from the database, hands it to a pool thread (run-worker.ts), writes its progress at
 * most every `progressIntervalMs`, enforces the run time limit, reserves the project's storage for the files
 * and stores them, then marks the run succeeded — so a run's files are only kept for a run that succeeds.
 * Tolerance studies and library builds run on the same pool (tolerance-executor.ts, library-build-executor.ts).
 */
import { mkdtemp, rm } from 'node:fs/promises';
import { availableParallelism, tmpdir } from 'node:os';
import { join } from 'node:path';
import { MessageChannel } from 'node:worker_threads';
import { Op, type Transaction } from 'sequelize';
import { Piscina } from 'piscina';
import type { Logger } from 'pino';
import type { Design } from '../../../shared/schemas/design';
import { DEFAULT_TILES_MAX_SIDE, type AppConfig } from '../../config';
import { workerExecArgv, workerFile } from '../../lib/worker-pool';
import { rulesForRun } from '../fab/design-rules.service';
import { libraryForRun } from '../atom-libraries/atom-library.service';
import { memoryBudgetRefusal, reserveRunFiles, timeLimitMessage } from '../quotas/quota.service';
import { uploadIdsOf } from '../revisions/design-assets';
import { UploadModel } from '../uploads/upload.model';
import { createToleranceExecutor, type ToleranceExecutor } from '../tolerance/tolerance-executor';
import { buildLanes } from '../library-builds/library-build-cost';
import { createLibraryBuildExecutor, type LibraryBuildExecutor } from '../library-builds/library-build-executor';
import { deleteArtifacts, storeArtifacts } from './run-artifacts';
import { addEvent, markFailed, markStarted, markSucceeded, recordProgress } from './run-state';
import type { RunProgressMessage, RunTask, RunTaskResult } from './run-task';
import { RunArtifactModel, RunModel } from './run.model';
import { deletedUploadsMessage } from './run.service';
import { retryOnDeadlock } from '../../db/retry';

export interface RunExecutorOptions {
  logger: Logger;
  /** Worker threads; default os.availableParallelism(), at least 1. */
  threads?: number;
  /** Helper threads inside each run (run-worker.ts); default `parallelWithinRuns(threads)`. */
  parallelWithinRuns?: boolean;
  /** Least time between two progress writes of one run, ms (default 500: at most 2 writes/s). */
  progressIntervalMs?: number;
  /** The run time limit, the projects' storage quota, the library builds' time limit and the tile pyramids' size (default: none). */
  limits?: Pick<AppConfig, 'RUN_TIME_LIMIT_MINUTES' | 'PROJECT_STORAGE_MB'> & Partial<Pick<AppConfig, 'LIBRARY_BUILD_TIME_LIMIT_MINUTES' | 'PREVIEW_TILES_MAX_SIDE'>>;
  /** Nice value of the pool's threads (0–19, default 0): see `createRunPool`. */
  nice?: number;
  /**
   * Memory one run may take, MiB (RUN_MEMORY_BUDGET_MB): a run whose estimate is larger fails before it starts,
   * and it is the JavaScript heap limit of the pool's threads. Default: no check, V8's own heap limit.
   */
  memoryBudgetMb?: number;
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
export function createRunPool(threads: number, nice = 0, memoryBudgetMb?: number): Piscina<RunTask, RunTaskResult> {
  const workerData: RunPoolThreadData = { nice };
  return new Piscina<RunTask, RunTaskResult>({
    // The large arrays live outside the JavaScript heap; the heap limit only has to be no smaller than the budget.
    ...(memoryBudgetMb ? { resourceLimits: { maxOldGenerationSizeMb: memoryBudgetMb } } : {}),
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

export interface RunExecutor {
  /** Opens the pool. */
  start(): void;
  /** Aborts every run on the pool (their rows stay 'running', for whoever picks them up again) and closes it. */
  stop(): Promise<void>;
  /**
   * Starts a queued run on the pool. Resolves once it is handed over (null when it is not queued, already
   * here, or the pool is closed) with the promise of its end: result stored, row final, folder removed.
   */
  execute(runId: number): Promise<Promise<void> | null>;
  /** Stops a run on this pool after its row was cancelled; false when it is not here. */
  abort(runId: number): boolean;
  /** Tolerance studies, on the same pool. */
  tolerance: ToleranceExecutor;
  /** Library builds, on the same pool. */
  libraryBuilds: LibraryBuildExecutor;
  threads: number;
  running(): number;
  waiting(): number;
  accepting(): boolean;
}

export function createRunExecutor(options: RunExecutorOptions & { changed: (runId: number) => void }): RunExecutor {
  const { logger } = options;
  const threads = Math.max(1, options.threads ?? availableParallelism());
  const parallel = options.parallelWithinRuns ?? parallelWithinRuns(threads);
  const progressInterval = options.progressIntervalMs ?? 500;
  const limits = options.limits;
  const timeLimitMs = limits ? limits.RUN_TIME_LIMIT_MINUTES * 60_000 : null;
  const nice = options.nice ?? 0;
  const { memoryBudgetMb } = options;
  const tileSide = limits?.PREVIEW_TILES_MAX_SIDE ?? DEFAULT_TILES_MAX_SIDE;
  const tiles = tileSide > 0 ? { maxSide: tileSide } : null;
  const tolerance = createToleranceExecutor({ logger, pool: () => (accepting ? pool : null), progressIntervalMs: progressInterval, timeLimitMs, memoryBudgetMb, tileSide });
  const libraryBuilds = createLibraryBuildExecutor({
    logger,
    pool: () => (accepting ? pool : null),
    progressIntervalMs: progressInterval,
    timeLimitMinutes: limits?.LIBRARY_BUILD_TIME_LIMIT_MINUTES ?? null,
    lanes: buildLanes(parallel),
  });
  const active = new Map<number, ActiveRun>();
  let pool: Piscina<RunTask, RunTaskResult> | null = null;
  let accepting = false;
  /** Result handling of every task not yet settled; stop() waits for them before the database closes. */
  const settling = new Set<Promise<void>>();

  const { changed } = options;

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
            // A task computing while its row still says queued would be taken again: give up the task instead.
            const started = await retryOnDeadlock(() => markStarted(runId)).catch((err: unknown) => {
              logger.error({ err, runId }, 'run could not be marked started; it stays queued');
              return false;
            });
            if (!started) return controller.abort('cancel');
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

  async function execute(runId: number): Promise<Promise<void> | null> {
    if (!accepting || !pool || active.has(runId)) return null;
    const loaded = await loadTask(runId);
    if (!loaded || !accepting) return null;
    // Checked again here: the run may have been queued under another budget, or by a server with another one.
    const overBudget = memoryBudgetMb ? memoryBudgetRefusal(loaded.design, memoryBudgetMb, tileSide) : null;
    if (overBudget) {
      if (await markFailed(runId, overBudget, ['queued'])) changed(runId);
      return null;
    }
    const workDir = await mkdtemp(join(tmpdir(), `phasewright-run-${runId}-`));
    if (!accepting || !pool || active.has(runId)) {
      await rm(workDir, { recursive: true, force: true });
      return null;
    }
    // From here to pool.run nothing awaits, so stop() sees this run in `active` or not at all.
    const controller = new AbortController();
    const entry: ActiveRun = { controller };
    active.set(runId, entry);
    const { port1, port2 } = new MessageChannel();
    const track = tracker(runId, entry);
    port1.on('message', (message: RunProgressMessage) => track.onMessage(message));
    const running = pool.run({ ...loaded, workDir, port: port2, parallel, tiles }, { transferList: [port2], signal: controller.signal });
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
    return handled;
  }

  return {
    threads,
    tolerance,
    libraryBuilds,
    execute,
    start() {
      if (accepting) return;
      pool = createRunPool(threads, nice, memoryBudgetMb);
      accepting = true;
    },
    async stop() {
      accepting = false;
      for (const entry of active.values()) {
        entry.reason = 'shutdown';
        entry.controller.abort('shutdown');
      }
      await Promise.allSettled([...settling]);
      await tolerance.stop();
      await libraryBuilds.stop();
      const closing = pool;
      pool = null;
      if (closing) await closing.destroy();
    },
    abort(runId) {
      const entry = active.get(runId);
      if (!entry) return false;
      entry.reason = 'cancel';
      entry.controller.abort('cancel');
      return true;
    },
    running: () => active.size,
    waiting: () => pool?.queueSize ?? 0,
    accepting: () => accepting,
  };
}

