/**
 * Every project route × every role gets exactly the status it should. The server decides, whatever the
 * client shows: roles from shared/roles.ts (owner manages, designer edits and runs, reviewer comments,
 * viewer reads; a site admin acts as owner; a signed-in non-member sees 404 so project names never leak).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ApiClient, createTestApp, makeUser, signedInClient, type TestApp } from '../support/test-app';

type Who = 'anonymous' | 'outsider' | 'viewer' | 'reviewer' | 'designer' | 'owner' | 'admin';
const WHO: Who[] = ['anonymous', 'outsider', 'viewer', 'reviewer', 'designer', 'owner', 'admin'];

interface Fixture {
  projectId: number;
  targetUserId: number;
}
interface RouteCase {
  name: string;
  send(client: ApiClient, f: Fixture): Promise<{ status: number }>;
  expected: Record<Who, number>;
}

const read = { anonymous: 401, outsider: 404, viewer: 200, reviewer: 200, designer: 200, owner: 200, admin: 200 };
const manage = (ok: number) => ({ anonymous: 401, outsider: 404, viewer: 403, reviewer: 403, designer: 403, owner: ok, admin: ok });

const ROUTES: RouteCase[] = [
  { name: 'GET /projects', send: (c) => c.get('/api/projects'), expected: { ...read, outsider: 200 } },
  {
    name: 'POST /projects',
    send: (c) => c.post('/api/projects', { name: 'Made in the matrix' }),
    expected: { anonymous: 401, outsider: 201, viewer: 201, reviewer: 201, designer: 201, owner: 201, admin: 201 },
  },
  { name: 'GET /projects/:id', send: (c, f) => c.get(`/api/projects/${f.projectId}`), expected: read },
  { name: 'PATCH /projects/:id', send: (c, f) => c.patch(`/api/projects/${f.projectId}`, { name: 'Renamed' }), expected: manage(200) },
  { name: 'POST /projects/:id/archive', send: (c, f) => c.post(`/api/projects/${f.projectId}/archive`), expected: manage(200) },
  { name: 'POST /projects/:id/unarchive', send: (c, f) => c.post(`/api/projects/${f.projectId}/unarchive`), expected: manage(200) },
  { name: 'GET /projects/:id/members', send: (c, f) => c.get(`/api/projects/${f.projectId}/members`), expected: read },
  {
    name: 'POST /projects/:id/members',
    send: async (c, f) => c.post(`/api/projects/${f.projectId}/members`, { email: (await makeUser()).email, role: 'viewer' }),
    expected: manage(201),
  },
  {
    name: 'PATCH /projects/:id/members/:userId',
    send: (c, f) => c.patch(`/api/projects/${f.projectId}/members/${f.targetUserId}`, { role: 'designer' }),
    expected: manage(200),
  },
  {
    name: 'DELETE /projects/:id/members/:userId (someone else)',
    send: (c, f) => c.delete(`/api/projects/${f.projectId}/members/${f.targetUserId}`),
    expected: manage(204),
  },
];

let t: TestApp;
const clients = {} as Record<Who, ApiClient>;
const users = {} as Record<Who, Awaited<ReturnType<typeof makeUser>>>;

beforeAll(async () => {
  t = await createTestApp();
  for (const who of WHO) {
    if (who === 'anonymous') {
      clients[who] = await new ApiClient(t.app).start();
      continue;
    }
    users[who] = await makeUser({ siteRole: who === 'admin' ? 'admin' : 'member', name: `Matrix ${who}` });
    clients[who] = await signedInClient(t.app, users[who]);
  }
});
afterAll(async () => {
  await t?.close();
});

/** A fresh project per case, so one case's change never affects another. */
async function freshProject(): Promise<Fixture> {
  const owner = clients.owner;
  const project = (await owner.post('/api/projects', { name: 'Matrix project' })).body.project;
  for (const role of ['viewer', 'reviewer', 'designer'] as const) {
    await owner.post(`/api/projects/${project.id}/members`, { email: users[role].email, role });
  }
  const target = await makeUser({ name: 'Matrix target' });
  await owner.post(`/api/projects/${project.id}/members`, { email: target.email, role: 'viewer' });
  return { projectId: project.id, targetUserId: target.id };
}

describe('authorization matrix', () => {
  for (const route of ROUTES) {
    for (const who of WHO) {
      it(`${route.name} as ${who} → ${route.expected[who]}`, async () => {
        const fixture = await freshProject();
        const res = await route.send(clients[who], fixture);
        expect(res.status).toBe(route.expected[who]);
      });
    }
  }

  it('a viewer gets 403 on every project write', async () => {
    const fixture = await freshProject();
    const viewer = clients.viewer;
    const writes = [
      await viewer.patch(`/api/projects/${fixture.projectId}`, { description: 'x' }),
      await viewer.post(`/api/projects/${fixture.projectId}/archive`),
      await viewer.post(`/api/projects/${fixture.projectId}/members`, { email: users.outsider.email, role: 'owner' }),
      await viewer.patch(`/api/projects/${fixture.projectId}/members/${users.viewer.id}`, { role: 'owner' }),
      await viewer.delete(`/api/projects/${fixture.projectId}/members/${fixture.targetUserId}`),
    ];
    expect(writes.map((r) => r.status)).toEqual([403, 403, 403, 403, 403]);
  });
});
