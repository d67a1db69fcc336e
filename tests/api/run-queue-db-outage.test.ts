/**
 * RUN_QUEUE=redis when MariaDB stops answering: a worker process that takes a run meanwhile waits for the
 * database instead of failing the run, and runs it once MariaDB is back. A MariaDB of this file's own, so that
 * stopping it disturbs no other test.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { freePort } from '../../scripts/lib/free-port';
import { startMariaDb, type RunningMariaDb } from '../../scripts/lib/mariadb';
import { deflectorDesign, waitForRun } from '../support/designs';
import { TEST_DB_PASSWORD, TEST_DB_PATTERN, TEST_DB_USER } from '../support/global-services';
import { createTestApp, makeUser, signedInClient, type ApiClient, type TestApp } from '../support/test-app';
import { startWorkerProcess, stopWorkerProcess, type WorkerProcess } from '../support/worker-process';

let t: TestApp;
let db: RunningMariaDb;
let dbPort: number;
let dataDir: string;
let designer: ApiClient;
let worker: WorkerProcess | null = null;

const startDb = () => startMariaDb({ dataDir, port: dbPort, user: TEST_DB_USER, password: TEST_DB_PASSWORD, databases: [], grants: [TEST_DB_PATTERN] });

beforeAll(async () => {
  dataDir = mkdtempSync(path.join(tmpdir(), 'pw-outage-db-'));
  dbPort = await freePort();
  db = await startDb();
  t = await createTestApp({ RUN_QUEUE: 'redis', DB_PORT: String(dbPort) }, { worker: false });
  designer = await signedInClient(t.app, await makeUser({ name: 'Outage Designer' }));
}, 120_000);

afterAll(async () => {
  if (worker) await stopWorkerProcess(worker);
  await t?.close();
  await db?.stop();
  rmSync(dataDir, { recursive: true, force: true });
}, 60_000);

describe('MariaDB unreachable', () => {
  it('a worker waits for the database and then runs the queued run; the run does not fail', async () => {
    const projectId = (await designer.post('/api/projects', { name: 'Outage queue' })).body.project.id as number;
    const number = (await designer.post(`/api/projects/${projectId}/revisions`, { design: deflectorDesign() })).body.revision.number as number;
    const revisionId = (await designer.get(`/api/projects/${projectId}/revisions/${number}`)).body.revision.id as number;
    worker = startWorkerProcess(t.ctx.config);
    const log = worker.messages;
    await expect.poll(() => log.join('\n'), { timeout: 30_000, interval: 200 }).toMatch(/run worker taking jobs/);
    // A queued run whose job reaches the worker while MariaDB is down.
    const { RunModel } = await import('../../server/components/runs/run.model');
    const id = (await RunModel.create({ projectId, revisionId, startedById: null, queuedAt: new Date(), stage: 'queued' })).id;
    await db.stop();
    t.ctx.runQueue.enqueue(id);
    await expect.poll(() => log.join('\n'), { timeout: 30_000, interval: 200 }).toMatch(/MariaDB does not answer: waiting for it/);
    await new Promise((resolve) => setTimeout(resolve, 3_000));
    db = await startDb();
    const run = await waitForRun(designer, projectId, id, undefined, 60_000);
    expect(run.status, run.error ?? '').toBe('succeeded');
    expect(run.attempts).toBe(1);
    expect(log.join('\n')).toMatch(/MariaDB answers again/);
  }, 150_000);
});
