/**
 * Review: comments pinned on a run's preview images, threads, permissions per role, plain text, mentions
 * and replies that notify (in-app and by mail through the mail fake, per each user's e-mail choices),
 * run-finished notifications, and the project's activity feed.
 */
import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { storeArtifacts } from '../../server/components/runs/run-artifacts';
import { markFailed, markStarted, markSucceeded } from '../../server/components/runs/run-state';
import { RunModel } from '../../server/components/runs/run.model';
import { deflectorDesign } from '../support/designs';
import { allMail, waitForMail } from '../support/mailbox';
import { createTestApp, makeUser, signedInClient, type ApiClient, type TestApp } from '../support/test-app';

let t: TestApp;
type Who = 'owner' | 'designer' | 'reviewer' | 'viewer';
const users = {} as Record<Who, Awaited<ReturnType<typeof makeUser>>>;
const clients = {} as Record<Who, ApiClient>;
const names: Record<Who, string> = { owner: 'Ottilie Brandt', designer: 'Dario Mensah', reviewer: 'Rosa Lindqvist', viewer: 'Vik Aalto' };
let projectId = 0;
let revisionId = 0;
let runId = 0;
const IMAGE = 'farfield_a.png';
const PNG = Buffer.from('89504e470d0a1a0a0000000d4948445200000001000000010806000000', 'hex');

beforeAll(async () => {
  t = await createTestApp();
  for (const who of Object.keys(names) as Who[]) {
    users[who] = await makeUser({ name: names[who] });
    clients[who] = await signedInClient(t.app, users[who]);
  }
  const project = (await clients.owner.post('/api/projects', { name: 'Beam splitter for lab B' }).expect(201)).body.project;
  projectId = project.id;
  for (const who of ['designer', 'reviewer', 'viewer'] as const) {
    await clients.owner.post(`/api/projects/${projectId}/members`, { email: users[who].email, role: who }).expect(201);
  }
  const revision = (await clients.designer.post(`/api/projects/${projectId}/revisions`, { design: deflectorDesign(), message: 'first' }).expect(201)).body.revision;
  revisionId = revision.id;
  const run = await RunModel.create({ projectId, revisionId, startedById: users.designer.id, queuedAt: new Date(), status: 'succeeded', progress: 1, stage: 'done', finishedAt: new Date() });
  runId = run.id;
  const dir = await mkdtemp(join(tmpdir(), 'pw-review-'));
  await writeFile(join(dir, IMAGE), PNG);
  await writeFile(join(dir, 'design.json'), '{}');
  await storeArtifacts(runId, dir, [{ name: IMAGE, bytes: PNG.length }, { name: 'design.json', bytes: 2 }]);
  await rm(dir, { recursive: true });
});
afterAll(async () => {
  await t?.close();
});

const threadsUrl = () => `/api/projects/${projectId}/runs/${runId}/threads`;
const pin = (body: string, extra: object = {}) => ({ artifact: IMAGE, x: 0.25, y: 0.75, body, ...extra });

