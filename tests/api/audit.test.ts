/**
 * The security event log: every kind of event is recorded with who did it, to whom, from which address and
 * what, as a row admins read at GET /api/admin/audit and as a structured log line; never a password or token.
 */
import { Writable } from 'node:stream';
import pino from 'pino';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { AuditEvent, AuditKind } from '../../shared/schemas/audit';
import { RunModel } from '../../server/components/runs/run.model';
import { deflectorDesign } from '../support/designs';
import { storeSyntheticLayout } from '../support/fab-fixture';
import { linkToken, waitForMail } from '../support/mailbox';
import { ApiClient, createTestApp, makeUser, signedInClient, type TestApp } from '../support/test-app';

const SIGNIN_LIMIT = 3;
let t: TestApp;
let admin: Awaited<ReturnType<typeof makeUser>>;
let adminClient: ApiClient;
/** Secrets sent during the tests: none may appear in any stored event. */
const secrets: string[] = [];

beforeAll(async () => {
  t = await createTestApp({ SIGNIN_LIMIT: String(SIGNIN_LIMIT) });
  admin = await makeUser({ siteRole: 'admin', name: 'Audit Admin' });
  adminClient = await signedInClient(t.app, admin);
  secrets.push(admin.password);
});
afterAll(async () => {
  await t?.close();
});

async function events(query: Record<string, string | number> = {}): Promise<AuditEvent[]> {
  const search = new URLSearchParams(Object.entries(query).map(([k, v]): [string, string] => [k, String(v)]));
  const res = await adminClient.get(`/api/admin/audit?${search}`);
  expect(res.status).toBe(200);
  return res.body.events;
}

/** The newest event of this kind about this account (as subject). */
async function latest(kind: AuditKind, subjectUserId: number): Promise<AuditEvent> {
  const found = (await events({ kind, userId: subjectUserId, pageSize: 100 })).find((e) => e.subject?.id === subjectUserId);
  if (!found) throw new Error(`no ${kind} event about user ${subjectUserId}`);
  return found;
}

async function newUser(name: string) {
  const user = await makeUser({ name });
  secrets.push(user.password);
  return user;
}

const FROM = '203.0.113.7';

