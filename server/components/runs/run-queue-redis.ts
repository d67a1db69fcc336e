/**
 * The run queue on BullMQ over Redis (RUN_QUEUE=redis), for when one machine is outgrown. The web server only
 * enqueues (`createRedisRunQueue`); worker processes (`npm run worker`, any number, on any machine) take the
 * jobs and execute them on their own thread pools with the embedded queue's executor (`createRedisRunWorker`).
 *
 * The run row in MariaDB stays the source of truth; a job only says "look at run N". So:
 * - progress and status are written to the row by the worker, which publishes the run's id on a Redis channel;
 *   the server's listeners (the event stream) re-read the row, as with the embedded queue;
 * - a cancel marks the row cancelled, then a message on another channel makes the holding worker abort the
 *   run's thread at once;
 * - a worker that dies stops renewing its hold on the job: BullMQ finds the job stalled and hands it to
 *   another worker, which finds the row still 'running' and queues it again (one more attempt; failed after
 *   MAX_ATTEMPTS, as after server stops);
 * - at start and whenever the Redis connection comes back, the server gives every queued row without a live
 *   job a new one (and a running row without one is queued again), so a Redis that lost its data loses no run.
 * Tolerance studies and library builds travel the same way as jobs of their own kind; a build's cancel message
 * on the cancel channel is `library-build:<id>`.
 */
import { EventEmitter } from 'node:events';
import { Queue, Worker, type Job } from 'bullmq';
import { Redis } from 'ioredis';
import type { Logger } from 'pino';
import { ConnectionError, Op } from 'sequelize';
import type { AppConfig } from '../../config';
import { ToleranceStudyModel } from '../tolerance/tolerance.model';
import { markBuildCancelled, requeueInterruptedBuild } from '../library-builds/library-build-executor';
import { LibraryBuildModel } from '../library-builds/library-build.model';
import { createRunExecutor, type RunExecutorOptions } from './run-executor';
import type { RunQueue, RunQueueState } from './run-queue';
import { MAX_ATTEMPTS, markCancelled, requeueInterrupted } from './run-state';
import { RunModel } from './run.model';

const QUEUE_NAME = 'runs';

export type RedisSettings = Pick<AppConfig, 'REDIS_URL' | 'REDIS_PREFIX'>;

interface QueueJob {
  kind: 'run' | 'tolerance' | 'library-build';
  id: number;
}

/** The cancel channel's message for a library build (a run's is its bare id). */
const BUILD_CANCEL = 'library-build:';

/** Counts of the queue's jobs per BullMQ state, for the admin page. */
export type RunQueueCounts = Record<'waiting' | 'active' | 'delayed' | 'completed' | 'failed' | 'paused', number>;

const jobIdOf = (job: QueueJob) => `${job.kind}-${job.id}`;
const channels = (prefix: string) => ({ updates: `${prefix}:run-updates`, cancel: `${prefix}:run-cancel` });
/** Job states in which the job will still be (or is being) executed. */
const LIVE_STATES = new Set(['waiting', 'active', 'delayed', 'prioritized', 'waiting-children']);
const JOB_OPTIONS = { removeOnComplete: { count: 1000 }, removeOnFail: { count: 1000 } };

function connect(url: string, logger: Logger, name: string): Redis {
  // BullMQ's blocking commands need maxRetriesPerRequest null; reconnects are retried for ever.
  const redis = new Redis(url, { maxRetriesPerRequest: null, lazyConnect: false });
  redis.on('error', (err: Error) => logger.warn({ err: err.message, connection: name }, 'Redis connection problem'));
  return redis;
}

