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

/** A hash of nothing, compared against when the account does not exist so timing does not reveal it. */
const decoyHash = bcrypt.hashSync('phasewright-decoy-password', 10);

/** Returns the enabled user whose password matches, or null. */
export async function verifyCredentials(email: string, password: string): Promise<UserModel | null> {
  const user = await UserModel.findOne({ where: { email } });
  const ok = await bcrypt.compare(password, user?.passwordHash ?? decoyHash);
  if (!user || !user.passwordHash || !ok || user.disabledAt) return null;
  return user;
}

export async function findActiveUser(id: number): Promise<UserModel | null> {
  const user = await UserModel.findByPk(id);
  return user && !user.disabledAt ? user : null;
}

/** `findActiveUser` for a session's user, through the access cache: a fresh instance for every request. */
export async function findSignedInUser(id: number): Promise<UserModel | null> {
  const plain = await signedInUsers.get(String(id), async () => (await findActiveUser(id))?.get({ plain: true }) ?? null);
  return plain && UserModel.build(plain, { isNewRecord: false, raw: true });
}

export async function changePassword(user: UserModel, currentPassword: string, newPassword: string, cost: number) {
  if (!user.passwordHash || !(await bcrypt.compare(currentPassword, user.passwordHash))) {
    throw new AppError(400, 'Your current password is not correct', { currentPassword: 'Not correct' });
  }
  user.passwordHash = await hashPassword(newPassword, cost);
  await user.save();
}

export async function updateProfile(user: UserModel, name: string) {
  user.name = name;
  await user.save();
  return toUserDto(user);
}

export async function findUserByEmail(email: string) {
  return UserModel.findOne({ where: { email } });
}
