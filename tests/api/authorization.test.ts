/**
 * Every project route × every role gets exactly the status it should. The server decides, whatever the
 * client shows: roles from shared/roles.ts (owner manages, designer edits and runs, reviewer comments,
 * viewer reads; a site admin acts as owner; a signed-in non-member sees 404 so project names never leak).
 */
import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { storeArtifacts } from '../../server/components/runs/run-artifacts';
import { ReviewCommentModel, ReviewThreadModel } from '../../server/components/review/review.model';
import { RunModel } from '../../server/components/runs/run.model';
import { LibraryBuildModel } from '../../server/components/library-builds/library-build.model';
import { writeTilePyramids } from '../../server/cli/tiles';
import { paintPhase } from '../../shared/optics/colormap';
import { encodeNpy } from '../../shared/optics/npy';
import { eightAtomCsv, uploadAtomLibrary } from '../support/atom-libraries';
import { apiRoutes } from '../support/app-routes';
import { deflectorDesign } from '../support/designs';
import { smallSpec } from '../support/library-builds';
import { storeSyntheticLayout } from '../support/fab-fixture';
import { ApiClient, createTestApp, makeUser, signedInClient, type TestApp } from '../support/test-app';

type Who = 'anonymous' | 'outsider' | 'viewer' | 'reviewer' | 'designer' | 'owner' | 'admin';
const WHO: Who[] = ['anonymous', 'outsider', 'viewer', 'reviewer', 'designer', 'owner', 'admin'];

interface Fixture {
  projectId: number;
  targetUserId: number;
  revisionNumber: number;
  uploadId: number;
  /** A project atom library the owner uploaded, used by no revision. */
  libraryId: number;
  /** A run waiting in the queue (never handed to a worker), to cancel. */
  queuedRunId: number;
  /** A finished run with one artifact, to read. */
  finishedRunId: number;
  /** 'thread': an open thread the owner pinned on the finished run's far-field preview, and its first comment. */
  threadId: number;
  commentId: number;
  /** 'invite': a member a site admin invited by e-mail into the project, who has not accepted yet. */
  inviteeUserId: number;
  /** 'build': a project library build waiting in the queue (never handed to a worker), to read and cancel. */
  buildId: number;
}
/** Parts of the fixture a route needs beyond the project and its members (built only then: they cost time). */
/** 'layout': the finished run gets a synthetic layout with design-rule violations and an owner's override. */
/** 'tiles': the finished run's far-field preview gets a 512-px tile pyramid. */
type Need = 'revision' | 'upload' | 'runs' | 'library' | 'layout' | 'thread' | 'invite' | 'build' | 'tiles';
interface RouteCase {
  name: string;
  needs?: Need[];
  send(client: ApiClient, f: Fixture): Promise<{ status: number }>;
  expected: Record<Who, number>;
}

const read = { anonymous: 401, outsider: 404, viewer: 200, reviewer: 200, designer: 200, owner: 200, admin: 200 };
const manage = (ok: number) => ({ anonymous: 401, outsider: 404, viewer: 403, reviewer: 403, designer: 403, owner: ok, admin: ok });
const comment = (ok: number) => ({ anonymous: 401, outsider: 404, viewer: 403, reviewer: ok, designer: ok, owner: ok, admin: ok });
const design = (ok: number) => ({ anonymous: 401, outsider: 404, viewer: 403, reviewer: 403, designer: ok, owner: ok, admin: ok });

const phaseMap = Buffer.from(encodeNpy(new Float64Array(16), [4, 4]));
function uploadPhaseMap(c: ApiClient, projectId: number) {
  return c.agent
    .post(`/api/projects/${projectId}/uploads`)
    .set('x-csrf-token', c.csrfToken)
    .field('kind', 'phase-map')
    .attach('file', phaseMap, { filename: 'map.npy', contentType: 'application/octet-stream' });
}

