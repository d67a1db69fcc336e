import { Op, literal } from 'sequelize';
import type { ProjectRole } from '../../../shared/roles';
import type { ListProjectsQuery, Member, Project } from '../../../shared/schemas/projects';
import type { AppContext } from '../../context';
import { select } from '../../db/select';
import { AppError } from '../../lib/app-error';
import { recordAudit } from '../audit/audit.service';
import { inviteUser } from '../auth/auth.service';
import { UserModel } from '../users/user.model';
import { MembershipModel } from './membership.model';
import { ProjectModel } from './project.model';

const memberCount = literal('(SELECT COUNT(*) FROM project_members pm WHERE pm.project_id = `Project`.`id`)');

function toProjectDto(project: ProjectModel, myRole: ProjectRole | null): Project {
  const createdBy = project.createdBy;
  return {
    id: project.id,
    name: project.name,
    description: project.description,
    archived: project.archivedAt != null,
    createdAt: project.createdAt.toISOString(),
    updatedAt: project.updatedAt.toISOString(),
    memberCount: Number(project.get('memberCount') ?? 0),
    myRole,
    createdBy: createdBy ? { id: createdBy.id, name: createdBy.name } : null,
  };
}

function toMemberDto(m: MembershipModel): Member {
  return { userId: m.userId, name: m.user!.name, email: m.user!.email, role: m.role, addedAt: m.createdAt.toISOString() };
}

const PROJECT_SORT_COLUMNS: Record<ListProjectsQuery['sort'], string> = {
  name: 'p.name',
  updatedAt: 'p.updated_at',
  createdAt: 'p.created_at',
  memberCount: 'memberCount',
};

/**
 * Projects the user belongs to (every project for a site admin), filtered and sorted: one SELECT (`select`),
 * as the projects page and the dashboard read it on every view.
 */
