import { Router } from 'express';
import {
  addMemberSchema,
  changeMemberRoleSchema,
  createProjectSchema,
  listProjectsQuerySchema,
  updateProjectSchema,
} from '../../../shared/schemas/projects';
import type { AppContext } from '../../context';
import { AppError } from '../../lib/app-error';
import { parseId, parseInput } from '../../lib/validate';
import { currentUser, requireUser } from '../auth/auth.middleware';
import { recordMembershipActivity } from '../review/activity.service';
import { UserModel } from '../users/user.model';
import { listPendingInvitations, resendInvitation, revokeInvitation } from './invitation.service';
import { projectAccess, requireProject } from './project-access';
import { cachedList, projectLists } from '../../db/list-caches';
import {
  addMember,
  changeMemberRole,
  createProject,
  getProject,
  listMembers,
  listProjects,
  removeMember,
  setArchived,
  updateProject,
} from './project.service';

export function projectRoutes(ctx: AppContext) {
  const router = Router();

  router.get('/', requireUser, async (req, res) => {
    const query = parseInput(listProjectsQuerySchema, req.query, 'query');
    const user = currentUser(req);
    res.type('application/json').send(await cachedList(projectLists, user.id, query, async () => ({ projects: await listProjects(user, query) })));
  });

  router.post('/', requireUser, async (req, res) => {
    const input = parseInput(createProjectSchema, req.body);
    res.status(201).json({ project: await createProject(ctx, currentUser(req), input) });
  });

  router.get('/:projectId', requireProject('read'), async (req, res) => {
    const { project, role } = projectAccess(req);
    res.json({ project: await getProject(project.id, role) });
  });

  router.patch('/:projectId', requireProject('manage'), async (req, res) => {
    const { project, role } = projectAccess(req);
    const input = parseInput(updateProjectSchema, req.body);
    res.json({ project: await updateProject(project, role, input) });
  });

  router.post('/:projectId/archive', requireProject('manage'), async (req, res) => {
    const { project, role } = projectAccess(req);
    res.json({ project: await setArchived(project, role, true) });
  });

  router.post('/:projectId/unarchive', requireProject('manage', { whenArchived: 'allow' }), async (req, res) => {
    const { project, role } = projectAccess(req);
    res.json({ project: await setArchived(project, role, false) });
  });

  router.get('/:projectId/members', requireProject('read'), async (req, res) => {
    res.json({ members: await listMembers(projectAccess(req).project.id) });
  });

  router.post('/:projectId/members', requireProject('manage'), async (req, res) => {
    const input = parseInput(addMemberSchema, req.body);
    const added = await addMember(ctx, projectAccess(req).project.id, input, currentUser(req));
    await recordMembershipActivity(projectAccess(req).project.id, currentUser(req).id, 'member-added', added.member, input.role);
    res.status(201).json(added);
  });

  router.patch('/:projectId/members/:userId', requireProject('manage'), async (req, res) => {
    const { role } = parseInput(changeMemberRoleSchema, req.body);
    const userId = parseId(req.params.userId, 'userId');
    const member = await changeMemberRole(projectAccess(req).project.id, userId, role);
    await recordMembershipActivity(projectAccess(req).project.id, currentUser(req).id, 'member-role-changed', member, role);
    res.json({ member });
  });

  /** Owners remove anyone; every member may remove themselves (leave). */
  router.delete('/:projectId/members/:userId', requireProject('read'), async (req, res) => {
    const { project, role } = projectAccess(req);
    const userId = parseId(req.params.userId, 'userId');
    if (role !== 'owner' && userId !== currentUser(req).id) {
      throw new AppError(403, `Your role on this project (${role}) does not allow removing other members`);
    }
    const removed = await UserModel.findByPk(userId, { attributes: ['name'] });
    await removeMember(project.id, userId);
    await recordMembershipActivity(project.id, currentUser(req).id, 'member-removed', { name: removed?.name ?? `user ${userId}` });
    res.status(204).end();
  });

  router.get('/:projectId/invitations', requireProject('manage'), async (req, res) => {
    res.json({ invitations: await listPendingInvitations(projectAccess(req).project.id) });
  });

  router.post('/:projectId/invitations/:userId/resend', requireProject('manage'), async (req, res) => {
    const userId = parseId(req.params.userId, 'userId');
    res.json({ invitation: await resendInvitation(ctx, projectAccess(req).project.id, userId, currentUser(req)) });
  });

  router.delete('/:projectId/invitations/:userId', requireProject('manage'), async (req, res) => {
    const { project } = projectAccess(req);
    const userId = parseId(req.params.userId, 'userId');
    const revoked = await revokeInvitation(ctx, project.id, userId, currentUser(req));
    await recordMembershipActivity(project.id, currentUser(req).id, 'member-removed', { name: revoked.email });
    res.status(204).end();
  });

  return router;
}