export function createRedisRunQueue(options: {
  logger: Logger;
  redis: RedisSettings;
  /** How often the rows are compared with the jobs again, ms (0: only at start and reconnect). */
  recheckMs?: number;
}): RunQueue & { counts(): Promise<RunQueueCounts> } {
  const { logger } = options;
  const { REDIS_URL: url, REDIS_PREFIX: prefix } = options.redis;
  const names = channels(prefix);
  const updates = new EventEmitter();
  updates.setMaxListeners(0);
  const changed = (runId: number) => updates.emit('update', runId);
  let queue: Queue<QueueJob> | null = null;
  let publisher: Redis | null = null;
  let subscriber: Redis | null = null;
  let accepting = false;
  let counts: RunQueueCounts = { waiting: 0, active: 0, delayed: 0, completed: 0, failed: 0, paused: 0 };
  let countTimer: NodeJS.Timeout | null = null;
  let recheckTimer: NodeJS.Timeout | null = null;

  async function add(job: QueueJob) {
    if (!queue) return;
    await queue.add(job.kind, job, { ...JOB_OPTIONS, jobId: jobIdOf(job) });
  }

  /** Gives the job a fresh entry unless a live one exists (a finished job of the same id is removed first). */
  async function ensureJob(job: QueueJob): Promise<boolean> {
    if (!queue) return false;
    const existing = await queue.getJob(jobIdOf(job));
    if (existing) {
      const state = await existing.getState();
      if (LIVE_STATES.has(state)) return false;
      await existing.remove().catch(() => undefined);
    }
    await add(job);
    return true;
  }

  async function refreshCounts() {
    if (!queue) return counts;
    counts = (await queue.getJobCounts('waiting', 'active', 'delayed', 'completed', 'failed', 'paused')) as RunQueueCounts;
    return counts;
  }

  const runQueue: RunQueue & { counts(): Promise<RunQueueCounts> } = {
    async start() {
      if (accepting) return;
      publisher = connect(url, logger, 'publisher');
      subscriber = connect(url, logger, 'subscriber');
      queue = new Queue<QueueJob>(QUEUE_NAME, { connection: connect(url, logger, 'queue'), prefix });
      queue.on('error', (err) => logger.warn({ err: err.message }, 'run queue: Redis problem'));
      subscriber.on('message', (_channel: string, message: string) => {
        const runId = Number(message);
        if (Number.isInteger(runId)) changed(runId);
      });
      await subscriber.subscribe(names.updates);
      accepting = true;
      const { requeued, failed } = await runQueue.recover();
      if (requeued.length || failed.length) logger.info({ requeued, failed }, 'runs given back to the queue');
      // Back from a Redis outage (or a Redis restarted without its data): queued rows get their jobs again.
      let lost = false;
      publisher.on('close', () => (lost = true));
      publisher.on('ready', () => {
        if (!lost || !accepting) return;
        lost = false;
        logger.info('Redis answers again: giving queued runs their jobs back');
        void runQueue
          .recover()
          .then(({ requeued, failed }) => logger.info({ requeued, failed }, 'runs given back to the queue'))
          .catch((err: unknown) => logger.error({ err }, 'runs could not be given back to the queue'));
      });
      countTimer = setInterval(() => void refreshCounts().catch(() => undefined), 2_000).unref();
      // A job that ended without its row (a worker lost MariaDB while storing a result) is caught up here.
      if (options.recheckMs) {
        recheckTimer = setInterval(() => {
          void runQueue
            .recover()
            .then(({ requeued, failed }) => (requeued.length || failed.length) && logger.info({ requeued, failed }, 'runs without a job given back to the queue'))
            .catch((err: unknown) => logger.warn({ err }, 'run rows could not be compared with the queue'));
        }, options.recheckMs).unref();
      }
      await refreshCounts().catch(() => undefined);
    },

    async stop() {
      accepting = false;
      if (countTimer) clearInterval(countTimer);
      if (recheckTimer) clearInterval(recheckTimer);
      await queue?.close();
      subscriber?.disconnect();
      publisher?.disconnect();
      queue = null;
      subscriber = publisher = null;
    },

    enqueue(runId) {
      add({ kind: 'run', id: runId }).catch((err: unknown) => logger.error({ err, runId }, 'run could not be queued in Redis (it is queued again when Redis answers)'));
    },

    async cancel(runId) {
      const cancelled = await markCancelled(runId);
      if (!cancelled) return false;
      // The worker holding it aborts its thread; a job not yet taken is dropped (a locked one refuses: fine).
      await publisher?.publish(names.cancel, String(runId)).catch((err: unknown) => logger.warn({ err, runId }, 'cancel message not sent'));
      await queue?.remove(jobIdOf({ kind: 'run', id: runId })).catch(() => undefined);
      changed(runId);
      return true;
    },

    async recover() {
      const requeued: number[] = [];
      const failed: number[] = [];
      if (!queue) return { requeued, failed };
      const rows = await RunModel.findAll({
        where: { status: { [Op.in]: ['queued', 'running'] } },
        attributes: ['id', 'status', 'attempts'],
        order: [['queuedAt', 'ASC'], ['id', 'ASC']],
      });
      for (const row of rows) {
        const job: QueueJob = { kind: 'run', id: row.id };
        const existing = await queue.getJob(jobIdOf(job));
        if (existing && LIVE_STATES.has(await existing.getState())) continue;
        if (row.status === 'running') {
          // Held by no job: its worker and Redis both lost it.
          const outcome = await requeueInterrupted(row, 'a worker');
          if (outcome === 'failed') {
            failed.push(row.id);
            changed(row.id);
          }
          if (outcome !== 'queued') continue;
        }
        if (await ensureJob(job)) requeued.push(row.id);
      }
      const studies = await ToleranceStudyModel.findAll({ where: { status: 'queued' }, attributes: ['id'], order: [['id', 'ASC']] });
      for (const study of studies) await ensureJob({ kind: 'tolerance', id: study.id });
      const builds = await LibraryBuildModel.findAll({ where: { status: { [Op.in]: ['queued', 'running'] } }, attributes: ['id', 'status', 'attempts'], order: [['id', 'ASC']] });
      for (const build of builds) {
        const job: QueueJob = { kind: 'library-build', id: build.id };
        const existing = await queue.getJob(jobIdOf(job));
        if (existing && LIVE_STATES.has(await existing.getState())) continue;
        if (build.status === 'running' && (await requeueInterruptedBuild(build, 'a worker')) !== 'queued') continue;
        await ensureJob(job);
      }
      return { requeued, failed };
    },

    enqueueTolerance(studyId) {
      add({ kind: 'tolerance', id: studyId }).catch((err: unknown) => logger.error({ err, studyId }, 'tolerance study could not be queued in Redis'));
    },

    enqueueLibraryBuild(buildId) {
      add({ kind: 'library-build', id: buildId }).catch((err: unknown) => logger.error({ err, buildId }, 'library build could not be queued in Redis (it is queued again when Redis answers)'));
    },

    async cancelLibraryBuild(buildId) {
      if (!(await markBuildCancelled(buildId))) return false;
      await publisher?.publish(names.cancel, `${BUILD_CANCEL}${buildId}`).catch((err: unknown) => logger.warn({ err, buildId }, 'cancel message not sent'));
      await queue?.remove(jobIdOf({ kind: 'library-build', id: buildId })).catch(() => undefined);
      return true;
    },

    state(): RunQueueState {
      // Runs execute on the worker processes: the server's own threads are none.
      return { accepting, threads: 0, running: counts.active, waiting: counts.waiting + counts.delayed };
    },

    onUpdate(listener) {
      updates.on('update', listener);
      return () => updates.off('update', listener);
    },

    counts: refreshCounts,
  };
  return runQueue;
}

