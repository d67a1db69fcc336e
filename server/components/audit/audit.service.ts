import { Op, type WhereOptions } from 'sequelize';
import pino from 'pino';
import type { AuditDetail, AuditEvent, AuditKind, AuditPage, AuditPerson, ListAuditQuery } from '../../../shared/schemas/audit';
import { ProjectModel } from '../projects/project.model';
import { UserModel } from '../users/user.model';
import { auditScope } from './audit-scope';
import { AuditEventModel } from './audit.model';

export interface AuditFacts {
  /** Who did it; default: the account signed in on this request. */
  actorId?: number | null;
  /** The account acted on (a changed role, a revoked token's owner, a failed sign-in's account). */
  subjectUserId?: number | null;
  projectId?: number | null;
  detail?: AuditDetail;
}

let fallbackLogger: pino.Logger | null = null;

/**
 * Records a security event: one structured log line (`audit: {...}`) and one row of `audit_events`. The
 * event has already happened when this is called, so a failure to store it is logged, never thrown.
 */
export async function recordAudit(kind: AuditKind, facts: AuditFacts = {}): Promise<void> {
  const scope = auditScope.getStore();
  const logger = scope?.logger ?? (fallbackLogger ??= pino());
  const event = {
    at: new Date(),
    kind,
    actorId: facts.actorId !== undefined ? facts.actorId : (scope?.actorId ?? null),
    subjectUserId: facts.subjectUserId ?? null,
    projectId: facts.projectId ?? null,
    address: scope?.address ?? null,
    detail: facts.detail ?? {},
  };
  logger.info({ audit: event }, `security event: ${kind}`);
  try {
    await AuditEventModel.create(event);
  } catch (err) {
    logger.error({ err, audit: event }, 'security event could not be stored');
  }
}

/**
 * The id of the account an e-mail belongs to, or null — also when the database cannot be asked (logged): like
 * storing the event, naming its subject never fails the request that caused it.
 */
async function accountIdOf(email: string): Promise<number | null> {
  if (!email) return null;
  try {
    return (await UserModel.findOne({ where: { email }, attributes: ['id'] }))?.id ?? null;
  } catch (err) {
    (auditScope.getStore()?.logger ?? (fallbackLogger ??= pino())).error({ err }, 'account of a security event could not be looked up');
    return null;
  }
}

/** A refused sign-in: the account the e-mail belongs to, if any, is the subject. */
export async function recordSignInFailure(email: string): Promise<void> {
  await recordAudit('sign-in-failed', { actorId: null, subjectUserId: await accountIdOf(email), detail: { email: email.slice(0, 254) } });
}

/**
 * A rate limiter starts refusing (`used` has just passed `limit`): one event per lockout, not one per refused
 * request, so a flood of attempts cannot flood the log.
 */
export async function recordLockout(limiter: string, email: string, usage: { used: number; limit: number } | undefined): Promise<void> {
  if (!usage || usage.used !== usage.limit + 1) return;
  await recordAudit('lockout', { subjectUserId: await accountIdOf(email), detail: { limiter, email: email.slice(0, 254), limit: usage.limit } });
}

/** A site admin changed an account: one event for a new site role, one for disabling or enabling it. */
export async function recordAccountChange(actorId: number, user: UserModel, before: { siteRole: string; disabled: boolean }): Promise<void> {
  if (user.siteRole !== before.siteRole) {
    await recordAudit('site-role-changed', { actorId, subjectUserId: user.id, detail: { from: before.siteRole, to: user.siteRole } });
  }
  const disabled = user.disabledAt != null;
  if (disabled !== before.disabled) await recordAudit(disabled ? 'account-disabled' : 'account-enabled', { actorId, subjectUserId: user.id });
}

/** Events newest first, one page, filtered by an account (as actor or subject) and by kind. */
export async function listAuditEvents(query: ListAuditQuery): Promise<AuditPage> {
  const where: WhereOptions<AuditEventModel> = {};
  if (query.kind) Object.assign(where, { kind: query.kind });
  if (query.userId) Object.assign(where, { [Op.or]: [{ actorId: query.userId }, { subjectUserId: query.userId }] });
  const { rows, count } = await AuditEventModel.findAndCountAll({
    where,
    order: [['id', 'DESC']],
    limit: query.pageSize,
    offset: (query.page - 1) * query.pageSize,
  });
  const userIds = [...new Set(rows.flatMap((r) => [r.actorId, r.subjectUserId]).filter((id): id is number => id !== null))];
  const projectIds = [...new Set(rows.map((r) => r.projectId).filter((id): id is number => id !== null))];
  const [users, projects] = await Promise.all([
    userIds.length ? UserModel.findAll({ where: { id: userIds }, attributes: ['id', 'name', 'email'] }) : [],
    projectIds.length ? ProjectModel.findAll({ where: { id: projectIds }, attributes: ['id', 'name'] }) : [],
  ]);
  const userById = new Map(users.map((u) => [u.id, u]));
  const projectName = new Map(projects.map((p) => [p.id, p.name]));
  const person = (id: number | null): AuditPerson | null => {
    if (id === null) return null;
    const user = userById.get(id);
    return { id, name: user?.name ?? null, email: user?.email ?? null };
  };
  const events: AuditEvent[] = rows.map((r) => ({
    id: r.id,
    at: r.at.toISOString(),
    kind: r.kind,
    actor: person(r.actorId),
    subject: person(r.subjectUserId),
    project: r.projectId === null ? null : { id: r.projectId, name: projectName.get(r.projectId) ?? null },
    address: r.address,
    detail: r.detail,
  }));
  return { events, total: count, page: query.page, pageSize: query.pageSize };
}
