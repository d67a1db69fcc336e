/**
 * What every request reads before its own work: its session, the signed-in account and its role on the
 * project. Kept in memory between requests (ModelReadCache) and dropped on every write of sessions, users,
 * memberships or projects, so a sign-out, a role change, a removal from a project or a disabled account
 * takes effect at the very next request.
 */
import type { InferAttributes } from 'sequelize';
import type { ProjectRole } from '../../../shared/roles';
import type { AppConfig } from '../../config';
import { ModelReadCache, type ModelReadCacheOptions } from '../../lib/model-read-cache';
import { MembershipModel } from '../projects/membership.model';
import { ProjectModel } from '../projects/project.model';
import { SessionModel } from './session.model';
import { UserModel } from '../users/user.model';

const OFF: ModelReadCacheOptions = { ttlMs: 0, maxEntries: 0 };

/** The enabled account of a user id (a session's `passport.user`); null when disabled or deleted. */
export const signedInUsers = new ModelReadCache<InferAttributes<UserModel> | null>(OFF);

/** A member's role on a project and the project's row; null when not a member. Keyed by user and project. */
export const projectRoles = new ModelReadCache<{ role: ProjectRole; project: InferAttributes<ProjectModel> } | null>(OFF);

/**
 * A session row's stored data (JSON text, parsed afresh for each request, which may change it) and expiry,
 * ms since the epoch; null when there is no such row. Keyed by session id.
 */
export const sessionRows = new ModelReadCache<{ data: string; expires: number } | null>(OFF);

export function configureAccessCaches(config: Pick<AppConfig, 'ACCESS_CACHE_SECONDS' | 'ACCESS_CACHE_ENTRIES'>) {
  const options = { ttlMs: config.ACCESS_CACHE_SECONDS * 1000, maxEntries: config.ACCESS_CACHE_ENTRIES };
  signedInUsers.configure(options);
  projectRoles.configure(options);
  sessionRows.configure(options);
}

/** Installs the hooks that clear the caches; after the models' `init` (createSequelize). */
export function watchAccessWrites() {
  for (const model of [UserModel, MembershipModel, ProjectModel]) {
    signedInUsers.watch(model);
    projectRoles.watch(model);
  }
  // The session store writes through SessionModel (sign-in, sign-out, the throttled expiry touch, the sweep).
  sessionRows.watch(SessionModel);
}
