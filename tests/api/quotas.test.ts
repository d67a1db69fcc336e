/**
 * What one person and one project may make the server do at once: runs and tolerance studies queued or
 * running per person (RUNS_PER_USER) and per project (RUNS_PER_PROJECT), counted so that simultaneous
 * requests cannot slip past together; the run time limit (RUN_TIME_LIMIT_MINUTES); run event streams per
 * person (EVENT_STREAMS_PER_USER), which end once their reader loses access: at once when a membership is
 * removed, otherwise at the next periodic check (EVENT_STREAM_RECHECK_SECONDS).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createEmbeddedRunQueue } from '../../server/components/runs/run-queue';
import { RunModel } from '../../server/components/runs/run.model';
import { ToleranceStudyModel } from '../../server/components/tolerance/tolerance.model';
import { UserModel } from '../../server/components/users/user.model';
import { deflectorDesign, twinImageDesign, waitForRun } from '../support/designs';
import { createTestApp, makeUser, RUN_QUEUE_ENGINES, signedInClient, type ApiClient, type TestApp } from '../support/test-app';

let t: TestApp;
let owner: ApiClient;
let designer: ApiClient;
let designerId: number;
let designerEmail: string;

/** A project of the owner with the designer as a member and one revision. */
async function project(design: object = deflectorDesign()) {
  const projectId = (await owner.post('/api/projects', { name: 'Quota project' })).body.project.id as number;
  await owner.post(`/api/projects/${projectId}/members`, { email: designerEmail, role: 'designer' });
  const revision = (await owner.post(`/api/projects/${projectId}/revisions`, { design })).body.revision;
  return { projectId, revisionId: revision.id as number, number: revision.number as number };
}

/** A run row waiting in the queue (never handed to a worker, so it stays queued). */
async function waitingRun(projectId: number, revisionId: number, startedById: number | null) {
  return RunModel.create({ projectId, revisionId, startedById, queuedAt: new Date(), stage: 'queued' });
}

/** Frees every slot: what these tests left queued or running is cancelled. */
async function cancelEverything() {
  await RunModel.update({ status: 'cancelled', finishedAt: new Date() }, { where: { status: ['queued', 'running'] } });
  await ToleranceStudyModel.update({ status: 'failed', finishedAt: new Date() }, { where: { status: ['queued', 'running'] } });
}

/** An event stream held open: `opened` once the first event arrived, `done` with everything once it ends. */
function openStream(client: ApiClient, url: string) {
  let opened!: () => void;
  const first = new Promise<void>((resolve) => (opened = resolve));
  const request = client
    .get(url)
    .buffer(true)
    .parse((stream, callback) => {
      let text = '';
      stream.setEncoding('utf8');
      stream.on('data', (chunk: string) => {
        text += chunk;
        opened();
      });
      stream.on('end', () => callback(null, text));
    });
  // An aborted stream (closed by this side) settles as status 0.
  const done = request.then(
    (res) => ({ status: res.status, text: String(res.body ?? '') }),
    () => ({ status: 0, text: '' }),
  );
  return { request, done, opened: Promise.race([first, done.then(() => undefined)]) };
}

function within<T>(promise: Promise<T>, ms: number, what: string): Promise<T> {
  return Promise.race([promise, new Promise<never>((_, reject) => setTimeout(() => reject(new Error(`${what} did not happen within ${ms} ms`)), ms))]);
}

