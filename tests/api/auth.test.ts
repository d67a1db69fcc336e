import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ApiClient, createTestApp, makeUser, signedInClient, type TestApp } from '../support/test-app';
import { linkToken, waitForMail } from '../support/mailbox';

let t: TestApp;
beforeAll(async () => {
  t = await createTestApp({ SIGNIN_LIMIT: '5' });
});
afterAll(async () => {
  await t?.close();
});

describe('sign-in and sign-out', () => {
  it('signs in with e-mail and password, reports the user, and signs out', async () => {
    const user = await makeUser({ name: 'Ada Quill' });
    const client = await new ApiClient(t.app).start();
    expect((await client.get('/api/auth/me')).body.user).toBeNull();

    const res = await client.signIn(user.email.toUpperCase(), user.password);
    expect(res.body.user).toMatchObject({ email: user.email, name: 'Ada Quill', siteRole: 'member' });
    expect(res.body.user).not.toHaveProperty('passwordHash');
    const cookie = String(res.headers['set-cookie']);
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);

    expect((await client.get('/api/auth/me')).body.user.email).toBe(user.email);
    const [rows] = await t.ctx.sequelize.query('SELECT data FROM sessions');
    const stored = (rows as { data: string }[]).map((r) => JSON.parse(r.data));
    expect(stored.some((d) => d.passport?.user?.id === user.id)).toBe(true);
    const out = await client.post('/api/auth/sign-out');
    expect(out.status).toBe(200);
    client.csrfToken = out.body.csrfToken;
    expect((await client.get('/api/auth/me')).body.user).toBeNull();
    expect((await client.get('/api/projects')).status).toBe(401);
  });

  it('rejects a wrong password with 401 and a message, without saying which part was wrong', async () => {
    const user = await makeUser();
    const client = await new ApiClient(t.app).start();
    const res = await client.post('/api/auth/sign-in', { email: user.email, password: 'not the password' });
    expect(res.status).toBe(401);
    expect(res.body.error).toMatch(/not correct/);
    const unknown = await client.post('/api/auth/sign-in', { email: 'nobody@lab.example', password: 'whatever123' });
    expect(unknown.status).toBe(401);
    expect(unknown.body.error).toBe(res.body.error);
  });

  it('rate-limits repeated failed sign-ins for one account with 429', async () => {
    const user = await makeUser();
    const client = await new ApiClient(t.app).start();
    const statuses: number[] = [];
    for (let i = 0; i < 7; i++) {
      statuses.push((await client.post('/api/auth/sign-in', { email: user.email, password: `wrong-${i}` })).status);
    }
    expect(statuses.slice(0, 5)).toEqual([401, 401, 401, 401, 401]);
    expect(statuses.slice(5)).toEqual([429, 429]);
    const blocked = await client.post('/api/auth/sign-in', { email: user.email, password: user.password });
    expect(blocked.status).toBe(429);
    expect(blocked.body.error).toMatch(/Too many/);
  });

  it('refuses state-changing requests without a valid CSRF token', async () => {
    const user = await makeUser();
    const client = await signedInClient(t.app, user);
    const missing = await client.agent.post('/api/projects').send({ name: 'No token' });
    expect(missing.status).toBe(403);
    expect(missing.body.error).toMatch(/CSRF/);
    const wrong = await client.agent.post('/api/projects').set('x-csrf-token', 'forged-token').send({ name: 'Forged' });
    expect(wrong.status).toBe(403);
    const fine = await client.post('/api/projects', { name: 'With token' });
    expect(fine.status).toBe(201);
  });

  it('sets helmet security headers', async () => {
    const res = await new ApiClient(t.app).get('/api/auth/me');
    expect(res.headers['x-content-type-options']).toBe('nosniff');
    expect(res.headers['content-security-policy']).toContain("default-src 'self'");
    expect(res.headers['x-powered-by']).toBeUndefined();
  });
});

