import { revokeAllAccessTokens } from '../access-tokens/access-token.service';
import { recordAudit } from '../audit/audit.service';
import type { UserModel } from '../users/user.model';
import { checkCurrentPassword, hashPassword } from '../users/user.service';

/**
 * Gives the account a new password and ends what the old one opened: every session signed in before now
 * stops being signed in (the caller signs the current one in again) and every access token is revoked.
 * Returns how many tokens were revoked, so the person can be told.
 */
export async function replacePassword(user: UserModel, newPassword: string, cost: number): Promise<{ revokedTokens: number }> {
  user.passwordHash = await hashPassword(newPassword, cost);
  user.credentialsChangedAt = new Date();
  await user.save();
  return { revokedTokens: await revokeAllAccessTokens(user.id) };
}

/** Changes the password after checking the current one (400 naming `currentPassword` otherwise). */
export async function changePassword(user: UserModel, currentPassword: string, newPassword: string, cost: number) {
  await checkCurrentPassword(user, currentPassword);
  const replaced = await replacePassword(user, newPassword, cost);
  await recordAudit('password-changed', { actorId: user.id, subjectUserId: user.id });
  return replaced;
}
