/**
 * The signed-in account and project roles are reused between requests (server/components/auth/access-cache.ts):
 * every change made through the server must still take effect at the very next request.
 */
import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import { ModelReadCache } from '../../server/lib/model-read-cache';
import { twinImageDesign } from '../support/designs';
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
});
