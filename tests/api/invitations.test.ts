/**
 * Invitations with sign-up closed (the default): only a site admin brings new accounts in through a project;
 * revoking or resending touches only the revoker's own links and accounts; an unknown and a disabled address
 * get the same answer.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { UserModel } from '../../server/components/users/user.model';
import { allMail, linkToken, waitForMail } from '../support/mailbox';
import { ApiClient, createTestApp, makeUser, signedInClient, type TestApp } from '../support/test-app';

let t: TestApp;
let owner: ApiClient;
let admin: ApiClient;
beforeAll(async () => {
  t = await createTestApp();
  owner = await signedInClient(t.app, await makeUser({ name: 'Member Owner' }));
  admin = await signedInClient(t.app, await makeUser({ name: 'Site Admin', siteRole: 'admin' }));
});
afterAll(async () => {
  await t?.close();
});

let n = 0;
const freshEmail = (what: string) => `${what}.${Date.now()}.${++n}@partner-lab.example`;
const newProject = async (name: string) => (await owner.post('/api/projects', { name })).body.project as { id: number };

async function accept(token: string) {
  return (await new ApiClient(t.app).start()).post('/api/auth/invitation/accept', { token, name: 'Invited Person', password: 'a long enough secret' });
}

describe('who may create accounts through a project', () => {
  it('a member adding an unknown e-mail creates no account and sends no mail; a disabled address gets the same answer', async () => {
    const project = await newProject('Closed sign-up project');
    const email = freshEmail('stranger');
    const unknown = await owner.post(`/api/projects/${project.id}/members`, { email, role: 'viewer' });
    expect(unknown.status).toBe(403);
    expect(unknown.body.error).toMatch(/only a site admin can invite someone new/);
    expect(await UserModel.count({ where: { email } })).toBe(0);
    await new Promise((r) => setTimeout(r, 300));
    expect((await allMail()).some((m) => m.to.some((to) => to.address === email))).toBe(false);

    const disabled = await makeUser();
    await UserModel.update({ disabledAt: new Date() }, { where: { id: disabled.id } });
    const refused = await owner.post(`/api/projects/${project.id}/members`, { email: disabled.email, role: 'viewer' });
    expect({ status: refused.status, body: refused.body }).toEqual({ status: unknown.status, body: unknown.body });
  });

  it('a site admin adding an unknown e-mail invites a new account', async () => {
    const project = await newProject('Admin invites here');
    const email = freshEmail('newcomer');
    const added = await admin.post(`/api/projects/${project.id}/members`, { email, role: 'reviewer' });
    expect(added.status).toBe(201);
    expect(added.body.invited).toBe(true);
    expect((await accept(linkToken(await waitForMail(email, 'invited you')))).status).toBe(200);
  });
});

describe('revoking and resending touch only one’s own', () => {
  it('revoking keeps an account a site admin invited, and the admin’s link still works', async () => {
    const email = freshEmail('admin-invited');
    expect((await admin.post('/api/admin/users', { email, name: 'Admin Invited', siteRole: 'member' })).status).toBe(201);
    const adminLink = linkToken(await waitForMail(email, 'invited you'));
    const project = await newProject('Revoking project');
    const member = (await owner.post(`/api/projects/${project.id}/members`, { email, role: 'viewer' })).body.member;
    expect((await owner.get(`/api/projects/${project.id}/invitations`)).body.invitations).toHaveLength(1);

    expect((await owner.delete(`/api/projects/${project.id}/invitations/${member.userId}`)).status).toBe(204);
    expect(await UserModel.count({ where: { email } })).toBe(1);
    expect((await owner.get(`/api/projects/${project.id}/members`)).body.members.map((m: { email: string }) => m.email)).not.toContain(email);
    expect((await accept(adminLink)).status).toBe(200);
  });

  it('revoking deletes the password-less account the revoker created when nobody else waits for it', async () => {
    const project = await newProject('Admin revokes own');
    const email = freshEmail('own-invitee');
    const member = (await admin.post(`/api/projects/${project.id}/members`, { email, role: 'viewer' })).body.member;
    const link = linkToken(await waitForMail(email, 'invited you'));
    expect((await admin.delete(`/api/projects/${project.id}/invitations/${member.userId}`)).status).toBe(204);
    expect(await UserModel.count({ where: { email } })).toBe(0);
    expect((await accept(link)).status).toBe(400);
  });

  it('resending replaces only the resender’s link; a site admin’s earlier link keeps working', async () => {
    const email = freshEmail('resent');
    await admin.post('/api/admin/users', { email, name: 'Twice Linked', siteRole: 'member' });
    const adminLink = linkToken(await waitForMail(email, 'invited you'));
    const project = await newProject('Resending project');
    const member = (await owner.post(`/api/projects/${project.id}/members`, { email, role: 'reviewer' })).body.member;
    const resent = await owner.post(`/api/projects/${project.id}/invitations/${member.userId}/resend`);
    expect(resent.status).toBe(200);
    const mails = async () => (await allMail()).filter((m) => m.to.some((to) => to.address === email));
    await expect.poll(async () => (await mails()).length).toBe(2);
    const ownerLink = linkToken((await mails())[1]);
    expect(ownerLink).not.toBe(adminLink);
    expect((await accept(adminLink)).status).toBe(200);
  });
});
