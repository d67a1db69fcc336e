import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ApiClient, createTestApp, makeUser, signedInClient, type TestApp } from '../support/test-app';

let t: TestApp;
beforeAll(async () => {
  t = await createTestApp();
});
afterAll(async () => {
  await t?.close();
});

describe('admin', () => {
  it('lists users, changes a site role and disables an account', async () => {
    const admin = await makeUser({ siteRole: 'admin' });
    const member = await makeUser({ name: 'Zed Member' });
    const client = await signedInClient(t.app, admin);
    const memberClient = await signedInClient(t.app, member);

    const list = await client.get('/api/admin/users');
    expect(list.status).toBe(200);
    expect(list.body.users.map((u: { email: string }) => u.email)).toEqual(expect.arrayContaining([admin.email, member.email]));
    expect(JSON.stringify(list.body)).not.toMatch(/password/i);

    const promoted = await client.patch(`/api/admin/users/${member.id}`, { siteRole: 'admin' });
    expect(promoted.body.user.siteRole).toBe('admin');
    await client.patch(`/api/admin/users/${member.id}`, { siteRole: 'member' });

    const disabled = await client.patch(`/api/admin/users/${member.id}`, { disabled: true });
    expect(disabled.body.user.disabled).toBe(true);
    // A disabled account is signed out at its next request and cannot sign in again.
    expect((await memberClient.get('/api/auth/me')).body.user).toBeNull();
    const again = await new ApiClient(t.app).start();
    expect((await again.post('/api/auth/sign-in', { email: member.email, password: member.password })).status).toBe(401);

    await client.patch(`/api/admin/users/${member.id}`, { disabled: false });
    expect((await again.post('/api/auth/sign-in', { email: member.email, password: member.password })).status).toBe(200);
  });

  it('does not let an admin demote or disable themselves', async () => {
    const admin = await makeUser({ siteRole: 'admin' });
    const client = await signedInClient(t.app, admin);
    const res = await client.patch(`/api/admin/users/${admin.id}`, { disabled: true });
    expect(res.status).toBe(409);
    expect(res.body.error).toMatch(/your own/);
  });

  it('keeps admin routes from members (403) and anonymous callers (401)', async () => {
    const member = await makeUser();
    const client = await signedInClient(t.app, member);
    expect((await client.get('/api/admin/users')).status).toBe(403);
    expect((await client.patch(`/api/admin/users/${member.id}`, { siteRole: 'admin' })).status).toBe(403);
    expect((await client.get('/api/admin/audit')).status).toBe(403);
    const anon = await new ApiClient(t.app).start();
    expect((await anon.get('/api/admin/users')).status).toBe(401);
    expect((await anon.get('/api/admin/audit')).status).toBe(401);
  });

  it('rejects a bad role or an empty change', async () => {
    const admin = await makeUser({ siteRole: 'admin' });
    const member = await makeUser();
    const client = await signedInClient(t.app, admin);
    expect((await client.patch(`/api/admin/users/${member.id}`, { siteRole: 'emperor' })).status).toBe(400);
    expect((await client.patch(`/api/admin/users/${member.id}`, {})).status).toBe(400);
    expect((await client.patch('/api/admin/users/987654', { disabled: true })).status).toBe(404);
  });
});