describe('pinned comment threads', () => {
  it('a viewer cannot comment; reviewer, designer and owner can', async () => {
    const denied = await clients.viewer.post(threadsUrl(), pin('Looks fine'));
    expect(denied.status).toBe(403);
    expect(denied.body.error ?? denied.body.message).toMatch(/viewer/);
    for (const who of ['reviewer', 'designer', 'owner'] as const) {
      const res = await clients[who].post(threadsUrl(), pin(`Comment by ${who}`)).expect(201);
      expect(res.body.thread).toMatchObject({ runId, revisionId, artifact: IMAGE, x: 0.25, y: 0.75, resolvedAt: null });
      expect(res.body.thread.comments[0]).toMatchObject({ body: `Comment by ${who}`, author: { id: users[who].id, name: names[who] } });
    }
    const listed = (await clients.viewer.get(threadsUrl()).expect(200)).body.threads;
    expect(listed.map((th: { comments: { body: string }[] }) => th.comments[0].body)).toEqual(['Comment by reviewer', 'Comment by designer', 'Comment by owner']);
  });

  it('refuses bad input with a 400 naming what to fix', async () => {
    const offImage = await clients.reviewer.post(threadsUrl(), pin('x', { x: 1.5 }));
    expect(offImage.status).toBe(400);
    expect(offImage.body.details).toHaveProperty('x');
    const empty = await clients.reviewer.post(threadsUrl(), pin('   '));
    expect(empty.status).toBe(400);
    expect(empty.body.details).toHaveProperty('body');
    const tooLong = await clients.reviewer.post(threadsUrl(), pin('a'.repeat(4001)));
    expect(tooLong.status).toBe(400);
    expect(tooLong.body.details.body).toMatch(/4000/);
    const notImage = await clients.reviewer.post(threadsUrl(), pin('x', { artifact: 'design.json' }));
    expect(notImage.status).toBe(400);
    expect(notImage.body.details).toHaveProperty('artifact');
    const noRun = await clients.reviewer.post(`/api/projects/${projectId}/runs/999999/threads`, pin('x'));
    expect(noRun.status).toBe(404);
    const badId = await clients.reviewer.post(`/api/projects/${projectId}/runs/abc/threads`, pin('x'));
    expect(badId.status).toBe(400);
  });

  it('keeps text plain: markup comes back verbatim, line breaks included', async () => {
    const body = '<script>alert("x")</script>\nsecond line & <b>bold</b>';
    const res = await clients.reviewer.post(threadsUrl(), pin(body)).expect(201);
    expect(res.body.thread.comments[0].body).toBe(body);
    const listed = (await clients.owner.get(threadsUrl()).expect(200)).body.threads;
    expect(listed.find((th: { id: number }) => th.id === res.body.thread.id).comments[0].body).toBe(body);
  });

  it('replies form a thread; only the author edits; the owner may delete any comment', async () => {
    const thread = (await clients.reviewer.post(threadsUrl(), pin('Zero order too bright here')).expect(201)).body.thread;
    const url = `${threadsUrl()}/${thread.id}/comments`;
    const reply = (await clients.designer.post(url, { body: 'Will raise the iteration count' }).expect(201)).body.comment;
    expect(reply).toMatchObject({ threadId: thread.id, author: { id: users.designer.id } });

    const first = thread.comments[0];
    expect((await clients.designer.patch(`${url}/${first.id}`, { body: 'hijacked' })).status).toBe(403);
    expect((await clients.owner.patch(`${url}/${first.id}`, { body: 'hijacked' })).status).toBe(403);
    const edited = (await clients.reviewer.patch(`${url}/${first.id}`, { body: 'Zero order too bright (edited)' }).expect(200)).body.comment;
    expect(edited.body).toBe('Zero order too bright (edited)');
    expect(edited.editedAt).not.toBeNull();

    expect((await clients.reviewer.delete(`${url}/${reply.id}`)).status).toBe(403);
    expect((await clients.viewer.delete(`${url}/${reply.id}`)).status).toBe(403);
    await clients.owner.delete(`${url}/${reply.id}`).expect(204);
    await clients.reviewer.delete(`${url}/${first.id}`).expect(204);
    const listed = (await clients.owner.get(threadsUrl()).expect(200)).body.threads;
    expect(listed.some((th: { id: number }) => th.id === thread.id)).toBe(false);
    expect((await clients.owner.delete(`${url}/${first.id}`)).status).toBe(404);
  });

  it('resolves and reopens a thread (reviewer+), not twice, never as a viewer', async () => {
    const thread = (await clients.reviewer.post(threadsUrl(), pin('Crosstalk ring at 3 o’clock')).expect(201)).body.thread;
    const base = `${threadsUrl()}/${thread.id}`;
    expect((await clients.viewer.post(`${base}/resolve`)).status).toBe(403);
    const resolved = (await clients.designer.post(`${base}/resolve`).expect(200)).body.thread;
    expect(resolved.resolvedAt).not.toBeNull();
    expect(resolved.resolvedBy).toEqual({ id: users.designer.id, name: names.designer });
    expect((await clients.designer.post(`${base}/resolve`)).status).toBe(409);
    const reopened = (await clients.reviewer.post(`${base}/reopen`).expect(200)).body.thread;
    expect(reopened).toMatchObject({ resolvedAt: null, resolvedBy: null });
    expect((await clients.reviewer.post(`${base}/reopen`)).status).toBe(409);
  });
});

