/**
 * Where a sign-in ends: a password change or reset ends the account's other sessions and revokes its access
 * tokens, and tokens are created only with the current password; sign-in takes as long for unknown addresses,
 * and an anonymous visitor asking for a CSRF token stores nothing. (Lifetime and address limits: session-limits.test.ts.)
 */
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { linkToken, waitForMail } from '../support/mailbox';
import { ApiClient, createTestApp, makeUser, signedInClient, type TestApp } from '../support/test-app';

let t: TestApp;
beforeAll(async () => {
  t = await createTestApp();
});
afterAll(async () => {
  await t?.close();
});

const bearer = (token: string) => ({ Authorization: `Bearer ${token}` });

async function createToken(client: ApiClient, currentPassword: string) {
  const res = await client.post('/api/access-tokens', { name: 'nightly', scope: 'write', currentPassword });
  expect(res.status).toBe(201);
  return res.body.token as string;
}

async function sessionRows(app: TestApp): Promise<number> {
  const [rows] = await app.ctx.sequelize.query('SELECT COUNT(*) AS n FROM sessions');
  return Number((rows as { n: number }[])[0].n);
}

describe('password changes end what the old password opened', () => {
  it('a change ends every other session and revokes the access tokens; the changing session goes on', async () => {
    const user = await makeUser();
    const here = await signedInClient(t.app, user);
    const elsewhere = await signedInClient(t.app, user);
    const token = await createToken(here, user.password);
    expect((await request(t.app).get('/api/projects').set(bearer(token))).status).toBe(200);

    const changed = await here.post('/api/auth/password', { currentPassword: user.password, newPassword: 'a brand new secret' });
    expect(changed.status).toBe(200);
    expect(changed.body.revokedTokens).toBe(1);
    here.csrfToken = changed.body.csrfToken;

    expect((await elsewhere.get('/api/auth/me')).body.user).toBeNull();
    expect((await elsewhere.get('/api/projects')).status).toBe(401);
    expect((await request(t.app).get('/api/projects').set(bearer(token))).status).toBe(401);
    expect((await here.get('/api/auth/me')).body.user.email).toBe(user.email);
    expect((await here.post('/api/projects', { name: 'After the change' })).status).toBe(201);
    const listed = (await here.get('/api/access-tokens')).body.accessTokens;
    expect(listed.every((a: { revokedAt: string | null }) => a.revokedAt !== null)).toBe(true);
  });

  it('a reset ends every session of the account and revokes its access tokens', async () => {
    const user = await makeUser();
    const before = await signedInClient(t.app, user);
    const token = await createToken(before, user.password);
    const guest = await new ApiClient(t.app).start();
    expect((await guest.post('/api/auth/password-reset/request', { email: user.email })).status).toBe(202);
    const done = await guest.post('/api/auth/password-reset/complete', {
      token: linkToken(await waitForMail(user.email, 'set a new password')),
      password: 'reset to something new',
    });
    expect(done.status).toBe(200);
    expect(done.body.revokedTokens).toBe(1);
    expect((await before.get('/api/auth/me')).body.user).toBeNull();
    expect((await request(t.app).get('/api/projects').set(bearer(token))).status).toBe(401);
    expect((await guest.get('/api/auth/me')).body.user.email).toBe(user.email);
  });

  it('creating an access token asks for the current password', async () => {
    const user = await makeUser();
    const client = await signedInClient(t.app, user);
    const missing = await client.post('/api/access-tokens', { name: 'no password', scope: 'read' });
    expect(missing.status).toBe(400);
    expect(missing.body.details.currentPassword).toMatch(/current password/);
    const wrong = await client.post('/api/access-tokens', { name: 'wrong password', scope: 'read', currentPassword: 'not it at all' });
    expect(wrong.status).toBe(400);
    expect(wrong.body.details.currentPassword).toBe('Not correct');
    expect((await client.get('/api/access-tokens')).body.accessTokens).toHaveLength(0);
    await createToken(client, user.password);
  });
});

describe('current-password checks', () => {
  it('limits wrong current passwords per account (SIGNIN_LIMIT), for token creation and password change alike', async () => {
    const user = await makeUser();
    const client = await signedInClient(t.app, user);
    const statuses: number[] = [];
    for (let i = 0; i < 6; i++) {
      statuses.push((await client.post('/api/access-tokens', { name: 'guess', scope: 'write', currentPassword: `guess ${i}` })).status);
      statuses.push((await client.post('/api/auth/password', { currentPassword: `guess ${i}`, newPassword: 'a brand new secret' })).status);
    }
    expect(statuses.slice(0, 10)).toEqual(Array(10).fill(400));
    expect(statuses.slice(10)).toEqual([429, 429]);
    const blocked = await client.post('/api/access-tokens', { name: 'right', scope: 'write', currentPassword: user.password });
    expect(blocked.status).toBe(429);
    expect(blocked.body.error).toMatch(/Too many wrong current passwords/);
    // Another account at the same address is not affected.
    const other = await makeUser();
    await createToken(await signedInClient(t.app, other), other.password);
  });
});

describe('sign-in', () => {
  it('answers an unknown address in about the time of a known one (same bcrypt cost)', async () => {
    const known = await makeUser();
    const client = await new ApiClient(t.app).start();
    const timed = async (email: string) => {
      const started = process.hrtime.bigint();
      const res = await client.post('/api/auth/sign-in', { email, password: 'wrong password here' });
      expect(res.status).toBe(401);
      return Number(process.hrtime.bigint() - started) / 1e6;
    };
    const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
    const knownMs: number[] = [];
    const unknownMs: number[] = [];
    // Interleaved, so a burst of load on the machine hits both series alike; 7 stays under SIGNIN_LIMIT.
    for (let i = 0; i < 7; i++) {
      knownMs.push(await timed(known.email));
      unknownMs.push(await timed(`nobody.${i}.${known.id}@lab.example`));
    }
    // Generous: a loaded machine adds noise to both, but a cheaper or dearer stand-in hash shows as a factor.
    const ratio = median(unknownMs) / median(knownMs);
    expect(ratio, `unknown ${median(unknownMs).toFixed(1)} ms vs known ${median(knownMs).toFixed(1)} ms`).toBeGreaterThan(1 / 2.5);
    expect(ratio, `unknown ${median(unknownMs).toFixed(1)} ms vs known ${median(knownMs).toFixed(1)} ms`).toBeLessThan(2.5);
  });

  it('an anonymous visitor asking for a CSRF token stores no session row, and the token still works', async () => {
    const before = await sessionRows(t);
    for (let i = 0; i < 5; i++) await new ApiClient(t.app).start();
    expect(await sessionRows(t)).toBe(before);

    const user = await makeUser();
    const client = await new ApiClient(t.app).start();
    const forged = await client.agent.post('/api/auth/sign-in').set('x-csrf-token', 'forged').send({ email: user.email, password: user.password });
    expect(forged.status).toBe(403);
    await client.signIn(user.email, user.password);
    expect(await sessionRows(t)).toBe(before + 1);
    expect((await client.post('/api/projects', { name: 'Signed in with the anonymous token' })).status).toBe(201);
  });
});
