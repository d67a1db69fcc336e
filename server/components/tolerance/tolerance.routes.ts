import { Router } from 'express';
import { toleranceRequestSchema } from '../../../shared/schemas/tolerance';
import type { AppContext } from '../../context';
import { parseId, parseInput } from '../../lib/validate';
import { currentUser } from '../auth/auth.middleware';
import { projectAccess, requireProject } from '../projects/project-access';
import { getToleranceStudy, startToleranceStudy } from './tolerance.service';

/** Tolerance studies of a run, under `/api/projects/:projectId`. */
export function toleranceRoutes(ctx: AppContext) {
  const router = Router({ mergeParams: true });

  router.post('/runs/:runId/tolerance', requireProject('design'), async (req, res) => {
    const runId = parseId(req.params.runId, 'runId');
    const request = parseInput(toleranceRequestSchema, req.body, 'body');
    res.status(202).json({ study: await startToleranceStudy(ctx, projectAccess(req).project.id, runId, currentUser(req).id, request) });
  });

  router.get('/runs/:runId/tolerance', requireProject('read'), async (req, res) => {
    const runId = parseId(req.params.runId, 'runId');
    res.json({ study: await getToleranceStudy(projectAccess(req).project.id, runId) });
  });

  return router;
}
