import { Router } from 'express';
import { comparePictureQuerySchema, compareRunsQuerySchema } from '../../../shared/schemas/run-comparison';
import type { AppContext } from '../../context';
import { parseInput } from '../../lib/validate';
import { projectAccess, requireProject } from '../projects/project-access';
import { comparePicture, compareRuns } from './run-comparison.service';

/** Comparison of two runs of a project, under `/api/projects/:projectId` (before `/runs/:runId`). */
export function runComparisonRoutes(ctx: AppContext) {
  const router = Router({ mergeParams: true });

  router.get('/runs/compare', requireProject('read'), async (req, res) => {
    const query = parseInput(compareRunsQuerySchema, req.query, 'query');
    res.json({ comparison: await compareRuns(ctx, projectAccess(req).project.id, query) });
  });

  router.get('/runs/compare/far-field.png', requireProject('read'), async (req, res) => {
    const query = parseInput(comparePictureQuerySchema, req.query, 'query');
    const png = await comparePicture(ctx, projectAccess(req).project.id, query);
    res.set({ 'Content-Type': 'image/png', 'Content-Length': String(png.length), 'X-Content-Type-Options': 'nosniff', 'Cache-Control': 'private, max-age=300' });
    res.end(png);
  });

  return router;
}
