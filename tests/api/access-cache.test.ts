/**
 * The signed-in account and project roles are reused between requests (server/components/auth/access-cache.ts):
 * every change made through the server must still take effect at the very next request.
 */
import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import { NotificationModel } from '../../server/components/notifications/notification.model';
import { RunModel } from '../../server/components/runs/run.model';
import { ModelReadCache } from '../../server/lib/model-read-cache';
import { deflectorDesign, twinImageDesign, waitForRun } from '../support/designs';
import { ApiClient, createTestApp, makeUser, signedInClient, type TestApp } from '../support/test-app';

const TTL_SECONDS = 300;
let t: TestApp;
beforeAll(async () => {
  // A long lifetime: what the tests see after a change comes from dropping the cache, never from its expiry.
  t = await createTestApp({ ACCESS_CACHE_SECONDS: String(TTL_SECONDS) });
});
afterAll(async () => {
  await t?.close();
});
afterEach(() => {
  vi.useRealTimers();
});

async function projectWith(role: 'designer' | 'viewer' | 'reviewer') {
  const owner = await signedInClient(t.app, await makeUser());
  const person = await makeUser();
  const client = await signedInClient(t.app, person);
  const id = (await owner.post('/api/projects', { name: `Access ${Math.random()}` })).body.project.id as number;
  expect((await owner.post(`/api/projects/${id}/members`, { email: person.email, role })).status).toBe(201);
  return { owner, person, client, id };
}

const saveRevision = (client: ApiClient, id: number) => client.post(`/api/projects/${id}/revisions`, { design: twinImageDesign(), message: '' });

describe('access reused between requests', () => {
  it('applies a project role change at the next request, both ways', async () => {
    const { owner, person, client, id } = await projectWith('designer');
    expect((await client.get(`/api/projects/${id}/runs`)).status).toBe(200);
    expect((await saveRevision(client, id)).status).toBe(201);
    expect((await owner.patch(`/api/projects/${id}/members/${person.id}`, { role: 'viewer' })).status).toBe(200);
    expect((await saveRevision(client, id)).status).toBe(403);
    expect((await client.get(`/api/projects/${id}`)).body.project.myRole).toBe('viewer');
    expect((await owner.patch(`/api/projects/${id}/members/${person.id}`, { role: 'designer' })).status).toBe(200);
    expect((await saveRevision(client, id)).status).toBe(201);
  });

  it('refuses a removed member at the next request and admits a newly added one at once', async () => {
    const { owner, person, client, id } = await projectWith('viewer');
    expect((await client.get(`/api/projects/${id}/runs`)).status).toBe(200);
    expect((await owner.delete(`/api/projects/${id}/members/${person.id}`)).status).toBe(204);
    expect((await client.get(`/api/projects/${id}/runs`)).status).toBe(404);
    expect((await owner.post(`/api/projects/${id}/members`, { email: person.email, role: 'viewer' })).status).toBe(201);
    expect((await client.get(`/api/projects/${id}/runs`)).status).toBe(200);
  });

  it('signs a disabled account out at its next request', async () => {
    const admin = await signedInClient(t.app, await makeUser({ siteRole: 'admin' }));
    const { person, client, id } = await projectWith('viewer');
    expect((await client.get(`/api/projects/${id}/runs`)).status).toBe(200);
    expect((await admin.patch(`/api/admin/users/${person.id}`, { disabled: true })).status).toBe(200);
    expect((await client.get(`/api/projects/${id}/runs`)).status).toBe(401);
    expect((await client.get('/api/auth/me')).body.user).toBeNull();
    expect((await admin.patch(`/api/admin/users/${person.id}`, { disabled: false })).status).toBe(200);
    const again = await new ApiClient(t.app).start();
    expect((await again.post('/api/auth/sign-in', { email: person.email, password: person.password })).status).toBe(200);
  });

  it('applies a site role change at the next request', async () => {
    const admin = await signedInClient(t.app, await makeUser({ siteRole: 'admin' }));
    const other = await makeUser({ siteRole: 'admin' });
    const otherClient = await signedInClient(t.app, other);
    const { id } = await projectWith('viewer');
    // As a site admin: owner of every project, and the admin pages.
    expect((await otherClient.get(`/api/projects/${id}/runs`)).status).toBe(200);
    expect((await otherClient.get('/api/admin/users')).status).toBe(200);
    expect((await admin.patch(`/api/admin/users/${other.id}`, { siteRole: 'member' })).status).toBe(200);
    expect((await otherClient.get(`/api/projects/${id}/runs`)).status).toBe(404);
    expect((await otherClient.get('/api/admin/users')).status).toBe(403);
    expect((await otherClient.get('/api/auth/me')).body.user.siteRole).toBe('member');
  });

  it('uses the project row as it is now: archived and renamed at the next request', async () => {
    const { owner, id } = await projectWith('viewer');
    expect((await owner.get(`/api/projects/${id}`)).body.project.archived).toBe(false);
    expect((await owner.post(`/api/projects/${id}/archive`)).body.project.archived).toBe(true);
    expect((await owner.get(`/api/projects/${id}`)).body.project.archived).toBe(true);
    expect((await owner.post(`/api/projects/${id}/unarchive`)).body.project.archived).toBe(false);
    expect((await owner.patch(`/api/projects/${id}`, { name: 'Renamed at once' })).status).toBe(200);
    expect((await owner.get(`/api/projects/${id}`)).body.project.name).toBe('Renamed at once');
  });

  it('sees a change made by hand in the database after ACCESS_CACHE_SECONDS at the latest', async () => {
    const { person, client, id } = await projectWith('designer');
    expect((await client.get(`/api/projects/${id}/runs`)).status).toBe(200);
    await t.ctx.sequelize.query('DELETE FROM project_members WHERE project_id = ? AND user_id = ?', { replacements: [id, person.id] });
    // Reused from memory while the entry is young (this is what the cache is for) …
    expect((await client.get(`/api/projects/${id}/runs`)).status).toBe(200);
    // … and read again once it is older than ACCESS_CACHE_SECONDS.
    vi.useFakeTimers({ toFake: ['Date'], now: Date.now() + TTL_SECONDS * 1000 + 1000 });
    expect((await client.get(`/api/projects/${id}/runs`)).status).toBe(404);
  });
});

