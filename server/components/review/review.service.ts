import type { ProjectRole } from '../../../shared/roles';
import type { CreateThreadInput, ReviewComment, ReviewThread } from '../../../shared/schemas/review';
import type { AppContext } from '../../context';
import { AppError } from '../../lib/app-error';
import { notify, type NotifyInput } from '../notifications/notification.service';
import { MembershipModel } from '../projects/membership.model';
import { RunArtifactModel, RunModel } from '../runs/run.model';
import { UserModel } from '../users/user.model';
import { ProjectActivityModel, ReviewCommentModel, ReviewThreadModel } from './review.model';

const person = (u: UserModel | null | undefined) => (u ? { id: u.id, name: u.name } : null);

function toComment(c: ReviewCommentModel): ReviewComment {
  return {
    id: c.id,
    threadId: c.threadId,
    author: person(c.author),
    body: c.body,
    mentions: c.mentions,
    createdAt: c.createdAt.toISOString(),
    editedAt: c.editedAt ? c.editedAt.toISOString() : null,
  };
}

function toThread(t: ReviewThreadModel): ReviewThread {
  return {
    id: t.id,
    runId: t.runId,
    revisionId: t.revisionId,
    artifact: t.artifact,
    x: t.x,
    y: t.y,
    createdBy: person(t.createdBy),
    createdAt: t.createdAt.toISOString(),
    resolvedAt: t.resolvedAt ? t.resolvedAt.toISOString() : null,
    resolvedBy: person(t.resolvedBy),
    comments: [...(t.comments ?? [])].sort((a, b) => a.id - b.id).map(toComment),
  };
}

const threadInclude = [
  { model: UserModel, as: 'createdBy', attributes: ['id', 'name'] },
  { model: UserModel, as: 'resolvedBy', attributes: ['id', 'name'] },
  { model: ReviewCommentModel, as: 'comments', include: [{ model: UserModel, as: 'author', attributes: ['id', 'name'] }] },
];

async function findRun(projectId: number, runId: number) {
  const run = await RunModel.findOne({ where: { id: runId, projectId }, attributes: ['id', 'projectId', 'revisionId'] });
  if (!run) throw new AppError(404, 'Run not found');
  return run;
}

async function findThread(projectId: number, runId: number, threadId: number) {
  const thread = await ReviewThreadModel.findOne({ where: { id: threadId, runId, projectId }, include: threadInclude });
  if (!thread) throw new AppError(404, 'Thread not found');
  return thread;
}

async function reload(thread: ReviewThreadModel) {
  return toThread(await findThread(thread.projectId, thread.runId, thread.id));
}

const escapeRegExp = (s: string) => s.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');

/** Project members named in `body` as `@Full Name` (case-insensitive, not followed by a letter or digit). */
export async function findMentions(projectId: number, body: string): Promise<number[]> {
  if (!body.includes('@')) return [];
  const members = await MembershipModel.findAll({ where: { projectId }, include: [{ model: UserModel, as: 'user', attributes: ['id', 'name'] }] });
  const ids: number[] = [];
  for (const m of members) {
    if (!m.user) continue;
    const pattern = new RegExp(`(^|[^\\p{L}\\p{N}_])@${escapeRegExp(m.user.name)}(?![\\p{L}\\p{N}_])`, 'iu');
    if (pattern.test(body)) ids.push(m.user.id);
  }
  return ids;
}

export async function listThreads(projectId: number, runId: number): Promise<ReviewThread[]> {
  await findRun(projectId, runId);
  const threads = await ReviewThreadModel.findAll({ where: { projectId, runId }, include: threadInclude, order: [['id', 'ASC']] });
  return threads.map(toThread);
}

/** Mentions → 'mention'; earlier participants of the thread → 'reply'; never the author, never twice. */
async function notifyForComment(ctx: AppContext, thread: ReviewThreadModel, comment: ReviewCommentModel, author: UserModel, isReply: boolean) {
  const items: NotifyInput[] = [];
  const told = new Set<number>([author.id]);
  const base = { projectId: thread.projectId, runId: thread.runId, threadId: thread.id, actorId: author.id };
  for (const userId of comment.mentions) {
    if (told.has(userId)) continue;
    told.add(userId);
    items.push({ ...base, userId, kind: 'mention', text: `${author.name} mentioned you on run #${thread.runId}` });
  }
  if (isReply) {
    const earlier = await ReviewCommentModel.findAll({ where: { threadId: thread.id }, attributes: ['authorId'] });
    const participants = new Set<number>([thread.createdById ?? 0, ...earlier.map((c) => c.authorId ?? 0)]);
    participants.delete(0);
    const stillMembers = await MembershipModel.findAll({ where: { projectId: thread.projectId, userId: [...participants] }, attributes: ['userId'] });
    for (const { userId } of stillMembers) {
      if (told.has(userId)) continue;
      told.add(userId);
      items.push({ ...base, userId, kind: 'reply', text: `${author.name} replied in a thread on run #${thread.runId}` });
    }
  }
  await notify(ctx, items);
}

