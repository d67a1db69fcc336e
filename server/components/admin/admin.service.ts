import type { UpdateUserInput } from '../../../shared/schemas/admin';
import { AppError } from '../../lib/app-error';
import { recordAccountChange } from '../audit/audit.service';
import { UserModel } from '../users/user.model';
import { toUserDto } from '../users/user.service';

export async function listUsers() {
  const users = await UserModel.findAll({ order: [['name', 'ASC'], ['id', 'ASC']] });
  return users.map(toUserDto);
}

/** Changes a site role or disables/enables an account; an admin cannot lock themselves or the site out. */
export async function updateUser(actor: UserModel, userId: number, input: UpdateUserInput) {
  const user = await UserModel.findByPk(userId);
  if (!user) throw new AppError(404, 'User not found');
  if (user.id === actor.id) {
    throw new AppError(409, 'You cannot change your own role or disable your own account — ask another admin');
  }
  const before = { siteRole: user.siteRole, disabled: user.disabledAt != null };
  if (input.siteRole !== undefined) user.siteRole = input.siteRole;
  if (input.disabled !== undefined) user.disabledAt = input.disabled ? (user.disabledAt ?? new Date()) : null;
  await user.save();
  await recordAccountChange(actor.id, user, before);
  return toUserDto(user);
}
