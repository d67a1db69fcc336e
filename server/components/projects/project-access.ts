import type { NextFunction, Request, Response } from 'express';
import { projectRoleAllows, type ProjectAbility, type ProjectRole } from '../../../shared/roles';
import { AppError } from '../../lib/app-error';
import { parseId } from '../../lib/validate';
import { projectRoles } from '../auth/access-cache';
import type { UserModel } from '../users/user.model';
import { MembershipModel } from './membership.model';
import { ProjectModel } from './project.model';

export interface ProjectAccess {
  project: ProjectModel;
  role: ProjectRole;
}

declare module 'express-serve-static-core' {
  interface Request {
    projectAccess?: ProjectAccess;
  }
}

/** A site admin acts as owner on every project; everyone else has their membership role or none. */
export async function effectiveRole(user: UserModel, projectId: number): Promise<ProjectRole | null> {
  if (user.siteRole === 'admin') return 'owner';
  const membership = await MembershipModel.findOne({ where: { projectId, userId: user.id } });
  return membership?.role ?? null;
}

const READS = new Set(['GET', 'HEAD', 'OPTIONS']);

/** The project and the user's effective role on it, in one query; null when either is missing. */
async function loadAccess(user: UserModel, projectId: number): Promise<ProjectAccess | null> {
  if (user.siteRole === 'admin') {
    const project = await ProjectModel.findByPk(projectId);
    return project && { project, role: 'owner' };
  }
  const membership = await MembershipModel.findOne({
    where: { projectId, userId: user.id },
    attributes: ['role'],
    include: [{ association: 'project', required: true }],
  });
  return membership?.project ? { project: membership.project, role: membership.role } : null;
}

/** `loadAccess` through the access cache, with a fresh project instance for every request. */
async function findAccess(user: UserModel, projectId: number): Promise<ProjectAccess | null> {
  const cached = await projectRoles.get(`${user.id}:${user.siteRole}:${projectId}`, async () => {
    const access = await loadAccess(user, projectId);
    return access && { role: access.role, project: access.project.get({ plain: true }) };
  });
  return cached && { role: cached.role, project: ProjectModel.build(cached.project, { isNewRecord: false, raw: true }) };
}

/**
 * Route guard for `/projects/:projectId/…`: 401 when signed out, 404 when the project does not exist or the
 * user is not a member (so project names never leak), 403 when the role lacks `ability`, 409 for any write to
 * an archived project (an archived project is read-only; `whenArchived: 'allow'` is for unarchiving).
 */
export function requireProject(ability: ProjectAbility, options: { whenArchived?: 'refuse' | 'allow' } = {}) {
  return async (req: Request, _res: Response, next: NextFunction) => {
    if (!req.user) throw new AppError(401, 'Sign in to continue');
    const projectId = parseId(req.params.projectId, 'projectId');
    const access = await findAccess(req.user, projectId);
    if (!access) throw new AppError(404, 'Project not found');
    if (!projectRoleAllows(access.role, ability)) {
      throw new AppError(403, `Your role on this project (${access.role}) does not allow this`);
    }
    if (access.project.archivedAt && !READS.has(req.method) && options.whenArchived !== 'allow') {
      throw new AppError(409, 'This project is archived and read-only — an owner can unarchive it to make changes');
    }
    req.projectAccess = access;
    next();
  };
}

export function projectAccess(req: Request): ProjectAccess {
  if (!req.projectAccess) throw new Error('requireProject() must run before this handler');
  return req.projectAccess;
}
