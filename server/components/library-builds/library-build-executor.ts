/**
 * Executes library builds on the run queue's worker pool (run-executor.ts owns the pool and delegates here), in
 * the server process (embedded queue) or in a worker process taking jobs from Redis: hands a queued build to a
 * worker thread (library-build-task.ts), writes its progress (atom i of N, seconds per atom) at most every
 * `progressIntervalMs`, fails it at the time limit, stops it at once on cancel, and on success stores the atom
 * library (project or personal, not approximate) and the result for the plots in one transaction. The build
 * row is the source of truth: a server stop leaves a running build as it is, and `recover()` at the next start
 * queues it again (failed after three starts).
 */
import { MessageChannel } from 'node:worker_threads';
import type { Piscina } from 'piscina';
import type { Logger } from 'pino';
import { Op, type InferAttributes, type Transaction } from 'sequelize';
import type { LibraryBuildStatus } from '../../../shared/schemas/library-builds';
import { retryOnDeadlock } from '../../db/retry';
import { workerFile } from '../../lib/worker-pool';
import { insertAtomLibrary } from '../atom-libraries/atom-library.service';
import type { LibraryBuildMessage, LibraryBuildTask, LibraryBuildTaskResult } from './library-build-task';
import { LibraryBuildModel } from './library-build.model';

const TASK_FILE = workerFile('library-build-task', import.meta.url);
export const MAX_BUILD_ATTEMPTS = 3;
const INTERNAL_FAILURE = 'The library build stopped on an internal error of the server (it has been logged). Start it again; if it fails again, tell your administrator.';

/** The message of a build stopped at LIBRARY_BUILD_TIME_LIMIT_MINUTES. */
export function buildTimeLimitMessage(minutes: number): string {
  return (
    `The library build was stopped after the time limit of ${minutes} minute${minutes === 1 ? '' : 's'} (LIBRARY_BUILD_TIME_LIMIT_MINUTES). ` +
    'Take a larger sweep step (fewer atoms) or fewer harmonics, or ask your administrator to raise the limit.'
  );
}

export interface LibraryBuildExecutor {
  enqueue(buildId: number): void;
  /** Stops a build on this pool after its row was cancelled; false when it is not here. */
  abort(buildId: number): boolean;
  /** Builds left queued or running by a previous process: queued again (failed after too many starts). */
  recover(): Promise<void>;
  /** Aborts running builds (they stay 'running' for the next start) and waits for their handling. */
  stop(): Promise<void>;
}

/** Moves a build's row from one of `from` to `values`; false when it was in none of them (cancelled, say). */
export async function transitionBuild(id: number, from: LibraryBuildStatus[], values: Partial<InferAttributes<LibraryBuildModel>>, transaction?: Transaction): Promise<boolean> {
  const [count] = await LibraryBuildModel.update(values, { where: { id, status: { [Op.in]: from } }, transaction });
  return count > 0;
}

/** Cancels a queued or running build's row; false when it had already ended. */
export function markBuildCancelled(id: number): Promise<boolean> {
  return transitionBuild(id, ['queued', 'running'], { status: 'cancelled', error: null, finishedAt: new Date() });
}

/**
 * A build whose worker stopped mid-way (server or worker process gone): queued again, or failed after
 * MAX_BUILD_ATTEMPTS starts. `who` names what stopped ('the server', 'a worker').
 */
export async function requeueInterruptedBuild(build: Pick<LibraryBuildModel, 'id' | 'attempts'>, who: string): Promise<'queued' | 'failed' | null> {
  if (build.attempts >= MAX_BUILD_ATTEMPTS) {
    const error = `${who} stopped during this library build ${build.attempts} times; start a smaller one (a larger sweep step or fewer harmonics)`;
    return (await transitionBuild(build.id, ['running'], { status: 'failed', error, finishedAt: new Date() })) ? 'failed' : null;
  }
  return (await transitionBuild(build.id, ['running'], { status: 'queued', progress: null, startedAt: null })) ? 'queued' : null;
}