/** Nine pillars at 1×1 harmonics: a build of a few milliseconds (its library may be refused; the status is what counts). */
const tinySpec = () => smallSpec(3, 1);

const ROUTES: RouteCase[] = [
  { name: 'GET /projects', send: (c) => c.get('/api/projects'), expected: { ...read, outsider: 200 } },
  {
    name: 'POST /projects',
    send: (c) => c.post('/api/projects', { name: 'Made in the matrix' }),
    expected: { anonymous: 401, outsider: 201, viewer: 201, reviewer: 201, designer: 201, owner: 201, admin: 201 },
  },
  { name: 'GET /projects/:id', send: (c, f) => c.get(`/api/projects/${f.projectId}`), expected: read },
  { name: 'PATCH /projects/:id', send: (c, f) => c.patch(`/api/projects/${f.projectId}`, { name: 'Renamed' }), expected: manage(200) },
  { name: 'POST /projects/:id/archive', send: (c, f) => c.post(`/api/projects/${f.projectId}/archive`), expected: manage(200) },
  { name: 'POST /projects/:id/unarchive', send: (c, f) => c.post(`/api/projects/${f.projectId}/unarchive`), expected: manage(200) },
  { name: 'GET /projects/:id/members', send: (c, f) => c.get(`/api/projects/${f.projectId}/members`), expected: read },
  {
    name: 'POST /projects/:id/members',
    send: async (c, f) => c.post(`/api/projects/${f.projectId}/members`, { email: (await makeUser()).email, role: 'viewer' }),
    expected: manage(201),
  },
  {
    name: 'PATCH /projects/:id/members/:userId',
    send: (c, f) => c.patch(`/api/projects/${f.projectId}/members/${f.targetUserId}`, { role: 'designer' }),
    expected: manage(200),
  },
  {
    name: 'DELETE /projects/:id/members/:userId (someone else)',
    send: (c, f) => c.delete(`/api/projects/${f.projectId}/members/${f.targetUserId}`),
    expected: manage(204),
  },
  { name: 'GET /projects/:id/invitations', needs: ['invite'], send: (c, f) => c.get(`/api/projects/${f.projectId}/invitations`), expected: manage(200) },
  {
    name: 'POST /projects/:id/invitations/:userId/resend',
    needs: ['invite'],
    send: (c, f) => c.post(`/api/projects/${f.projectId}/invitations/${f.inviteeUserId}/resend`),
    expected: manage(200),
  },
  {
    name: 'DELETE /projects/:id/invitations/:userId',
    needs: ['invite'],
    send: (c, f) => c.delete(`/api/projects/${f.projectId}/invitations/${f.inviteeUserId}`),
    expected: manage(204),
  },
  { name: 'GET /projects/:id/revisions', send: (c, f) => c.get(`/api/projects/${f.projectId}/revisions`), expected: read },
  {
    name: 'POST /projects/:id/revisions',
    send: (c, f) => c.post(`/api/projects/${f.projectId}/revisions`, { design: deflectorDesign(), message: 'matrix' }),
    expected: design(201),
  },
  {
    name: 'GET /projects/:id/revisions/:number',
    needs: ['revision'],
    send: (c, f) => c.get(`/api/projects/${f.projectId}/revisions/${f.revisionNumber}`),
    expected: read,
  },
  {
    name: 'GET /projects/:id/revisions/compare',
    needs: ['revision'],
    send: (c, f) => c.get(`/api/projects/${f.projectId}/revisions/compare?a=${f.revisionNumber}&b=${f.revisionNumber}`),
    expected: read,
  },
  { name: 'GET /projects/:id/uploads', send: (c, f) => c.get(`/api/projects/${f.projectId}/uploads`), expected: read },
  { name: 'POST /projects/:id/uploads', send: (c, f) => uploadPhaseMap(c, f.projectId), expected: design(201) },
  {
    name: 'GET /projects/:id/uploads/:id/content',
    needs: ['upload'],
    send: (c, f) => c.get(`/api/projects/${f.projectId}/uploads/${f.uploadId}/content`),
    expected: read,
  },
  {
    name: 'DELETE /projects/:id/uploads/:uploadId',
    needs: ['upload'],
    send: (c, f) => c.delete(`/api/projects/${f.projectId}/uploads/${f.uploadId}`),
    expected: design(204),
  },
  { name: 'GET /projects/:id/atom-libraries', send: (c, f) => c.get(`/api/projects/${f.projectId}/atom-libraries`), expected: read },
  { name: 'POST /projects/:id/atom-libraries', send: (c, f) => uploadAtomLibrary(c, f.projectId, eightAtomCsv()), expected: design(201) },
  {
    name: 'GET /projects/:id/atom-libraries/:libraryId',
    needs: ['library'],
    send: (c, f) => c.get(`/api/projects/${f.projectId}/atom-libraries/${f.libraryId}`),
    expected: read,
  },
  { name: 'GET /projects/:id/atom-libraries/demo', send: (c, f) => c.get(`/api/projects/${f.projectId}/atom-libraries/demo`), expected: read },
  {
    name: 'GET /projects/:id/atom-libraries/:libraryId/csv',
    needs: ['library'],
    send: (c, f) => c.get(`/api/projects/${f.projectId}/atom-libraries/${f.libraryId}/csv`),
    expected: read,
  },
  {
    name: 'DELETE /projects/:id/atom-libraries/:libraryId (uploaded by the owner)',
    needs: ['library'],
    send: (c, f) => c.delete(`/api/projects/${f.projectId}/atom-libraries/${f.libraryId}`),
    expected: { ...design(204), designer: 403 },
  },
  {
    // Only its owner shares a personal library; to others it is invisible (404) until shared.
    name: 'POST /projects/:id/atom-libraries/:libraryId/share (the owner’s personal library)',
    send: async (c, f) => {
      const lib = (await uploadAtomLibrary(clients.owner, f.projectId, eightAtomCsv(), { scope: 'personal' })).body.atomLibrary.id;
      return c.post(`/api/projects/${f.projectId}/atom-libraries/${lib}/share`);
    },
    expected: { ...design(200), designer: 404, admin: 404 },
  },
  {
    name: 'DELETE /projects/:id/atom-libraries/:libraryId/share (the owner’s shared personal library)',
    send: async (c, f) => {
      const lib = (await uploadAtomLibrary(clients.owner, f.projectId, eightAtomCsv(), { scope: 'personal' })).body.atomLibrary.id;
      await clients.owner.post(`/api/projects/${f.projectId}/atom-libraries/${lib}/share`);
      return c.delete(`/api/projects/${f.projectId}/atom-libraries/${lib}/share`);
    },
    expected: { ...design(200), designer: 403, admin: 403 },
  },
  {
    name: 'POST /projects/:id/revisions/:number/runs',
    needs: ['revision'],
    send: (c, f) => c.post(`/api/projects/${f.projectId}/revisions/${f.revisionNumber}/runs`),
    expected: design(202),
  },
  { name: 'GET /projects/:id/runs', send: (c, f) => c.get(`/api/projects/${f.projectId}/runs`), expected: read },
  {
    name: 'GET /projects/:id/runs/compare',
    needs: ['runs'],
    send: (c, f) => c.get(`/api/projects/${f.projectId}/runs/compare?a=${f.finishedRunId}&b=${f.queuedRunId}`),
    expected: read,
  },
  {
    // The queued run has no far fields yet: every reader is let through to that answer.
    name: 'GET /projects/:id/runs/compare/far-field.png',
    needs: ['runs'],
    send: (c, f) => c.get(`/api/projects/${f.projectId}/runs/compare/far-field.png?a=${f.finishedRunId}&b=${f.queuedRunId}&channel=a&show=a`),
    expected: { anonymous: 401, outsider: 404, viewer: 409, reviewer: 409, designer: 409, owner: 409, admin: 409 },
  },
  {
    name: 'GET /projects/:id/runs/:runId',
    needs: ['runs'],
    send: (c, f) => c.get(`/api/projects/${f.projectId}/runs/${f.finishedRunId}`),
    expected: read,
  },
  { name: 'POST /projects/:id/runs/:runId/cancel', needs: ['runs'], send: (c, f) => c.post(`/api/projects/${f.projectId}/runs/${f.queuedRunId}/cancel`), expected: design(200) },
  {
    name: 'DELETE /projects/:id/runs/:runId/files',
    needs: ['runs'],
    send: (c, f) => c.delete(`/api/projects/${f.projectId}/runs/${f.finishedRunId}/files`),
    expected: design(200),
  },
  {
    name: 'GET /projects/:id/runs/:runId/artifacts/:name',
    needs: ['runs'],
    send: (c, f) => c.get(`/api/projects/${f.projectId}/runs/${f.finishedRunId}/artifacts/design.json`),
    expected: read,
  },
  {
    name: 'GET /projects/:id/runs/:runId/tiles/:picture',
    needs: ['runs', 'tiles'],
    send: (c, f) => c.get(`/api/projects/${f.projectId}/runs/${f.finishedRunId}/tiles/farfield_a.png`),
    expected: read,
  },
  {
    name: 'GET /projects/:id/runs/:runId/tiles/:picture/:level/:x/:y',
    needs: ['runs', 'tiles'],
    send: (c, f) => c.get(`/api/projects/${f.projectId}/runs/${f.finishedRunId}/tiles/farfield_a.png/0/1/1`),
    expected: read,
  },
  {
    name: 'GET /projects/:id/runs/:runId/events',
    needs: ['runs'],
    send: (c, f) => c.get(`/api/projects/${f.projectId}/runs/${f.finishedRunId}/events`),
    expected: read,
  },
  {
    name: 'POST /projects/:id/runs/:runId/tolerance',
    needs: ['runs'],
    send: (c, f) => c.post(`/api/projects/${f.projectId}/runs/${f.finishedRunId}/tolerance`, { widthBiasNm: [0], detuneNm: [] }),
    expected: design(202),
  },
  {
    name: 'POST /projects/:id/library-builds/estimate',
    send: (c, f) => c.post(`/api/projects/${f.projectId}/library-builds/estimate`, { spec: tinySpec() }),
    expected: design(200),
  },
  {
    name: 'POST /projects/:id/library-builds',
    send: (c, f) => c.post(`/api/projects/${f.projectId}/library-builds`, { spec: tinySpec(), scope: 'project' }),
    expected: design(202),
  },
  { name: 'GET /projects/:id/library-builds', send: (c, f) => c.get(`/api/projects/${f.projectId}/library-builds`), expected: read },
  {
    name: 'GET /projects/:id/library-builds/:buildId',
    needs: ['build'],
    send: (c, f) => c.get(`/api/projects/${f.projectId}/library-builds/${f.buildId}`),
    expected: read,
  },
  {
    name: 'POST /projects/:id/library-builds/:buildId/cancel',
    needs: ['build'],
    send: (c, f) => c.post(`/api/projects/${f.projectId}/library-builds/${f.buildId}/cancel`),
    expected: design(200),
  },
  {
    name: 'GET /projects/:id/runs/:runId/tolerance',
    needs: ['runs'],
    send: (c, f) => c.get(`/api/projects/${f.projectId}/runs/${f.finishedRunId}/tolerance`),
    expected: read,
  },
  { name: 'GET /projects/:id/design-rules', send: (c, f) => c.get(`/api/projects/${f.projectId}/design-rules`), expected: read },
  {
    name: 'PUT /projects/:id/design-rules',
    send: (c, f) => c.agent.put(`/api/projects/${f.projectId}/design-rules`).set('x-csrf-token', c.csrfToken).send({ minGapNm: 60, minFeatureNm: 100, maxAspectRatio: 10 }),
    expected: manage(200),
  },
  {
    name: 'GET /projects/:id/runs/:runId/layout',
    needs: ['runs', 'layout'],
    send: (c, f) => c.get(`/api/projects/${f.projectId}/runs/${f.finishedRunId}/layout?x0=0&y0=0&size=16`),
    expected: read,
  },
  {
    name: 'GET /projects/:id/runs/:runId/design-check',
    needs: ['runs', 'layout'],
    send: (c, f) => c.get(`/api/projects/${f.projectId}/runs/${f.finishedRunId}/design-check`),
    expected: read,
  },
  {
    name: 'GET /projects/:id/runs/:runId/report',
    needs: ['runs', 'layout'],
    send: (c, f) => c.get(`/api/projects/${f.projectId}/runs/${f.finishedRunId}/report`),
    expected: read,
  },
  {
    name: 'POST /projects/:id/runs/:runId/export-override',
    needs: ['runs', 'layout'],
    send: (c, f) => c.post(`/api/projects/${f.projectId}/runs/${f.finishedRunId}/export-override`, { reason: 'Matrix: accepted for a dose test' }),
    expected: manage(201),
  },
  { name: 'GET /projects/:id/activity', send: (c, f) => c.get(`/api/projects/${f.projectId}/activity`), expected: read },
  {
    name: 'GET /projects/:id/runs/:runId/threads',
    needs: ['runs', 'thread'],
    send: (c, f) => c.get(`/api/projects/${f.projectId}/runs/${f.finishedRunId}/threads`),
    expected: read,
  },
  {
    name: 'POST /projects/:id/runs/:runId/threads',
    needs: ['runs'],
    send: (c, f) => c.post(`/api/projects/${f.projectId}/runs/${f.finishedRunId}/threads`, { artifact: 'farfield_a.png', x: 0.5, y: 0.5, body: 'Matrix pin' }),
    expected: comment(201),
  },
  {
    name: 'POST /projects/:id/runs/:runId/threads/:threadId/comments',
    needs: ['runs', 'thread'],
    send: (c, f) => c.post(`/api/projects/${f.projectId}/runs/${f.finishedRunId}/threads/${f.threadId}/comments`, { body: 'Matrix reply' }),
    expected: comment(201),
  },
  {
    name: 'POST /projects/:id/runs/:runId/threads/:threadId/resolve',
    needs: ['runs', 'thread'],
    send: (c, f) => c.post(`/api/projects/${f.projectId}/runs/${f.finishedRunId}/threads/${f.threadId}/resolve`),
    expected: comment(200),
  },
  {
    name: 'POST /projects/:id/runs/:runId/threads/:threadId/reopen (a resolved thread)',
    needs: ['runs', 'thread'],
    send: async (c, f) => {
      await ReviewThreadModel.update({ resolvedAt: new Date() }, { where: { id: f.threadId } });
      return c.post(`/api/projects/${f.projectId}/runs/${f.finishedRunId}/threads/${f.threadId}/reopen`);
    },
    expected: comment(200),
  },
  {
    name: 'PATCH /projects/:id/runs/:runId/threads/:threadId/comments/:commentId (the owner’s comment)',
    needs: ['runs', 'thread'],
    send: (c, f) => c.patch(`/api/projects/${f.projectId}/runs/${f.finishedRunId}/threads/${f.threadId}/comments/${f.commentId}`, { body: 'Edited' }),
    expected: { ...comment(403), owner: 200 },
  },
  {
    name: 'DELETE /projects/:id/runs/:runId/threads/:threadId/comments/:commentId (the owner’s comment)',
    needs: ['runs', 'thread'],
    send: (c, f) => c.delete(`/api/projects/${f.projectId}/runs/${f.finishedRunId}/threads/${f.threadId}/comments/${f.commentId}`),
    expected: { ...comment(403), owner: 204, admin: 204 },
  },
  {
    name: 'GET /projects/:id/runs/:runId/fab-package.zip',
    needs: ['runs', 'layout'],
    send: (c, f) => c.get(`/api/projects/${f.projectId}/runs/${f.finishedRunId}/fab-package.zip`).buffer(true),
    expected: read,
  },
  {
    name: 'GET /projects/:id/runs/:runId/share-links',
    needs: ['runs'],
    send: (c, f) => c.get(`/api/projects/${f.projectId}/runs/${f.finishedRunId}/share-links`),
    expected: manage(200),
  },
  {
    name: 'POST /projects/:id/runs/:runId/share-links',
    needs: ['runs'],
    send: (c, f) => c.post(`/api/projects/${f.projectId}/runs/${f.finishedRunId}/share-links`, {}),
    expected: manage(201),
  },
  {
    name: 'DELETE /projects/:id/share-links/:linkId',
    needs: ['runs'],
    send: async (c, f) => {
      const link = (await clients.owner.post(`/api/projects/${f.projectId}/runs/${f.finishedRunId}/share-links`, {})).body.shareLink;
      return c.delete(`/api/projects/${f.projectId}/share-links/${link.id}`);
    },
    expected: manage(200),
  },
];

