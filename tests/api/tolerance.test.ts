import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { RunModel } from '../../server/components/runs/run.model';
import type { ToleranceStudy } from '../../shared/schemas/tolerance';
import { twinImageDesign, waitForRun } from '../support/designs';
import { createTestApp, makeUser, RUN_QUEUE_ENGINES, signedInClient, type ApiClient, type TestApp } from '../support/test-app';

// The same tests against each run queue engine: with Redis a worker takes the study as a job of its own.
describe.each(RUN_QUEUE_ENGINES)('%s run queue', (engine) => {
  let t: TestApp;
  let designer: ApiClient;
  let projectId: number;

  beforeAll(async () => {
    t = await createTestApp({ RUN_QUEUE: engine });
    designer = await signedInClient(t.app, await makeUser({ name: 'Tolerance Designer' }));
    projectId = (await designer.post('/api/projects', { name: 'Tolerance tag' })).body.project.id;
  });
  afterAll(async () => {
    await t?.close();
  });

  async function finishedRun(cells = 64) {
    const revision = await designer.post(`/api/projects/${projectId}/revisions`, { design: twinImageDesign({ cells }) });
    expect(revision.status, JSON.stringify(revision.body)).toBe(201);
    const started = await designer.post(`/api/projects/${projectId}/revisions/${revision.body.revision.number}/runs`);
    const run = await waitForRun(designer, projectId, started.body.run.id);
    expect(run.status, run.error ?? '').toBe('succeeded');
    return run;
  }

  async function waitForStudy(runId: number, timeoutMs = 45_000): Promise<ToleranceStudy> {
    const deadline = Date.now() + timeoutMs;
    for (;;) {
      const res = await designer.get(`/api/projects/${projectId}/runs/${runId}/tolerance`);
      expect(res.status).toBe(200);
      const study = res.body.study as ToleranceStudy;
      if (study && (study.status === 'succeeded' || study.status === 'failed')) return study;
      if (Date.now() > deadline) throw new Error(`study of run ${runId} did not finish; last seen ${JSON.stringify(study)}`);
      await new Promise((r) => setTimeout(r, 100));
    }
  }

  const relative = (a: number, b: number) => Math.abs(a - b) / Math.max(Math.abs(b), 1e-300);

  describe('tolerance studies', () => {
    it('runs a study of a finished run off the request thread; zero bias gives the run’s own metrics', async () => {
      const run = await finishedRun(64);
      expect((await designer.get(`/api/projects/${projectId}/runs/${run.id}/tolerance`)).body).toEqual({ study: null });

      const started = await designer.post(`/api/projects/${projectId}/runs/${run.id}/tolerance`, { widthBiasNm: [10, -10, 0, 0], detuneNm: [0, 15] });
      expect(started.status, JSON.stringify(started.body)).toBe(202);
      expect(started.body.study).toMatchObject({ runId: run.id, status: 'queued', request: { widthBiasNm: [-10, 0, 10], detuneNm: [0, 15] } });
      const again = await designer.post(`/api/projects/${projectId}/runs/${run.id}/tolerance`, {});
      expect([202, 409]).toContain(again.status);

      const study = await waitForStudy(run.id);
      expect(study.status, study.error ?? '').toBe('succeeded');
      // A second study may have been accepted above (when the first had finished already); either way the latest
      // study holds results of the same run.
      const results = study.results!;
      expect(results.cells).toBe(64);
      expect(results.method).toBe('effective-index');
      expect(results.detuningAvailable).toBe(true);
      expect(results.channels.a.kind).toBe('window');
      expect(results.msPerPoint).toBeGreaterThanOrEqual(0);
      const zero = results.widthBias.find((p) => p.widthBiasNm === 0)!;
      const detuned = results.detuning.find((p) => p.detuneNm !== 0)!;
      expect(detuned.error).toBeNull();
      const sections = { a: run.metrics!['channel A'], b: run.metrics!['channel B'] };
      for (const c of ['a', 'b'] as const) {
        expect(relative(zero.channels![c].efficiency!, sections[c].efficiency.value!)).toBeLessThan(1e-9);
        expect(relative(zero.channels![c].crosstalkDb!, sections[c].crosstalk.value!)).toBeLessThan(1e-9);
        expect(relative(zero.channels![c].zeroOrder!, sections[c].zeroOrder.value!)).toBeLessThan(1e-9);
      }
      expect(study.progress).toBe(1);
      expect(study.finishedAt).not.toBeNull();

      // The run carries its mapping report for the run page.
      const report = (run.plots as { mappingReport: { cells: number; errorHistogram: { counts: number[] } } }).mappingReport;
      expect(report.cells).toBe(64 * 64);
      expect(report.errorHistogram.counts.reduce((s, v) => s + v, 0)).toBe(64 * 64);
    });

    it('answers bad requests with 400 naming the field, unknown runs with 404, unfinished runs with 409', async () => {
      const url = (id: number) => `/api/projects/${projectId}/runs/${id}/tolerance`;
      const revision = await designer.post(`/api/projects/${projectId}/revisions`, { design: twinImageDesign() });
      const runId = (await designer.post(`/api/projects/${projectId}/revisions/${revision.body.revision.number}/runs`)).body.run.id as number;

      const tooMany = await designer.post(url(runId), { widthBiasNm: Array.from({ length: 22 }, (_, i) => i) });
      expect(tooMany.status).toBe(400);
      expect(Object.keys(tooMany.body.details)).toEqual(['widthBiasNm']);
      expect(tooMany.body.error).toMatch(/widthBiasNm: at most 21 values/);

      const tooLarge = await designer.post(url(runId), { widthBiasNm: [0], detuneNm: [5, 150] });
      expect(tooLarge.status).toBe(400);
      expect(tooLarge.body.details['detuneNm.1']).toMatch(/−100…100 nm/);

      const notNumbers = await designer.post(url(runId), { widthBiasNm: ['ten'] });
      expect(notNumbers.status).toBe(400);
      expect(Object.keys(notNumbers.body.details)).toEqual(['widthBiasNm.0']);

      const notList = await designer.post(url(runId), { widthBiasNm: 10 });
      expect(notList.status).toBe(400);
      expect(notList.body.details.widthBiasNm).toMatch(/list of numbers/);

      const empty = await designer.post(url(runId), { widthBiasNm: [], detuneNm: [] });
      expect(empty.status).toBe(400);
      expect(empty.body.details.widthBiasNm).toMatch(/at least one/);

      const badGrid = await designer.post(url(runId), { cells: 100 });
      expect(badGrid.status).toBe(400);
      expect(badGrid.body.details.cells).toMatch(/cells must be one of 64, 128, 256, 512, 1024/);

      const unknownField = await designer.post(url(runId), { widthBias: [5] });
      expect(unknownField.status).toBe(400);

      expect((await designer.post(url(999999), {})).status).toBe(404);
      expect((await designer.get(url(999999))).status).toBe(404);
      expect((await designer.post(`/api/projects/${projectId}/runs/abc/tolerance`, {})).status).toBe(400);

      await waitForRun(designer, projectId, runId);

      // Only a succeeded run accepts a study: a queued and a running run (rows held in those states, so the
      // answer cannot depend on how fast the worker is) are refused with exactly 409, saying why.
      const revisionId = revision.body.revision.id as number;
      for (const status of ['queued', 'running'] as const) {
        const held = await RunModel.create({ projectId, revisionId, startedById: null, queuedAt: new Date(), status, progress: status === 'running' ? 0.4 : 0, stage: status === 'running' ? 'phase retrieval' : 'queued', startedAt: status === 'running' ? new Date() : null });
        const early = await designer.post(url(held.id), {});
        expect(early.status, `${status} run`).toBe(409);
        expect(early.body.error).toMatch(new RegExp(`is still ${status === 'queued' ? 'waiting' : 'running'}; a bias and detuning sweep needs a finished run`));
        await held.update({ status: 'cancelled', finishedAt: new Date() });
      }
    });

    it('refuses a study of a run that failed or was cancelled (409)', async () => {
      const revision = await designer.post(`/api/projects/${projectId}/revisions`, { design: twinImageDesign({ cells: 256, iterations: 2000, name: 'Long' }) });
      const runId = (await designer.post(`/api/projects/${projectId}/revisions/${revision.body.revision.number}/runs`)).body.run.id as number;
      expect((await designer.post(`/api/projects/${projectId}/runs/${runId}/cancel`)).status).toBe(200);
      const refused = await designer.post(`/api/projects/${projectId}/runs/${runId}/tolerance`, {});
      expect(refused.status).toBe(409);
      expect(refused.body.error).toMatch(/is cancelled; a bias and detuning sweep needs a finished run/);
    });
  });
});
