import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { diffDesigns } from '../../shared/design-diff';
import { deflectorDesign, twinImageDesign, waitForRun } from '../support/designs';
import { createTestApp, makeUser, signedInClient, type ApiClient, type TestApp } from '../support/test-app';

let t: TestApp;
let designer: ApiClient;
let projectId: number;
let otherProjectId: number;

beforeAll(async () => {
  t = await createTestApp();
  designer = await signedInClient(t.app, await makeUser({ name: 'Rev Designer' }));
  projectId = (await designer.post('/api/projects', { name: 'Revisions project' })).body.project.id;
  otherProjectId = (await designer.post('/api/projects', { name: 'Other project' })).body.project.id;
});
afterAll(async () => {
  await t?.close();
});

const base = () => `/api/projects/${projectId}/revisions`;

describe('revisions', () => {
  it('saves numbered revisions with defaults filled in, lists them newest first and reads one back', async () => {
    const first = await designer.post(base(), { design: twinImageDesign(), message: '  first try  ' });
    expect(first.status).toBe(201);
    expect(first.body.revision).toMatchObject({ number: 1, message: 'first try', designName: 'Small twin-image tag', runCount: 0, createdBy: { name: 'Rev Designer' } });
    expect(first.body.revision.design.atomLibrary).toEqual({ source: 'demo' });
    expect(first.body.revision.design.channels.a.terms[0].algorithm).toBe('weighted-gs');
    const second = await designer.post(base(), { design: deflectorDesign() });
    expect(second.body.revision).toMatchObject({ number: 2, message: '' });

    const list = await designer.get(base());
    expect(list.status).toBe(200);
    expect(list.body.revisions.map((r: { number: number }) => r.number)).toEqual([2, 1]);
    expect(list.body.revisions[0].design).toBeUndefined();

    const one = await designer.get(`${base()}/1`);
    expect(one.body.revision.design).toEqual(first.body.revision.design);
    expect((await designer.get(`${base()}/3`)).status).toBe(404);
    expect((await designer.get(`${base()}/x`)).status).toBe(400);

    // Numbers count per project.
    const elsewhere = await designer.post(`/api/projects/${otherProjectId}/revisions`, { design: deflectorDesign() });
    expect(elsewhere.body.revision.number).toBe(1);
  });

  it('is immutable: no route changes or deletes a revision', async () => {
    const saved = (await designer.post(base(), { design: deflectorDesign(), message: 'keep me' })).body.revision;
    const url = `${base()}/${saved.number}`;
    expect((await designer.patch(url, { message: 'changed' })).status).toBe(404);
    expect((await designer.delete(url)).status).toBe(404);
    expect((await designer.agent.put(url).set('x-csrf-token', designer.csrfToken).send({ design: twinImageDesign() })).status).toBe(404);
    const after = await designer.get(url);
    expect(after.body.revision).toMatchObject({ message: 'keep me', designName: 'Twin deflector' });
  });

  it('refuses an invalid design naming the field path', async () => {
    const design = twinImageDesign() as { setup: { cells: number; periodNm: number } };
    design.setup.cells = 100;
    const res = await designer.post(base(), { design });
    expect(res.status).toBe(400);
    expect(res.body.error).toMatch(/design\.setup\.cells: cells must be one of 64, 128/);
    expect(res.body.details['design.setup.cells']).toBeDefined();

    const superWavelength = twinImageDesign() as { setup: { periodNm: number } };
    superWavelength.setup.periodNm = 700;
    const period = await designer.post(base(), { design: superWavelength });
    expect(period.body.details['design.setup.periodNm']).toMatch(/smaller than wavelengthNm/);

    const noTerms = { ...deflectorDesign(), channels: { a: { terms: [] }, b: { terms: [{ kind: 'vortex', charge: 0 }] } } };
    const terms = await designer.post(base(), { design: noTerms });
    expect(Object.keys(terms.body.details)).toEqual(expect.arrayContaining(['design.channels.a.terms', 'design.channels.b.terms.0.charge']));

    expect((await designer.post(base(), { message: 'no design' })).body.details.design).toBeDefined();
    const long = await designer.post(base(), { design: deflectorDesign(), message: 'x'.repeat(501) });
    expect(long.body.details.message).toMatch(/500/);
  });

  it('accepts only uploads of this project, of a fitting kind, and no files on disk', async () => {
    const refTo = (image: object) => {
      const design = twinImageDesign() as { channels: { a: { terms: { image: object }[] } } };
      design.channels.a.terms[0].image = image;
      return design;
    };
    const missing = await designer.post(base(), { design: refTo({ source: 'upload', id: 4242 }) });
    expect(missing.status).toBe(400);
    expect(missing.body.details['design.channels.a.terms.0.image.id']).toBe('this project has no upload 4242');
    const file = await designer.post(base(), { design: refTo({ source: 'file', path: 'lighthouse.png' }) });
    expect(file.status).toBe(400);
    expect(file.body.details['design.channels.a.terms.0.image']).toMatch(/command line/);
    const library = await designer.post(base(), { design: { ...deflectorDesign(), atomLibrary: { source: 'library', id: 3 } } });
    expect(library.body.details['design.atomLibrary.id']).toMatch(/no atom library 3/);
  });

  it('compares two revisions leaf by leaf', async () => {
    const a = (await designer.post(base(), { design: twinImageDesign() })).body.revision.number;
    const changed = twinImageDesign({ cells: 128, iterations: 20 }) as { channels: { b: { terms: unknown[] } } };
    changed.channels.b.terms.push({ kind: 'vortex', charge: 2 });
    const b = (await designer.post(base(), { design: changed, message: 'bigger' })).body.revision.number;
    const res = await designer.get(`${base()}/compare?a=${a}&b=${b}`);
    expect(res.status).toBe(200);
    expect(res.body.a.number).toBe(a);
    expect(res.body.b.message).toBe('bigger');
    const byPath = Object.fromEntries(res.body.changes.map((c: { path: string; a: unknown; b: unknown }) => [c.path, [c.a, c.b]]));
    expect(byPath).toEqual({
      'setup.cells': [64, 128],
      'channels.a.terms.0.iterations': [8, 20],
      'channels.b.terms.0.iterations': [8, 20],
      'channels.b.terms.1': [null, { kind: 'vortex', charge: 2 }],
    });
    const same = await designer.get(`${base()}/compare?a=${a}&b=${a}`);
    expect(same.body.changes).toEqual([]);
    const bad = await designer.get(`${base()}/compare?a=${a}`);
    expect(bad.status).toBe(400);
    expect(bad.body.details.b).toBeDefined();
    expect((await designer.get(`${base()}/compare?a=${a}&b=999`)).status).toBe(404);
  });
});