describe('ModelReadCache', () => {
  it('does not keep a value whose load was under way when a write cleared the cache', async () => {
    const cache = new ModelReadCache<string>({ ttlMs: 60_000, maxEntries: 10 });
    let finish: (value: string) => void = () => undefined;
    let loads = 0;
    const slowLoad = () => {
      loads += 1;
      return new Promise<string>((resolve) => (finish = resolve));
    };
    const first = cache.get('k', slowLoad);
    cache.clear();
    finish('before the write');
    expect(await first).toBe('before the write');
    const second = cache.get('k', slowLoad);
    finish('after the write');
    expect(await second).toBe('after the write');
    expect(await cache.get('k', slowLoad)).toBe('after the write');
    expect(loads).toBe(2);
  });

  it('keeps at most maxEntries, dropping the oldest, and loads every time with ttlMs 0', async () => {
    const cache = new ModelReadCache<number>({ ttlMs: 60_000, maxEntries: 2 });
    let loads = 0;
    const load = async () => ++loads;
    await cache.get('a', load);
    await cache.get('b', load);
    await cache.get('c', load);
    expect(await cache.get('b', load)).toBe(2);
    expect(await cache.get('a', load)).toBe(4);
    cache.configure({ ttlMs: 0, maxEntries: 2 });
    expect(await cache.get('a', load)).toBe(5);
    expect(await cache.get('a', load)).toBe(6);
  });

  it('keeps at most maxBytes of values by sizeOf, dropping the oldest, and never keeps a value larger than that', async () => {
    const cache = new ModelReadCache<string>({ ttlMs: 60_000, maxEntries: 100, maxBytes: 10 }, (text) => text.length);
    let loads = 0;
    const load = (text: string) => async () => {
      loads += 1;
      return text;
    };
    await cache.get('a', load('aaaa'));
    await cache.get('b', load('bbbb'));
    expect(cache.heldBytes).toBe(8);
    await cache.get('c', load('cccc')); // 12 bytes: the oldest goes
    expect(cache.heldBytes).toBe(8);
    expect(loads).toBe(3);
    await cache.get('b', load('x'));
    await cache.get('c', load('x'));
    expect(loads).toBe(3);
    expect(await cache.get('a', load('aaaa'))).toBe('aaaa');
    expect(loads).toBe(4);
    expect(await cache.get('big', load('far too long'))).toBe('far too long');
    expect(await cache.get('big', load('far too long'))).toBe('far too long');
    expect(loads).toBe(6);
    expect(cache.heldBytes).toBeLessThanOrEqual(10);
    cache.clear();
    expect(cache.heldBytes).toBe(0);
  });
});

