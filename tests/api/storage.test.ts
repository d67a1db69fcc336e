/**
 * Storage per project (PROJECT_STORAGE_MB: uploads + run files): an upload past the quota gets 413 naming
 * it, a run whose files would not fit fails saying so, and deleting uploads or a run's files (designer and
 * up) frees the room while the run row, its metrics and events stay.
 */
import { randomBytes } from 'node:crypto';
import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { reserveRunFiles } from '../../server/components/quotas/quota.service';
import { storeArtifacts } from '../../server/components/runs/run-artifacts';
import { RunArtifactModel, RunModel } from '../../server/components/runs/run.model';
import { encodeNpy } from '../../shared/optics/npy';
import { deflectorDesign, waitForRun } from '../support/designs';
import { createTestApp, makeUser, RUN_QUEUE_ENGINES, signedInClient, type ApiClient, type TestApp } from '../support/test-app';

const QUOTA_BYTES = Math.floor(0.1 * 1024 * 1024);
/** A 64 × 64 float64 phase map: 32 768 bytes of data behind its 128-byte header. */
const phaseMap = Buffer.from(encodeNpy(new Float64Array(64 * 64), [64, 64]));

// The same tests against each run queue engine: the storage quota holds for runs executed by Redis workers too.
describe.each(RUN_QUEUE_ENGINES)('%s run queue', (engine) => {
  let t: TestApp;
  let owner: ApiClient;
  let designer: ApiClient;
  let reviewer: ApiClient;
  let people: Record<'owner' | 'designer' | 'reviewer', Awaited<ReturnType<typeof makeUser>>>;

  beforeAll(async () => {
    t = await createTestApp({ PROJECT_STORAGE_MB: '0.1', RUN_QUEUE: engine });
    people = { owner: await makeUser({ name: 'Storage Owner' }), designer: await makeUser({ name: 'Storage Designer' }), reviewer: await makeUser({ name: 'Storage Reviewer' }) };
    owner = await signedInClient(t.app, people.owner);
    designer = await signedInClient(t.app, people.designer);
    reviewer = await signedInClient(t.app, people.reviewer);
  });
  afterAll(async () => {
    await t?.close();
  });

  async function project() {
    const projectId = (await owner.post('/api/projects', { name: 'Storage project' })).body.project.id as number;
    await owner.post(`/api/projects/${projectId}/members`, { email: people.designer.email, role: 'designer' });
    await owner.post(`/api/projects/${projectId}/members`, { email: people.reviewer.email, role: 'reviewer' });
    const revision = (await owner.post(`/api/projects/${projectId}/revisions`, { design: deflectorDesign() })).body.revision;
    return { projectId, revisionId: revision.id as number, number: revision.number as number };
  }

  function upload(client: ApiClient, projectId: number) {
    return client.agent
      .post(`/api/projects/${projectId}/uploads`)
      .set('x-csrf-token', client.csrfToken)
      .field('kind', 'phase-map')
      .attach('file', phaseMap, { filename: 'map.npy', contentType: 'application/octet-stream' });
  }

  /** A finished run with stored files of `bytes` in all, and metrics. */
  async function finishedRun(projectId: number, revisionId: number, bytes: number) {
    const run = await RunModel.create({
      projectId,
      revisionId,
      startedById: null,
      queuedAt: new Date(),
      status: 'succeeded',
      progress: 1,
      stage: 'done',
      finishedAt: new Date(),
      metrics: { device: { efficiency: { value: 0.5, unit: 'fraction', meaning: 'light into the windows' } } },
    });
    const dir = await mkdtemp(join(tmpdir(), 'pw-storage-'));
    await writeFile(join(dir, 'design.json'), JSON.stringify(deflectorDesign()));
    const designBytes = JSON.stringify(deflectorDesign()).length;
    await writeFile(join(dir, 'farfield_a.png'), randomBytes(bytes - designBytes));
    await storeArtifacts(run.id, dir, [{ name: 'design.json', bytes: designBytes }, { name: 'farfield_a.png', bytes: bytes - designBytes }]);
    await rm(dir, { recursive: true });
    return run.id;
  }

  describe('storage quota', () => {
    it('an upload past the quota gets 413 naming PROJECT_STORAGE_MB and stores nothing; deleting an upload frees the room', async () => {
      const p = await project();
      for (let i = 0; i < 3; i++) expect((await upload(designer, p.projectId)).status).toBe(201);
      const refused = await upload(designer, p.projectId);
      expect(refused.status).toBe(413);
      expect(refused.body.error).toMatch(/PROJECT_STORAGE_MB = 0\.1/);
      expect(refused.body.error).toMatch(/Delete uploads or the files of old runs/);
      const listed = (await designer.get(`/api/projects/${p.projectId}/uploads`)).body.uploads as { id: number }[];
      expect(listed).toHaveLength(3);

      // A reviewer may not delete; a designer may, and the bytes are gone.
      expect((await reviewer.delete(`/api/projects/${p.projectId}/uploads/${listed[0].id}`)).status).toBe(403);
      expect((await designer.delete(`/api/projects/${p.projectId}/uploads/${listed[0].id}`)).status).toBe(204);
      expect((await designer.get(`/api/projects/${p.projectId}/uploads/${listed[0].id}/content`)).status).toBe(404);
      expect((await designer.delete(`/api/projects/${p.projectId}/uploads/${listed[0].id}`)).status).toBe(404);
      expect((await designer.get(`/api/projects/${p.projectId}/uploads`)).body.uploads).toHaveLength(2);
      expect((await upload(designer, p.projectId)).status).toBe(201);
    });

    it('a revision whose upload was deleted cannot be run: 409 naming the upload, and a queued run of it fails saying so', async () => {
      const p = await project();
      const map = (await upload(designer, p.projectId)).body.upload;
      const design = deflectorDesign() as { channels: { b: { terms: object[] } } };
      design.channels.b.terms = [{ kind: 'custom', phaseMap: { source: 'upload', id: map.id } }];
      const number = (await designer.post(`/api/projects/${p.projectId}/revisions`, { design })).body.revision.number;
      expect((await designer.delete(`/api/projects/${p.projectId}/uploads/${map.id}`)).status).toBe(204);
      const refused = await designer.post(`/api/projects/${p.projectId}/revisions/${number}/runs`);
      expect(refused.status).toBe(409);
      expect(refused.body.error).toBe(`Revision ${number} uses upload ${map.id}, which was deleted; choose another file in the design and save a new revision`);
      expect(await RunModel.count({ where: { projectId: p.projectId } })).toBe(0);

      // A run queued before the upload was deleted fails with the same words when a worker picks it up.
      const revisionId = (await designer.get(`/api/projects/${p.projectId}/revisions/${number}`)).body.revision.id;
      const queued = await RunModel.create({ projectId: p.projectId, revisionId, startedById: null, queuedAt: new Date(), stage: 'queued' });
      t.ctx.runQueue.enqueue(queued.id);
      const failed = await waitForRun(designer, p.projectId, queued.id);
      expect(failed.status).toBe('failed');
      expect(failed.error).toBe(`The design uses upload ${map.id}, which was deleted; choose another file in the design and save a new revision.`);
    });

    it('an upload is deleted only through its own project', async () => {
      const a = await project();
      const b = await project();
      const id = (await upload(designer, a.projectId)).body.upload.id;
      expect((await designer.delete(`/api/projects/${b.projectId}/uploads/${id}`)).status).toBe(404);
      expect((await designer.get(`/api/projects/${a.projectId}/uploads/${id}/content`)).status).toBe(200);
      expect((await designer.delete(`/api/projects/${a.projectId}/uploads/${id}`)).status).toBe(204);
    });

    it('deleting a run’s files keeps the run, its metrics and events, and frees the room', async () => {
      const p = await project();
      const runId = await finishedRun(p.projectId, p.revisionId, 60_000);
      expect((await upload(designer, p.projectId)).status).toBe(201);
      expect((await upload(designer, p.projectId)).status).toBe(413);

      expect((await reviewer.delete(`/api/projects/${p.projectId}/runs/${runId}/files`)).status).toBe(403);
      const deleted = await designer.delete(`/api/projects/${p.projectId}/runs/${runId}/files`);
      expect(deleted.status).toBe(200);
      expect(deleted.body.run).toMatchObject({ id: runId, status: 'succeeded', artifacts: [] });
      expect(deleted.body.run.filesDeletedAt).toEqual(expect.any(String));
      expect(deleted.body.run.metrics.device.efficiency.value).toBe(0.5);
      expect(deleted.body.run.events.at(-1).message).toBe('files deleted by Storage Designer');
      expect(await RunArtifactModel.count({ where: { runId } })).toBe(0);

      const file = await designer.get(`/api/projects/${p.projectId}/runs/${runId}/artifacts/design.json`);
      expect(file.status).toBe(404);
      expect(file.body.error).toMatch(/files were deleted/);
      const layout = await designer.get(`/api/projects/${p.projectId}/runs/${runId}/layout?x0=0&y0=0&size=16`);
      expect(layout.status).toBe(409);
      expect(layout.body.error).toMatch(/files of run \d+ were deleted/);
      const study = await designer.post(`/api/projects/${p.projectId}/runs/${runId}/tolerance`, { widthBiasNm: [0], detuneNm: [] });
      expect(study.status).toBe(409);
      const listed = (await designer.get(`/api/projects/${p.projectId}/runs`)).body.runs.find((r: { id: number }) => r.id === runId);
      expect(listed.filesDeletedAt).toEqual(deleted.body.run.filesDeletedAt);

      expect((await upload(designer, p.projectId)).status).toBe(201);
    });

    it('a queued run’s files cannot be deleted', async () => {
      const p = await project();
      const queued = await RunModel.create({ projectId: p.projectId, revisionId: p.revisionId, startedById: null, queuedAt: new Date(), stage: 'queued' });
      const res = await designer.delete(`/api/projects/${p.projectId}/runs/${queued.id}/files`);
      expect(res.status).toBe(409);
      expect(res.body.error).toMatch(/is still waiting; cancel it or wait/);
      await queued.update({ status: 'cancelled' });
    });

    it('a run cannot start while the project’s storage is full (413), and a run whose files do not fit fails saying so', async () => {
      const full = await project();
      await finishedRun(full.projectId, full.revisionId, QUOTA_BYTES);
      const refused = await designer.post(`/api/projects/${full.projectId}/revisions/${full.number}/runs`);
      expect(refused.status).toBe(413);
      expect(refused.body.error).toMatch(/PROJECT_STORAGE_MB/);

      const p = await project();
      const started = await designer.post(`/api/projects/${p.projectId}/revisions/${p.number}/runs`);
      expect(started.status).toBe(202);
      const run = await waitForRun(designer, p.projectId, started.body.run.id, undefined, 90_000);
      expect(run.status).toBe('failed');
      expect(run.error).toMatch(/^This project stores .* quota \(PROJECT_STORAGE_MB = 0\.1\); this run's files \(.*\) do not fit/);
      expect(run.artifacts).toEqual([]);
    });

    it('two runs finishing at once with room for one: exactly one keeps its files (the room is taken under the project lock)', async () => {
      const p = await project();
      const runs = await Promise.all([0, 1].map(() => RunModel.create({ projectId: p.projectId, revisionId: p.revisionId, startedById: null, queuedAt: new Date(), status: 'running' })));
      const dir = await mkdtemp(join(tmpdir(), 'pw-storage-'));
      const bytes = Math.floor(QUOTA_BYTES * 0.6);
      await writeFile(join(dir, 'farfield_a.png'), randomBytes(bytes));
      const files = [{ name: 'farfield_a.png', bytes }];
      const refusals: string[] = [];
      const kept = await Promise.all(
        runs.map((run) =>
          storeArtifacts(run.id, dir, files, undefined, async (createRows) => {
            const reserved = await reserveRunFiles({ PROJECT_STORAGE_MB: 0.1 }, p.projectId, bytes, async (transaction) => {
              // Slow enough that, without the lock, both checks would see the room still free.
              await new Promise((r) => setTimeout(r, 200));
              return createRows(transaction);
            });
            if ('rows' in reserved) return reserved.rows;
            refusals.push(reserved.refusal);
            return null;
          }),
        ),
      );
      await rm(dir, { recursive: true });
      expect(kept.filter(Boolean)).toHaveLength(1);
      expect(refusals).toHaveLength(1);
      expect(refusals[0]).toMatch(/PROJECT_STORAGE_MB = 0\.1\); this run's files .* do not fit/);
      const stored = await RunArtifactModel.findAll({ where: { runId: runs.map((r) => r.id) } });
      expect(stored).toHaveLength(1);
      expect(stored[0].size).toBe(bytes);
    });
  });
});
