import { Op } from 'sequelize';
import type { AccessToken, TokenScope } from '../../../shared/schemas/access';
import { AppError } from '../../lib/app-error';
import { hashToken, newToken } from '../../lib/tokens';
import { recordAudit } from '../audit/audit.service';
import type { UserModel } from '../users/user.model';
import { checkCurrentPassword, findActiveUser } from '../users/user.service';
import { AccessTokenModel } from './access-token.model';

/** Every personal access token starts with this, so a leaked one is recognisable in logs and scanners. */
export const ACCESS_TOKEN_PREFIX = 'pwt_';
/** lastUsedAt is written at most this often per token, so a busy script does not write on every request. */
const LAST_USED_RESOLUTION_MS = 60_000;

const iso = (d: Date | null | undefined) => (d ? d.toISOString() : null);

function toDto(row: AccessTokenModel): AccessToken {
  return {
    id: row.id,
    name: row.name,
    scope: row.scope,
    prefix: row.prefix,
    createdAt: row.createdAt.toISOString(),
    expiresAt: iso(row.expiresAt),
    lastUsedAt: iso(row.lastUsedAt),
    revokedAt: iso(row.revokedAt),
  };
}

export async function listAccessTokens(userId: number): Promise<AccessToken[]> {
  const rows = await AccessTokenModel.findAll({ where: { userId }, order: [['id', 'DESC']] });
  return rows.map(toDto);
}

/** Creates a token once the current password is confirmed; the secret is returned here once and never again (only its hash is kept). */
export async function createAccessToken(user: UserModel, input: { name: string; scope: TokenScope; expiresAt: string | null; currentPassword: string }) {
  await checkCurrentPassword(user, input.currentPassword);
  const { token: random } = newToken();
  const token = `${ACCESS_TOKEN_PREFIX}${random}`;
  const row = await AccessTokenModel.create({
    userId: user.id,
    name: input.name,
    scope: input.scope,
    tokenHash: hashToken(token),
    prefix: token.slice(0, 10),
    expiresAt: input.expiresAt ? new Date(input.expiresAt) : null,
  });
  await recordAudit('token-created', { subjectUserId: user.id, detail: { tokenId: row.id, name: row.name, scope: row.scope, expiresAt: iso(row.expiresAt) } });
  return { accessToken: toDto(row), token };
}

export async function revokeAccessToken(userId: number, tokenId: number): Promise<AccessToken> {
  const row = await AccessTokenModel.findOne({ where: { id: tokenId, userId } });
  if (!row) throw new AppError(404, `You have no access token ${tokenId}`);
  if (!row.revokedAt) {
    row.revokedAt = new Date();
    await row.save();
    await recordAudit('token-revoked', { subjectUserId: userId, detail: { tokenId: row.id, name: row.name, scope: row.scope } });
  }
  return toDto(row);
}

/** Revokes every live token of the account (after a password change or reset); returns how many. */
export async function revokeAllAccessTokens(userId: number): Promise<number> {
  const [count] = await AccessTokenModel.update({ revokedAt: new Date() }, { where: { userId, revokedAt: { [Op.is]: null } } });
  return count;
}

/**
 * The user and scope behind a bearer token, or a 401 naming why not: unknown, revoked, expired, or the
 * account is disabled. Records when the token was last used.
 */
export async function authenticateAccessToken(token: string): Promise<{ user: UserModel; scope: TokenScope; tokenId: number }> {
  const invalid = 'This access token is not valid — check it, or create a new one in Settings';
  if (!token.startsWith(ACCESS_TOKEN_PREFIX) || token.length > 200) throw new AppError(401, invalid);
  const row = await AccessTokenModel.findOne({ where: { tokenHash: hashToken(token) } });
  if (!row) throw new AppError(401, invalid);
  if (row.revokedAt) throw new AppError(401, 'This access token was revoked');
  if (row.expiresAt && row.expiresAt.getTime() <= Date.now()) throw new AppError(401, 'This access token has expired');
  const user = await findActiveUser(row.userId);
  if (!user) throw new AppError(401, 'The account of this access token is disabled');
  const now = Date.now();
  if (!row.lastUsedAt || now - row.lastUsedAt.getTime() >= LAST_USED_RESOLUTION_MS) {
    await AccessTokenModel.update({ lastUsedAt: new Date(now) }, { where: { id: row.id } });
  }
  return { user, scope: row.scope, tokenId: row.id };
}
