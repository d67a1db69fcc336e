/**
 * The run queue: one interface for whatever executes runs. The default is embedded — a piscina pool of
 * worker threads (one per core) inside the server process, so runs never use the request thread. When one
 * machine is outgrown, RUN_QUEUE=redis puts BullMQ on Redis behind the same interface (run-queue-redis.ts),
 * with worker processes executing runs; both engines execute with the same code (run-executor.ts).
 *
 * The run row is the source of truth (run-state.ts): the queue only moves it along. A server stop leaves
 * running runs as they are; `recover()` at the next start queues them again.
 */
import { EventEmitter } from 'node:events';
import { createRunExecutor, type RunExecutorOptions } from './run-executor';
import { markCancelled, recoverInterrupted } from './run-state';
import { markBuildCancelled } from '../library-builds/library-build-executor';

export { createRunPool, parallelWithinRuns, type RunPoolThreadData } from './run-executor';

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
  /** Queues a library build (row in status 'queued') on the same worker pool. */
  enqueueLibraryBuild(buildId: number): void;
  /** Cancels a queued or running library build and stops its thread; false when it had already ended. */
  cancelLibraryBuild(buildId: number): Promise<boolean>;
  /** What the queue is doing now, for the health check; answers at once (no database). */
  state(): RunQueueState;
  /** A distributed engine's own job counts per state (BullMQ's getJobCounts), for the admin page. */
  counts?(): Promise<Record<string, number>>;
}

export interface RunQueueState {
  accepting: boolean;
  threads: number;
  /** Runs on a worker thread now. */
  running: number;
  /** Tasks (runs, tolerance studies and library builds) waiting for a thread. */
  waiting: number;
}

export type EmbeddedRunQueueOptions = RunExecutorOptions;

export function createEmbeddedRunQueue(options: EmbeddedRunQueueOptions): RunQueue {
  const { logger } = options;
  const updates = new EventEmitter();
  updates.setMaxListeners(0);
  const changed = (runId: number) => updates.emit('update', runId);
  const executor = createRunExecutor({ ...options, changed });
  /** Submissions in order: loading a run from the database is asynchronous. */
  let submitting: Promise<void> = Promise.resolve();

  const queue: RunQueue = {
    async start() {
      if (executor.accepting()) return;
      executor.start();
      const { requeued, failed } = await queue.recover();
      await executor.tolerance.recover();
      await executor.libraryBuilds.recover();
      if (requeued.length || failed.length) logger.info({ requeued, failed }, 'runs interrupted by the last stop');
    },

    async stop() {
      const stopping = executor.stop();
      await submitting;
      await stopping;
    },

    enqueue(runId) {
      submitting = submitting.then(async () => void (await executor.execute(runId))).catch((err: unknown) => logger.error({ err, runId }, 'run could not be queued'));
    },

    async cancel(runId) {
      const cancelled = await markCancelled(runId);
      if (cancelled) {
        executor.abort(runId);
        changed(runId);
      }
      return cancelled;
    },

    async recover() {
      const { requeue, failed } = await recoverInterrupted();
      for (const id of requeue) queue.enqueue(id);
      for (const id of failed) changed(id);
      return { requeued: requeue, failed };
    },

    enqueueTolerance(studyId) {
      executor.tolerance.enqueue(studyId);
    },

    enqueueLibraryBuild(buildId) {
      executor.libraryBuilds.enqueue(buildId);
    },

    async cancelLibraryBuild(buildId) {
      const cancelled = await markBuildCancelled(buildId);
      if (cancelled) executor.libraryBuilds.abort(buildId);
      return cancelled;
    },

    state() {
      return { accepting: executor.accepting(), threads: executor.threads, running: executor.running(), waiting: executor.waiting() };
    },

    onUpdate(listener) {
      updates.on('update', listener);
      return () => updates.off('update', listener);
    },
  };
  return queue;
}