// Each test app lives in its own describe, one after another: the models bind to the latest app's database.
describe.each(RUN_QUEUE_ENGINES)('with small limits (%s run queue)', (engine) => {
  beforeAll(async () => {
    // 0.05 minutes = 3 s: long enough for a run to start on a loaded machine, far shorter than the long design.
    t = await createTestApp({
      RUN_QUEUE: engine,
      RUNS_PER_USER: '2',
      RUNS_PER_PROJECT: '3',
      RUN_TIME_LIMIT_MINUTES: '0.05',
      EVENT_STREAMS_PER_USER: '2',
      EVENT_STREAM_RECHECK_SECONDS: '0.5',
    });
    const ownerUser = await makeUser({ name: 'Quota Owner' });
    const designerUser = await makeUser({ name: 'Quota Designer' });
    designerId = designerUser.id;
    designerEmail = designerUser.email;
    owner = await signedInClient(t.app, ownerUser);
    designer = await signedInClient(t.app, designerUser);
  });
  afterAll(async () => {
    await t?.close();
  });

  describe('runs at once', () => {
    it('the next run past the per-person limit gets 429 naming RUNS_PER_USER; a finished run frees the slot', async () => {
      await cancelEverything();
      const p = await project();
      const first = await waitingRun(p.projectId, p.revisionId, designerId);
      await waitingRun(p.projectId, p.revisionId, designerId);
      const refused = await designer.post(`/api/projects/${p.projectId}/revisions/${p.number}/runs`);
      expect(refused.status).toBe(429);
      expect(refused.body.error).toMatch(/RUNS_PER_USER = 2/);
      expect(refused.body.error).not.toMatch(/\n\s+at /);
      // The limit holds over all of the person's projects.
      const other = await project();
      expect((await designer.post(`/api/projects/${other.projectId}/revisions/${other.number}/runs`)).status).toBe(429);

      await first.update({ status: 'cancelled', finishedAt: new Date() });
      const accepted = await designer.post(`/api/projects/${p.projectId}/revisions/${p.number}/runs`);
      expect(accepted.status).toBe(202);
      await cancelEverything();
    });

    it('the next run past the per-project limit gets 429 naming RUNS_PER_PROJECT, whoever started the others', async () => {
      await cancelEverything();
      const p = await project();
      for (let i = 0; i < 3; i++) await waitingRun(p.projectId, p.revisionId, null);
      const refused = await designer.post(`/api/projects/${p.projectId}/revisions/${p.number}/runs`);
      expect(refused.status).toBe(429);
      expect(refused.body.error).toMatch(/RUNS_PER_PROJECT = 3/);
      await cancelEverything();
    });

    it('tolerance studies count as runs, both ways', async () => {
      await cancelEverything();
      const p = await project();
      const finished = await RunModel.create({ projectId: p.projectId, revisionId: p.revisionId, startedById: null, queuedAt: new Date(), status: 'succeeded', progress: 1, stage: 'done', finishedAt: new Date() });
      // A queued study of the designer and one waiting run: the designer is at the limit of two.
      await ToleranceStudyModel.create({ runId: finished.id, request: { widthBiasNm: [0], detuneNm: [] }, startedById: designerId, queuedAt: new Date(), stage: 'queued' });
      await waitingRun(p.projectId, p.revisionId, designerId);
      const run = await designer.post(`/api/projects/${p.projectId}/revisions/${p.number}/runs`);
      expect(run.status).toBe(429);
      expect(run.body.error).toMatch(/RUNS_PER_USER/);

      await ToleranceStudyModel.update({ status: 'failed' }, { where: { runId: finished.id } });
      await waitingRun(p.projectId, p.revisionId, designerId);
      const study = await designer.post(`/api/projects/${p.projectId}/runs/${finished.id}/tolerance`, { widthBiasNm: [0], detuneNm: [] });
      expect(study.status).toBe(429);
      expect(study.body.error).toMatch(/RUNS_PER_USER = 2/);
      await cancelEverything();
    });

    it('simultaneous requests cannot slip past the limit together', async () => {
      await cancelEverything();
      const p = await project(twinImageDesign({ cells: 512, iterations: 2000, name: 'Long twin' }));
      const answers = await Promise.all(Array.from({ length: 6 }, () => designer.post(`/api/projects/${p.projectId}/revisions/${p.number}/runs`)));
      const statuses = answers.map((r) => r.status).sort();
      expect(statuses).toEqual([202, 202, 429, 429, 429, 429]);
      expect(await RunModel.count({ where: { projectId: p.projectId } })).toBe(2);
      for (const answer of answers.filter((r) => r.status === 202)) {
        expect((await designer.post(`/api/projects/${p.projectId}/runs/${answer.body.run.id}/cancel`)).status).toBe(200);
      }
    });
  });

  describe('run time limit', () => {
    it('a run still running past RUN_TIME_LIMIT_MINUTES is failed with a message naming the limit, and the queue goes on', async () => {
      await cancelEverything();
      const p = await project(twinImageDesign({ cells: 512, iterations: 5000, name: 'Endless twin' }));
      const started = (await designer.post(`/api/projects/${p.projectId}/revisions/${p.number}/runs`)).body.run;
      const run = await waitForRun(designer, p.projectId, started.id, undefined, 90_000);
      expect(run.status).toBe('failed');
      expect(run.error).toMatch(/time limit of 0\.05 minutes \(RUN_TIME_LIMIT_MINUTES\)/);
      expect(run.events.at(-1)).toMatchObject({ status: 'failed', message: run.error });
      expect(run.artifacts).toEqual([]);
      // Nothing writes to the failed run afterwards, and the worker is free for the next run.
      await new Promise((r) => setTimeout(r, 1500));
      expect((await RunModel.findByPk(started.id))!.status).toBe('failed');
      const quick = (await owner.post(`/api/projects/${p.projectId}/revisions`, { design: deflectorDesign() })).body.revision.number;
      const next = (await designer.post(`/api/projects/${p.projectId}/revisions/${quick}/runs`)).body.run;
      // The one worker thread takes the next run (whether it then fits the 3 s limit depends on the machine's load).
      const picked = await waitForRun(designer, p.projectId, next.id, (r) => r.attempts === 1, 90_000);
      expect(picked.status).not.toBe('queued');
    });
  });

  describe('run event streams', () => {
    it('a person may hold EVENT_STREAMS_PER_USER streams; the next gets 429 naming it, and closing one frees it', async () => {
      const p = await project();
      const run = await waitingRun(p.projectId, p.revisionId, null);
      const url = `/api/projects/${p.projectId}/runs/${run.id}/events`;
      const streams = [openStream(designer, url), openStream(designer, url)];
      await within(Promise.all(streams.map((s) => s.opened)), 20_000, 'two streams opening');
      const refused = await designer.get(url);
      expect(refused.status).toBe(429);
      expect(refused.body.error).toMatch(/EVENT_STREAMS_PER_USER = 2/);
      // Another person is not held back by the designer's streams.
      const other = openStream(owner, url);
      await within(other.opened, 20_000, 'the owner’s stream opening');
      other.request.abort();

      streams[0].request.abort();
      let third: ReturnType<typeof openStream> | null = null;
      const deadline = Date.now() + 20_000;
      while (!third && Date.now() < deadline) {
        const attempt = openStream(designer, url);
        const first = await within(Promise.race([attempt.opened.then(() => 'open'), attempt.done.then((r) => r.status)]), 20_000, 'a stream answer');
        if (first === 'open') third = attempt;
        else await new Promise((r) => setTimeout(r, 200));
      }
      expect(third).not.toBeNull();
      third!.request.abort();
      streams[1].request.abort();
      await run.update({ status: 'cancelled' });
    });

    it('a disabled account stops receiving at the next periodic check (EVENT_STREAM_RECHECK_SECONDS): the stream ends', async () => {
      const p = await project();
      const viewer = await makeUser({ name: 'Soon Disabled' });
      await owner.post(`/api/projects/${p.projectId}/members`, { email: viewer.email, role: 'viewer' });
      const client = await signedInClient(t.app, viewer);
      const run = await waitingRun(p.projectId, p.revisionId, null);
      const stream = openStream(client, `/api/projects/${p.projectId}/runs/${run.id}/events`);
      await within(stream.opened, 20_000, 'the stream opening');
      // Straight in the database: no hook announces it, only the periodic check can notice.
      await UserModel.update({ disabledAt: new Date() }, { where: { id: viewer.id } });
      const { status, text } = await within(stream.done, 20_000, 'the stream ending');
      expect(status).toBe(200);
      expect(text).toMatch(/event: end\ndata: \{"reason":"You no longer have access to this project"\}/);
      await run.update({ status: 'cancelled' });
    });
  });

});

