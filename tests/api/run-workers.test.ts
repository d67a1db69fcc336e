/**
 * RUN_QUEUE=redis with real worker processes (`server/worker-main.ts`, what `npm run worker` starts): two
 * workers share queued runs and produce the same files as the embedded engine; a cancel on the server stops
 * a run held by a worker process; a worker killed with SIGKILL mid-run loses nothing — BullMQ finds its job
 * stalled and another worker finishes the run as attempt 2.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { RunArtifactModel, RunModel } from '../../server/components/runs/run.model';
import { ToleranceStudyModel } from '../../server/components/tolerance/tolerance.model';
import type { ToleranceStudy } from '../../shared/schemas/tolerance';
import type { RunDetail } from '../../shared/schemas/runs';
import { download, twinImageDesign, waitForRun } from '../support/designs';
import { createTestApp, makeUser, signedInClient, type ApiClient, type TestApp } from '../support/test-app';
import { startWorkerProcess, stopWorkerProcess, workerAlive, type WorkerProcess } from '../support/worker-process';

let t: TestApp;
let designer: ApiClient;
let projectId: number;
const workers: WorkerProcess[] = [];

function startWorker(): WorkerProcess {
  const worker = startWorkerProcess(t.ctx.config);
  workers.push(worker);
  return worker;
}

/** Two live worker processes (each test may also run alone). */
function twoWorkers(): WorkerProcess[] {
  while (workers.filter(workerAlive).length < 2) startWorker();
  return workers.filter(workerAlive);
}

const SHARED_DESIGN = twinImageDesign({ cells: 128, iterations: 40, name: 'Shared tag' });
const ARRAYS = ['phase_a.npy', 'phase_b.npy'];
/** The embedded engine's files for SHARED_DESIGN (same design and seeds): what every worker must reproduce. */
const referenceFiles = new Map<string, Buffer>();
let referenceNames: string[] = [];

beforeAll(async () => {
  // The embedded engine first, on its own database (one app at a time per test process).
  const embedded = await createTestApp({ RUN_QUEUE: 'embedded' });
  try {
    const client = await signedInClient(embedded.app, await makeUser({ name: 'Reference Designer' }));
    const project = (await client.post('/api/projects', { name: 'Reference' })).body.project.id as number;
    const run = await waitForRun(client, project, await startRun(client, project, SHARED_DESIGN), undefined, 120_000);
    expect(run.status, run.error ?? '').toBe('succeeded');
    referenceNames = run.artifacts.map((f) => f.name).sort();
    for (const name of ARRAYS) referenceFiles.set(name, await files(client, project, run, name));
  } finally {
    await embedded.close();
  }
  // Quick stall detection: a killed worker's run is taken by another within a few seconds.
  // Cached lists and run details live long here: what the server shows of the workers' progress must come from
  // the workers' announcements (server/db/list-caches.ts), not from the cache running out.
  t = await createTestApp(
    { RUN_QUEUE: 'redis', RUN_STALLED_CHECK_SECONDS: '0.5', RUN_LOCK_SECONDS: '2', RUNS_PER_USER: '10', RUNS_PER_PROJECT: '10', ACCESS_CACHE_SECONDS: '300' },
    { worker: false },
  );
  designer = await signedInClient(t.app, await makeUser({ name: 'Queue Designer' }));
  projectId = (await designer.post('/api/projects', { name: 'Shared queue' })).body.project.id;
}, 150_000);

afterAll(async () => {
  await Promise.all(workers.map(stopWorkerProcess));
  await t?.close();
}, 30_000);

async function startRun(client: ApiClient, project: number, design: object): Promise<number> {
  const revision = await client.post(`/api/projects/${project}/revisions`, { design, message: '' });
  expect(revision.status, JSON.stringify(revision.body)).toBe(201);
  const run = await client.post(`/api/projects/${project}/revisions/${revision.body.revision.number}/runs`);
  expect(run.status, JSON.stringify(run.body)).toBe(202);
  return run.body.run.id as number;
}

