import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import request from 'supertest';
import { sessionRows } from '../../server/components/auth/access-cache';
import { ApiClient, createTestApp, makeUser, signedInClient, type TestApp } from '../support/test-app';

let t: TestApp;
beforeAll(async () => {
  t = await createTestApp({ SESSION_TOUCH_SECONDS: '60' });
});
afterAll(async () => {
  await t?.close();
});
afterEach(() => {
  vi.useRealTimers();
});

const HOUR_MS = 60 * 60 * 1000;
const DAY_MS = 24 * HOUR_MS;

async function sessionOf(userId: number): Promise<{ sid: string; expires: Date }> {
  const [rows] = await t.ctx.sequelize.query('SELECT sid, expires, data FROM sessions');
  // The session keeps { id, at }: the account and when it signed in.
  const row = (rows as { sid: string; expires: Date; data: string }[]).find((r) => JSON.parse(r.data).passport?.user?.id === userId);
  if (!row) throw new Error(`no session of user ${userId}`);
  return { sid: row.sid, expires: new Date(row.expires) };
}

async function setExpiry(sid: string, expires: Date) {
  await t.ctx.sequelize.query('UPDATE sessions SET expires = ? WHERE sid = ?', { replacements: [expires, sid] });
}

async function signedInUser(): Promise<{ id: number; client: ApiClient }> {
  const user = await makeUser();
  return { id: user.id, client: await signedInClient(t.app, user) };
}

describe('session store', () => {
  it('writes the sliding expiry at most once per SESSION_TOUCH_SECONDS, then on the next request after it', async () => {
    const { id, client } = await signedInUser();
    const { sid } = await sessionOf(id);
    // A stored expiry far from what a touch would write (now + SESSION_IDLE_HOURS, 72 h), so any write shows.
    const marker = new Date(Math.floor(Date.now() / 1000) * 1000 + DAY_MS);
    await setExpiry(sid, marker);
    for (let i = 0; i < 3; i++) expect((await client.get('/api/projects')).status).toBe(200);
    expect((await sessionOf(id)).expires.getTime()).toBe(marker.getTime());

    vi.useFakeTimers({ toFake: ['Date'], now: Date.now() + 61_000 });
    expect((await client.get('/api/projects')).status).toBe(200);
    const extended = (await sessionOf(id)).expires.getTime();
    expect(Math.abs(extended - (Date.now() + 72 * HOUR_MS))).toBeLessThan(5000);
    // And again not before the next interval has passed.
    await setExpiry(sid, marker);
    expect((await client.get('/api/projects')).status).toBe(200);
    expect((await sessionOf(id)).expires.getTime()).toBe(marker.getTime());
  });

  it('refuses a session whose stored expiry has passed at once, without waiting for the sweep of expired rows', async () => {
    const { id, client } = await signedInUser();
    expect((await client.get('/api/auth/me')).body.user.id).toBe(id);
    const { sid } = await sessionOf(id);
    await setExpiry(sid, new Date(Date.now() - 1000));
    // A write by hand in the database: the session cache (ACCESS_CACHE_SECONDS) would not see it at once.
    sessionRows.clear();
    expect((await client.get('/api/auth/me')).body.user).toBeNull();
    expect((await client.get('/api/projects')).status).toBe(401);
  });

  it('refuses a session at its stored expiry even while the session cache still holds its row', async () => {
    const { id, client } = await signedInUser();
    const { sid } = await sessionOf(id);
    const expires = new Date(Math.floor(Date.now() / 1000) * 1000 + 5000);
    await setExpiry(sid, expires);
    sessionRows.clear();
    // Read once (the row, with that expiry, is now cached), then once more just past the expiry.
    expect((await client.get('/api/auth/me')).body.user.id).toBe(id);
    vi.useFakeTimers({ toFake: ['Date'], now: expires.getTime() + 1 });
    expect((await client.get('/api/auth/me')).body.user).toBeNull();
    expect((await client.get('/api/projects')).status).toBe(401);
  });

  it('ends a session unused for SESSION_IDLE_HOURS, while the cookie lasts until SESSION_MAX_DAYS after sign-in', async () => {
    const user = await makeUser();
    const client = await new ApiClient(t.app).start();
    const signIn = await client.signIn(user.email, user.password);
    // The cookie the sign-in sets lives until the absolute end (SESSION_MAX_DAYS, 7 days) …
    const cookie = (signIn.headers['set-cookie'] as unknown as string[]).find((c) => c.startsWith('pw.sid='))!;
    const expires = Date.parse(/Expires=([^;]+)/.exec(cookie)![1]);
    expect(Math.abs(expires - (Date.now() + 7 * DAY_MS))).toBeLessThan(5000);
    // … and reads answer without a Set-Cookie: the idle lifetime lives in the row, now + 72 h.
    expect((await client.get('/api/projects')).headers['set-cookie']).toBeUndefined();
    const stored = (await sessionOf(user.id)).expires.getTime();
    expect(Math.abs(stored - (Date.now() + 72 * HOUR_MS))).toBeLessThan(5000);
    // Unused past the idle lifetime: signed out, although the cookie has days left.
    vi.useFakeTimers({ toFake: ['Date'], now: stored + 1000 });
    expect((await client.get('/api/projects')).status).toBe(401);
  });

  it('ends a session at sign-out at once: its cookie, replayed, is no longer signed in', async () => {
    const { id, client } = await signedInUser();
    expect((await client.get('/api/auth/me')).body.user.id).toBe(id);
    // The session cookie as the browser holds it, replayed after the sign-out has deleted its row.
    const cookie = (client.agent as unknown as { jar: { getCookies(a: unknown): { name: string; value: string }[] } }).jar
      .getCookies({ domain: '127.0.0.1', path: '/', secure: false, script: false })
      .map((c) => `${c.name}=${c.value}`)
      .join('; ');
    expect(cookie).toContain('=');
    expect((await client.post('/api/auth/sign-out')).status).toBeLessThan(300);
    expect((await request(t.app).get('/api/auth/me').set('cookie', cookie)).body.user).toBeNull();
  });

  it('forgets a session at sign-out, so signing in again writes the new one', async () => {
    const user = await makeUser();
    const client = await signedInClient(t.app, user);
    const out = await client.post('/api/auth/sign-out');
    expect(out.status).toBe(200);
    client.csrfToken = out.body.csrfToken;
    expect((await client.get('/api/projects')).status).toBe(401);
    await client.signIn(user.email, user.password);
    expect((await client.get('/api/projects')).status).toBe(200);
    expect(Math.abs((await sessionOf(user.id)).expires.getTime() - (Date.now() + 72 * HOUR_MS))).toBeLessThan(5000);
  });
});