export function createLibraryBuildExecutor(options: {
  logger: Logger;
  /** The run pool while it accepts work, null otherwise. */
  pool: () => Piscina | null;
  progressIntervalMs: number;
  /** Longest a build may run once started (LIBRARY_BUILD_TIME_LIMIT_MINUTES); null: no limit. */
  timeLimitMinutes: number | null;
  /** Threads each build computes on (library-build-cost.ts `buildLanes`). */
  lanes: number;
}): LibraryBuildExecutor {
  const { logger } = options;
  const active = new Map<number, AbortController>();
  const settling = new Set<Promise<void>>();
  let submitting: Promise<void> = Promise.resolve();

  const fail = (id: number, message: string) => transitionBuild(id, ['queued', 'running'], { status: 'failed', error: message, finishedAt: new Date() });

  /** Stores the library and the result, and marks the build succeeded, together; nothing when it was cancelled meanwhile. */
  async function store(build: LibraryBuildModel, result: Extract<LibraryBuildTaskResult, { ok: true }>) {
    const ownerId = build.createdById;
    if (!result.library) {
      const error =
        `The computed atoms cannot make an atom library runs could use: ${result.refusal}. ` +
        'They are kept for the plots; take a finer sweep step, taller pillars or a material of higher index, and build again.';
      await transitionBuild(build.id, ['running'], { status: 'failed', error, result: result.result, finishedAt: new Date() });
      return;
    }
    const stored = result.library;
    if (ownerId === null) {
      await fail(build.id, 'The account that started this library build no longer exists; nobody could own the library.');
      return;
    }
    await retryOnDeadlock(() =>
      LibraryBuildModel.sequelize!.transaction(async (transaction) => {
        const row = await LibraryBuildModel.findByPk(build.id, { attributes: ['id', 'status'], lock: transaction.LOCK.UPDATE, transaction });
        if (row?.status !== 'running') return;
        const library = await insertAtomLibrary(build.projectId, ownerId, stored, build.scope, transaction);
        await transitionBuild(build.id, ['running'], { status: 'succeeded', result: result.result, libraryId: library.id, finishedAt: new Date() }, transaction);
      }),
    );
  }

  async function execute(buildId: number) {
    if (!options.pool() || active.has(buildId)) return;
    const build = await LibraryBuildModel.findByPk(buildId);
    if (!build || build.status !== 'queued') return;
    const pool = options.pool();
    if (!pool || active.has(buildId)) return;
    const controller = new AbortController();
    active.set(buildId, controller);
    const { port1, port2 } = new MessageChannel();
    let chain: Promise<unknown> = Promise.resolve();
    const later = (write: () => Promise<unknown>) => {
      chain = chain.then(write).catch((err: unknown) => logger.error({ err, buildId }, 'library build progress could not be written'));
      return chain;
    };
    let lastWrite = 0;
    let lastStage = '';
    let deadline: NodeJS.Timeout | undefined;
    port1.on('message', (message: LibraryBuildMessage) => {
      if (message.type === 'started') {
        void later(async () => {
          const ok = await retryOnDeadlock(() =>
            transitionBuild(buildId, ['queued'], { status: 'running', attempts: build.attempts + 1, startedAt: new Date(), progress: null, error: null }),
          );
          if (!ok) return controller.abort('gone');
          const minutes = options.timeLimitMinutes;
          if (minutes === null || controller.signal.aborted) return;
          // Past the time limit: the row is failed first (the truth), then the worker is stopped.
          const stop = async () => {
            if (await transitionBuild(buildId, ['running'], { status: 'failed', error: buildTimeLimitMessage(minutes), finishedAt: new Date() })) controller.abort('time limit');
          };
          deadline = setTimeout(() => void later(stop), minutes * 60_000).unref();
        });
      } else if (Date.now() - lastWrite >= options.progressIntervalMs || message.stage !== lastStage || message.progress.fraction === 1) {
        lastWrite = Date.now();
        lastStage = message.stage;
        void later(() => transitionBuild(buildId, ['running'], { progress: message.progress }));
      }
    });
    const task: LibraryBuildTask = {
      buildId,
      spec: build.spec,
      scope: build.scope,
      name: build.name,
      subsetSize: build.subsetSize,
      lanes: options.lanes,
      port: port2,
    };
    const running = pool.run(task, { filename: TASK_FILE.href, transferList: [port2], signal: controller.signal }) as Promise<LibraryBuildTaskResult>;
    const handled: Promise<void> = running
      .then(
        async (result) => {
          clearTimeout(deadline);
          await chain;
          if (result.ok) await store(build, result);
          else {
            logger.error({ buildId, error: result.message, stack: result.detail }, 'library build failed inside the worker');
            await fail(buildId, result.detail ? INTERNAL_FAILURE : `The library build failed: ${result.message}`);
          }
        },
        async (error: unknown) => {
          clearTimeout(deadline);
          await chain;
          if (controller.signal.aborted) return;
          logger.error({ err: error, buildId }, 'library build worker stopped');
          await fail(buildId, INTERNAL_FAILURE);
        },
      )
      .catch((err: unknown) => logger.error({ err, buildId }, 'library build result could not be stored'))
      .finally(() => {
        active.delete(buildId);
        port1.close();
        settling.delete(handled);
      });
    settling.add(handled);
  }

  const executor: LibraryBuildExecutor = {
    enqueue(buildId) {
      submitting = submitting
        .then(() => execute(buildId))
        .catch(async (err: unknown) => {
          logger.error({ err, buildId }, 'library build could not be started');
          await fail(buildId, INTERNAL_FAILURE).catch(() => undefined);
        });
    },
    abort(buildId) {
      const controller = active.get(buildId);
      if (!controller) return false;
      controller.abort('cancel');
      return true;
    },
    async recover() {
      const stale = await LibraryBuildModel.findAll({ where: { status: { [Op.in]: ['queued', 'running'] } }, attributes: ['id', 'status', 'attempts'], order: [['id', 'ASC']] });
      for (const build of stale) {
        if (build.status === 'running' && (await requeueInterruptedBuild(build, 'the server')) !== 'queued') continue;
        executor.enqueue(build.id);
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