export async function createThread(ctx: AppContext, projectId: number, author: UserModel, runId: number, input: CreateThreadInput): Promise<ReviewThread> {
  const run = await findRun(projectId, runId);
  const artifact = await RunArtifactModel.findOne({ where: { runId, name: input.artifact }, attributes: ['id', 'mime'] });
  if (!artifact || !artifact.mime.startsWith('image/')) {
    throw new AppError(400, `artifact: "${input.artifact}" is not a preview image of run #${runId}`, { artifact: 'Pick a preview image of this run' });
  }
  const thread = await ReviewThreadModel.create({
    projectId,
    runId,
    revisionId: run.revisionId,
    artifact: input.artifact,
    x: input.x,
    y: input.y,
    createdById: author.id,
  });
  const comment = await ReviewCommentModel.create({ threadId: thread.id, authorId: author.id, body: input.body, mentions: await findMentions(projectId, input.body) });
  await notifyForComment(ctx, thread, comment, author, false);
  return reload(thread);
}

export async function addComment(ctx: AppContext, projectId: number, author: UserModel, runId: number, threadId: number, body: string): Promise<ReviewComment> {
  const thread = await findThread(projectId, runId, threadId);
  const mentions = await findMentions(projectId, body);
  const comment = await ReviewCommentModel.create({ threadId, authorId: author.id, body, mentions });
  await notifyForComment(ctx, thread, comment, author, true);
  comment.author = author;
  return toComment(comment);
}

export async function setResolved(projectId: number, user: UserModel, runId: number, threadId: number, resolved: boolean): Promise<ReviewThread> {
  const thread = await findThread(projectId, runId, threadId);
  if (resolved === (thread.resolvedAt != null)) {
    throw new AppError(409, resolved ? 'This thread is already resolved' : 'This thread is already open');
  }
  await thread.update(resolved ? { resolvedAt: new Date(), resolvedById: user.id } : { resolvedAt: null, resolvedById: null });
  await ProjectActivityModel.create({
    projectId,
    actorId: user.id,
    kind: resolved ? 'thread-resolved' : 'thread-reopened',
    text: `${resolved ? 'resolved' : 'reopened'} a thread on run #${runId}`,
    runId,
    threadId,
    at: new Date(),
  });
  return reload(thread);
}

async function findComment(projectId: number, runId: number, threadId: number, commentId: number) {
  await findThread(projectId, runId, threadId);
  const comment = await ReviewCommentModel.findOne({ where: { id: commentId, threadId }, include: [{ model: UserModel, as: 'author', attributes: ['id', 'name'] }] });
  if (!comment) throw new AppError(404, 'Comment not found');
  return comment;
}

/** Only the author edits a comment; a new mention in the edit is not notified again. */
export async function editComment(projectId: number, user: UserModel, runId: number, threadId: number, commentId: number, body: string): Promise<ReviewComment> {
  const comment = await findComment(projectId, runId, threadId, commentId);
  if (comment.authorId !== user.id) throw new AppError(403, 'Only the author of a comment can edit it');
  await comment.update({ body, mentions: await findMentions(projectId, body), editedAt: new Date() });
  return toComment(comment);
}

/** The author, or the project's owner, deletes a comment; the last comment takes its thread with it. */
export async function deleteComment(projectId: number, user: UserModel, role: ProjectRole, runId: number, threadId: number, commentId: number) {
  const comment = await findComment(projectId, runId, threadId, commentId);
  if (comment.authorId !== user.id && role !== 'owner') {
    throw new AppError(403, 'Only the author of a comment or the project owner can delete it');
  }
  await comment.destroy();
  if ((await ReviewCommentModel.count({ where: { threadId } })) === 0) await ReviewThreadModel.destroy({ where: { id: threadId } });
}
