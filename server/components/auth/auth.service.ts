import { Op, type Transaction } from 'sequelize';
import type { AppContext } from '../../context';
import { AppError } from '../../lib/app-error';
import { hashToken, newToken } from '../../lib/tokens';
import { recordAudit } from '../audit/audit.service';
import { UserModel } from '../users/user.model';
import { hashPassword } from '../users/user.service';
import { replacePassword } from './credentials.service';
import { AuthTokenModel, type AuthTokenPurpose } from './auth-token.model';

const RESET_LIFETIME_MS = 60 * 60 * 1000;
const INVITE_LIFETIME_MS = 7 * 24 * 60 * 60 * 1000;

async function issueToken(userId: number, purpose: AuthTokenPurpose, lifetimeMs: number, createdById: number | null = null): Promise<string> {
  const { token, hash } = newToken();
  await AuthTokenModel.create({ userId, purpose, tokenHash: hash, expiresAt: new Date(Date.now() + lifetimeMs), createdById });
  return token;
}

/** Finds a usable token (right purpose, unused, unexpired) and marks it used, atomically. */
async function consumeToken(ctx: AppContext, token: string, purpose: AuthTokenPurpose): Promise<UserModel> {
  return ctx.sequelize.transaction(async (transaction) => {
    const row = await AuthTokenModel.findOne({
      where: { tokenHash: hashToken(token), purpose },
      lock: transaction.LOCK.UPDATE,
      transaction,
    });
    const expired = row && row.expiresAt.getTime() < Date.now();
    if (!row || row.usedAt || expired) {
      const what = purpose === 'reset' ? 'reset link' : 'invitation link';
      throw new AppError(400, `This ${what} is invalid, already used or expired — ask for a new one`);
    }
    const user = await UserModel.findByPk(row.userId, { transaction });
    if (!user || user.disabledAt) throw new AppError(400, 'This account is disabled');
    row.usedAt = new Date();
    await row.save({ transaction });
    await AuthTokenModel.update(
      { usedAt: new Date() },
      { where: { userId: user.id, purpose, usedAt: { [Op.is]: null } }, transaction },
    );
    return user;
  });
}

export async function requestPasswordReset(ctx: AppContext, email: string) {
  const user = await UserModel.findOne({ where: { email } });
  if (!user || user.disabledAt) return;
  const token = await issueToken(user.id, 'reset', RESET_LIFETIME_MS);
  await recordAudit('password-reset-requested', { subjectUserId: user.id });
  const link = `${ctx.config.publicUrl}/reset-password?token=${token}`;
  ctx.mailer.enqueue({
    to: user.email,
    subject: 'Phasewright: set a new password',
    text: [
      `Hello ${user.name},`,
      '',
      'Someone (hopefully you) asked to reset the password of your Phasewright account.',
      `Open this link within one hour to choose a new one:`,
      link,
      '',
      'If you did not ask for this, ignore this message; your password stays as it is.',
    ].join('\n'),
  });
}

/** Sets the new password of a reset link's account; its other sessions end and its access tokens are revoked. */
export async function resetPassword(ctx: AppContext, token: string, password: string) {
  const user = await consumeToken(ctx, token, 'reset');
  const { revokedTokens } = await replacePassword(user, password, ctx.config.BCRYPT_COST);
  await recordAudit('password-reset', { actorId: user.id, subjectUserId: user.id });
  return { user, revokedTokens };
}

export interface InvitationContext {
  name: string;
  role: string;
}

function mailInvitation(ctx: AppContext, user: UserModel, invitedBy: UserModel, token: string, project?: InvitationContext) {
  ctx.mailer.enqueue({
    to: user.email,
    subject: `${invitedBy.name} invited you to Phasewright`,
    text: [
      `Hello ${user.name},`,
      '',
      project
        ? `${invitedBy.name} invited you to the Phasewright project "${project.name}" as ${project.role}.`
        : `${invitedBy.name} created a Phasewright account for you.`,
      'Open this link within seven days to choose your password and sign in:',
      `${ctx.config.publicUrl}/welcome?token=${token}`,
    ].join('\n'),
  });
}

/** Creates an account without a password and mails its owner a link to choose one. */
export async function inviteUser(
  ctx: AppContext,
  input: { email: string; name: string; siteRole: 'admin' | 'member' },
  invitedBy: UserModel,
  project?: InvitationContext,
) {
  if (await UserModel.findOne({ where: { email: input.email } })) {
    throw new AppError(409, 'An account with this e-mail already exists', { email: 'Already registered' });
  }
  const user = await UserModel.create({ ...input, passwordHash: null, invitedById: invitedBy.id });
  const token = await issueToken(user.id, 'invite', INVITE_LIFETIME_MS, invitedBy.id);
  mailInvitation(ctx, user, invitedBy, token, project);
  await recordAudit('invitation-sent', { actorId: invitedBy.id, subjectUserId: user.id, detail: { email: user.email, siteRole: user.siteRole, project: project?.name ?? null } });
  return user;
}

