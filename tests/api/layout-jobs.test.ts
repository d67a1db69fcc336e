/**
 * Layout jobs of finished runs — layout regions, design checks recomputed for runs without drc.json, GDSII
 * regenerated for the fab package — run on a worker thread with a time limit (FAB_JOB_TIME_LIMIT_SECONDS)
 * and are rate-limited per person (FAB_REQUESTS_PER_MINUTE).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { RunArtifactModel, RunModel } from '../../server/components/runs/run.model';
import { deflectorDesign } from '../support/designs';
import { storeSyntheticLayout } from '../support/fab-fixture';
import { createTestApp, makeUser, signedInClient, type ApiClient, type TestApp } from '../support/test-app';

/** A project with a synthetic finished run holding a 64² layout with gap violations. */
async function finishedRun(client: ApiClient) {
  const projectId = (await client.post('/api/projects', { name: 'Layout jobs' })).body.project.id as number;
  const revision = (await client.post(`/api/projects/${projectId}/revisions`, { design: deflectorDesign() })).body.revision;
  const run = await RunModel.create({ projectId, revisionId: revision.id, startedById: null, queuedAt: new Date(), status: 'succeeded', progress: 1, stage: 'done', finishedAt: new Date() });
  await storeSyntheticLayout(run.id, deflectorDesign());
  return { projectId, runId: run.id, base: `/api/projects/${projectId}/runs/${run.id}` };
}

describe('rate limit per person', () => {
  let t: TestApp;
  let designer: ApiClient;
  let other: ApiClient;
  beforeAll(async () => {
    t = await createTestApp({ FAB_REQUESTS_PER_MINUTE: '3' });
    designer = await signedInClient(t.app, await makeUser({ name: 'Busy Designer' }));
    other = await signedInClient(t.app, await makeUser({ name: 'Other Designer' }));
  });
  afterAll(async () => {
    await t?.close();
  });

  it('answers regions and design checks (recomputed on the worker without drc.json) up to the limit, then 429 naming FAB_REQUESTS_PER_MINUTE', async () => {
    const { base, runId } = await finishedRun(designer);
    const region = await designer.get(`${base}/layout?x0=0&y0=0&size=16`);
    expect(region.status, JSON.stringify(region.body)).toBe(200);
    expect(region.body).toMatchObject({ n: 64, x0: 0, y0: 0, width: 16, height: 16 });
    expect(region.body.violations.length).toBeGreaterThan(0);

    const stored = await designer.get(`${base}/design-check`);
    expect(stored.status).toBe(200);
    // A run from before drc.json existed: the same check, computed again on the layout worker.
    await RunArtifactModel.destroy({ where: { runId, name: 'drc.json' } });
    const recomputed = await designer.get(`${base}/design-check`);
    expect(recomputed.status).toBe(200);
    expect(recomputed.body.check.counts).toEqual(stored.body.check.counts);
    expect(recomputed.body.check.violations).toEqual(stored.body.check.violations);

    const refused = await designer.get(`${base}/layout?x0=16&y0=0&size=16`);
    expect(refused.status).toBe(429);
    expect(refused.body.error).toMatch(/limit is 3 a minute per person \(FAB_REQUESTS_PER_MINUTE\)/);
    expect((await designer.get(`${base}/fab-package.zip`).buffer(true)).status).toBe(429);

    // Someone else keeps their own budget.
    const theirs = await finishedRun(other);
    expect((await other.get(`${theirs.base}/layout?x0=0&y0=0&size=8`)).status).toBe(200);
  });
});

describe('time limit', () => {
  let t: TestApp;
  let designer: ApiClient;
  beforeAll(async () => {
    // 1 ms: every job is past its limit before the worker can answer.
    t = await createTestApp({ FAB_JOB_TIME_LIMIT_SECONDS: '0.001' });
    designer = await signedInClient(t.app, await makeUser({ name: 'Patient Designer' }));
  });
  afterAll(async () => {
    await t?.close();
  });

  it('a layout job past FAB_JOB_TIME_LIMIT_SECONDS is stopped and answered with a message naming the limit; the server goes on', async () => {
    const { base, runId } = await finishedRun(designer);
    const region = await designer.get(`${base}/layout?x0=0&y0=0&size=128`);
    expect(region.status).toBe(503);
    expect(region.body.error).toMatch(/limit of 0\.001 s \(FAB_JOB_TIME_LIMIT_SECONDS\)/);

    const zip = await designer.get(`${base}/fab-package.zip?layer=7`).buffer(true);
    expect(zip.status).toBe(503);
    expect(zip.headers['content-type']).toMatch(/json/);

    await RunArtifactModel.destroy({ where: { runId, name: 'drc.json' } });
    expect((await designer.get(`${base}/design-check`)).status).toBe(503);

    // What needs no layout job still answers.
    expect((await designer.get(base)).status).toBe(200);
  });
});
