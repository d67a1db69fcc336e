import { Op } from 'sequelize';
import type { ActivityItem } from '../../../shared/schemas/review';
import { FabExportModel } from '../fab/fab.model';
import { RevisionModel } from '../revisions/revision.model';
import { RunModel } from '../runs/run.model';
import { UserModel } from '../users/user.model';
import { ProjectActivityModel, ReviewCommentModel, ReviewThreadModel } from './review.model';

/** Newest events shown by the feed. */
export const ACTIVITY_LIMIT = 100;

const person = (u: UserModel | null | undefined) => (u ? { id: u.id, name: u.name } : null);
const item = (v: Partial<ActivityItem> & Pick<ActivityItem, 'kind' | 'at' | 'text'>): ActivityItem => ({
  actor: null,
  runId: null,
  threadId: null,
  revisionNumber: null,
  ...v,
});

/**
 * What happened in a project, newest first: revisions saved, runs started and finished, comments, threads
 * resolved/reopened, membership changes and fab package downloads — each from the table that records it.
 */
export async function listActivity(projectId: number): Promise<ActivityItem[]> {
  const limit = ACTIVITY_LIMIT;
  const userAttrs = ['id', 'name'];
  const [revisions, runsStarted, runsFinished, comments, recorded] = await Promise.all([
    RevisionModel.findAll({ where: { projectId }, include: [{ model: UserModel, as: 'createdBy', attributes: userAttrs }], order: [['createdAt', 'DESC']], limit }),
    RunModel.findAll({
      where: { projectId },
      attributes: ['id', 'queuedAt', 'revisionId', 'startedById'],
      include: [{ model: UserModel, as: 'startedBy', attributes: userAttrs }, { model: RevisionModel, as: 'revision', attributes: ['number'] }],
      order: [['queuedAt', 'DESC']],
      limit,
    }),
    RunModel.findAll({
      where: { projectId, finishedAt: { [Op.ne]: null } },
      attributes: ['id', 'status', 'finishedAt', 'startedById'],
      include: [{ model: UserModel, as: 'startedBy', attributes: userAttrs }],
      order: [['finishedAt', 'DESC']],
      limit,
    }),
    ReviewCommentModel.findAll({
      include: [
        { model: ReviewThreadModel, as: 'thread', where: { projectId }, attributes: ['id', 'runId'] },
        { model: UserModel, as: 'author', attributes: userAttrs },
      ],
      order: [['createdAt', 'DESC']],
      limit,
    }),
    ProjectActivityModel.findAll({ where: { projectId }, include: [{ model: UserModel, as: 'actor', attributes: userAttrs }], order: [['at', 'DESC']], limit }),
  ]);
  const exports = await FabExportModel.findAll({
    where: { runId: { [Op.in]: (await RunModel.findAll({ where: { projectId }, attributes: ['id'] })).map((r) => r.id) } },
    order: [['at', 'DESC']],
    limit,
  });
  const exporters = new Map(
    (await UserModel.findAll({ where: { id: [...new Set(exports.map((e) => e.userId).filter((id): id is number => id != null))] }, attributes: userAttrs })).map((u) => [u.id, u]),
  );

  const items: ActivityItem[] = [
    ...revisions.map((r) =>
      item({ kind: 'revision-saved', at: r.createdAt.toISOString(), actor: person(r.createdBy), text: `saved revision ${r.number}`, revisionNumber: r.number }),
    ),
    ...runsStarted.map((r) =>
      item({ kind: 'run-started', at: r.queuedAt.toISOString(), actor: person(r.startedBy), text: `started run #${r.id}`, runId: r.id, revisionNumber: r.revision?.number ?? null }),
    ),
    ...runsFinished.map((r) => {
      const kind = r.status === 'succeeded' ? 'run-finished' : r.status === 'failed' ? 'run-failed' : 'run-cancelled';
      const verb = r.status === 'succeeded' ? 'finished' : r.status === 'failed' ? 'failed' : 'was cancelled';
      return item({ kind, at: r.finishedAt!.toISOString(), actor: person(r.startedBy), text: `run #${r.id} ${verb}`, runId: r.id });
    }),
    ...comments.map((c) =>
      item({ kind: 'comment', at: c.createdAt.toISOString(), actor: person(c.author), text: `commented on run #${c.thread!.runId}`, runId: c.thread!.runId, threadId: c.threadId }),
    ),
    ...recorded.map((a) =>
      item({ kind: a.kind as ActivityItem['kind'], at: a.at.toISOString(), actor: person(a.actor), text: a.text, runId: a.runId, threadId: a.threadId }),
    ),
    ...exports.map((e) =>
      item({ kind: 'export', at: e.at.toISOString(), actor: person(exporters.get(e.userId ?? 0)), text: `downloaded the fab package of run #${e.runId}`, runId: e.runId }),
    ),
  ];
  return items.sort((a, b) => b.at.localeCompare(a.at)).slice(0, limit);
}

/** Records a membership change made by `actorId` (the feed's only source for these). */
export async function recordMembershipActivity(
  projectId: number,
  actorId: number,
  kind: 'member-added' | 'member-role-changed' | 'member-removed',
  subject: { name: string },
  role?: string,
) {
  const text =
    kind === 'member-added' ? `added ${subject.name} as ${role}` : kind === 'member-role-changed' ? `made ${subject.name} ${role}` : `removed ${subject.name}`;
  await ProjectActivityModel.create({ projectId, actorId, kind, text, runId: null, threadId: null, at: new Date() });
}
