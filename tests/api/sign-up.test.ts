/**
 * Open sign-up (ALLOW_SIGNUP=true) answers the same for every address, so the form never tells whether an
 * address has an account or is disabled; only the address's owner learns more, by e-mail (issue: account
 * boundaries — "no answer reveals whether an address has an account or is disabled").
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { UserModel } from '../../server/components/users/user.model';
import { allMail, linkToken, waitForMail } from '../support/mailbox';
import { ApiClient, createTestApp, makeUser, signedInClient, type TestApp } from '../support/test-app';

let t: TestApp;
beforeAll(async () => {
  t = await createTestApp({ ALLOW_SIGNUP: 'true' });
});
afterAll(async () => {
  await t?.close();
});

const unique = (name: string) => `${name}.${Date.now()}.${Math.floor(Math.random() * 1e6)}@lab.example`;

/** A sign-up's answer with the address taken out: what an onlooker could compare between addresses. */
async function signUpAnswer(email: string) {
  const res = await (await new ApiClient(t.app).start()).post('/api/auth/sign-up', { email, name: 'Someone New' });
  return { status: res.status, body: JSON.stringify(res.body).replaceAll(email, '<address>'), cookie: res.headers['set-cookie'] ?? null };
}

describe('open sign-up', () => {
  it('mails a new address a link to choose its password; the account signs in only after that', async () => {
    const email = unique('newcomer');
    const answer = await signUpAnswer(email);
    expect(answer.status).toBe(202);
    expect(answer.body).toContain('<address>');
    const guest = await new ApiClient(t.app).start();
    expect((await guest.post('/api/auth/sign-in', { email, password: 'chosen later on' })).status).toBe(401);
    const mail = await waitForMail(email, 'finish creating your account');
    const accepted = await guest.post('/api/auth/invitation/accept', { token: linkToken(mail), name: 'Newcomer', password: 'chosen later on' });
    expect(accepted.status).toBe(200);
    expect(accepted.body.user).toMatchObject({ email, name: 'Newcomer' });
  });

  it('answers an address in use, a disabled one and a new one alike, and mails only the owner of the one in use', async () => {
    const inUse = await makeUser({ name: 'Long Standing' });
    const disabled = await makeUser({ name: 'Switched Off' });
    await UserModel.update({ disabledAt: new Date() }, { where: { id: disabled.id } });
    const answers = [await signUpAnswer(unique('fresh')), await signUpAnswer(inUse.email), await signUpAnswer(disabled.email)];
    expect(answers[1]).toEqual(answers[0]);
    expect(answers[2]).toEqual(answers[0]);

    const notice = await waitForMail(inUse.email, 'you already have an account');
    expect(notice.text).toContain('/forgot-password');
    // The account in use keeps its password and its name.
    expect((await signedInClient(t.app, inUse)).csrfToken).not.toBe('');
    expect((await UserModel.findByPk(inUse.id))!.name).toBe('Long Standing');
    // A later mail to another address has arrived, and still nothing went to the disabled account.
    await signUpAnswer(unique('later'));
    await new Promise((r) => setTimeout(r, 500));
    expect((await allMail()).some((m) => m.to.some((to) => to.address.toLowerCase() === disabled.email.toLowerCase()))).toBe(false);
  });

  it('mails a fresh link to an account that never chose its password, without taking another name', async () => {
    const admin = await makeUser({ siteRole: 'admin' });
    const email = unique('invited');
    const adminClient = await signedInClient(t.app, admin);
    expect((await adminClient.post('/api/admin/users', { email, name: 'Invited First', siteRole: 'member' })).status).toBe(201);
    const answer = await signUpAnswer(email);
    expect(answer.status).toBe(202);
    const mail = await waitForMail(email, 'finish creating your account');
    expect(mail.text).toContain('Hello Invited First');
    const guest = await new ApiClient(t.app).start();
    expect((await guest.post('/api/auth/invitation/accept', { token: linkToken(mail), name: 'Invited First', password: 'a password of mine' })).status).toBe(200);
  });
});
