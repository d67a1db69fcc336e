/**
 * The memory budget of a run (RUN_MEMORY_BUDGET_MB): a design whose estimated peak (shared/optics/run-memory.ts)
 * is larger is refused before it starts, with a message naming both numbers; one queued under another budget
 * fails at the worker with the same message, never reaching a pool thread; a design that fits runs.
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { storeArtifacts } from '../../server/components/runs/run-artifacts';
import { ToleranceStudyModel } from '../../server/components/tolerance/tolerance.model';
import { toleranceRequestSchema } from '../../shared/schemas/tolerance';
import { RunModel } from '../../server/components/runs/run.model';
import { estimateRunMemory } from '../../shared/optics/run-memory';
import { designSchema } from '../../shared/schemas/design';
import { twinImageDesign, waitForRun } from '../support/designs';
import { createTestApp, makeUser, signedInClient, type ApiClient, type TestApp } from '../support/test-app';

const BUDGET_MB = 1024;

describe('run memory budget', () => {
  let t: TestApp;
  let designer: ApiClient;
  let projectId: number;

  beforeAll(async () => {
    t = await createTestApp({ RUN_MEMORY_BUDGET_MB: String(BUDGET_MB) });
    designer = await signedInClient(t.app, await makeUser({ name: 'Budget Designer' }));
    projectId = (await designer.post('/api/projects', { name: 'Large tag' })).body.project.id;
  });
  afterAll(async () => {
    await t?.close();
  });

  async function saveRevision(design: object) {
    const res = await designer.post(`/api/projects/${projectId}/revisions`, { design });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    return res.body.revision as { id: number; number: number };
  }

  it('refuses a 4096² design whose estimate exceeds the budget, naming the estimate and the budget', async () => {
    const design = twinImageDesign({ cells: 4096, iterations: 2 });
    const estimate = estimateRunMemory(designSchema.parse(design));
    expect(estimate.mib).toBeGreaterThan(BUDGET_MB);
    const { number } = await saveRevision(design);
    const res = await designer.post(`/api/projects/${projectId}/revisions/${number}/runs`);
    expect(res.status).toBe(413);
    expect(res.body.error).toContain(`estimated ${estimate.mib} MiB`);
    expect(res.body.error).toContain(`${BUDGET_MB} MiB a run may use on this server (RUN_MEMORY_BUDGET_MB)`);
    expect(res.body.details).toEqual({ estimatedMiB: String(estimate.mib), budgetMiB: String(BUDGET_MB) });
    expect(await RunModel.count({ where: { projectId } })).toBe(0);
  });

  it('fails a run queued under a larger budget before it reaches a worker thread', async () => {
    const { id: revisionId } = await saveRevision(twinImageDesign({ cells: 4096, iterations: 2, name: 'Queued elsewhere' }));
    const queued = await RunModel.create({ projectId, revisionId, startedById: null, queuedAt: new Date(), stage: 'queued' });
    t.ctx.runQueue.enqueue(queued.id);
    const run = await waitForRun(designer, projectId, queued.id);
    expect(run.status).toBe('failed');
    expect(run.error).toMatch(/^This design needs an estimated \d+ MiB of memory to run .*more than the 1024 MiB a run may use on this server \(RUN_MEMORY_BUDGET_MB\)/);
    expect(run.startedAt).toBeNull();
  });

  it('runs a design that fits the budget', async () => {
    const { number } = await saveRevision(twinImageDesign());
    const res = await designer.post(`/api/projects/${projectId}/revisions/${number}/runs`);
    expect(res.status).toBe(202);
    const run = await waitForRun(designer, projectId, res.body.run.id);
    expect(run.status, run.error ?? '').toBe('succeeded');
  });

  it('refuses a bias and detuning sweep of a run whose design no longer fits the budget, naming both numbers', async () => {
    // A 4096² run finished under a larger budget (its row written here; the study is refused before it reads files).
    const design = twinImageDesign({ cells: 4096, iterations: 2, name: 'Finished elsewhere' });
    const { id: revisionId } = await saveRevision(design);
    const finished = await RunModel.create({ projectId, revisionId, startedById: null, queuedAt: new Date(), stage: 'done', status: 'succeeded', progress: 1 });
    const estimate = estimateRunMemory(designSchema.parse(design), { tilesMaxSide: 4096 });
    const res = await designer.post(`/api/projects/${projectId}/runs/${finished.id}/tolerance`, {});
    expect(res.status, JSON.stringify(res.body)).toBe(413);
    expect(res.body.error).toMatch(new RegExp(`^A bias and detuning sweep of this run needs up to an estimated ${estimate.mib} MiB`));
    expect(res.body.error).toContain(`${BUDGET_MB} MiB a run may now use on this server (RUN_MEMORY_BUDGET_MB)`);
    expect(res.body.details).toEqual({ estimatedMiB: String(estimate.mib), budgetMiB: String(BUDGET_MB) });
    expect((await designer.get(`/api/projects/${projectId}/runs/${finished.id}/tolerance`)).body.study).toBeNull();

    // Queued under a larger budget (the row written here): the worker fails it with the same words after reading
    // the run's design.json, before it reads the run's arrays (none are stored here).
    const dir = mkdtempSync(join(tmpdir(), 'phasewright-budget-'));
    try {
      const bytes = Buffer.from(JSON.stringify(designSchema.parse(design)));
      writeFileSync(join(dir, 'design.json'), bytes);
      await storeArtifacts(finished.id, dir, [{ name: 'design.json', bytes: bytes.length }]);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
    const queued = await ToleranceStudyModel.create({ runId: finished.id, request: toleranceRequestSchema.parse({}), startedById: null, queuedAt: new Date(), stage: 'queued' });
    t.ctx.runQueue.enqueueTolerance(queued.id);
    let study: { status: string; error: string | null } | null = null;
    for (let i = 0; i < 100 && study?.status !== 'failed'; i++) {
      await new Promise((r) => setTimeout(r, 100));
      study = (await designer.get(`/api/projects/${projectId}/runs/${finished.id}/tolerance`)).body.study;
    }
    expect(study?.status).toBe('failed');
    expect(study?.error).toMatch(new RegExp(`^A bias and detuning sweep of this run needs up to an estimated ${estimate.mib} MiB`));
  });
});
