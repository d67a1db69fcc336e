/** Share links: one run and its files for someone without an account, nothing else, and nothing after revocation. */
import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { storeArtifacts } from '../../server/components/runs/run-artifacts';
import { RunModel } from '../../server/components/runs/run.model';
import { ShareLinkModel } from '../../server/components/share-links/share-link.model';
import { hashToken } from '../../server/lib/tokens';
import { deflectorDesign } from '../support/designs';
import { createTestApp, makeUser, signedInClient, type ApiClient, type TestApp } from '../support/test-app';

let t: TestApp;
let owner: ApiClient;
let designer: ApiClient;
let projectId: number;
let sharedRunId: number;
let otherRunId: number;

/** A finished run whose files are design.json (`content`) and, optionally, files only it has. */
async function finishedRun(revisionId: number, content: string, ownFiles: Record<string, string> = {}) {
  const run = await RunModel.create({ projectId, revisionId, startedById: null, queuedAt: new Date(), status: 'succeeded', progress: 1, stage: 'done', finishedAt: new Date() });
  const dir = await mkdtemp(join(tmpdir(), 'pw-share-'));
  const files = { 'design.json': content, ...ownFiles };
  for (const [name, text] of Object.entries(files)) await writeFile(join(dir, name), text);
  await storeArtifacts(run.id, dir, Object.keys(files).map((name) => ({ name, bytes: 0 })));
  await rm(dir, { recursive: true });
  return run.id;
}

beforeAll(async () => {
  t = await createTestApp();
  const ownerUser = await makeUser({ name: 'Share Owner' });
  const designerUser = await makeUser({ name: 'Share Designer' });
  owner = await signedInClient(t.app, ownerUser);
  designer = await signedInClient(t.app, designerUser);
  projectId = (await owner.post('/api/projects', { name: 'Shared hologram' })).body.project.id;
  await owner.post(`/api/projects/${projectId}/members`, { email: designerUser.email, role: 'designer' });
  const revision = (await owner.post(`/api/projects/${projectId}/revisions`, { design: deflectorDesign() })).body.revision;
  sharedRunId = await finishedRun(revision.id, '{"shared":true}');
  otherRunId = await finishedRun(revision.id, '{"shared":false}', { 'metrics.json': '{"other":true}' });
});
afterAll(async () => {
  await t?.close();
});

async function share(expiresAt: string | null = null) {
  const res = await owner.post(`/api/projects/${projectId}/runs/${sharedRunId}/share-links`, { expiresAt });
  expect(res.status).toBe(201);
  return res.body as { token: string; url: string; shareLink: { id: number } };
}

