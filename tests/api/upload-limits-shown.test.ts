/** The upload limits the client is told (GET /api/auth/me) are the ones this server enforces, not defaults. */
import { afterAll, beforeAll, expect, it } from 'vitest';
import { encodeNpy } from '../../shared/optics/npy';
import { createTestApp, makeUser, signedInClient, type ApiClient, type TestApp } from '../support/test-app';

let t: TestApp;
let designer: ApiClient;
beforeAll(async () => {
  t = await createTestApp({ UPLOAD_MAX_MIB: '0.25', UPLOAD_MAX_SIDE: '300' });
  designer = await signedInClient(t.app, await makeUser());
});
afterAll(async () => {
  await t?.close();
});

it('tells the client the limits set by UPLOAD_MAX_MIB and UPLOAD_MAX_SIDE, and enforces exactly those', async () => {
  const { limits } = (await designer.get('/api/auth/me')).body;
  expect(limits).toEqual({ uploadMaxBytes: 262_144, uploadMaxSide: 300, runMemoryBudgetMb: 8192 });
  const projectId = (await designer.post('/api/projects', { name: 'Limits' })).body.project.id as number;
  const send = (bytes: Buffer, name: string) =>
    designer.agent.post(`/api/projects/${projectId}/uploads`).set('x-csrf-token', designer.csrfToken).field('kind', 'phase-map').attach('file', bytes, name);
  // 300 a side passes, 301 does not; a file of one byte over the size is refused before it is read.
  expect((await send(Buffer.from(encodeNpy(new Float32Array(300 * 2), [2, 300])), 'edge.npy')).status).toBe(201);
  const wide = await send(Buffer.from(encodeNpy(new Float32Array(301 * 2), [2, 301])), 'wide.npy');
  expect(wide.status).toBe(400);
  expect(wide.body.error).toMatch(/at most 300 per side/);
  const big = await send(Buffer.alloc(limits.uploadMaxBytes + 1), 'big.npy');
  expect(big.status).toBe(413);
});
