import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { RunArtifactModel, RunEventModel, RunModel } from '../../server/components/runs/run.model';
import { getRunSummary } from '../../server/components/runs/run.service';
import { deflectorDesign, waitForRun } from '../support/designs';
import { createTestApp, makeUser, signedInClient, type ApiClient, type TestApp } from '../support/test-app';

let t: TestApp;
let designer: ApiClient;
beforeAll(async () => {
  t = await createTestApp();
  designer = await signedInClient(t.app, await makeUser({ name: 'List Reader' }));
});
afterAll(async () => {
  await t?.close();
});

describe('runs list and run detail', () => {
  it('lists every run exactly as its own summary reads it: finished, queued, and started by nobody', async () => {
    const projectId = (await designer.post('/api/projects', { name: 'Run list' })).body.project.id as number;
    const revision = await designer.post(`/api/projects/${projectId}/revisions`, { design: deflectorDesign() });
    expect(revision.status).toBe(201);
    const number = revision.body.revision.number as number;
    const finished = await waitForRun(designer, projectId, (await designer.post(`/api/projects/${projectId}/revisions/${number}/runs`)).body.run.id);
    expect(finished.status, finished.error ?? '').toBe('succeeded');
    expect(finished.headline.efficiencyA).not.toBeNull();
    const revisionId = (await RunModel.findByPk(finished.id))!.revisionId;
    // Rows the queue does not pick up in this process: one queued by nobody, one failed with a message.
    await RunModel.create({ projectId, revisionId, startedById: null, queuedAt: new Date(), stage: 'queued' });
    await RunModel.create({ projectId, revisionId, startedById: null, queuedAt: new Date(Date.now() - 60_000), status: 'failed', error: 'it broke', stage: 'simulation', progress: 0.5, attempts: 3 });

    const listed = (await designer.get(`/api/projects/${projectId}/runs`)).body.runs as { id: number; startedBy: unknown }[];
    expect(listed).toHaveLength(3);
    // The list and the summary read with SQL of their own; the ORM's models, with their associations, are the
    // independent reading they must agree with.
    const rows = await RunModel.findAll({
      where: { projectId },
      include: [{ association: 'revision' }, { association: 'startedBy' }],
      order: [['queuedAt', 'DESC'], ['id', 'DESC']],
    });
    const iso = (d: Date | null) => (d ? d.toISOString() : null);
    expect(listed).toEqual(
      rows.map((r) => ({
        id: r.id,
        revisionNumber: r.revision!.number,
        status: r.status,
        progress: r.progress,
        stage: r.stage,
        attempts: r.attempts,
        error: r.error,
        startedBy: r.startedBy ? { id: r.startedBy.id, name: r.startedBy.name } : null,
        queuedAt: r.queuedAt.toISOString(),
        startedAt: iso(r.startedAt),
        finishedAt: iso(r.finishedAt),
        durationMs: r.durationMs,
        headline: r.headline ?? { efficiencyA: null, efficiencyB: null, crosstalkDb: null, zeroOrder: null },
        filesDeletedAt: iso(r.filesDeletedAt),
      })),
    );
    for (const run of listed) {
      expect(run).toEqual(JSON.parse(JSON.stringify(await getRunSummary(projectId, run.id))));
    }
    expect(listed.filter((r) => r.startedBy === null)).toHaveLength(2);
  });

  it("gives a run's events and files in the detail as their rows hold them", async () => {
    const projectId = (await designer.post('/api/projects', { name: 'Run detail' })).body.project.id as number;
    const number = (await designer.post(`/api/projects/${projectId}/revisions`, { design: deflectorDesign() })).body.revision.number as number;
    const run = await waitForRun(designer, projectId, (await designer.post(`/api/projects/${projectId}/revisions/${number}/runs`)).body.run.id);
    expect(run.status, run.error ?? '').toBe('succeeded');
    const files = await RunArtifactModel.findAll({ where: { runId: run.id }, order: [['id', 'ASC']] });
    expect(files.length).toBeGreaterThan(10);
    expect(run.artifacts).toEqual(files.map((a) => ({ name: a.name, mime: a.mime, size: a.size, label: a.label })));
    expect(run.artifacts.every((a) => typeof a.size === 'number' && a.size > 0)).toBe(true);
    const events = await RunEventModel.findAll({ where: { runId: run.id }, order: [['at', 'ASC'], ['id', 'ASC']] });
    expect(run.events).toEqual(events.map((e) => ({ at: e.at.toISOString(), status: e.status, stage: e.stage, message: e.message })));
  });

  it("serves a finished run's large columns as stored, and their new values once the row is written again", async () => {
    const projectId = (await designer.post('/api/projects', { name: 'Run detail again' })).body.project.id as number;
    const number = (await designer.post(`/api/projects/${projectId}/revisions`, { design: deflectorDesign() })).body.revision.number as number;
    const run = await waitForRun(designer, projectId, (await designer.post(`/api/projects/${projectId}/revisions/${number}/runs`)).body.run.id);
    expect(run.status, run.error ?? '').toBe('succeeded');
    const row = (await RunModel.findByPk(run.id))!;
    const first = (await designer.get(`/api/projects/${projectId}/runs/${run.id}`)).body.run;
    // As the model reads the row (an independent reading of the same columns).
    expect(first.metrics).toEqual(row.metrics);
    expect(first.plots).toEqual(row.plots);
    expect(first.convergence).toEqual(row.convergence);
    expect((await designer.get(`/api/projects/${projectId}/runs/${run.id}`)).body.run).toEqual(first);
    // A write of the row through the model (as every server path writes runs): the next read shows it.
    await new Promise((r) => setTimeout(r, 5));
    const metrics = { ...row.metrics!, note: { marker: { value: 1, unit: '', meaning: 'written after the run' } } };
    await RunModel.update({ metrics }, { where: { id: run.id } });
    expect((await designer.get(`/api/projects/${projectId}/runs/${run.id}`)).body.run.metrics.note.marker.meaning).toBe('written after the run');
    // The rest of the detail too: a new event of the run, and a new name of the person who started it.
    await RunEventModel.create({ runId: run.id, status: 'succeeded', stage: 'done', message: 'noted after the run', at: new Date() });
    expect((await designer.get(`/api/projects/${projectId}/runs/${run.id}`)).body.run.events.at(-1).message).toBe('noted after the run');
    expect((await designer.patch('/api/auth/profile', { name: 'Renamed Designer' })).status).toBe(200);
    expect((await designer.get(`/api/projects/${projectId}/runs/${run.id}`)).body.run.startedBy.name).toBe('Renamed Designer');
  });
});