function files(client: ApiClient, project: number, run: RunDetail, name: string): Promise<Buffer> {
  return download(client, `/api/projects/${project}/runs/${run.id}/artifacts/${name}`).then((r) => r.body as Buffer);
}

describe('worker processes on one Redis queue', () => {
  it('two workers share six queued runs, all succeed, and the arrays equal the embedded engine\'s byte for byte', async () => {
    const ids: number[] = [];
    for (let i = 0; i < 6; i++) ids.push(await startRun(designer, projectId, SHARED_DESIGN));
    const listed = async () => ((await designer.get(`/api/projects/${projectId}/runs`)).body.runs as { id: number; status: string }[]).filter((r) => ids.includes(r.id));
    expect((await listed()).map((r) => r.status)).toEqual(Array(6).fill('queued'));
    const [a, b] = twoWorkers();
    const runs: RunDetail[] = [];
    for (const id of ids) runs.push(await waitForRun(designer, projectId, id, undefined, 120_000));
    for (const run of runs) expect(run.status, run.error ?? '').toBe('succeeded');
    // The list read while they were queued is not shown again: the workers' announcements dropped it.
    expect((await listed()).map((r) => r.status)).toEqual(Array(6).fill('succeeded'));
    expect(a.taken.length, `first worker took ${a.taken.join(', ')}`).toBeGreaterThan(0);
    expect(b.taken.length, `second worker took ${b.taken.join(', ')}`).toBeGreaterThan(0);
    expect([...a.taken, ...b.taken].sort((x, y) => x - y)).toEqual(ids);
    for (const run of runs) {
      expect(run.artifacts.map((f) => f.name).sort()).toEqual(referenceNames);
      for (const name of ARRAYS) {
        const expected = referenceFiles.get(name)!;
        expect(expected.length).toBeGreaterThan(128 * 128 * 4);
        expect((await files(designer, projectId, run, name)).equals(expected), `${name} of run ${run.id}`).toBe(true);
      }
    }
    // The admin page's counts come from BullMQ itself.
    const admin = await signedInClient(t.app, await makeUser({ siteRole: 'admin', name: 'Queue Admin' }));
    const queue = await admin.get('/api/admin/run-queue');
    expect(queue.status).toBe(200);
    expect(queue.body.engine).toBe('redis');
    expect(queue.body.counts.completed).toBeGreaterThanOrEqual(6);
    expect(queue.body.counts).toMatchObject({ waiting: 0, failed: 0 });
  }, 180_000);

  it('a queued run whose job Redis lost is given a new job when the server recovers, and runs', async () => {
    twoWorkers();
    const revisionId = (await designer.post(`/api/projects/${projectId}/revisions`, { design: twinImageDesign(), message: '' })).body.revision.id as number;
    // A row queued with no job in Redis: what a Redis restarted without its data leaves behind.
    const lost = await RunModel.create({ projectId, revisionId, startedById: null, queuedAt: new Date(), stage: 'queued' });
    await new Promise((r) => setTimeout(r, 1000));
    expect((await RunModel.findByPk(lost.id))!.status).toBe('queued');
    const outcome = await t.ctx.runQueue.recover();
    expect(outcome.requeued).toContain(lost.id);
    const run = await waitForRun(designer, projectId, lost.id, undefined, 60_000);
    expect(run.status, run.error ?? '').toBe('succeeded');
    expect(run.attempts).toBe(1);
    // A second recovery finds its job and adds none.
    expect((await t.ctx.runQueue.recover()).requeued).toEqual([]);
  }, 90_000);

  it('a cancel on the server stops the run on the worker process holding it within 2 s', async () => {
    twoWorkers();
    const id = await startRun(designer, projectId, twinImageDesign({ cells: 512, iterations: 2000, name: 'Long twin' }));
    await waitForRun(designer, projectId, id, (run) => run.status === 'running' && run.stage === 'phase retrieval', 60_000);
    const holder = workers.find((w) => w.taken.includes(id))!;
    expect(holder).toBeDefined();
    const asked = Date.now();
    const res = await designer.post(`/api/projects/${projectId}/runs/${id}/cancel`);
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const deadline = asked + 2_000;
    while (!holder.cancelledAt.has(id) && Date.now() < deadline) await new Promise((r) => setTimeout(r, 25));
    expect(holder.cancelledAt.get(id), 'the worker aborted the run').toBeLessThanOrEqual(deadline);
    const run = await waitForRun(designer, projectId, id);
    expect(run.status).toBe('cancelled');
    expect(run.artifacts).toEqual([]);
    expect(await RunArtifactModel.count({ where: { runId: id } })).toBe(0);
  }, 90_000);

  it('a worker killed with SIGKILL mid-run: another worker finishes the run as attempt 2, with one set of files', async () => {
    twoWorkers();
    const id = await startRun(designer, projectId, twinImageDesign({ cells: 256, iterations: 400, name: 'Killed twin' }));
    await waitForRun(designer, projectId, id, (run) => run.status === 'running' && run.stage === 'phase retrieval', 60_000);
    const holder = workers.find((w) => w.taken.includes(id))!;
    const other = workers.find((w) => w !== holder && workerAlive(w))!;
    holder.child.kill('SIGKILL');
    const run = await waitForRun(designer, projectId, id, undefined, 120_000);
    expect(run.status, run.error ?? '').toBe('succeeded');
    expect(run.attempts).toBe(2);
    expect(other.taken).toContain(id);
    expect(run.events.map((e) => e.message)).toEqual(expect.arrayContaining(['a worker stopped during attempt 1; queued again', 'started again (attempt 2 of 3)']));
    const names = run.artifacts.map((f) => f.name);
    expect(new Set(names).size).toBe(names.length);
    expect(await RunArtifactModel.count({ where: { runId: id } })).toBe(names.length);
  }, 150_000);

  it('a worker killed with SIGKILL during a fabrication sweep: another worker finishes the study as attempt 2', async () => {
    twoWorkers();
    const runId = await startRun(designer, projectId, twinImageDesign({ cells: 512, iterations: 20, name: 'Swept twin' }));
    expect((await waitForRun(designer, projectId, runId, undefined, 120_000)).status).toBe('succeeded');
    const points = Array.from({ length: 21 }, (_, i) => (i - 10) * 5);
    const started = await designer.post(`/api/projects/${projectId}/runs/${runId}/tolerance`, { widthBiasNm: points, detuneNm: points });
    expect(started.status, JSON.stringify(started.body)).toBe(202);
    const studyId = started.body.study.id as number;
    const studyOf = async () => (await designer.get(`/api/projects/${projectId}/runs/${runId}/tolerance`)).body.study as ToleranceStudy;
    const until = async (done: (s: ToleranceStudy) => boolean, timeoutMs: number) => {
      const deadline = Date.now() + timeoutMs;
      for (let s = await studyOf(); ; s = await studyOf()) {
        if (done(s)) return s;
        if (Date.now() > deadline) throw new Error(`study ${studyId}: last seen ${JSON.stringify(s)}`);
        await new Promise((r) => setTimeout(r, 50));
      }
    };
    await until((s) => s.status === 'running' && s.progress > 0, 60_000);
    const holder = workers.find((w) => workerAlive(w) && w.takenStudies.includes(studyId))!;
    expect(holder, 'a worker process logged taking the study').toBeDefined();
    holder.child.kill('SIGKILL');
    const study = await until((s) => s.status === 'succeeded' || s.status === 'failed', 120_000);
    expect(study.status, study.error ?? '').toBe('succeeded');
    expect(study.results!.widthBias).toHaveLength(21);
    expect((await ToleranceStudyModel.findByPk(studyId))!.attempts).toBe(2);
    expect(workers.some((w) => w !== holder && w.takenStudies.includes(studyId))).toBe(true);
  }, 240_000);
});