describe('security event log', () => {
  it('records sign-in success and failure with the address, the account and the e-mail tried', async () => {
    const user = await newUser('Sign In Person');
    const client = await new ApiClient(t.app).start();
    const wrong = await client.post('/api/auth/sign-in', { email: user.email, password: 'not the password' }).set('x-forwarded-for', FROM);
    expect(wrong.status).toBe(401);
    secrets.push('not the password');
    const failed = await latest('sign-in-failed', user.id);
    expect(failed).toMatchObject({ actor: null, subject: { id: user.id, email: user.email }, address: FROM, detail: { email: user.email } });

    const ok = await client.post('/api/auth/sign-in', { email: user.email, password: user.password }).set('x-forwarded-for', FROM);
    expect(ok.status).toBe(200);
    const signedIn = await latest('sign-in', user.id);
    expect(signedIn).toMatchObject({ actor: { id: user.id, name: 'Sign In Person' }, subject: { id: user.id }, address: FROM });

    const stranger = await (await new ApiClient(t.app).start()).post('/api/auth/sign-in', { email: 'nobody.here@lab.example', password: 'whatever it is' });
    expect(stranger.status).toBe(401);
    const unknown = (await events({ kind: 'sign-in-failed' })).find((e) => e.detail.email === 'nobody.here@lab.example');
    expect(unknown).toMatchObject({ actor: null, subject: null, address: '127.0.0.1' });
  });

  it('records one lockout when the sign-in limiter starts refusing, not one per refused request', async () => {
    const user = await newUser('Locked Person');
    const client = await new ApiClient(t.app).start();
    const statuses: number[] = [];
    for (let i = 0; i < SIGNIN_LIMIT + 3; i++) {
      statuses.push((await client.post('/api/auth/sign-in', { email: user.email, password: `guess number ${i}` })).status);
    }
    expect(statuses).toEqual([...Array(SIGNIN_LIMIT).fill(401), 429, 429, 429]);
    const lockouts = (await events({ kind: 'lockout', userId: user.id })).filter((e) => e.subject?.id === user.id);
    expect(lockouts).toHaveLength(1);
    expect(lockouts[0]).toMatchObject({ address: '127.0.0.1', detail: { limiter: '/sign-in', email: user.email, limit: SIGNIN_LIMIT } });
  });

  it('records password change, reset request and reset', async () => {
    const user = await newUser('Password Person');
    const client = await signedInClient(t.app, user);
    const changed = await client.post('/api/auth/password', { currentPassword: user.password, newPassword: 'a brand new secret' }).set('x-forwarded-for', FROM);
    expect(changed.status).toBe(200);
    secrets.push('a brand new secret');
    expect(await latest('password-changed', user.id)).toMatchObject({ actor: { id: user.id }, address: FROM });

    const guest = await new ApiClient(t.app).start();
    expect((await guest.post('/api/auth/password-reset/request', { email: user.email })).status).toBe(202);
    expect(await latest('password-reset-requested', user.id)).toMatchObject({ actor: null, address: '127.0.0.1' });
    const token = linkToken(await waitForMail(user.email, 'set a new password'));
    secrets.push(token);
    const done = await guest.post('/api/auth/password-reset/complete', { token, password: 'reset to this one' }).set('x-forwarded-for', FROM);
    expect(done.status).toBe(200);
    secrets.push('reset to this one');
    expect(await latest('password-reset', user.id)).toMatchObject({ actor: { id: user.id }, subject: { id: user.id }, address: FROM });
  });

  it('records access-token creation and revocation, naming the token but never its secret', async () => {
    const user = await newUser('Token Person');
    const client = await signedInClient(t.app, user);
    const created = await client.post('/api/access-tokens', { name: 'nightly sweep', scope: 'read', currentPassword: user.password });
    expect(created.status).toBe(201);
    secrets.push(created.body.token);
    const id = created.body.accessToken.id;
    expect(await latest('token-created', user.id)).toMatchObject({ actor: { id: user.id }, detail: { tokenId: id, name: 'nightly sweep', scope: 'read' } });
    expect((await client.delete(`/api/access-tokens/${id}`)).status).toBe(200);
    expect(await latest('token-revoked', user.id)).toMatchObject({ actor: { id: user.id }, address: '127.0.0.1', detail: { tokenId: id } });
  });

  it('records site role changes and disabling and enabling an account, by the admin who did it', async () => {
    const user = await newUser('Role Person');
    await adminClient.patch(`/api/admin/users/${user.id}`, { siteRole: 'admin' }).set('x-forwarded-for', FROM).expect(200);
    expect(await latest('site-role-changed', user.id)).toMatchObject({ actor: { id: admin.id }, address: FROM, detail: { from: 'member', to: 'admin' } });
    await adminClient.patch(`/api/admin/users/${user.id}`, { disabled: true }).expect(200);
    expect(await latest('account-disabled', user.id)).toMatchObject({ actor: { id: admin.id } });
    await adminClient.patch(`/api/admin/users/${user.id}`, { disabled: false }).expect(200);
    expect(await latest('account-enabled', user.id)).toMatchObject({ actor: { id: admin.id } });
    // A change to nothing new is no event.
    const before = (await events({ userId: user.id })).length;
    await adminClient.patch(`/api/admin/users/${user.id}`, { siteRole: 'admin', disabled: false }).expect(200);
    expect(await events({ userId: user.id })).toHaveLength(before);
  });

  it('records project role changes: added, changed, removed', async () => {
    const owner = await newUser('Project Owner');
    const member = await newUser('Project Member');
    const ownerClient = await signedInClient(t.app, owner);
    const project = (await ownerClient.post('/api/projects', { name: 'Audited project' })).body.project;
    await ownerClient.post(`/api/projects/${project.id}/members`, { email: member.email, role: 'viewer' }).expect(201);
    await ownerClient.patch(`/api/projects/${project.id}/members/${member.id}`, { role: 'designer' }).expect(200);
    await ownerClient.delete(`/api/projects/${project.id}/members/${member.id}`).expect(204);
    const changes = (await events({ kind: 'project-role-changed', userId: member.id })).filter((e) => e.subject?.id === member.id);
    expect(changes.map((e) => e.detail)).toEqual([
      { from: 'designer', to: null },
      { from: 'viewer', to: 'designer' },
      { from: null, to: 'viewer' },
    ]);
    for (const change of changes) expect(change).toMatchObject({ actor: { id: owner.id }, project: { id: project.id, name: 'Audited project' } });
  });

  it('records invitations sent, resent, revoked and accepted', async () => {
    const email = `audit.invitee.${Date.now()}@partner-lab.example`;
    const invited = await adminClient.post('/api/admin/users', { email, name: 'Audit Invitee', siteRole: 'member' }).set('x-forwarded-for', FROM);
    expect(invited.status).toBe(201);
    const inviteeId = invited.body.user.id;
    expect(await latest('invitation-sent', inviteeId)).toMatchObject({ actor: { id: admin.id }, address: FROM, detail: { email, siteRole: 'member' } });
    const token = linkToken(await waitForMail(email, 'invited you to Phasewright'));
    secrets.push(token);
    const guest = await new ApiClient(t.app).start();
    expect((await guest.post('/api/auth/invitation/accept', { token, name: 'Audit Invitee', password: 'invitee chose this' })).status).toBe(200);
    secrets.push('invitee chose this');
    expect(await latest('invitation-accepted', inviteeId)).toMatchObject({ actor: { id: inviteeId } });

    // Adding an address without an account invites it only when a site admin adds it.
    const owner = admin;
    const ownerClient = adminClient;
    const project = (await ownerClient.post('/api/projects', { name: 'Invitation project' })).body.project;
    const partner = `audit.partner.${Date.now()}@partner-lab.example`;
    const added = await ownerClient.post(`/api/projects/${project.id}/members`, { email: partner, role: 'reviewer' });
    expect(added.status).toBe(201);
    const partnerId = added.body.member.userId;
    expect(await latest('invitation-sent', partnerId)).toMatchObject({ actor: { id: owner.id }, detail: { email: partner } });
    await ownerClient.post(`/api/projects/${project.id}/invitations/${partnerId}/resend`).set('x-forwarded-for', FROM).expect(200);
    expect(await latest('invitation-resent', partnerId)).toMatchObject({ actor: { id: owner.id }, project: { id: project.id }, address: FROM, detail: { email: partner } });
    await ownerClient.delete(`/api/projects/${project.id}/invitations/${partnerId}`).expect(204);
    const revoked = await latest('invitation-revoked', partnerId);
    // However the account fares, the event keeps its id and the e-mail.
    expect(revoked).toMatchObject({ actor: { id: owner.id }, project: { id: project.id }, subject: { id: partnerId }, detail: { email: partner, role: 'reviewer' } });
  });

  it('records an export override with the run, the violations and the reason', async () => {
    const owner = await newUser('Override Owner');
    const ownerClient = await signedInClient(t.app, owner);
    const project = (await ownerClient.post('/api/projects', { name: 'Override project' })).body.project;
    const revision = (await ownerClient.post(`/api/projects/${project.id}/revisions`, { design: deflectorDesign() })).body.revision;
    const run = await RunModel.create({ projectId: project.id, revisionId: revision.id, startedById: owner.id, queuedAt: new Date(), status: 'succeeded', progress: 1, stage: 'done', finishedAt: new Date() });
    await storeSyntheticLayout(run.id, deflectorDesign());
    const reason = 'Dose test structure: gaps below the rule are intended here.';
    const res = await ownerClient.post(`/api/projects/${project.id}/runs/${run.id}/export-override`, { reason }).set('x-forwarded-for', FROM);
    expect(res.status).toBe(201);
    const [event] = await events({ kind: 'export-override', userId: owner.id });
    expect(event).toMatchObject({ actor: { id: owner.id }, project: { id: project.id }, address: FROM, detail: { runId: run.id, overrideId: res.body.override.id, reason } });
    expect(event.detail.violations).toBeGreaterThan(0);
  });

  it('writes each event as a structured log line too', async () => {
    const lines: Record<string, unknown>[] = [];
    const capture = new Writable({
      write(chunk: Buffer, _enc, done) {
        for (const line of chunk.toString().split('\n').filter(Boolean)) lines.push(JSON.parse(line));
        done();
      },
    });
    const quiet = t.ctx.logger;
    t.ctx.logger = pino({ level: 'info' }, capture);
    try {
      const user = await newUser('Logged Person');
      const client = await new ApiClient(t.app).start();
      await client.post('/api/auth/sign-in', { email: user.email, password: user.password }).set('x-forwarded-for', FROM).expect(200);
      const line = lines.find((l) => (l.audit as { kind?: string } | undefined)?.kind === 'sign-in');
      expect(line).toMatchObject({ msg: 'security event: sign-in', audit: { kind: 'sign-in', actorId: user.id, subjectUserId: user.id, address: FROM } });
      expect(JSON.stringify(lines)).not.toContain(user.password);
    } finally {
      t.ctx.logger = quiet;
    }
  });

  it('never stores a password or a token', async () => {
    const all = JSON.stringify(await events({ pageSize: 100 }));
    expect(secrets.length).toBeGreaterThan(8);
    for (const secret of secrets) expect(all).not.toContain(secret);
    expect(all).not.toMatch(/pwt_/);
  });
});

