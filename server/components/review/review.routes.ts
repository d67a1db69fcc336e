import { Router } from 'express';
import { createCommentSchema, createThreadSchema, updateCommentSchema } from '../../../shared/schemas/review';
import type { AppContext } from '../../context';
import { parseId, parseInput } from '../../lib/validate';
import { currentUser } from '../auth/auth.middleware';
import { projectAccess, requireProject } from '../projects/project-access';
import { listActivity } from './activity.service';
import { addComment, createThread, deleteComment, editComment, listThreads, setResolved } from './review.service';

/** Comment threads pinned on a run's previews and the project's activity, under `/api/projects/:projectId`. */
export function reviewRoutes(ctx: AppContext) {
  const router = Router({ mergeParams: true });
  const ids = (params: Record<string, unknown>) => ({
    runId: parseId(params.runId, 'runId'),
    threadId: params.threadId === undefined ? 0 : parseId(params.threadId, 'threadId'),
  });

  router.get('/activity', requireProject('read'), async (req, res) => {
    res.json({ activity: await listActivity(projectAccess(req).project.id) });
  });

  router.get('/runs/:runId/threads', requireProject('read'), async (req, res) => {
    res.json({ threads: await listThreads(projectAccess(req).project.id, ids(req.params).runId) });
  });

  router.post('/runs/:runId/threads', requireProject('comment'), async (req, res) => {
    const { runId } = ids(req.params);
    const input = parseInput(createThreadSchema, req.body);
    res.status(201).json({ thread: await createThread(ctx, projectAccess(req).project.id, currentUser(req), runId, input) });
  });

  router.post('/runs/:runId/threads/:threadId/comments', requireProject('comment'), async (req, res) => {
    const { runId, threadId } = ids(req.params);
    const { body } = parseInput(createCommentSchema, req.body);
    res.status(201).json({ comment: await addComment(ctx, projectAccess(req).project.id, currentUser(req), runId, threadId, body) });
  });

  router.post('/runs/:runId/threads/:threadId/resolve', requireProject('comment'), async (req, res) => {
    const { runId, threadId } = ids(req.params);
    res.json({ thread: await setResolved(projectAccess(req).project.id, currentUser(req), runId, threadId, true) });
  });

  router.post('/runs/:runId/threads/:threadId/reopen', requireProject('comment'), async (req, res) => {
    const { runId, threadId } = ids(req.params);
    res.json({ thread: await setResolved(projectAccess(req).project.id, currentUser(req), runId, threadId, false) });
  });

  router.patch('/runs/:runId/threads/:threadId/comments/:commentId', requireProject('comment'), async (req, res) => {
    const { runId, threadId } = ids(req.params);
    const commentId = parseId(req.params.commentId, 'commentId');
    const { body } = parseInput(updateCommentSchema, req.body);
    res.json({ comment: await editComment(projectAccess(req).project.id, currentUser(req), runId, threadId, commentId, body) });
  });

  router.delete('/runs/:runId/threads/:threadId/comments/:commentId', requireProject('comment'), async (req, res) => {
    const { runId, threadId } = ids(req.params);
    const commentId = parseId(req.params.commentId, 'commentId');
    const { project, role } = projectAccess(req);
    await deleteComment(project.id, currentUser(req), role, runId, threadId, commentId);
    res.status(204).end();
  });

  return router;
}