describe('busiest lists and finished runs reused between requests (server/db/list-caches.ts, run-detail-cache.ts)', () => {
  const later = () => vi.useFakeTimers({ toFake: ['Date'], now: Date.now() + TTL_SECONDS * 1000 + 1000 });

  it('projects: a new project, a rename, a new member and a saved revision show at the next request', async () => {
    const owner = await signedInClient(t.app, await makeUser());
    const listed = async () => (await owner.get('/api/projects')).body.projects as { id: number; name: string; memberCount: number; updatedAt: string }[];
    expect(await listed()).toEqual([]);
    const id = (await owner.post('/api/projects', { name: 'Listed at once' })).body.project.id as number;
    expect((await listed()).map((p) => p.name)).toEqual(['Listed at once']);
    expect((await owner.patch(`/api/projects/${id}`, { name: 'Renamed in the list' })).status).toBe(200);
    expect((await listed())[0].name).toBe('Renamed in the list');
    expect((await owner.post(`/api/projects/${id}/members`, { email: (await makeUser()).email, role: 'viewer' })).status).toBe(201);
    expect((await listed())[0].memberCount).toBe(2);
    // A saved revision moves the project's last change by a raw update (touchProject), which no model hook sees.
    const before = (await listed())[0].updatedAt;
    await new Promise((r) => setTimeout(r, 1100)); // DATETIME keeps whole seconds here
    expect((await saveRevision(owner, id)).status).toBe(201);
    expect((await listed())[0].updatedAt > before).toBe(true);
  });

  it('projects: a change by hand is reused while young and read again after ACCESS_CACHE_SECONDS', async () => {
    const owner = await signedInClient(t.app, await makeUser());
    const id = (await owner.post('/api/projects', { name: 'Before the hand edit' })).body.project.id as number;
    expect((await owner.get('/api/projects')).body.projects[0].name).toBe('Before the hand edit');
    await t.ctx.sequelize.query('UPDATE projects SET name = ? WHERE id = ?', { replacements: ['After the hand edit', id] });
    expect((await owner.get('/api/projects')).body.projects[0].name).toBe('Before the hand edit');
    later();
    expect((await owner.get('/api/projects')).body.projects[0].name).toBe('After the hand edit');
  });

  it('runs: a new run row and a status change show at the next request; a hand edit after ACCESS_CACHE_SECONDS', async () => {
    const { owner, id } = await projectWith('viewer');
    const revision = await saveRevision(owner, id);
    const revisionId = (await RunModel.sequelize!.query('SELECT id FROM revisions WHERE project_id = ?', { replacements: [id], plain: true })) as { id: number };
    expect(revision.status).toBe(201);
    const listed = async () => (await owner.get(`/api/projects/${id}/runs`)).body.runs as { id: number; status: string; error: string | null }[];
    expect(await listed()).toEqual([]);
    // Rows the queue does not pick up: written through the model, as the queue writes them.
    const run = await RunModel.create({ projectId: id, revisionId: revisionId.id, startedById: null, queuedAt: new Date(), stage: 'queued', status: 'failed', error: 'first reason' });
    expect((await listed()).map((r) => [r.id, r.status])).toEqual([[run.id, 'failed']]);
    await RunModel.update({ error: 'second reason' }, { where: { id: run.id } });
    expect((await listed())[0].error).toBe('second reason');
    await t.ctx.sequelize.query('UPDATE runs SET error = ? WHERE id = ?', { replacements: ['by hand', run.id] });
    expect((await listed())[0].error).toBe('second reason');
    later();
    expect((await listed())[0].error).toBe('by hand');
  });

  it('notifications: a new one and one marked read show at the next request', async () => {
    const person = await makeUser();
    const client = await signedInClient(t.app, person);
    const projectId = (await client.post('/api/projects', { name: 'Notified' })).body.project.id as number;
    const listed = async () => (await client.get('/api/notifications')).body as { notifications: { text: string }[]; unread: number };
    expect((await listed()).unread).toBe(0);
    const note = await NotificationModel.create({ userId: person.id, projectId, kind: 'mention', runId: null, threadId: null, actorId: null, text: 'Listed at once' });
    expect((await listed()).notifications.map((n) => n.text)).toEqual(['Listed at once']);
    expect((await listed()).unread).toBe(1);
    expect((await client.post(`/api/notifications/${note.id}/read`)).status).toBe(204);
    expect((await listed()).unread).toBe(0);
  });

  it("a finished run's detail: a write through the server shows at once, a hand edit after ACCESS_CACHE_SECONDS", async () => {
    const owner = await signedInClient(t.app, await makeUser());
    const id = (await owner.post('/api/projects', { name: 'Finished detail' })).body.project.id as number;
    const number = (await owner.post(`/api/projects/${id}/revisions`, { design: deflectorDesign(), message: '' })).body.revision.number as number;
    const finished = await waitForRun(owner, id, (await owner.post(`/api/projects/${id}/revisions/${number}/runs`)).body.run.id);
    expect(finished.status, finished.error ?? '').toBe('succeeded');
    const detail = async () => (await owner.get(`/api/projects/${id}/runs/${finished.id}`)).body.run as { stage: string; filesDeletedAt: string | null };
    expect((await detail()).filesDeletedAt).toBeNull();
    expect((await owner.delete(`/api/projects/${id}/runs/${finished.id}/files`)).status).toBe(200);
    expect((await detail()).filesDeletedAt).not.toBeNull();
    // The run belongs to this project only: another project's id is still a 404, kept or not.
    const other = (await owner.post('/api/projects', { name: 'Another project' })).body.project.id as number;
    expect((await owner.get(`/api/projects/${other}/runs/${finished.id}`)).status).toBe(404);
    await t.ctx.sequelize.query('UPDATE runs SET stage = ?, updated_at = ? WHERE id = ?', { replacements: ['edited by hand', new Date(Date.now() + 5000), finished.id] });
    expect((await detail()).stage).not.toBe('edited by hand');
    later();
    expect((await detail()).stage).toBe('edited by hand');
  });
});
