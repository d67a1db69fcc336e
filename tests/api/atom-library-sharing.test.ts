/**
 * A personal atom library is its owner's alone until they share it with a project themselves: not a site
 * admin's libraries in every project, not a new designer's libraries in the project that added them.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { AtomLibrarySummary } from '../../shared/schemas/atom-libraries';
import { eightAtomCsv, uploadAtomLibrary } from '../support/atom-libraries';
import { deflectorDesign } from '../support/designs';
import { createTestApp, makeUser, signedInClient, type ApiClient, type TestApp } from '../support/test-app';

let t: TestApp;
let owner: ApiClient;
let designer: ApiClient;
let viewer: ApiClient;
let designerUser: Awaited<ReturnType<typeof makeUser>>;
beforeAll(async () => {
  t = await createTestApp();
  owner = await signedInClient(t.app, await makeUser({ name: 'Project Owner' }));
  designerUser = await makeUser({ name: 'New Designer' });
  designer = await signedInClient(t.app, designerUser);
  const viewerUser = await makeUser({ name: 'Plain Viewer' });
  viewer = await signedInClient(t.app, viewerUser);
});
afterAll(async () => {
  await t?.close();
});

/** λ and period of eightAtomLibrary, so a design with it is accepted. */
const setup = { wavelengthNm: 800, periodNm: 400, cells: 64 };
const designWith = (id: number) => ({ design: { ...deflectorDesign(), setup, atomLibrary: { source: 'library', id } } });
const listed = async (c: ApiClient, projectId: number) => (await c.get(`/api/projects/${projectId}/atom-libraries`)).body.atomLibraries as AtomLibrarySummary[];

async function projectWith(name: string, members: { email: string; role: string }[] = []) {
  const id = (await owner.post('/api/projects', { name })).body.project.id as number;
  for (const m of members) expect((await owner.post(`/api/projects/${id}/members`, m)).status).toBe(201);
  return id;
}

describe('personal atom libraries stay personal', () => {
  it('a site admin’s personal library is not listed, readable or usable in other people’s projects', async () => {
    const admin = await signedInClient(t.app, await makeUser({ name: 'Site Admin', siteRole: 'admin' }));
    const adminProject = (await admin.post('/api/projects', { name: 'Admin’s own' })).body.project.id;
    const lib = (await uploadAtomLibrary(admin, adminProject, eightAtomCsv('Admin private'), { scope: 'personal' })).body.atomLibrary.id;
    const project = await projectWith('Someone else’s project');
    expect((await listed(owner, project)).map((l) => l.id)).toEqual(['demo']);
    expect((await owner.get(`/api/projects/${project}/atom-libraries/${lib}`)).status).toBe(404);
    expect((await owner.get(`/api/projects/${project}/atom-libraries/${lib}/csv`)).status).toBe(404);
    const use = await owner.post(`/api/projects/${project}/revisions`, designWith(lib));
    expect(use.status).toBe(400);
    expect(use.body.details['design.atomLibrary.id']).toMatch(/not shared with this project/);
  });

  it('adding someone as a designer does not show their personal libraries to the project; they see their own', async () => {
    const home = (await designer.post('/api/projects', { name: 'Designer’s home' })).body.project.id;
    const lib = (await uploadAtomLibrary(designer, home, eightAtomCsv('Designer private'), { scope: 'personal' })).body.atomLibrary.id;
    const project = await projectWith('Adding project', [{ email: designerUser.email, role: 'designer' }]);
    expect((await listed(owner, project)).map((l) => l.id)).not.toContain(lib);
    expect((await owner.get(`/api/projects/${project}/atom-libraries/${lib}`)).status).toBe(404);
    expect((await owner.post(`/api/projects/${project}/revisions`, designWith(lib))).status).toBe(400);
    const own = (await listed(designer, project)).find((l) => l.id === lib);
    expect(own).toMatchObject({ usable: true, sharedHere: false, canShare: true });
  });
});

describe('sharing is the owner’s own act', () => {
  it('the owner shares with one project: its members see it, designers use it; stopping hides it again', async () => {
    const viewerEmail = (await viewer.get('/api/auth/me')).body.user.email;
    const project = await projectWith('Sharing project', [
      { email: designerUser.email, role: 'designer' },
      { email: viewerEmail, role: 'viewer' },
    ]);
    const other = await projectWith('Not shared here', [{ email: designerUser.email, role: 'designer' }]);
    const lib = (await uploadAtomLibrary(designer, project, eightAtomCsv('Shared on purpose'), { scope: 'personal' })).body.atomLibrary.id;
    expect((await owner.post(`/api/projects/${project}/atom-libraries/${lib}/share`)).status).toBe(404);

    const shared = await designer.post(`/api/projects/${project}/atom-libraries/${lib}/share`);
    expect(shared.status).toBe(200);
    expect(shared.body.atomLibrary).toMatchObject({ id: lib, sharedHere: true });
    expect((await designer.post(`/api/projects/${project}/atom-libraries/${lib}/share`)).status).toBe(200);
    expect((await listed(owner, project)).find((l) => l.id === lib)).toMatchObject({ usable: true, sharedHere: true, canShare: false });
    expect((await listed(viewer, project)).map((l) => l.id)).toContain(lib);
    expect((await listed(owner, other)).map((l) => l.id)).not.toContain(lib);
    expect((await owner.post(`/api/projects/${project}/revisions`, designWith(lib))).status).toBe(201);

    const notTheirs = await owner.delete(`/api/projects/${project}/atom-libraries/${lib}/share`);
    expect(notTheirs.status).toBe(403);
    expect(notTheirs.body.error).toMatch(/Only New Designer may share/);
    expect((await viewer.delete(`/api/projects/${project}/atom-libraries/${lib}/share`)).status).toBe(403);

    const stopped = await designer.delete(`/api/projects/${project}/atom-libraries/${lib}/share`);
    expect(stopped.status).toBe(200);
    expect(stopped.body.atomLibrary.sharedHere).toBe(false);
    // The saved revision still reads it; nobody else may start using it.
    expect((await listed(owner, project)).find((l) => l.id === lib)).toMatchObject({ usable: false, sharedHere: false });
    expect((await owner.post(`/api/projects/${project}/revisions`, designWith(lib))).status).toBe(400);
  });

  it('a project library is not shared (it already belongs to the project)', async () => {
    const project = await projectWith('Project library here');
    const lib = (await uploadAtomLibrary(owner, project, eightAtomCsv('Project owned'))).body.atomLibrary.id;
    const res = await owner.post(`/api/projects/${project}/atom-libraries/${lib}/share`);
    expect(res.status).toBe(409);
    expect(res.body.error).toMatch(/only personal libraries are shared/);
  });
});
