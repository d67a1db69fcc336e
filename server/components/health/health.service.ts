/**
 * The server's health: the database answers a ping within its own short time limit, and what the run queue and
 * the input pool are doing. Never waits longer than the ping's limit, whatever the database does; at most one
 * ping is in flight, so a database that stopped answering is not buried under pings.
 */
import type { Sequelize } from 'sequelize';
import type { RunQueueState } from '../runs/run-queue';
import type { InputPoolState } from '../../lib/input-pool';

export interface Health {
  ok: boolean;
  database: { ok: boolean; ms: number; error?: string };
  runQueue: RunQueueState;
  inputs: InputPoolState;
}

export interface HealthSources {
  sequelize: Sequelize;
  timeoutMs: number;
  runQueue: () => RunQueueState;
  inputs: () => InputPoolState;
}

/** A checker that shares one database ping among concurrent callers. */
export function healthChecker(sources: HealthSources): () => Promise<Health> {
  let ping: Promise<void> | null = null;
  const pingOnce = () => {
    ping ??= sources.sequelize
      .query('SELECT 1')
      .then(() => undefined)
      .finally(() => {
        ping = null;
      });
    return ping;
  };

  async function database(): Promise<Health['database']> {
    const started = performance.now();
    let timer: NodeJS.Timeout | undefined;
    const late = new Promise<never>((_, reject) => {
      timer = setTimeout(() => reject(new Error(`no answer within ${sources.timeoutMs} ms`)), sources.timeoutMs);
    });
    try {
      await Promise.race([pingOnce(), late]);
      return { ok: true, ms: Math.round(performance.now() - started) };
    } catch (error) {
      return { ok: false, ms: Math.round(performance.now() - started), error: error instanceof Error ? error.message : 'the ping failed' };
    } finally {
      clearTimeout(timer);
    }
  }

  return async () => {
    const db = await database();
    const runQueue = sources.runQueue();
    return { ok: db.ok && runQueue.accepting, database: db, runQueue, inputs: sources.inputs() };
  };
}