describe('share links', () => {
  it('shows exactly the shared run and its files, without an account', async () => {
    const { token, url, shareLink } = await share();
    expect(url).toBe(`http://127.0.0.1:5999/shared/${token}`);
    expect((await ShareLinkModel.findByPk(shareLink.id))!.tokenHash).toBe(hashToken(token));

    const anon = request(t.app);
    const seen = await anon.get(`/api/shared/${token}`);
    expect(seen.status).toBe(200);
    expect(seen.body.projectName).toBe('Shared hologram');
    expect(seen.body.run).toMatchObject({ id: sharedRunId, status: 'succeeded', startedBy: null, events: [] });
    expect(seen.body.run.artifacts.map((a: { name: string }) => a.name)).toEqual(['design.json']);
    const file = await anon.get(`/api/shared/${token}/artifacts/design.json`).buffer(true);
    expect(file.status).toBe(200);
    expect(file.body).toEqual({ shared: true });
    expect((await anon.get(`/api/shared/${token}/artifacts/nothing.png`)).status).toBe(404);

    // Nothing else of the project opens: the other run's files through the real file route (its own file
    // name, which the shared run lacks, and the name both have, which must give the shared run's bytes),
    // other runs, members, revisions, writes.
    const othersFile = await anon.get(`/api/shared/${token}/artifacts/metrics.json`);
    expect(othersFile.status).toBe(404);
    expect(JSON.stringify(othersFile.body)).not.toContain('other');
    expect((await request(t.app).get(`/api/shared/${token}/artifacts/design.json`).buffer(true)).body).toEqual({ shared: true });
    expect((await owner.get(`/api/projects/${projectId}/runs/${otherRunId}/artifacts/metrics.json`)).status).toBe(200);
    expect((await anon.get(`/api/shared/${token}/runs/${otherRunId}`)).status).toBe(404);
    expect((await anon.get(`/api/shared/${token}/artifacts/..%2F${otherRunId}`)).status).toBe(404);
    expect((await anon.get(`/api/projects/${projectId}/runs/${otherRunId}`)).status).toBe(401);
    expect((await anon.get(`/api/projects/${projectId}/members`)).status).toBe(401);
    expect((await anon.get(`/api/projects/${projectId}/revisions`)).status).toBe(401);
    expect((await anon.post(`/api/shared/${token}`).send({})).status).toBe(403);
    expect(JSON.stringify(seen.body)).not.toContain('Share Owner');
  });

  it('is gone after revocation (410) and unknown tokens are 404 with a clear message', async () => {
    const { token, shareLink } = await share();
    expect((await request(t.app).get(`/api/shared/${token}`)).status).toBe(200);
    const revoked = await owner.delete(`/api/projects/${projectId}/share-links/${shareLink.id}`);
    expect(revoked.status).toBe(200);
    expect(revoked.body.shareLink.revokedAt).not.toBeNull();
    const gone = await request(t.app).get(`/api/shared/${token}`);
    expect(gone.status).toBe(410);
    expect(gone.body.error).toMatch(/withdrawn/);
    expect((await request(t.app).get(`/api/shared/${token}/artifacts/design.json`)).status).toBe(410);
    const unknown = await request(t.app).get(`/api/shared/${'A'.repeat(43)}`);
    expect(unknown.status).toBe(404);
    expect(unknown.body.error).toMatch(/no share link/i);
    expect((await request(t.app).get('/api/shared/short')).status).toBe(404);
  });

  it('expires', async () => {
    const { token, shareLink } = await share(new Date(Date.now() + 3_600_000).toISOString());
    expect((await request(t.app).get(`/api/shared/${token}`)).body.expiresAt).not.toBeNull();
    await ShareLinkModel.update({ expiresAt: new Date(Date.now() - 1000) }, { where: { id: shareLink.id } });
    const expired = await request(t.app).get(`/api/shared/${token}`);
    expect(expired.status).toBe(410);
    expect(expired.body.error).toMatch(/expired/);
  });

  it('only an owner creates, lists and revokes links; a past expiry is refused', async () => {
    expect((await designer.post(`/api/projects/${projectId}/runs/${sharedRunId}/share-links`, {})).status).toBe(403);
    expect((await designer.get(`/api/projects/${projectId}/runs/${sharedRunId}/share-links`)).status).toBe(403);
    const { shareLink } = await share();
    expect((await designer.delete(`/api/projects/${projectId}/share-links/${shareLink.id}`)).status).toBe(403);
    const list = await owner.get(`/api/projects/${projectId}/runs/${sharedRunId}/share-links`);
    expect(list.body.shareLinks.map((l: { id: number }) => l.id)).toContain(shareLink.id);
    expect(list.body.shareLinks[0]).not.toHaveProperty('token');
    const past = await owner.post(`/api/projects/${projectId}/runs/${sharedRunId}/share-links`, { expiresAt: '2000-01-01T00:00:00Z' });
    expect(past.status).toBe(400);
    expect(past.body.details.expiresAt).toMatch(/future/);
    expect((await owner.post(`/api/projects/${projectId}/runs/999999/share-links`, {})).status).toBe(404);
  });
});