let t: TestApp;
const clients = {} as Record<Who, ApiClient>;
const users = {} as Record<Who, Awaited<ReturnType<typeof makeUser>>>;

beforeAll(async () => {
  t = await createTestApp();
  for (const who of WHO) {
    if (who === 'anonymous') {
      clients[who] = await new ApiClient(t.app).start();
      continue;
    }
    users[who] = await makeUser({ siteRole: who === 'admin' ? 'admin' : 'member', name: `Matrix ${who}` });
    clients[who] = await signedInClient(t.app, users[who]);
  }
});
afterAll(async () => {
  await t?.close();
});

/** A fresh project per case, so one case's change never affects another. */
async function freshProject(needs: Need[] = ['revision', 'upload', 'runs', 'library']): Promise<Fixture> {
  const owner = clients.owner;
  const project = (await owner.post('/api/projects', { name: 'Matrix project' })).body.project;
  for (const role of ['viewer', 'reviewer', 'designer'] as const) {
    await owner.post(`/api/projects/${project.id}/members`, { email: users[role].email, role });
  }
  const target = await makeUser({ name: 'Matrix target' });
  await owner.post(`/api/projects/${project.id}/members`, { email: target.email, role: 'viewer' });
  const fixture: Fixture = { projectId: project.id, targetUserId: target.id, revisionNumber: 0, uploadId: 0, libraryId: 0, queuedRunId: 0, finishedRunId: 0, threadId: 0, commentId: 0, inviteeUserId: 0, buildId: 0 };
  if (needs.includes('invite')) {
    const email = `matrix.invitee.${project.id}@partner-lab.example`;
    // With sign-up closed only a site admin brings a new account in; the owner then manages the invitation.
    fixture.inviteeUserId = (await clients.admin.post(`/api/projects/${project.id}/members`, { email, role: 'reviewer' })).body.member.userId;
  }
  if (needs.includes('upload')) fixture.uploadId = (await uploadPhaseMap(owner, project.id)).body.upload.id;
  if (needs.includes('library')) fixture.libraryId = (await uploadAtomLibrary(owner, project.id, eightAtomCsv())).body.atomLibrary.id;
  if (needs.includes('build')) {
    const row = { projectId: project.id, scope: 'project' as const, name: 'Matrix build', spec: tinySpec(), subsetSize: null, estimateSeconds: 0, warnings: [] };
    // Started by the fixture's own member, so the queued row takes none of the owner's run slots.
    fixture.buildId = (await LibraryBuildModel.create({ ...row, createdById: target.id, queuedAt: new Date() })).id;
  }
  if (!needs.includes('revision') && !needs.includes('runs')) return fixture;
  const revision = (await owner.post(`/api/projects/${project.id}/revisions`, { design: deflectorDesign() })).body.revision;
  fixture.revisionNumber = revision.number;
  if (!needs.includes('runs')) return fixture;
  const row = { projectId: project.id, revisionId: revision.id, startedById: null, queuedAt: new Date() };
  fixture.queuedRunId = (await RunModel.create({ ...row, stage: 'queued' })).id;
  const finished = await RunModel.create({ ...row, status: 'succeeded', progress: 1, stage: 'done', finishedAt: new Date() });
  fixture.finishedRunId = finished.id;
  const dir = await mkdtemp(join(tmpdir(), 'pw-matrix-'));
  await writeFile(join(dir, 'design.json'), JSON.stringify(revision.design));
  await writeFile(join(dir, 'farfield_a.png'), Buffer.from('89504e470d0a1a0a', 'hex'));
  const tiles = needs.includes('tiles')
    ? await writeTilePyramids(dir, [{ picture: 'farfield_a.png', side: 512, paint: (f) => paintPhase(new Float64Array((512 / f) ** 2), 512 / f, 512 / f) }], 512)
    : [];
  await storeArtifacts(finished.id, dir, [{ name: 'design.json', bytes: 0 }, { name: 'farfield_a.png', bytes: 8 }, ...tiles]);
  await rm(dir, { recursive: true });
  if (needs.includes('layout')) await storeSyntheticLayout(finished.id, deflectorDesign());
  if (needs.includes('thread')) {
    const thread = await ReviewThreadModel.create({ projectId: project.id, runId: finished.id, revisionId: revision.id, artifact: 'farfield_a.png', x: 0.5, y: 0.5, createdById: users.owner.id });
    fixture.threadId = thread.id;
    fixture.commentId = (await ReviewCommentModel.create({ threadId: thread.id, authorId: users.owner.id, body: 'Matrix pin', mentions: [] })).id;
  }
  return fixture;
}