describe('membership removal', () => {
  let t2: TestApp;
  let owner2: ApiClient;
  beforeAll(async () => {
    // A periodic check far beyond the test's patience: only the removal itself can end the stream.
    t2 = await createTestApp({ EVENT_STREAM_RECHECK_SECONDS: '600' });
    owner2 = await signedInClient(t2.app, await makeUser({ name: 'Removing Owner' }));
  });
  afterAll(async () => {
    await t2?.close();
  });

  it('a member removed from the project stops receiving at once: the stream ends', async () => {
    const projectId = (await owner2.post('/api/projects', { name: 'Removal project' })).body.project.id as number;
    const revision = (await owner2.post(`/api/projects/${projectId}/revisions`, { design: deflectorDesign() })).body.revision;
    const viewer = await makeUser({ name: 'Soon Removed' });
    await owner2.post(`/api/projects/${projectId}/members`, { email: viewer.email, role: 'viewer' });
    const client = await signedInClient(t2.app, viewer);
    const run = await waitingRun(projectId, revision.id, null);
    const stream = openStream(client, `/api/projects/${projectId}/runs/${run.id}/events`);
    await within(stream.opened, 20_000, 'the stream opening');
    expect((await owner2.delete(`/api/projects/${projectId}/members/${viewer.id}`)).status).toBe(204);
    const { status, text } = await within(stream.done, 20_000, 'the stream ending');
    expect(status).toBe(200);
    expect(text).toMatch(/event: end\ndata: \{"reason":"You no longer have access to this project"\}/);
    // Nothing about the run was sent after the end.
    expect(text.lastIndexOf('event: update')).toBeLessThan(text.indexOf('event: end'));
    // The stream's slot is free again: the removed person's next stream is refused for access, not for the cap.
    expect((await client.get(`/api/projects/${projectId}/runs/${run.id}/events`)).status).toBe(404);
    await run.update({ status: 'cancelled' });
  });
});