describe("the project's last change", () => {
  it('follows a saved revision, a started run and a finished one', async () => {
    const id = (await designer.post('/api/projects', { name: 'Last change project' })).body.project.id;
    const lastChange = async () => Date.parse((await designer.get(`/api/projects/${id}`)).body.project.updatedAt);
    const pause = () => new Promise((r) => setTimeout(r, 1100));
    const created = await lastChange();
    await pause();
    const saved = (await designer.post(`/api/projects/${id}/revisions`, { design: deflectorDesign() })).body.revision;
    const afterRevision = await lastChange();
    expect(afterRevision).toBeGreaterThan(created);
    expect(afterRevision).toBeGreaterThanOrEqual(Date.parse(saved.createdAt) - 1000);
    await pause();
    const run = (await designer.post(`/api/projects/${id}/revisions/${saved.number}/runs`)).body.run;
    const afterStart = await lastChange();
    expect(afterStart).toBeGreaterThan(afterRevision);
    const done = await waitForRun(designer, id, run.id);
    expect(done.status).toBe('succeeded');
    expect(await lastChange()).toBeGreaterThanOrEqual(Date.parse(done.finishedAt!) - 1000);
  });
});

describe('diffDesigns', () => {
  it('reports changed, added and removed leaves and whole values whose kind changed', () => {
    expect(diffDesigns({ x: 1, y: { z: [1, 2] } }, { x: 1, y: { z: [1, 3, 4] } })).toEqual([
      { path: 'y.z.1', a: 2, b: 3 },
      { path: 'y.z.2', a: null, b: 4 },
    ]);
    expect(diffDesigns({ w: { units: 'cells' }, gone: true }, { w: 5 })).toEqual([
      { path: 'w', a: { units: 'cells' }, b: 5 },
      { path: 'gone', a: true, b: null },
    ]);
    expect(diffDesigns({ a: [] }, { a: {} })).toEqual([{ path: 'a', a: [], b: {} }]);
    expect(diffDesigns(twinImageDesign(), twinImageDesign())).toEqual([]);
  });
});