describe('mentions, replies and notifications', () => {
  it('a mention notifies in the app and by a short mail naming the project and linking to the pin', async () => {
    const res = await clients.reviewer.post(threadsUrl(), pin(`@${names.designer} the side lobe here?`)).expect(201);
    const thread = res.body.thread;
    expect(thread.comments[0].mentions).toEqual([users.designer.id]);
    const mail = await waitForMail(users.designer.email, 'mentioned you');
    expect(mail.subject).toContain('Beam splitter for lab B');
    expect(mail.text).toContain('Beam splitter for lab B');
    expect(mail.text).toContain(`http://127.0.0.1:5999/projects/${projectId}/runs/${runId}?thread=${thread.id}`);
    expect(mail.text).toContain(names.reviewer);

    const inbox = (await clients.designer.get('/api/notifications').expect(200)).body;
    const note = inbox.notifications.find((n: { threadId: number }) => n.threadId === thread.id);
    expect(note).toMatchObject({ kind: 'mention', projectId, projectName: 'Beam splitter for lab B', runId, readAt: null, actor: { id: users.reviewer.id } });
    expect(inbox.unread).toBeGreaterThan(0);
    await clients.designer.post(`/api/notifications/${note.id}/read`).expect(204);
    const after = (await clients.designer.get('/api/notifications?unread=true').expect(200)).body;
    expect(after.notifications.some((n: { id: number }) => n.id === note.id)).toBe(false);
    expect((await clients.reviewer.post(`/api/notifications/${note.id}/read`)).status).toBe(404);
  });

  it('a reply notifies the others in the thread, not the one who wrote it', async () => {
    const thread = (await clients.owner.post(threadsUrl(), pin('Is this the ghost order?')).expect(201)).body.thread;
    await clients.reviewer.post(`${threadsUrl()}/${thread.id}/comments`, { body: 'Yes — the quantization ghost' }).expect(201);
    const mail = await waitForMail(users.owner.email, 'replied');
    expect(mail.text).toContain(`?thread=${thread.id}`);
    const reviewerInbox = (await clients.reviewer.get('/api/notifications').expect(200)).body.notifications;
    expect(reviewerInbox.some((n: { threadId: number; kind: string }) => n.threadId === thread.id)).toBe(false);
  });

  it('respects e-mail preferences: a kind turned off gets the in-app notification but no mail', async () => {
    expect((await clients.viewer.get('/api/notifications/preferences').expect(200)).body.preferences).toEqual({ email: { mention: true, reply: true, 'run-finished': true } });
    const bad = await clients.viewer.agent.put('/api/notifications/preferences').set('x-csrf-token', clients.viewer.csrfToken).send({ email: { mention: 'no' } });
    expect(bad.status).toBe(400);
    await clients.viewer.agent
      .put('/api/notifications/preferences')
      .set('x-csrf-token', clients.viewer.csrfToken)
      .send({ email: { mention: false, reply: true, 'run-finished': true } })
      .expect(200);
    const thread = (await clients.reviewer.post(threadsUrl(), pin(`@${names.viewer} and @${names.owner}, please look`)).expect(201)).body.thread;
    expect(thread.comments[0].mentions.sort()).toEqual([users.owner.id, users.viewer.id].sort());
    // The owner's mail proves the batch was sent; the viewer's, turned off, must not be among it.
    await waitForMail(users.owner.email, 'mentioned you');
    await t.ctx.mailer.drain();
    const toViewer = (await allMail()).filter((m) => m.to.some((a) => a.address === users.viewer.email));
    expect(toViewer).toEqual([]);
    const inbox = (await clients.viewer.get('/api/notifications').expect(200)).body.notifications;
    expect(inbox.some((n: { threadId: number; kind: string }) => n.threadId === thread.id && n.kind === 'mention')).toBe(true);
  });

  it('a run finishing or failing notifies the one who started it', async () => {
    const ok = await RunModel.create({ projectId, revisionId, startedById: users.designer.id, queuedAt: new Date() });
    expect(await markStarted(ok.id)).toBe(true);
    expect(await markSucceeded(ok.id, { metrics: null, plots: null, headline: null, convergence: null })).toBe(true);
    const mail = await waitForMail(users.designer.email, `run #${ok.id} finished`);
    expect(mail.text).toContain(`http://127.0.0.1:5999/projects/${projectId}/runs/${ok.id}`);
    expect(mail.subject).toContain('Beam splitter for lab B');

    const bad = await RunModel.create({ projectId, revisionId, startedById: users.designer.id, queuedAt: new Date() });
    await markStarted(bad.id);
    await markFailed(bad.id, 'the design cannot be sampled');
    await waitForMail(users.designer.email, `run #${bad.id} failed`);
    const kinds = (await clients.designer.get('/api/notifications').expect(200)).body.notifications.filter((n: { runId: number }) => n.runId === ok.id || n.runId === bad.id);
    expect(kinds.sort((x: { runId: number }, y: { runId: number }) => x.runId - y.runId).map((n: { kind: string; text: string }) => [n.kind, n.text])).toEqual([
      ['run-finished', `Your run #${ok.id} finished`],
      ['run-finished', `Your run #${bad.id} failed`],
    ]);
    await clients.designer.post('/api/notifications/read-all').expect(204);
    expect((await clients.designer.get('/api/notifications').expect(200)).body.unread).toBe(0);
  });
});

