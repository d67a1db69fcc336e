/**
 * RUN_QUEUE=redis when Redis restarts without its data (no append-only file): the run rows in MariaDB are the
 * truth, so when the server's connection comes back it gives every queued run a job again — none is lost.
 * A Redis of this file's own, so that stopping it disturbs no other test.
 */
import pino from 'pino';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { freePort } from '../../scripts/lib/free-port';
import { startRedis, type RunningRedis } from '../../scripts/lib/redis';
import { workerOptions } from '../../server/components/runs/run-queue-config';
import { createRedisRunWorker, type RedisRunWorker } from '../../server/components/runs/run-queue-redis';
import { deflectorDesign, waitForRun } from '../support/designs';
import { createTestApp, makeUser, signedInClient, type ApiClient, type TestApp } from '../support/test-app';

let t: TestApp;
let redis: RunningRedis;
let worker: RedisRunWorker | null = null;
let designer: ApiClient;
let port: number;

beforeAll(async () => {
  port = await freePort();
  redis = await startRedis({ port, dataDir: null });
  t = await createTestApp({ RUN_QUEUE: 'redis', REDIS_URL: redis.url, RUNS_PER_USER: '10', RUNS_PER_PROJECT: '10' }, { worker: false });
  designer = await signedInClient(t.app, await makeUser({ name: 'Restart Designer' }));
}, 60_000);

afterAll(async () => {
  await worker?.stop();
  await t?.close();
  await redis?.stop();
}, 30_000);

describe('Redis restarted with runs queued', () => {
  it('loses none: the server queues them again when Redis answers, and a worker then runs them all', async () => {
    const projectId = (await designer.post('/api/projects', { name: 'Restart queue' })).body.project.id as number;
    const number = (await designer.post(`/api/projects/${projectId}/revisions`, { design: deflectorDesign() })).body.revision.number as number;
    const ids: number[] = [];
    for (let i = 0; i < 3; i++) ids.push((await designer.post(`/api/projects/${projectId}/revisions/${number}/runs`)).body.run.id);
    // No worker yet: the three wait in Redis. Then Redis stops and comes back empty.
    const counts = (t.ctx.runQueue as { counts(): Promise<Record<string, number>> }).counts;
    await expect.poll(async () => (await counts()).waiting, { timeout: 5_000 }).toBe(3);
    await redis.stop();
    redis = await startRedis({ port, dataDir: null });
    // The server's connection comes back and it gives the queued rows their jobs again.
    await expect.poll(async () => (await counts().catch(() => ({ waiting: -1 }))).waiting, { timeout: 20_000, interval: 200 }).toBe(3);
    worker = createRedisRunWorker(workerOptions(t.ctx.config, pino({ level: 'silent' }), 1));
    await worker.start();
    for (const id of ids) {
      const run = await waitForRun(designer, projectId, id, undefined, 60_000);
      expect(run.status, run.error ?? '').toBe('succeeded');
      expect(run.attempts).toBe(1);
    }
  }, 120_000);
});