/**
 * Marks unused invitation links of this account as used, so they no longer work: those `issuedBy` one person
 * (their own links), or every one.
 */
export async function invalidateInvitations(userId: number, options: { issuedBy?: number; transaction?: Transaction } = {}) {
  const where = { userId, purpose: 'invite' as const, usedAt: { [Op.is]: null }, ...(options.issuedBy === undefined ? {} : { createdById: options.issuedBy }) };
  await AuthTokenModel.update({ usedAt: new Date() }, { where, transaction: options.transaction });
}

/** Unused, unexpired invitation links of the account issued by anyone but `person`. */
export async function invitationsByOthers(userId: number, person: number, transaction?: Transaction): Promise<number> {
  return AuthTokenModel.count({
    where: {
      userId,
      purpose: 'invite',
      usedAt: { [Op.is]: null },
      expiresAt: { [Op.gt]: new Date() },
      [Op.or]: [{ createdById: { [Op.is]: null } }, { createdById: { [Op.ne]: person } }],
    },
    transaction,
  });
}

/** Replaces the inviter's own links to the account with a fresh one and mails it; other people's links keep working. */
export async function reissueInvitation(ctx: AppContext, user: UserModel, invitedBy: UserModel, project: InvitationContext) {
  if (user.passwordHash) throw new AppError(409, 'This person has already accepted the invitation');
  await invalidateInvitations(user.id, { issuedBy: invitedBy.id });
  const token = await issueToken(user.id, 'invite', INVITE_LIFETIME_MS, invitedBy.id);
  mailInvitation(ctx, user, invitedBy, token, project);
}

/** The newest invitation link of each account: when it was sent and until when it works (null once used). */
export async function latestInvitations(userIds: number[]) {
  const rows = userIds.length
    ? await AuthTokenModel.findAll({ where: { userId: { [Op.in]: userIds }, purpose: 'invite' }, order: [['createdAt', 'DESC'], ['id', 'DESC']] })
    : [];
  const latest = new Map<number, { invitedAt: Date; expiresAt: Date | null }>();
  for (const row of rows) {
    if (!latest.has(row.userId)) latest.set(row.userId, { invitedAt: row.createdAt, expiresAt: row.usedAt ? null : row.expiresAt });
  }
  return latest;
}

export async function acceptInvitation(ctx: AppContext, token: string, name: string, password: string) {
  const user = await consumeToken(ctx, token, 'invite');
  user.name = name;
  await replacePassword(user, password, ctx.config.BCRYPT_COST);
  await recordAudit('invitation-accepted', { actorId: user.id, subjectUserId: user.id });
  return user;
}

/**
 * Open sign-up. Every address gets the same answer (the route's 202) and only its owner learns more, by
 * e-mail, so the form never tells whether an address has an account:
 * - a new address: an account without a password and a link to choose one (the invitation page), valid
 *   seven days;
 * - an account that never chose a password (invited, or signed up without finishing): a fresh link;
 * - an account in use: a note that it exists, with the sign-in and reset pages;
 * - a disabled account: nothing.
 */
export async function signUp(ctx: AppContext, input: { email: string; name: string }) {
  if (!ctx.config.ALLOW_SIGNUP) throw new AppError(403, 'Open sign-up is turned off here — ask an admin for an invitation');
  const existing = await UserModel.findOne({ where: { email: input.email } });
  if (existing?.disabledAt) return;
  if (existing?.passwordHash) {
    ctx.mailer.enqueue({
      to: existing.email,
      subject: 'Phasewright: you already have an account',
      text: [
        `Hello ${existing.name},`,
        '',
        'Someone (hopefully you) asked to create a Phasewright account with this e-mail, which already has one.',
        `Sign in: ${ctx.config.publicUrl}/sign-in`,
        `Forgot the password? Choose a new one: ${ctx.config.publicUrl}/forgot-password`,
        '',
        'If it was not you, ignore this message; nothing has changed.',
      ].join('\n'),
    });
    return;
  }
  const user = existing ?? (await UserModel.create({ email: input.email, name: input.name, passwordHash: null, invitedById: null }));
  const token = await issueToken(user.id, 'invite', INVITE_LIFETIME_MS, null);
  ctx.mailer.enqueue({
    to: user.email,
    subject: 'Phasewright: finish creating your account',
    text: [
      `Hello ${user.name},`,
      '',
      'Open this link within seven days to choose your password and sign in:',
      `${ctx.config.publicUrl}/welcome?token=${token}`,
      '',
      'If you did not ask for an account, ignore this message; none is used without this link.',
    ].join('\n'),
  });
}
