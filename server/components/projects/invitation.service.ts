import { Op } from 'sequelize';
import type { PendingInvitation } from '../../../shared/schemas/projects';
import type { AppContext } from '../../context';
import { AppError } from '../../lib/app-error';
import { recordAudit } from '../audit/audit.service';
import { invalidateInvitations, invitationsByOthers, latestInvitations, reissueInvitation } from '../auth/auth.service';
import { UserModel } from '../users/user.model';
import { MembershipModel } from './membership.model';
import { ProjectModel } from './project.model';

/** Members of the project whose account has no password yet, i.e. who have not accepted their invitation. */
export async function listPendingInvitations(projectId: number): Promise<PendingInvitation[]> {
  const memberships = await MembershipModel.findAll({
    where: { projectId },
    include: [{ model: UserModel, as: 'user', attributes: ['id', 'email'], where: { passwordHash: { [Op.is]: null } } }],
    order: [['createdAt', 'ASC'], ['id', 'ASC']],
  });
  const latest = await latestInvitations(memberships.map((m) => m.userId));
  return memberships.map((m) => {
    const invite = latest.get(m.userId);
    return {
      userId: m.userId,
      email: m.user!.email,
      role: m.role,
      invitedAt: (invite?.invitedAt ?? m.createdAt).toISOString(),
      expiresAt: invite?.expiresAt?.toISOString() ?? null,
    };
  });
}

async function findPendingMembership(projectId: number, userId: number) {
  const membership = await MembershipModel.findOne({
    where: { projectId, userId },
    include: [{ model: UserModel, as: 'user' }],
  });
  if (!membership || membership.user!.passwordHash) throw new AppError(404, 'No pending invitation for this person in this project');
  return membership;
}

/** Sends the invitation again with a new link; earlier links stop working. */
export async function resendInvitation(ctx: AppContext, projectId: number, userId: number, invitedBy: UserModel) {
  const membership = await findPendingMembership(projectId, userId);
  const project = await ProjectModel.findByPk(projectId, { attributes: ['name'] });
  await reissueInvitation(ctx, membership.user!, invitedBy, { name: project?.name ?? 'a project', role: membership.role });
  await recordAudit('invitation-resent', { subjectUserId: userId, projectId, detail: { email: membership.user!.email, role: membership.role } });
  const [pending] = (await listPendingInvitations(projectId)).filter((p) => p.userId === userId);
  return pending;
}

/**
 * Withdraws the invitation: the membership goes. The password-less account (and its links) goes too only when
 * the revoker created it by inviting it and nobody else is still waiting for it (no other project, no one
 * else's unused link); otherwise it stays with its links, which then no longer lead into this project.
 */
export async function revokeInvitation(ctx: AppContext, projectId: number, userId: number, revoker: UserModel) {
  const membership = await findPendingMembership(projectId, userId);
  const user = membership.user!;
  await ctx.sequelize.transaction(async (transaction) => {
    await membership.destroy({ transaction });
    if (user.invitedById !== revoker.id) return;
    const elsewhere = await MembershipModel.count({ where: { userId }, transaction });
    if (elsewhere > 0 || (await invitationsByOthers(userId, revoker.id, transaction)) > 0) return;
    await invalidateInvitations(userId, { transaction });
    await user.destroy({ transaction });
  });
  await recordAudit('invitation-revoked', { subjectUserId: userId, projectId, detail: { email: user.email, role: membership.role } });
  return { email: user.email };
}