/** A failure for want of MariaDB (refused, or the connection cut: the driver marks those fatal), not of the query. */
function lostDatabase(err: unknown): boolean {
  return err instanceof ConnectionError || (err as { parent?: { fatal?: boolean } } | null)?.parent?.fatal === true;
}

export interface RedisRunWorkerOptions extends RunExecutorOptions {
  redis: RedisSettings;
  /** BullMQ's check for jobs whose worker stopped renewing its lock, ms. */
  stalledIntervalMs: number;
  /** How long a lock lasts without renewal, ms. */
  lockMs: number;
}

export interface RedisRunWorker {
  start(): Promise<void>;
  /** Aborts the runs on this process (their rows stay 'running'; another worker takes them once their hold expires). */
  stop(): Promise<void>;
}

/** A worker process's side: takes jobs from Redis and executes them on this process's thread pool. */
export function createRedisRunWorker(options: RedisRunWorkerOptions): RedisRunWorker {
  const { logger } = options;
  const { REDIS_URL: url, REDIS_PREFIX: prefix } = options.redis;
  const names = channels(prefix);
  let publisher: Redis | null = null;
  let subscriber: Redis | null = null;
  let worker: Worker<QueueJob> | null = null;
  let stopping = false;
  const changed = (runId: number) => {
    publisher?.publish(names.updates, String(runId)).catch((err: unknown) => logger.warn({ err, runId }, 'run update not announced'));
  };
  const executor = createRunExecutor({ ...options, changed });
  /** Never settles: a job abandoned at shutdown stays active in Redis until its lock expires. */
  const abandon = () => new Promise<never>(() => undefined);

  /**
   * Runs `work` again once MariaDB answers when it failed for want of a connection: the worker waits for the
   * database rather than failing the job (its run stays queued and its hold on the job is kept meanwhile).
   */
  async function withDatabase(work: () => Promise<void>): Promise<void> {
    for (;;) {
      try {
        return await work();
      } catch (err) {
        if (!lostDatabase(err) || stopping) throw err;
        logger.warn({ err: (err as Error).message }, 'MariaDB does not answer: waiting for it');
        for (;;) {
          await new Promise((resolve) => setTimeout(resolve, 1_000));
          if (stopping) await abandon();
          if (await RunModel.sequelize!.authenticate().then(() => true, () => false)) break;
        }
        logger.info('MariaDB answers again');
      }
    }
  }

  async function runJob(runId: number) {
    const row = await RunModel.findByPk(runId, { attributes: ['id', 'status', 'attempts'] });
    if (!row) return;
    logger.info({ runId, status: row.status }, 'run taken');
    if (row.status === 'running') {
      // The job was stalled: the worker that held it stopped mid-run.
      const outcome = await requeueInterrupted(row, 'a worker');
      if (outcome) changed(runId);
      if (outcome !== 'queued') return;
    }
    const done = await executor.execute(runId);
    if (!done) return;
    await done;
    if (stopping) await abandon();
  }

  async function toleranceJob(studyId: number) {
    const study = await ToleranceStudyModel.findByPk(studyId, { attributes: ['id', 'status', 'attempts'] });
    if (!study) return;
    logger.info({ studyId, status: study.status }, 'tolerance study taken');
    if (study.status === 'running') {
      const values = study.attempts >= MAX_ATTEMPTS
        ? { status: 'failed' as const, error: `a worker stopped during this study ${study.attempts} times; start a smaller one`, finishedAt: new Date() }
        : { status: 'queued' as const, progress: 0, stage: 'queued', startedAt: null };
      await ToleranceStudyModel.update(values, { where: { id: studyId, status: 'running' } });
    }
    executor.tolerance.enqueue(studyId);
    // The tolerance executor stores the result itself; the job lasts until the study's row has ended.
    await untilEnded(() => ToleranceStudyModel.findByPk(studyId, { attributes: ['status'] }));
  }

  async function libraryBuildJob(buildId: number) {
    const build = await LibraryBuildModel.findByPk(buildId, { attributes: ['id', 'status', 'attempts'] });
    if (!build) return;
    logger.info({ buildId, status: build.status }, 'library build taken');
    // Running: the job was stalled, the worker that held it stopped mid-build.
    if (build.status === 'running' && (await requeueInterruptedBuild(build, 'a worker')) !== 'queued') return;
    executor.libraryBuilds.enqueue(buildId);
    await untilEnded(() => LibraryBuildModel.findByPk(buildId, { attributes: ['status'] }));
  }

  /** Waits until the row `read` gives is no longer queued or running (the executors store results themselves). */
  async function untilEnded(read: () => Promise<{ status: string } | null>) {
    for (;;) {
      await new Promise((resolve) => setTimeout(resolve, 250));
      if (stopping) await abandon();
      const now = await read();
      if (!now || (now.status !== 'queued' && now.status !== 'running')) return;
    }
  }

  return {
    async start() {
      executor.start();
      publisher = connect(url, logger, 'publisher');
      subscriber = connect(url, logger, 'subscriber');
      subscriber.on('message', (_channel: string, message: string) => {
        if (message.startsWith(BUILD_CANCEL)) {
          const buildId = Number(message.slice(BUILD_CANCEL.length));
          if (Number.isInteger(buildId) && executor.libraryBuilds.abort(buildId)) logger.info({ buildId }, 'library build cancelled');
          return;
        }
        const runId = Number(message);
        if (Number.isInteger(runId) && executor.abort(runId)) logger.info({ runId }, 'run cancelled');
      });
      await subscriber.subscribe(names.cancel);
      worker = new Worker<QueueJob>(
        QUEUE_NAME,
        async (job: Job<QueueJob>) =>
          withDatabase(() => (job.data.kind === 'run' ? runJob(job.data.id) : job.data.kind === 'tolerance' ? toleranceJob(job.data.id) : libraryBuildJob(job.data.id))),
        {
          connection: connect(url, logger, 'worker'),
          prefix,
          concurrency: executor.threads,
          stalledInterval: options.stalledIntervalMs,
          lockDuration: options.lockMs,
          // Each stall is one more attempt of the run; the row fails it after MAX_ATTEMPTS (see runJob).
          maxStalledCount: MAX_ATTEMPTS,
        },
      );
      worker.on('error', (err) => logger.warn({ err: err.message }, 'run worker: Redis problem'));
      worker.on('failed', (job, err) => logger.error({ err, job: job?.id }, 'run job failed'));
    },

    async stop() {
      stopping = true;
      const closing = worker?.close(true);
      await executor.stop();
      await closing;
      subscriber?.disconnect();
      publisher?.disconnect();
    },
  };
}
