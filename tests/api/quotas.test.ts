/**
 * What one person and one project may make the server do at once: runs and tolerance studies queued or
 * running per person (RUNS_PER_USER) and per project (RUNS_PER_PROJECT), counted so that simultaneous
 * requests cannot slip past together, and the run time limit (RUN_TIME_LIMIT_MINUTES).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { RunModel } from '../../server/components/runs/run.model';
import { ToleranceStudyModel } from '../../server/components/tolerance/tolerance.model';
import { deflectorDesign, twinImageDesign, waitForRun } from '../support/designs';
import { createTestApp, makeUser, signedInClient, type ApiClient, type TestApp } from '../support/test-app';

let t: TestApp;
let owner: ApiClient;
let designer: ApiClient;
let designerId: number;
let designerEmail: string;

beforeAll(async () => {
  // 0.05 minutes = 3 s: long enough for a run to start on a loaded machine, far shorter than the long design.
  t = await createTestApp({ RUNS_PER_USER: '2', RUNS_PER_PROJECT: '3', RUN_TIME_LIMIT_MINUTES: '0.05' });
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
    const done = await waitForRun(designer, p.projectId, next.id, undefined, 90_000);
    expect(done.status, done.error ?? '').toBe('succeeded');
  });
});