describe('tolerance study time limit', () => {
  let t3: TestApp;
  beforeAll(async () => {
    t3 = await createTestApp();
  });
  afterAll(async () => {
    await t3?.close();
  });

  it('a study still running past RUN_TIME_LIMIT_MINUTES is failed with a message naming the limit', async () => {
    const client = await signedInClient(t3.app, await makeUser({ name: 'Study Designer' }));
    const projectId = (await client.post('/api/projects', { name: 'Study limit' })).body.project.id as number;
    const design = { ...deflectorDesign(), setup: { wavelengthNm: 633, periodNm: 450, cells: 512 } };
    const number = (await client.post(`/api/projects/${projectId}/revisions`, { design })).body.revision.number;
    // The run itself under the default limit; the study then on a queue of its own with a 1.2 s limit (the study takes several seconds).
    const run = await waitForRun(client, projectId, (await client.post(`/api/projects/${projectId}/revisions/${number}/runs`)).body.run.id, undefined, 180_000);
    expect(run.status, run.error ?? '').toBe('succeeded');
    const study = await ToleranceStudyModel.create({
      runId: run.id,
      request: { widthBiasNm: Array.from({ length: 21 }, (_, i) => i * 5 - 50), detuneNm: Array.from({ length: 21 }, (_, i) => i * 5 - 50) },
      startedById: null,
      queuedAt: new Date(),
      stage: 'queued',
    });
    const strict = createEmbeddedRunQueue({ logger: t3.ctx.logger, threads: 1, limits: { RUN_TIME_LIMIT_MINUTES: 0.02, PROJECT_STORAGE_MB: 2048 } });
    try {
      await strict.start();
      const deadline = Date.now() + 90_000;
      let row = await ToleranceStudyModel.findByPk(study.id);
      while (row && (row.status === 'queued' || row.status === 'running') && Date.now() < deadline) {
        await new Promise((r) => setTimeout(r, 200));
        row = await ToleranceStudyModel.findByPk(study.id);
      }
      expect(row?.status).toBe('failed');
      expect(row?.error).toMatch(/^The study was stopped after the time limit of 0\.02 minutes \(RUN_TIME_LIMIT_MINUTES\)/);
      const seen = (await client.get(`/api/projects/${projectId}/runs/${run.id}/tolerance`)).body.study;
      expect(seen).toMatchObject({ status: 'failed', error: row?.error, results: null });
    } finally {
      await strict.stop();
    }
  });
});
