/** The run queue the configuration asks for (RUN_QUEUE), and a worker process's settings, from AppConfig. */
import type { Logger } from 'pino';
import type { AppConfig } from '../../config';
import type { RunExecutorOptions } from './run-executor';
import { createEmbeddedRunQueue, type RunQueue } from './run-queue';
import { createRedisRunQueue, type RedisRunWorkerOptions } from './run-queue-redis';

/** Threads, helper threads, limits and priority of the runs' pool, as configured. */
export function executorOptions(config: AppConfig, logger: Logger, threads = config.RUN_WORKERS): RunExecutorOptions {
  return { logger, threads, parallelWithinRuns: config.RUN_HELPER_THREADS, limits: config, nice: config.RUN_WORKER_NICE, memoryBudgetMb: config.RUN_MEMORY_BUDGET_MB };
}

/** RUN_QUEUE=embedded: runs on this process's threads; RUN_QUEUE=redis: this process only enqueues. */
export function createConfiguredRunQueue(config: AppConfig, logger: Logger, threads = config.RUN_WORKERS): RunQueue {
  if (config.RUN_QUEUE === 'redis') return createRedisRunQueue({ logger, redis: config, recheckMs: config.RUN_QUEUE_RECHECK_SECONDS * 1000 });
  return createEmbeddedRunQueue(executorOptions(config, logger, threads));
}

/** A worker process's settings (`npm run worker`). */
export function workerOptions(config: AppConfig, logger: Logger, threads = config.RUN_WORKERS): RedisRunWorkerOptions {
  return {
    ...executorOptions(config, logger, threads),
    redis: config,
    stalledIntervalMs: config.RUN_STALLED_CHECK_SECONDS * 1000,
    lockMs: config.RUN_LOCK_SECONDS * 1000,
  };
}