describe('GET /api/admin/audit', () => {
  it('is for site admins only: members get 403, anonymous callers 401', async () => {
    const member = await newUser('Curious Member');
    const client = await signedInClient(t.app, member);
    const refused = await client.get('/api/admin/audit');
    expect(refused.status).toBe(403);
    expect(refused.body.error).toMatch(/admin/);
    expect((await new ApiClient(t.app).start().then((c) => c.get('/api/admin/audit'))).status).toBe(401);
  });

  it('filters by person (actor or subject) and by kind, newest first, in pages', async () => {
    const person = await newUser('Filtered Person');
    const client = await new ApiClient(t.app).start();
    for (let i = 0; i < 2; i++) await client.post('/api/auth/sign-in', { email: person.email, password: `wrong ${i}` });
    await client.signIn(person.email, person.password);
    await client.post('/api/access-tokens', { name: 'filter check', scope: 'write', currentPassword: person.password });

    const mine = await events({ userId: person.id });
    expect(mine.map((e) => e.kind)).toEqual(['token-created', 'sign-in', 'sign-in-failed', 'sign-in-failed']);
    expect(mine.every((e) => e.actor?.id === person.id || e.subject?.id === person.id)).toBe(true);
    const ids = mine.map((e) => e.id);
    expect([...ids].sort((a, b) => b - a)).toEqual(ids);

    const failures = await events({ userId: person.id, kind: 'sign-in-failed' });
    expect(failures).toHaveLength(2);
    const everyFailure = await events({ kind: 'sign-in-failed', pageSize: 100 });
    expect(everyFailure.every((e) => e.kind === 'sign-in-failed')).toBe(true);
    expect(everyFailure.length).toBeGreaterThan(failures.length);

    const first = await adminClient.get(`/api/admin/audit?userId=${person.id}&pageSize=3`);
    expect(first.body).toMatchObject({ total: 4, page: 1, pageSize: 3 });
    const second = await adminClient.get(`/api/admin/audit?userId=${person.id}&pageSize=3&page=2`);
    expect(second.body.events.map((e: AuditEvent) => e.id)).toEqual([ids[3]]);
    expect((await adminClient.get(`/api/admin/audit?userId=${person.id}&page=9`)).body.events).toEqual([]);
  });

  it('answers a bad filter with 400 naming it', async () => {
    const badKind = await adminClient.get('/api/admin/audit?kind=launch-missiles');
    expect(badKind.status).toBe(400);
    expect(badKind.body.details).toHaveProperty('kind');
    const badSize = await adminClient.get('/api/admin/audit?pageSize=100000');
    expect(badSize.status).toBe(400);
    expect(badSize.body.details).toHaveProperty('pageSize');
    expect((await adminClient.get('/api/admin/audit?userId=abc')).status).toBe(400);
  });
});
