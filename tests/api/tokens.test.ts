/** Personal access tokens: shown once, stored hashed, scopes enforced, same role checks as a session. */
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AccessTokenModel } from '../../server/components/access-tokens/access-token.model';
import { UserModel } from '../../server/components/users/user.model';
import { hashToken } from '../../server/lib/tokens';
import { createTestApp, makeUser, signedInClient, type ApiClient, type TestApp } from '../support/test-app';

let t: TestApp;
let owner: ApiClient;
let ownerUser: Awaited<ReturnType<typeof makeUser>>;
beforeAll(async () => {
  t = await createTestApp();
  ownerUser = await makeUser({ name: 'Token Owner' });
  owner = await signedInClient(t.app, ownerUser);
});
afterAll(async () => {
  await t?.close();
});

async function createToken(client: ApiClient, scope: 'read' | 'write', extra: object = {}) {
  // Every account here has makeUser's default password.
  const res = await client.post('/api/access-tokens', { name: `script ${scope}`, scope, currentPassword: 'correct horse battery', ...extra });
  expect(res.status).toBe(201);
  return res.body as { token: string; accessToken: { id: number; prefix: string; lastUsedAt: string | null } };
}
const bearer = (token: string) => ({ Authorization: `Bearer ${token}` });

describe('personal access tokens', () => {
  it('shows the secret once, stores only its hash and lists it without the secret', async () => {
    const { token, accessToken } = await createToken(owner, 'read');
    expect(token).toMatch(/^pwt_[A-Za-z0-9_-]{43}$/);
    expect(token.startsWith(accessToken.prefix)).toBe(true);
    const row = await AccessTokenModel.findByPk(accessToken.id);
    expect(row!.tokenHash).toBe(hashToken(token));
    const list = await owner.get('/api/access-tokens');
    expect(list.status).toBe(200);
    expect(JSON.stringify(list.body)).not.toContain(token);
    expect(list.body.accessTokens.map((a: { id: number }) => a.id)).toContain(accessToken.id);
  });

  it('a read-only token reads projects and runs without CSRF, gets 403 on writes naming the scope', async () => {
    const project = (await owner.post('/api/projects', { name: 'Scripted reads' })).body.project;
    const { token } = await createToken(owner, 'read');
    const projects = await request(t.app).get('/api/projects').set(bearer(token));
    expect(projects.status).toBe(200);
    expect(projects.body.projects.map((p: { id: number }) => p.id)).toContain(project.id);
    const runs = await request(t.app).get(`/api/projects/${project.id}/runs`).set(bearer(token));
    expect(runs.status).toBe(200);
    expect(runs.body.runs).toEqual([]);
    const write = await request(t.app).post('/api/projects').set(bearer(token)).send({ name: 'Not allowed' });
    expect(write.status).toBe(403);
    expect(write.body.error).toMatch(/read-only scope "read"/);
  });

  it('a read-write token creates a project with no cookie and no CSRF header', async () => {
    const { token } = await createToken(owner, 'write');
    const created = await request(t.app).post('/api/projects').set(bearer(token)).send({ name: 'Made by a script' });
    expect(created.status).toBe(201);
    expect(created.body.project).toMatchObject({ name: 'Made by a script', myRole: 'owner' });
    // Without the token the same request is a CSRF failure, so the bearer path is what let it through.
    const anonymous = await request(t.app).post('/api/projects').send({ name: 'No token' });
    expect(anonymous.status).toBe(403);
  });

  it('keeps the role checks of a session: a viewer’s read-write token gets 403 on project writes', async () => {
    const project = (await owner.post('/api/projects', { name: 'Viewer scripts' })).body.project;
    const viewerUser = await makeUser({ name: 'Token Viewer' });
    await owner.post(`/api/projects/${project.id}/members`, { email: viewerUser.email, role: 'viewer' });
    const viewer = await signedInClient(t.app, viewerUser);
    const { token } = await createToken(viewer, 'write');
    expect((await request(t.app).get(`/api/projects/${project.id}`).set(bearer(token))).status).toBe(200);
    const rename = await request(t.app).patch(`/api/projects/${project.id}`).set(bearer(token)).send({ name: 'Renamed' });
    expect(rename.status).toBe(403);
    expect(rename.body.error).toMatch(/viewer/);
    const outsider = await makeUser();
    const outsiderToken = (await createToken(await signedInClient(t.app, outsider), 'write')).token;
    expect((await request(t.app).get(`/api/projects/${project.id}`).set(bearer(outsiderToken))).status).toBe(404);
  });

  it('records when a token was last used', async () => {
    const { token, accessToken } = await createToken(owner, 'read');
    expect(accessToken.lastUsedAt).toBeNull();
    await request(t.app).get('/api/projects').set(bearer(token)).expect(200);
    const listed = (await owner.get('/api/access-tokens')).body.accessTokens.find((a: { id: number }) => a.id === accessToken.id);
    expect(listed.lastUsedAt).not.toBeNull();
    expect(Math.abs(Date.parse(listed.lastUsedAt) - Date.now())).toBeLessThan(60_000);
  });

  it('answers 401 for revoked, expired, unknown and malformed tokens, and for a disabled account', async () => {
    const { token, accessToken } = await createToken(owner, 'write');
    expect((await owner.delete(`/api/access-tokens/${accessToken.id}`)).body.accessToken.revokedAt).not.toBeNull();
    const revoked = await request(t.app).get('/api/projects').set(bearer(token));
    expect(revoked.status).toBe(401);
    expect(revoked.body.error).toMatch(/revoked/);

    const soon = await createToken(owner, 'read', { expiresAt: new Date(Date.now() + 3_600_000).toISOString() });
    await AccessTokenModel.update({ expiresAt: new Date(Date.now() - 1000) }, { where: { id: soon.accessToken.id } });
    const expired = await request(t.app).get('/api/projects').set(bearer(soon.token));
    expect(expired.status).toBe(401);
    expect(expired.body.error).toMatch(/expired/);

    expect((await request(t.app).get('/api/projects').set(bearer(`pwt_${'x'.repeat(43)}`))).status).toBe(401);
    expect((await request(t.app).get('/api/projects').set('Authorization', 'Basic abc')).status).toBe(401);

    const leaving = await makeUser();
    const leavingToken = (await createToken(await signedInClient(t.app, leaving), 'read')).token;
    expect((await request(t.app).get('/api/projects').set(bearer(leavingToken))).status).toBe(200);
    await UserModel.update({ disabledAt: new Date() }, { where: { id: leaving.id } });
    const disabled = await request(t.app).get('/api/projects').set(bearer(leavingToken));
    expect(disabled.status).toBe(401);
    expect(disabled.body.error).toMatch(/disabled/);
  });

  it('refuses bad input with a 400 naming the field, and token management with a token', async () => {
    const noName = await owner.post('/api/access-tokens', { name: ' ', scope: 'read' });
    expect(noName.status).toBe(400);
    expect(noName.body.details.name).toBeDefined();
    const badScope = await owner.post('/api/access-tokens', { name: 'x', scope: 'admin' });
    expect(badScope.body.details.scope).toMatch(/read.*write/);
    const past = await owner.post('/api/access-tokens', { name: 'x', scope: 'read', expiresAt: '2001-01-01T00:00:00Z' });
    expect(past.body.details.expiresAt).toMatch(/future/);
    const { token } = await createToken(owner, 'write');
    const minted = await request(t.app).post('/api/access-tokens').set(bearer(token)).send({ name: 'child', scope: 'write' });
    expect(minted.status).toBe(403);
    const other = await makeUser();
    const otherClient = await signedInClient(t.app, other);
    const mine = await createToken(owner, 'read');
    expect((await otherClient.delete(`/api/access-tokens/${mine.accessToken.id}`)).status).toBe(404);
  });
});
