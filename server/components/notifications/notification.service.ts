import { Op } from 'sequelize';
import type { Notification, NotificationKind, NotificationPreferences } from '../../../shared/schemas/review';
import type { AppContext } from '../../context';
import { select } from '../../db/select';
import { AppError } from '../../lib/app-error';
import { MembershipModel } from '../projects/membership.model';
import { ProjectModel } from '../projects/project.model';
import { RunModel } from '../runs/run.model';
import { UserModel } from '../users/user.model';
import { NotificationModel, NotificationPreferenceModel } from './notification.model';

export interface NotifyInput {
  userId: number;
  projectId: number;
  kind: NotificationKind;
  runId: number | null;
  threadId: number | null;
  actorId: number | null;
  /** One line for the in-app list, e.g. "Noor Haddad mentioned you on run #4". */
  text: string;
}

/** The link a mail carries: straight to the pin when there is a thread, else to the run. */
export function reviewLink(publicUrl: string, projectId: number, runId: number, threadId: number | null): string {
  return `${publicUrl}/projects/${projectId}/runs/${runId}${threadId ? `?thread=${threadId}` : ''}`;
}

export async function getPreferences(userId: number): Promise<NotificationPreferences> {
  const row = await NotificationPreferenceModel.findByPk(userId);
  return { email: { mention: row?.emailMention ?? true, reply: row?.emailReply ?? true, 'run-finished': row?.emailRunFinished ?? true } };
}

export async function setPreferences(userId: number, prefs: NotificationPreferences): Promise<NotificationPreferences> {
  await NotificationPreferenceModel.upsert({
    userId,
    emailMention: prefs.email.mention,
    emailReply: prefs.email.reply,
    emailRunFinished: prefs.email['run-finished'],
  });
  return getPreferences(userId);
}

/**
 * Records in-app notifications and, for each recipient whose preferences allow the kind, enqueues a short
 * mail naming the project and linking to the pin (sent off the request path by the mailer).
 */
export async function notify(ctx: AppContext, items: NotifyInput[]): Promise<void> {
  if (!items.length) return;
  const projects = new Map<number, string>();
  for (const item of items) {
    await NotificationModel.create(item);
    const user = await UserModel.findByPk(item.userId, { attributes: ['id', 'email', 'disabledAt'] });
    if (!user || user.disabledAt) continue;
    const prefs = await getPreferences(item.userId);
    if (!prefs.email[item.kind]) continue;
    if (!projects.has(item.projectId)) projects.set(item.projectId, (await ProjectModel.findByPk(item.projectId, { attributes: ['name'] }))?.name ?? 'a project');
    const projectName = projects.get(item.projectId)!;
    const link = item.runId ? reviewLink(ctx.config.publicUrl, item.projectId, item.runId, item.threadId) : `${ctx.config.publicUrl}/projects/${item.projectId}`;
    ctx.mailer.enqueue({
      to: user.email,
      subject: `[${projectName}] ${item.text}`,
      text: `${item.text} in the project "${projectName}".\n\nOpen it: ${link}\n\nChoose which notifications reach you by e-mail: ${ctx.config.publicUrl}/settings\n`,
    });
  }
}

/** A run reached succeeded or failed: tell who started it, if they are still a member. */
export async function notifyRunFinished(ctx: AppContext, runId: number, status: 'succeeded' | 'failed'): Promise<void> {
  const run = await RunModel.findByPk(runId, { attributes: ['id', 'projectId', 'startedById'] });
  if (!run?.startedById) return;
  const member = await MembershipModel.findOne({ where: { projectId: run.projectId, userId: run.startedById } });
  if (!member) return;
  await notify(ctx, [
    {
      userId: run.startedById,
      projectId: run.projectId,
      kind: 'run-finished',
      runId: run.id,
      threadId: null,
      actorId: null,
      text: status === 'succeeded' ? `Your run #${run.id} finished` : `Your run #${run.id} failed`,
    },
  ]);
}

/**
 * The newest 50 notifications of a user (only unread ones when asked), and how many are unread: two SELECTs
 * (`select`), as the bell in the header reads them on every page.
 */
export async function listNotifications(userId: number, unreadOnly: boolean) {
  // One statement: the unread count rides on every row (MariaDB's subquery cache computes it once). An empty list
  // means nothing is unread: either none are (unreadOnly) or the person has no notifications at all.
  const rows = await select<{
    id: number;
    kind: NotificationKind;
    projectId: number;
    projectName: string | null;
    runId: number | null;
    threadId: number | null;
    actorId: number | null;
    actorName: string | null;
    text: string;
    createdAt: Date;
    readAt: Date | null;
    unread: number | bigint;
  }>(
    `SELECT n.id, n.kind, n.project_id AS projectId, p.name AS projectName, n.run_id AS runId, n.thread_id AS threadId,
       a.id AS actorId, a.name AS actorName, n.text, n.created_at AS createdAt, n.read_at AS readAt,
       (SELECT COUNT(*) FROM notifications u WHERE u.user_id = n.user_id AND u.read_at IS NULL) AS unread
     FROM notifications n LEFT JOIN users a ON a.id = n.actor_id LEFT JOIN projects p ON p.id = n.project_id
     WHERE n.user_id = ? ${unreadOnly ? 'AND n.read_at IS NULL' : ''} ORDER BY n.id DESC LIMIT 50`,
    [userId],
  );
  const notifications: Notification[] = rows.map((row) => ({
    id: row.id,
    kind: row.kind,
    projectId: row.projectId,
    projectName: row.projectName ?? '',
    runId: row.runId,
    threadId: row.threadId,
    actor: row.actorId !== null ? { id: row.actorId, name: row.actorName ?? '' } : null,
    text: row.text,
    createdAt: row.createdAt.toISOString(),
    readAt: row.readAt ? row.readAt.toISOString() : null,
  }));
  return { notifications, unread: rows.length ? Number(rows[0].unread) : 0 };
}

export async function markRead(userId: number, notificationId: number) {
  const row = await NotificationModel.findOne({ where: { id: notificationId, userId } });
  if (!row) throw new AppError(404, 'Notification not found');
  if (!row.readAt) await row.update({ readAt: new Date() });
}

export async function markAllRead(userId: number) {
  await NotificationModel.update({ readAt: new Date() }, { where: { userId, readAt: { [Op.is]: null } } });
}