describe('activity feed', () => {
  it('lists revisions, runs, comments, resolutions, membership changes and exports — who and when', async () => {
    // Database times are kept to the second: allow one second either side.
    const since = Date.now() - 1000;
    const extra = await makeUser({ name: 'Guest Reader' });
    await clients.owner.post(`/api/projects/${projectId}/members`, { email: extra.email, role: 'viewer' }).expect(201);
    await clients.owner.patch(`/api/projects/${projectId}/members/${extra.id}`, { role: 'reviewer' }).expect(200);
    await clients.owner.delete(`/api/projects/${projectId}/members/${extra.id}`).expect(204);
    const thread = (await clients.reviewer.post(threadsUrl(), pin('For the feed')).expect(201)).body.thread;
    await clients.designer.post(`${threadsUrl()}/${thread.id}/resolve`).expect(200);
    const { FabExportModel } = await import('../../server/components/fab/fab.model');
    await FabExportModel.create({ runId, userId: users.owner.id, options: { layer: 1, datatype: 0, dbUnitNm: 1, regenerated: false }, overrideId: null, at: new Date() });

    expect((await clients.viewer.get(`/api/projects/${projectId}/activity`).expect(200)).body.activity.length).toBeGreaterThan(0);
    const activity: { kind: string; text: string; actor: { name: string } | null; at: string }[] = (await clients.viewer.get(`/api/projects/${projectId}/activity`).expect(200)).body.activity;
    const find = (kind: string, text: string | RegExp) => activity.find((a) => a.kind === kind && (typeof text === 'string' ? a.text === text : text.test(a.text)));
    expect(find('revision-saved', 'saved revision 1')?.actor?.name).toBe(names.designer);
    expect(find('run-started', `started run #${runId}`)?.actor?.name).toBe(names.designer);
    expect(find('run-finished', `run #${runId} finished`)).toBeDefined();
    expect(find('run-failed', /failed$/)).toBeDefined();
    expect(find('comment', `commented on run #${runId}`)?.actor?.name).toBe(names.reviewer);
    expect(find('thread-resolved', `resolved a thread on run #${runId}`)?.actor?.name).toBe(names.designer);
    expect(find('member-added', 'added Guest Reader as viewer')?.actor?.name).toBe(names.owner);
    expect(find('member-role-changed', 'made Guest Reader reviewer')).toBeDefined();
    expect(find('member-removed', 'removed Guest Reader')).toBeDefined();
    expect(find('export', `downloaded the fab package of run #${runId}`)?.actor?.name).toBe(names.owner);
    const times = activity.map((a) => a.at);
    expect([...times].sort().reverse()).toEqual(times);

    // Each entry's actor and time are those of the thing it reports.
    const until = Date.now() + 1000;
    const revision = (await clients.viewer.get(`/api/projects/${projectId}/revisions/1`).expect(200)).body.revision;
    const run = (await RunModel.findByPk(runId))!;
    expect(find('revision-saved', 'saved revision 1')!.at).toBe(revision.createdAt);
    expect(find('run-started', `started run #${runId}`)!.at).toBe(run.queuedAt.toISOString());
    expect(find('run-finished', `run #${runId} finished`)!.at).toBe(run.finishedAt!.toISOString());
    expect(find('run-finished', `run #${runId} finished`)!.actor?.name).toBe(names.designer);
    expect(find('member-role-changed', 'made Guest Reader reviewer')!.actor?.name).toBe(names.owner);
    expect(find('member-removed', 'removed Guest Reader')!.actor?.name).toBe(names.owner);
    for (const [kind, text] of [
      ['member-added', 'added Guest Reader as viewer'],
      ['member-role-changed', 'made Guest Reader reviewer'],
      ['member-removed', 'removed Guest Reader'],
      ['comment', `commented on run #${runId}`],
      ['thread-resolved', `resolved a thread on run #${runId}`],
      ['export', `downloaded the fab package of run #${runId}`],
    ] as const) {
      const at = Date.parse(find(kind, text)!.at);
      expect(at, `${kind} at`).toBeGreaterThanOrEqual(since);
      expect(at, `${kind} at`).toBeLessThanOrEqual(until);
    }
    const added = Date.parse(find('member-added', 'added Guest Reader as viewer')!.at);
    const removed = Date.parse(find('member-removed', 'removed Guest Reader')!.at);
    expect(added).toBeLessThanOrEqual(removed);
  });
});
