import bcrypt from 'bcryptjs';
import type { User } from '../../../shared/schemas/auth';
import { AppError } from '../../lib/app-error';
import { signedInUsers } from '../auth/access-cache';
import { UserModel } from './user.model';

export function toUserDto(user: UserModel): User {
  return {
    id: user.id,
    email: user.email,
    name: user.name,
    siteRole: user.siteRole,
    disabled: user.disabledAt != null,
    createdAt: user.createdAt.toISOString(),
    lastSignInAt: user.lastSignInAt ? user.lastSignInAt.toISOString() : null,
  };
}

export async function hashPassword(password: string, cost: number): Promise<string> {
  return bcrypt.hash(password, cost);
}

const decoys = new Map<number, string>();
/**
 * A hash of nothing at the cost new passwords get, compared against when the account does not exist or has no
 * password yet, so the answer takes as long as for a real account and timing does not reveal it.
 */
export function decoyHash(cost: number): string {
  let hash = decoys.get(cost);
  if (!hash) {
    hash = bcrypt.hashSync('phasewright-decoy-password', cost);
    decoys.set(cost, hash);
  }
  return hash;
}

/** Returns the enabled user whose password matches, or null; as slow for unknown addresses as for known ones. */
export async function verifyCredentials(email: string, password: string, cost: number): Promise<UserModel | null> {
  const user = await UserModel.findOne({ where: { email } });
  const ok = await bcrypt.compare(password, user?.passwordHash ?? decoyHash(cost));
  if (!user || !user.passwordHash || !ok || user.disabledAt) return null;
  return user;
}

/**
 * The enabled user of a session signed in at `signedInAt` (ms), or null when the session is older than
 * `maxAgeMs` or began before the account's last password change.
 */
export async function findSessionUser(id: number, signedInAt: number, maxAgeMs: number): Promise<UserModel | null> {
  if (!(Date.now() - signedInAt <= maxAgeMs)) return null;
  const user = await findSignedInUser(id);
  if (!user) return null;
  if (user.credentialsChangedAt && signedInAt < user.credentialsChangedAt.getTime()) return null;
  return user;
}

/** 400 naming the field unless `password` is the user's current password. */
export async function checkCurrentPassword(user: UserModel, password: string) {
  if (!user.passwordHash || !(await bcrypt.compare(password, user.passwordHash))) {
    throw new AppError(400, 'Your current password is not correct', { currentPassword: 'Not correct' });
  }
}

export async function findActiveUser(id: number): Promise<UserModel | null> {
  const user = await UserModel.findByPk(id);
  return user && !user.disabledAt ? user : null;
}

/** `findActiveUser` for a session's user, through the access cache: a fresh instance for every request. */
async function findSignedInUser(id: number): Promise<UserModel | null> {
  const plain = await signedInUsers.get(String(id), async () => (await findActiveUser(id))?.get({ plain: true }) ?? null);
  return plain && UserModel.build(plain, { isNewRecord: false, raw: true });
}

export async function updateProfile(user: UserModel, name: string) {
  user.name = name;
  await user.save();
  return toUserDto(user);
}

export async function findUserByEmail(email: string) {
  return UserModel.findOne({ where: { email } });
}
