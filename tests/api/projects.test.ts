import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { allMail, linkToken, waitForMail } from '../support/mailbox';
import { ApiClient, createTestApp, makeUser, signedInClient, type TestApp } from '../support/test-app';

let t: TestApp;
let owner: ApiClient;
let ownerUser: Awaited<ReturnType<typeof makeUser>>;
beforeAll(async () => {
  // Open sign-up: the project owner here (a member) may invite unknown e-mails; closed sign-up is in invitations.test.ts.
  t = await createTestApp({ ALLOW_SIGNUP: 'true' });
  ownerUser = await makeUser({ name: 'Owner One' });
  owner = await signedInClient(t.app, ownerUser);
});
afterAll(async () => {
  await t?.close();
});

describe('projects', () => {
  it('creates, renames, describes, archives and unarchives a project', async () => {
    const created = await owner.post('/api/projects', { name: '  Twin-image hologram  ', description: 'Two images, one array' });
    expect(created.status).toBe(201);
    expect(created.body.project).toMatchObject({ name: 'Twin-image hologram', myRole: 'owner', memberCount: 1, archived: false });
    const id = created.body.project.id;

    const renamed = await owner.patch(`/api/projects/${id}`, { name: 'Twin hologram v2', description: 'Updated' });
    expect(renamed.body.project).toMatchObject({ name: 'Twin hologram v2', description: 'Updated' });

    expect((await owner.post(`/api/projects/${id}/archive`)).body.project.archived).toBe(true);
    const active = await owner.get('/api/projects');
    expect(active.body.projects.map((p: { id: number }) => p.id)).not.toContain(id);
    const archived = await owner.get('/api/projects?status=archived');
    expect(archived.body.projects.map((p: { id: number }) => p.id)).toContain(id);
    expect((await owner.post(`/api/projects/${id}/unarchive`)).body.project.archived).toBe(false);
  });

  it('lists only my projects, filtered by text and sorted by the chosen column', async () => {
    const me = await makeUser();
    const client = await signedInClient(t.app, me);
    for (const name of ['Bessel axis study', 'Alpha deflector', 'Charge-2 vortex']) {
      expect((await client.post('/api/projects', { name })).status).toBe(201);
    }
    const list = await client.get('/api/projects?sort=name&dir=asc');
    expect(list.body.projects.map((p: { name: string }) => p.name)).toEqual(['Alpha deflector', 'Bessel axis study', 'Charge-2 vortex']);
    const desc = await client.get('/api/projects?sort=name&dir=desc');
    expect(desc.body.projects[0].name).toBe('Charge-2 vortex');
    const filtered = await client.get('/api/projects?q=vortex');
    expect(filtered.body.projects.map((p: { name: string }) => p.name)).toEqual(['Charge-2 vortex']);
    const bad = await client.get('/api/projects?sort=colour');
    expect(bad.status).toBe(400);
    expect(bad.body.details.sort).toBeDefined();
  });

  it('rejects an empty or overlong name with the field named', async () => {
    const empty = await owner.post('/api/projects', { name: '   ' });
    expect(empty.status).toBe(400);
    expect(empty.body.details.name).toMatch(/Enter a project name/);
    const long = await owner.post('/api/projects', { name: 'x'.repeat(121) });
    expect(long.status).toBe(400);
    const wrongType = await owner.post('/api/projects', { name: 12 });
    expect(wrongType.status).toBe(400);
  });

  it('answers an unknown or malformed project id with 404 / 400', async () => {
    expect((await owner.get('/api/projects/999999')).status).toBe(404);
    expect((await owner.get('/api/projects/abc')).status).toBe(400);
  });
});

