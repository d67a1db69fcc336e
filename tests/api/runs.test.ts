import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { RunEventModel, RunModel } from '../../server/components/runs/run.model';
import { deflectorDesign, download, twinImageDesign, waitForRun } from '../support/designs';
import { createTestApp, makeUser, RUN_QUEUE_ENGINES, signedInClient, type ApiClient, type TestApp } from '../support/test-app';

// The same tests against each run queue engine: embedded worker threads, and BullMQ on Redis with a worker.
describe.each(RUN_QUEUE_ENGINES)('%s run queue', (engine) => {
  let t: TestApp;
  let designer: ApiClient;
  let projectId: number;

  beforeAll(async () => {
    // Helper threads inside runs whatever the machine: the channels' retrieval and the previews run on worker
    // threads started from the piscina run worker, the path the command line also takes.
    t = await createTestApp({ RUN_HELPER_THREADS: 'true', RUN_QUEUE: engine });
    designer = await signedInClient(t.app, await makeUser({ name: 'Run Designer' }));
    projectId = (await designer.post('/api/projects', { name: 'Twin Tag (runs)' })).body.project.id;
  });
  afterAll(async () => {
    await t?.close();
  });

  async function saveRevision(design: object, message = '') {
    const res = await designer.post(`/api/projects/${projectId}/revisions`, { design, message });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    return res.body.revision.number as number;
  }

  describe('runs', () => {
    it('runs a small twin-image design to the end: progress, convergence, metrics, artifacts', async () => {
      const number = await saveRevision(twinImageDesign());
      const started = await designer.post(`/api/projects/${projectId}/revisions/${number}/runs`);
      expect(started.status).toBe(202);
      expect(started.body.run).toMatchObject({ status: 'queued', revisionNumber: number, attempts: 0 });
      const run = await waitForRun(designer, projectId, started.body.run.id);
      expect(run.status, run.error ?? '').toBe('succeeded');
      expect(run.progress).toBe(1);
      expect(run.attempts).toBe(1);
      expect(run.durationMs).toBeGreaterThan(0);
      expect(run.convergence.a).toHaveLength(8);
      expect(run.convergence.b).toHaveLength(8);
      expect(run.metrics?.['channel A'].efficiency.unit).toBe('fraction');
      expect(run.headline.efficiencyA).toBeGreaterThan(0);
      expect(run.events.map((e) => e.stage)).toEqual(expect.arrayContaining(['queued', 'prepare', 'phase retrieval', 'atom mapping', 'done']));
      const names = run.artifacts.map((a) => a.name);
      expect(names).toEqual(expect.arrayContaining(['phase_a.npy', 'layout.gds', 'farfield_extra.png', 'metrics.json']));
      // Circular pair: each input's far field as the total, the parts along λA* and λB*, and the x and y parts.
      for (const input of ['a', 'b', 'extra']) {
        expect(names).toEqual(expect.arrayContaining(['', '_out-a', '_out-b', '_x', '_y'].map((part) => `farfield_${input}${part}.png`)));
      }
      const label = (name: string) => run.artifacts.find((a) => a.name === name)?.label;
      expect(label('farfield_a.png')).toMatch(/^Far field under input A: all the light, both output polarizations together/);
      expect(label('farfield_a_out-b.png')).toMatch(/^Far field under input A: only the light in channel B's output polarization \(λB\*/);
      expect(label('farfield_extra_y.png')).toBe('Far field under the third input: only the y-polarized light, on the same brightness scale as the total');

      const png = await download(designer, `/api/projects/${projectId}/runs/${run.id}/artifacts/farfield_a.png`);
      expect(png.status).toBe(200);
      expect(png.headers['content-type']).toBe('image/png');
      expect(png.headers['content-disposition']).toBe(`attachment; filename="twin-tag-runs-r${number}-run${run.id}-farfield_a.png"`);
      expect(png.body.subarray(0, 8)).toEqual(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]));

      const npy = await download(designer, `/api/projects/${projectId}/runs/${run.id}/artifacts/phase_a.npy`);
      expect(npy.headers['content-type']).toBe('application/x-npy');
      expect(npy.body.length).toBe(run.artifacts.find((a) => a.name === 'phase_a.npy')!.size);
      expect(npy.body.subarray(1, 6).toString('latin1')).toBe('NUMPY');

      const gds = await download(designer, `/api/projects/${projectId}/runs/${run.id}/artifacts/layout.gds`);
      expect(gds.body.length).toBe(run.artifacts.find((a) => a.name === 'layout.gds')!.size);
      // GDSII stream: first record HEADER (length 6, type 0x00, data type 0x02).
      expect([...gds.body.subarray(0, 4)]).toEqual([0x00, 0x06, 0x00, 0x02]);

      const missing = await designer.get(`/api/projects/${projectId}/runs/${run.id}/artifacts/nothing.bin`);
      expect(missing.status).toBe(404);

      const list = await designer.get(`/api/projects/${projectId}/runs?status=succeeded`);
      expect(list.body.runs.map((r: { id: number }) => r.id)).toContain(run.id);
    });
  });

  describe('cancelling', () => {
    it('cancels a queued run and a running one; the queue keeps working afterwards', async () => {
      const long = await saveRevision(twinImageDesign({ cells: 512, iterations: 2000, name: 'Long twin' }));
      const first = (await designer.post(`/api/projects/${projectId}/revisions/${long}/runs`)).body.run;
      const second = (await designer.post(`/api/projects/${projectId}/revisions/${long}/runs`)).body.run;
      // One worker thread in tests: the second run waits behind the first.
      await waitForRun(designer, projectId, first.id, (r) => r.status === 'running' && r.stage === 'phase retrieval');

      const queued = await designer.post(`/api/projects/${projectId}/runs/${second.id}/cancel`);
      expect(queued.status).toBe(200);
      expect(queued.body.run).toMatchObject({ status: 'cancelled', attempts: 0 });

      const running = await designer.post(`/api/projects/${projectId}/runs/${first.id}/cancel`);
      expect(running.status).toBe(200);
      expect(running.body.run.status).toBe('cancelled');
      expect(running.body.run.events.at(-1)).toMatchObject({ status: 'cancelled', message: 'cancelled' });

      const again = await designer.post(`/api/projects/${projectId}/runs/${first.id}/cancel`);
      expect(again.status).toBe(409);
      expect(again.body.error).toMatch(/already ended \(Cancelled\)/);

      // The row as the cancel left it: a late progress or status write from the stopping worker would change it.
      const rowAtCancel = (await RunModel.findByPk(first.id, { raw: true }))!;
      const eventsAtCancel = await RunEventModel.count({ where: { runId: first.id } });

      const quick = await saveRevision(deflectorDesign());
      const next = (await designer.post(`/api/projects/${projectId}/revisions/${quick}/runs`)).body.run;
      const done = await waitForRun(designer, projectId, next.id);
      expect(done.status, done.error ?? '').toBe('succeeded');

      // The next run had the only worker thread, so the cancelled run's task has ended by now: its row and
      // events are exactly as the cancel left them, and it has no files.
      expect((await RunModel.findByPk(first.id, { raw: true }))!).toEqual(rowAtCancel);
      expect(await RunEventModel.count({ where: { runId: first.id } })).toBe(eventsAtCancel);
      const after = await waitForRun(designer, projectId, first.id);
      expect(after.status).toBe('cancelled');
      expect(after.artifacts).toEqual([]);
      expect(done.convergence).toEqual({ a: [], b: [] });
      expect(done.headline.efficiencyA).toBeGreaterThan(0.3);
    });
  });

  describe('failures', () => {
    it('a design the engine cannot use fails with a message naming the channel and what to change', async () => {
      const design = twinImageDesign({ name: 'Window too far out' }) as { setup: { periodNm: number }; channels: { a: { terms: { window: object }[] } } };
      design.setup.periodNm = 300;
      design.channels.a.terms[0].window = { units: 'degrees', width: 10, centerX: 50, centerY: 50 };
      const number = await saveRevision(design);
      const started = await designer.post(`/api/projects/${projectId}/revisions/${number}/runs`);
      const run = await waitForRun(designer, projectId, started.body.run.id);
      expect(run.status).toBe('failed');
      expect(run.error).toMatch(/^channel A, term 1 \(image hologram\), far-field window: /);
      expect(run.error).toMatch(/propagating region.*make the window smaller or move it towards the zero order/);
      expect(run.error).not.toMatch(/\n\s+at /);
      expect(run.events.at(-1)).toMatchObject({ status: 'failed', message: run.error });
    });

    it('answers unknown revisions and runs with 404 and bad ids with 400', async () => {
      expect((await designer.post(`/api/projects/${projectId}/revisions/999/runs`)).status).toBe(404);
      expect((await designer.get(`/api/projects/${projectId}/runs/999999`)).status).toBe(404);
      expect((await designer.get(`/api/projects/${projectId}/runs/abc`)).status).toBe(400);
      const bad = await designer.get(`/api/projects/${projectId}/runs?status=finished`);
      expect(bad.status).toBe(400);
      expect(bad.body.details.status).toBeDefined();
    });
  });

  describe('listing', () => {
    it('filters by status and revision and sorts by the chosen column', async () => {
      const number = await saveRevision(deflectorDesign(), 'for the list');
      const ids: number[] = [];
      for (let i = 0; i < 2; i++) ids.push((await designer.post(`/api/projects/${projectId}/revisions/${number}/runs`)).body.run.id);
      for (const id of ids) await waitForRun(designer, projectId, id);
      const byRevision = await designer.get(`/api/projects/${projectId}/runs?revision=${number}&sort=queuedAt&dir=asc`);
      expect(byRevision.status).toBe(200);
      expect(byRevision.body.runs.map((r: { id: number }) => r.id)).toEqual(ids);
      const byRevisionNumber = await designer.get(`/api/projects/${projectId}/runs?sort=revisionNumber&dir=desc`);
      const numbers = byRevisionNumber.body.runs.map((r: { revisionNumber: number }) => r.revisionNumber);
      expect(numbers).toEqual([...numbers].sort((x, y) => y - x));
      const failed = await designer.get(`/api/projects/${projectId}/runs?status=failed`);
      expect(failed.body.runs.every((r: { status: string }) => r.status === 'failed')).toBe(true);
    });
  });

  describe('artifacts larger than one chunk', () => {
    it('stores a 20 MB file as three chunks and streams it back byte for byte', async () => {
      const { mkdtemp, rm, writeFile } = await import('node:fs/promises');
      const { createHash, randomBytes } = await import('node:crypto');
      const { tmpdir } = await import('node:os');
      const { join } = await import('node:path');
      const { storeArtifacts } = await import('../../server/components/runs/run-artifacts');
      const { RunArtifactChunkModel, RunArtifactModel } = await import('../../server/components/runs/run.model');
      const number = await saveRevision(deflectorDesign());
      const run = await waitForRun(designer, projectId, (await designer.post(`/api/projects/${projectId}/revisions/${number}/runs`)).body.run.id);
      const dir = await mkdtemp(join(tmpdir(), 'pw-artifact-test-'));
      const bytes = randomBytes(20 * 1024 * 1024 + 123);
      await writeFile(join(dir, 'layout.gds'), bytes);
      await storeArtifacts(run.id, dir, [{ name: 'layout.gds', bytes: bytes.length }]);
      await rm(dir, { recursive: true });
      const artifact = await RunArtifactModel.findOne({ where: { runId: run.id, name: 'layout.gds' } });
      expect(await RunArtifactChunkModel.count({ where: { artifactId: artifact!.id } })).toBe(3);
      const res = await download(designer, `/api/projects/${projectId}/runs/${run.id}/artifacts/layout.gds`);
      expect(res.status).toBe(200);
      expect(res.headers['content-length']).toBe(String(bytes.length));
      expect(createHash('sha256').update(res.body).digest('hex')).toBe(createHash('sha256').update(bytes).digest('hex'));
    });
  });

  describe('recovery of runs left running', () => {
    it('queues a run left running again and gives up after three interrupted attempts', async () => {
      const { RunModel } = await import('../../server/components/runs/run.model');
      const number = await saveRevision(deflectorDesign());
      const revisionId = (await RunModel.sequelize!.models.Revision.findOne({ where: { projectId, number } }))!.get('id') as number;
      const interrupted = await RunModel.create({ projectId, revisionId, startedById: null, queuedAt: new Date(), status: 'running', attempts: 1, stage: 'atom mapping', progress: 0.4, startedAt: new Date() });
      const hopeless = await RunModel.create({ projectId, revisionId, startedById: null, queuedAt: new Date(), status: 'running', attempts: 3, stage: 'simulation', progress: 0.7, startedAt: new Date() });
      // Embedded: the server's own stop left them; Redis: they are held by no job (their worker and Redis lost them).
      const holder = engine === 'embedded' ? 'the server' : 'a worker';
      const outcome = await t.ctx.runQueue.recover();
      expect(outcome).toEqual({ requeued: [interrupted.id], failed: [hopeless.id] });
      const failed = await waitForRun(designer, projectId, hopeless.id);
      expect(failed.status).toBe('failed');
      expect(failed.error).toMatch(new RegExp(`^${holder} stopped during this run 3 times`));
      const resumed = await waitForRun(designer, projectId, interrupted.id);
      expect(resumed.status, resumed.error ?? '').toBe('succeeded');
      expect(resumed.attempts).toBe(2);
      expect(resumed.events.map((e) => e.message)).toEqual(expect.arrayContaining([`${holder} stopped during attempt 1; queued again`, 'started again (attempt 2 of 3)']));
    });
  });

  describe('live updates', () => {
    it('streams a run as Server-Sent Events until it finishes', async () => {
      const number = await saveRevision(twinImageDesign({ iterations: 30 }));
      const started = (await designer.post(`/api/projects/${projectId}/revisions/${number}/runs`)).body.run;
      const res = await designer
        .get(`/api/projects/${projectId}/runs/${started.id}/events`)
        .buffer(true)
        .parse((stream, callback) => {
          let text = '';
          stream.setEncoding('utf8');
          stream.on('data', (chunk: string) => (text += chunk));
          stream.on('end', () => callback(null, text));
        });
      expect(res.status).toBe(200);
      expect(res.headers['content-type']).toMatch(/^text\/event-stream/);
      const updates = (res.body as string)
        .split('\n\n')
        .filter((block) => block.startsWith('event: update'))
        .map((block) => JSON.parse(block.split('\ndata: ')[1]));
      expect(updates.length).toBeGreaterThan(1);
      expect(updates.at(-1)).toMatchObject({ id: started.id, status: 'succeeded', progress: 1 });
    });
  });
});