/** `METHOD /path` of a matrix case's name, its notes in brackets left out. */
const caseRoute = (name: string) => name.replace(/\s*\(.*\)$/, '');
/** Whether a case's path (e.g. '/projects/:id/atom-libraries/demo') is an instance of a declared route. */
function coversRoute(casePath: string, declared: string): boolean {
  const [caseMethod, ...caseParts] = casePath.split(/[ /]/);
  const [method, ...parts] = declared.split(/[ /]/);
  return caseMethod === method && caseParts.length === parts.length && parts.every((part, i) => part.startsWith(':') || part === caseParts[i]);
}

describe('authorization matrix', () => {
  it('covers every project route the app has, and only routes it has (read from its router)', () => {
    const declared = apiRoutes(t.app).filter((r) => /^[A-Z]+ \/projects(\/|$)/.test(r));
    expect(declared.length).toBeGreaterThan(40);
    const cases = ROUTES.map((r) => caseRoute(r.name));
    expect(declared.filter((route) => !cases.some((c) => coversRoute(c, route)))).toEqual([]);
    expect(cases.filter((c) => !declared.some((route) => coversRoute(c, route)))).toEqual([]);
  });

  for (const route of ROUTES) {
    for (const who of WHO) {
      it(`${route.name} as ${who} → ${route.expected[who]}`, async () => {
        const fixture = await freshProject(route.needs ?? []);
        const res = await route.send(clients[who], fixture);
        expect(res.status).toBe(route.expected[who]);
      });
    }
  }

  it('a viewer gets 403 on every project write', async () => {
    const fixture = await freshProject(['revision', 'upload', 'runs', 'library', 'build']);
    const viewer = clients.viewer;
    const writes = [
      await viewer.patch(`/api/projects/${fixture.projectId}`, { description: 'x' }),
      await viewer.post(`/api/projects/${fixture.projectId}/archive`),
      await viewer.post(`/api/projects/${fixture.projectId}/members`, { email: users.outsider.email, role: 'owner' }),
      await viewer.patch(`/api/projects/${fixture.projectId}/members/${users.viewer.id}`, { role: 'owner' }),
      await viewer.delete(`/api/projects/${fixture.projectId}/members/${fixture.targetUserId}`),
      await viewer.post(`/api/projects/${fixture.projectId}/revisions`, { design: deflectorDesign() }),
      await uploadPhaseMap(viewer, fixture.projectId),
      await viewer.post(`/api/projects/${fixture.projectId}/revisions/${fixture.revisionNumber}/runs`),
      await viewer.post(`/api/projects/${fixture.projectId}/runs/${fixture.queuedRunId}/cancel`),
      await uploadAtomLibrary(viewer, fixture.projectId, eightAtomCsv()),
      await viewer.delete(`/api/projects/${fixture.projectId}/atom-libraries/${fixture.libraryId}`),
      await viewer.post(`/api/projects/${fixture.projectId}/library-builds`, { spec: tinySpec(), scope: 'personal' }),
      await viewer.post(`/api/projects/${fixture.projectId}/library-builds/${fixture.buildId}/cancel`),
    ];
    expect(writes.map((r) => r.status)).toEqual([403, 403, 403, 403, 403, 403, 403, 403, 403, 403, 403, 403, 403]);
  });

  it('an archived project refuses every write with 409 naming the archive, to its owner and a site admin; unarchiving works', async () => {
    const fixture = await freshProject(['revision', 'upload', 'runs', 'library', 'build']);
    const p = `/api/projects/${fixture.projectId}`;
    expect((await clients.owner.post(`${p}/archive`)).status).toBe(200);
    for (const who of ['owner', 'admin'] as const) {
      const c = clients[who];
      const writes = {
        rename: await c.patch(p, { description: 'x' }),
        addMember: await c.post(`${p}/members`, { email: users.outsider.email, role: 'viewer' }),
        changeRole: await c.patch(`${p}/members/${fixture.targetUserId}`, { role: 'designer' }),
        removeMember: await c.delete(`${p}/members/${fixture.targetUserId}`),
        saveRevision: await c.post(`${p}/revisions`, { design: deflectorDesign() }),
        upload: await uploadPhaseMap(c, fixture.projectId),
        startRun: await c.post(`${p}/revisions/${fixture.revisionNumber}/runs`),
        cancelRun: await c.post(`${p}/runs/${fixture.queuedRunId}/cancel`),
        tolerance: await c.post(`${p}/runs/${fixture.finishedRunId}/tolerance`, { widthBiasNm: [0], detuneNm: [] }),
        uploadLibrary: await uploadAtomLibrary(c, fixture.projectId, eightAtomCsv()),
        deleteLibrary: await c.delete(`${p}/atom-libraries/${fixture.libraryId}`),
        buildLibrary: await c.post(`${p}/library-builds`, { spec: tinySpec(), scope: 'project' }),
        cancelBuild: await c.post(`${p}/library-builds/${fixture.buildId}/cancel`),
        thread: await c.post(`${p}/runs/${fixture.finishedRunId}/threads`, { artifact: 'farfield_a.png', x: 0.5, y: 0.5, body: 'On an archive' }),
        shareLink: await c.post(`${p}/runs/${fixture.finishedRunId}/share-links`, {}),
        designRules: await c.agent.put(`${p}/design-rules`).set('x-csrf-token', c.csrfToken).send({ minGapNm: 60, minFeatureNm: 100, maxAspectRatio: 10 }),
      };
      for (const [what, res] of Object.entries(writes)) {
        expect({ what, who, status: res.status }).toEqual({ what, who, status: 409 });
        expect(res.body.error).toMatch(/archived/);
      }
    }
    expect((await clients.viewer.get(`${p}/runs`)).status).toBe(200);
    expect((await clients.owner.post(`${p}/unarchive`)).status).toBe(200);
    expect((await clients.owner.post(`${p}/revisions/${fixture.revisionNumber}/runs`)).status).toBe(202);
  });
});