describe('membership', () => {
  it('adds an existing user by e-mail with a role, changes the role and removes them', async () => {
    const project = (await owner.post('/api/projects', { name: 'Members project' })).body.project;
    const colleague = await makeUser({ name: 'Colleague' });
    const added = await owner.post(`/api/projects/${project.id}/members`, { email: colleague.email, role: 'reviewer' });
    expect(added.status).toBe(201);
    expect(added.body.member).toMatchObject({ userId: colleague.id, role: 'reviewer', name: 'Colleague' });
    expect(added.body.invited).toBe(false);

    const dup = await owner.post(`/api/projects/${project.id}/members`, { email: colleague.email, role: 'viewer' });
    expect(dup.status).toBe(409);
    const badRole = await owner.post(`/api/projects/${project.id}/members`, { email: colleague.email, role: 'boss' });
    expect(badRole.status).toBe(400);
    expect(badRole.body.details.role).toBeDefined();

    const members = await owner.get(`/api/projects/${project.id}/members`);
    expect(members.body.members.map((m: { role: string }) => m.role)).toEqual(['owner', 'reviewer']);

    const changed = await owner.patch(`/api/projects/${project.id}/members/${colleague.id}`, { role: 'designer' });
    expect(changed.body.member.role).toBe('designer');
    expect((await owner.delete(`/api/projects/${project.id}/members/${colleague.id}`)).status).toBe(204);
    expect((await owner.get(`/api/projects/${project.id}/members`)).body.members).toHaveLength(1);
  });

  it('invites an e-mail without an account: mail, accept, signed in, sees the project with the chosen role', async () => {
    const project = (await owner.post('/api/projects', { name: 'Invitation project' })).body.project;
    const email = `guest.${Date.now()}@partner-lab.example`;
    const invited = await owner.post(`/api/projects/${project.id}/members`, { email, role: 'reviewer' });
    expect(invited.status).toBe(201);
    expect(invited.body).toMatchObject({ invited: true, member: { role: 'reviewer', email } });
    const again = await owner.post(`/api/projects/${project.id}/members`, { email, role: 'viewer' });
    expect(again.status).toBe(409);

    const mail = await waitForMail(email, 'invited you');
    expect(mail.text).toContain('Invitation project');
    expect(mail.text).toContain('as reviewer');
    expect(mail.text).toContain('/welcome?token=');
    const token = linkToken(mail);

    const guest = await new ApiClient(t.app).start();
    expect((await guest.get(`/api/projects/${project.id}`)).status).toBe(401);
    const accepted = await guest.post('/api/auth/invitation/accept', { token, name: 'Guest Reviewer', password: 'a long enough secret' });
    expect(accepted.status).toBe(200);
    guest.csrfToken = accepted.body.csrfToken;
    expect(accepted.body.user).toMatchObject({ email, name: 'Guest Reviewer' });
    const seen = await guest.get(`/api/projects/${project.id}`);
    expect(seen.status).toBe(200);
    expect(seen.body.project.myRole).toBe('reviewer');
    const reused = await new ApiClient(t.app).start().then((c) => c.post('/api/auth/invitation/accept', { token, name: 'X', password: 'a long enough secret' }));
    expect(reused.status).toBe(400);
  });

  it('lists pending invitations, resends one with a fresh link and revokes another', async () => {
    const project = (await owner.post('/api/projects', { name: 'Pending invitations project' })).body.project;
    const email = `pending.${Date.now()}@partner-lab.example`;
    const other = `withdrawn.${Date.now()}@partner-lab.example`;
    const invited = (await owner.post(`/api/projects/${project.id}/members`, { email, role: 'reviewer' })).body.member;
    const withdrawn = (await owner.post(`/api/projects/${project.id}/members`, { email: other, role: 'viewer' })).body.member;
    const colleague = await makeUser();
    await owner.post(`/api/projects/${project.id}/members`, { email: colleague.email, role: 'designer' });

    const listed = await owner.get(`/api/projects/${project.id}/invitations`);
    expect(listed.status).toBe(200);
    expect(listed.body.invitations).toEqual([
      { userId: invited.userId, email, role: 'reviewer', invitedAt: expect.any(String), expiresAt: expect.any(String) },
      { userId: withdrawn.userId, email: other, role: 'viewer', invitedAt: expect.any(String), expiresAt: expect.any(String) },
    ]);
    const firstExpiry = Date.parse(listed.body.invitations[0].expiresAt) - Date.parse(listed.body.invitations[0].invitedAt);
    expect(firstExpiry).toBeGreaterThan(6.9 * 24 * 3600 * 1000);

    const firstMail = await waitForMail(email, 'invited you');
    const firstToken = linkToken(firstMail);
    const resent = await owner.post(`/api/projects/${project.id}/invitations/${invited.userId}/resend`);
    expect(resent.status).toBe(200);
    expect(resent.body.invitation).toMatchObject({ userId: invited.userId, email, role: 'reviewer' });
    const mails = async () => (await allMail()).filter((m) => m.to.some((to) => to.address === email));
    await expect.poll(async () => (await mails()).length).toBe(2);
    const secondToken = linkToken((await mails())[1]);
    expect(secondToken).not.toBe(firstToken);
    expect((await mails())[1].text).toContain('Pending invitations project');

    const stale = await new ApiClient(t.app).start().then((c) => c.post('/api/auth/invitation/accept', { token: firstToken, name: 'Too Late', password: 'a long enough secret' }));
    expect(stale.status).toBe(400);
    const fresh = await new ApiClient(t.app).start().then((c) => c.post('/api/auth/invitation/accept', { token: secondToken, name: 'On Time', password: 'a long enough secret' }));
    expect(fresh.status).toBe(200);
    const afterAccept = (await owner.get(`/api/projects/${project.id}/invitations`)).body.invitations;
    expect(afterAccept.map((i: { email: string }) => i.email)).toEqual([other]);
    expect((await owner.post(`/api/projects/${project.id}/invitations/${invited.userId}/resend`)).status).toBe(404);

    const withdrawnToken = linkToken(await waitForMail(other, 'invited you'));
    expect((await owner.delete(`/api/projects/${project.id}/invitations/${withdrawn.userId}`)).status).toBe(204);
    const refused = await new ApiClient(t.app).start().then((c) => c.post('/api/auth/invitation/accept', { token: withdrawnToken, name: 'Nope', password: 'a long enough secret' }));
    expect(refused.status).toBe(400);
    const members = (await owner.get(`/api/projects/${project.id}/members`)).body.members;
    expect(members.map((m: { email: string }) => m.email)).not.toContain(other);
    expect((await owner.get(`/api/projects/${project.id}/invitations`)).body.invitations).toEqual([]);
    expect((await owner.delete(`/api/projects/${project.id}/invitations/${withdrawn.userId}`)).status).toBe(404);
    expect((await owner.delete(`/api/projects/${project.id}/invitations/${colleague.id}`)).status).toBe(404);
    expect((await owner.delete(`/api/projects/${project.id}/invitations/abc`)).status).toBe(400);
    const again = await owner.post(`/api/projects/${project.id}/members`, { email: other, role: 'viewer' });
    expect(again.body.invited).toBe(true);
  });

  it('revoking an invitation keeps an account that another project still waits for', async () => {
    const first = (await owner.post('/api/projects', { name: 'First inviting project' })).body.project;
    const second = (await owner.post('/api/projects', { name: 'Second inviting project' })).body.project;
    const email = `twice.${Date.now()}@partner-lab.example`;
    const member = (await owner.post(`/api/projects/${first.id}/members`, { email, role: 'viewer' })).body.member;
    await owner.post(`/api/projects/${second.id}/members`, { email, role: 'reviewer' });
    const token = linkToken(await waitForMail(email, 'invited you'));
    expect((await owner.delete(`/api/projects/${first.id}/invitations/${member.userId}`)).status).toBe(204);

    const guest = await new ApiClient(t.app).start();
    const accepted = await guest.post('/api/auth/invitation/accept', { token, name: 'Twice Invited', password: 'a long enough secret' });
    expect(accepted.status).toBe(200);
    guest.csrfToken = accepted.body.csrfToken;
    expect((await guest.get(`/api/projects/${first.id}`)).status).toBe(404);
    expect((await guest.get(`/api/projects/${second.id}`)).body.project.myRole).toBe('reviewer');
  });

  it('never lets the last owner leave or be demoted', async () => {
    const project = (await owner.post('/api/projects', { name: 'Last owner project' })).body.project;
    const leave = await owner.delete(`/api/projects/${project.id}/members/${ownerUser.id}`);
    expect(leave.status).toBe(409);
    expect(leave.body.error).toMatch(/at least one owner/);
    const demote = await owner.patch(`/api/projects/${project.id}/members/${ownerUser.id}`, { role: 'viewer' });
    expect(demote.status).toBe(409);

    const second = await makeUser();
    await owner.post(`/api/projects/${project.id}/members`, { email: second.email, role: 'owner' });
    expect((await owner.delete(`/api/projects/${project.id}/members/${ownerUser.id}`)).status).toBe(204);
    expect((await owner.get(`/api/projects/${project.id}`)).status).toBe(404);
  });

  it('lets a non-owner leave but not remove others', async () => {
    const project = (await owner.post('/api/projects', { name: 'Leaving project' })).body.project;
    const a = await makeUser();
    const b = await makeUser();
    await owner.post(`/api/projects/${project.id}/members`, { email: a.email, role: 'designer' });
    await owner.post(`/api/projects/${project.id}/members`, { email: b.email, role: 'viewer' });
    const client = await signedInClient(t.app, a);
    expect((await client.delete(`/api/projects/${project.id}/members/${b.id}`)).status).toBe(403);
    expect((await client.delete(`/api/projects/${project.id}/members/${a.id}`)).status).toBe(204);
    expect((await client.get(`/api/projects/${project.id}`)).status).toBe(404);
  });
});