export async function listProjects(user: UserModel, query: ListProjectsQuery): Promise<Project[]> {
  const isAdmin = user.siteRole === 'admin';
  const where: string[] = [];
  const params: unknown[] = [user.id];
  if (!isAdmin) where.push('m.role IS NOT NULL');
  if (query.status === 'active') where.push('p.archived_at IS NULL');
  if (query.status === 'archived') where.push('p.archived_at IS NOT NULL');
  if (query.q) {
    const like = `%${query.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
    where.push('(p.name LIKE ? OR p.description LIKE ?)');
    params.push(like, like);
  }
  // Column and direction come from closed lists (the query schema), never from the request's text.
  const dir = query.dir === 'asc' ? 'ASC' : 'DESC';
  const rows = await select<{
    id: number;
    name: string;
    description: string;
    archivedAt: Date | null;
    createdAt: Date;
    updatedAt: Date;
    memberCount: number | bigint;
    myRole: ProjectRole | null;
    createdById: number | null;
    createdByName: string | null;
  }>(
    `SELECT p.id, p.name, p.description, p.archived_at AS archivedAt, p.created_at AS createdAt, p.updated_at AS updatedAt,
       (SELECT COUNT(*) FROM project_members pm WHERE pm.project_id = p.id) AS memberCount, m.role AS myRole,
       u.id AS createdById, u.name AS createdByName
     FROM projects p LEFT JOIN project_members m ON m.project_id = p.id AND m.user_id = ? LEFT JOIN users u ON u.id = p.created_by_id
     ${where.length ? `WHERE ${where.join(' AND ')}` : ''}
     ORDER BY ${PROJECT_SORT_COLUMNS[query.sort]} ${dir}, p.id ASC LIMIT 500`,
    params,
  );
  return rows.map((p) => ({
    id: p.id,
    name: p.name,
    description: p.description,
    archived: p.archivedAt !== null,
    createdAt: p.createdAt.toISOString(),
    updatedAt: p.updatedAt.toISOString(),
    memberCount: Number(p.memberCount),
    myRole: isAdmin ? 'owner' : p.myRole,
    createdBy: p.createdById !== null ? { id: p.createdById, name: p.createdByName ?? '' } : null,
  }));
}

export async function getProject(projectId: number, role: ProjectRole): Promise<Project> {
  const project = await ProjectModel.findByPk(projectId, {
    attributes: { include: [[memberCount, 'memberCount']] },
    include: [{ model: UserModel, as: 'createdBy', attributes: ['id', 'name'] }],
  });
  if (!project) throw new AppError(404, 'Project not found');
  return toProjectDto(project, role);
}

export async function createProject(ctx: AppContext, user: UserModel, input: { name: string; description: string }) {
  const project = await ctx.sequelize.transaction(async (transaction) => {
    const created = await ProjectModel.create({ ...input, createdById: user.id }, { transaction });
    await MembershipModel.create({ projectId: created.id, userId: user.id, role: 'owner' }, { transaction });
    return created;
  });
  return getProject(project.id, 'owner');
}

export async function updateProject(project: ProjectModel, role: ProjectRole, input: { name?: string; description?: string }) {
  if (input.name !== undefined) project.name = input.name;
  if (input.description !== undefined) project.description = input.description;
  await project.save();
  return getProject(project.id, role);
}

export async function setArchived(project: ProjectModel, role: ProjectRole, archived: boolean) {
  project.archivedAt = archived ? new Date() : null;
  await project.save();
  return getProject(project.id, role);
}

export async function listMembers(projectId: number): Promise<Member[]> {
  const members = await MembershipModel.findAll({
    where: { projectId },
    include: [{ model: UserModel, as: 'user', attributes: ['id', 'name', 'email'] }],
    order: [['createdAt', 'ASC'], ['id', 'ASC']],
  });
  return members.map(toMemberDto);
}

async function findMembership(projectId: number, userId: number) {
  const membership = await MembershipModel.findOne({
    where: { projectId, userId },
    include: [{ model: UserModel, as: 'user', attributes: ['id', 'name', 'email'] }],
  });
  if (!membership) throw new AppError(404, 'This person is not a member of the project');
  return membership;
}

async function assertOwnerRemains(projectId: number, leavingUserId: number) {
  const owners = await MembershipModel.count({ where: { projectId, role: 'owner', userId: { [Op.ne]: leavingUserId } } });
  if (owners === 0) {
    throw new AppError(409, 'A project needs at least one owner — make someone else owner first');
  }
}

/**
 * Who may bring a new account into the site by adding an unknown e-mail to a project: a site admin, or anyone
 * while open sign-up is on (they could sign the person up anyway).
 */
function mayCreateAccounts(ctx: AppContext, person: UserModel): boolean {
  return ctx.config.ALLOW_SIGNUP || person.siteRole === 'admin';
}

/**
 * Adds the account with this e-mail to the project. An e-mail without an account gets one (no password yet)
 * and an invitation mail when the adder may create accounts; the membership waits for them, so they see the
 * project once they accept. An unknown and a disabled address get the same refusal, so the answer never says
 * which it was.
 */
export async function addMember(ctx: AppContext, projectId: number, input: { email: string; role: ProjectRole }, invitedBy: UserModel) {
  let user = await UserModel.findOne({ where: { email: input.email } });
  let invited = false;
  // Site admins manage accounts and see them all; to anyone else a disabled account looks like none.
  if (user?.disabledAt && invitedBy.siteRole === 'admin') {
    throw new AppError(409, 'This account is disabled — enable it under Accounts first', { email: 'Account disabled' });
  }
  if (user?.disabledAt || (!user && !mayCreateAccounts(ctx, invitedBy))) {
    throw new AppError(
      403,
      'This e-mail cannot be added: only people with an active account can be, and only a site admin can invite someone new — ask one to invite this address',
      { email: 'No active account can be added for this address' },
    );
  }
  if (!user) {
    const project = await ProjectModel.findByPk(projectId, { attributes: ['name'] });
    const name = input.email.split('@')[0].slice(0, 80) || input.email.slice(0, 80);
    user = await inviteUser(ctx, { email: input.email, name, siteRole: 'member' }, invitedBy, { name: project?.name ?? 'a project', role: input.role });
    invited = true;
  }
  if (await MembershipModel.findOne({ where: { projectId, userId: user.id } })) {
    throw new AppError(409, 'This person is already a member', { email: 'Already a member' });
  }
  await MembershipModel.create({ projectId, userId: user.id, role: input.role });
  await recordAudit('project-role-changed', { subjectUserId: user.id, projectId, detail: { from: null, to: input.role } });
  return { member: toMemberDto(await findMembership(projectId, user.id)), invited };
}

export async function changeMemberRole(projectId: number, userId: number, role: ProjectRole) {
  const membership = await findMembership(projectId, userId);
  if (membership.role === 'owner' && role !== 'owner') await assertOwnerRemains(projectId, userId);
  const from = membership.role;
  membership.role = role;
  await membership.save();
  await recordAudit('project-role-changed', { subjectUserId: userId, projectId, detail: { from, to: role } });
  return toMemberDto(membership);
}

export async function removeMember(projectId: number, userId: number) {
  const membership = await findMembership(projectId, userId);
  if (membership.role === 'owner') await assertOwnerRemains(projectId, userId);
  await membership.destroy();
  await recordAudit('project-role-changed', { subjectUserId: userId, projectId, detail: { from: membership.role, to: null } });
}