describe('passwords', () => {
  it('changes the password after checking the current one', async () => {
    const user = await makeUser();
    const client = await signedInClient(t.app, user);
    const wrong = await client.post('/api/auth/password', { currentPassword: 'nope', newPassword: 'a brand new secret' });
    expect(wrong.status).toBe(400);
    expect(wrong.body.details.currentPassword).toBeDefined();
    const short = await client.post('/api/auth/password', { currentPassword: user.password, newPassword: 'short' });
    expect(short.status).toBe(400);
    expect(short.body.details.newPassword).toMatch(/at least 10/);
    expect((await client.post('/api/auth/password', { currentPassword: user.password, newPassword: 'a brand new secret' })).status).toBe(200);
    const fresh = await new ApiClient(t.app).start();
    expect((await fresh.post('/api/auth/sign-in', { email: user.email, password: user.password })).status).toBe(401);
    expect((await fresh.post('/api/auth/sign-in', { email: user.email, password: 'a brand new secret' })).status).toBe(200);
  });

  it('resets a forgotten password through a single-use link sent by e-mail', async () => {
    const user = await makeUser({ name: 'Reset Person' });
    const client = await new ApiClient(t.app).start();
    const asked = await client.post('/api/auth/password-reset/request', { email: user.email });
    expect(asked.status).toBe(202);
    const unknown = await client.post('/api/auth/password-reset/request', { email: 'nobody-here@lab.example' });
    expect(unknown.status).toBe(202);
    expect(unknown.body.message).toBe(asked.body.message);

    const mail = await waitForMail(user.email, 'set a new password');
    expect(mail.text).toContain('http://127.0.0.1:5999/reset-password?token=');
    const token = linkToken(mail);

    const done = await client.post('/api/auth/password-reset/complete', { token, password: 'reset worked fine' });
    expect(done.status).toBe(200);
    expect(done.body.user.email).toBe(user.email);
    client.csrfToken = done.body.csrfToken;
    const again = await client.post('/api/auth/password-reset/complete', { token, password: 'second use fails' });
    expect(again.status).toBe(400);
    expect(again.body.error).toMatch(/invalid, already used or expired/);

    const fresh = await new ApiClient(t.app).start();
    expect((await fresh.post('/api/auth/sign-in', { email: user.email, password: 'reset worked fine' })).status).toBe(200);
  });

  it('refuses an expired reset link', async () => {
    const user = await makeUser();
    const client = await new ApiClient(t.app).start();
    await client.post('/api/auth/password-reset/request', { email: user.email });
    const token = linkToken(await waitForMail(user.email, 'set a new password'));
    await t.ctx.sequelize.query('UPDATE auth_tokens SET expires_at = NOW() - INTERVAL 1 MINUTE WHERE user_id = ?', {
      replacements: [user.id],
    });
    const res = await client.post('/api/auth/password-reset/complete', { token, password: 'too late for this' });
    expect(res.status).toBe(400);
  });
});

describe('accounts', () => {
  it('keeps open sign-up closed unless the flag is on', async () => {
    const client = await new ApiClient(t.app).start();
    const res = await client.post('/api/auth/sign-up', { email: 'newcomer@lab.example', name: 'New', password: 'long enough pass' });
    expect(res.status).toBe(403);
    expect(res.body.error).toMatch(/sign-up is turned off/);
  });

  it('lets an invited person choose a password through the mailed link', async () => {
    const admin = await makeUser({ siteRole: 'admin', name: 'Site Admin' });
    const adminClient = await signedInClient(t.app, admin);
    const email = `invitee.${Date.now()}@lab.example`;
    const created = await adminClient.post('/api/admin/users', { email, name: 'Invitee', siteRole: 'member' });
    expect(created.status).toBe(201);
    const mail = await waitForMail(email, 'invited you to Phasewright');
    expect(mail.text).toContain('Site Admin');
    const guest = await new ApiClient(t.app).start();
    expect((await guest.post('/api/auth/sign-in', { email, password: 'anything at all' })).status).toBe(401);
    const accepted = await guest.post('/api/auth/invitation/accept', {
      token: linkToken(mail),
      name: 'Invited Person',
      password: 'my own password',
    });
    expect(accepted.status).toBe(200);
    expect(accepted.body.user).toMatchObject({ email, name: 'Invited Person' });
  });
});

describe('bad input', () => {
  it('answers malformed JSON with 400 and no stack trace', async () => {
    const client = await new ApiClient(t.app).start();
    const res = await client.agent
      .post('/api/auth/sign-in')
      .set('x-csrf-token', client.csrfToken)
      .set('content-type', 'application/json')
      .send('{"email": "a@b.example", "password": ');
    expect(res.status).toBe(400);
    expect(res.body.error).toBe('The request body is not valid JSON');
    expect(JSON.stringify(res.body)).not.toMatch(/at .*\.(ts|js):\d+/);
  });

  it('names missing and wrong-typed fields', async () => {
    const client = await new ApiClient(t.app).start();
    const res = await client.post('/api/auth/sign-in', { email: 42 });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.details)).toEqual(expect.arrayContaining(['email', 'password']));
    expect(res.body.error).toMatch(/email/);
  });

  it('answers an oversized body with 413', async () => {
    const client = await new ApiClient(t.app).start();
    const res = await client.post('/api/auth/sign-in', { email: 'a@b.example', password: 'x'.repeat(400_000) });
    expect(res.status).toBe(413);
    expect(res.body.error).toMatch(/too large/);
  });

  it('answers unknown API routes with 404 JSON', async () => {
    const res = await new ApiClient(t.app).get('/api/no-such-thing');
    expect(res.status).toBe(404);
    expect(res.headers['content-type']).toMatch(/json/);
    expect(res.body.error).toMatch(/No API route GET \/no-such-thing/);
  });
});
