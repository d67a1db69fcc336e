/** Limits that need short settings of their own: the absolute session lifetime and failed sign-ins per client address. */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ApiClient, createTestApp, makeUser, signedInClient, type TestApp } from '../support/test-app';

/** Sessions end 2.6 s after sign-in; four failed sign-ins per client address. */
let short: TestApp;
beforeAll(async () => {
  short = await createTestApp({ SESSION_MAX_DAYS: '0.00003', SIGNIN_ADDRESS_LIMIT: '4' });
});
afterAll(async () => {
  await short?.close();
});

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

describe('session lifetime', () => {
  it('ends a session SESSION_MAX_DAYS after sign-in, however active it is', async () => {
    const user = await makeUser();
    const client = await signedInClient(short.app, user);
    for (let i = 0; i < 3; i++) {
      expect((await client.get('/api/auth/me')).body.user?.email).toBe(user.email);
      await sleep(500);
    }
    await sleep(1600);
    expect((await client.get('/api/auth/me')).body.user).toBeNull();
    expect((await client.get('/api/projects')).status).toBe(401);
  });
});

describe('sign-in limits', () => {
  it('limits failed sign-ins from one client address across all e-mails (password spraying)', async () => {
    const client = await new ApiClient(short.app).start();
    const statuses: number[] = [];
    for (let i = 0; i < 6; i++) {
      statuses.push((await client.post('/api/auth/sign-in', { email: `spray.${i}@lab.example`, password: 'Summer2026!' })).status);
    }
    expect(statuses).toEqual([401, 401, 401, 401, 429, 429]);
    const blocked = await client.post('/api/auth/sign-in', { email: 'another.one@lab.example', password: 'Summer2026!' });
    expect(blocked.status).toBe(429);
    expect(blocked.body.error).toMatch(/Too many failed sign-in attempts from your network address/);
  });

});
