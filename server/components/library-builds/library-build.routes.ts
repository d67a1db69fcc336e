import { Router } from 'express';
import { libraryBuildRequestSchema, libraryEstimateRequestSchema } from '../../../shared/schemas/library-builds';
import type { AppContext } from '../../context';
import { parseId, parseInput } from '../../lib/validate';
import { currentUser } from '../auth/auth.middleware';
import { projectAccess, requireProject } from '../projects/project-access';
import { cancelLibraryBuild, estimateLibraryBuild, getLibraryBuild, listLibraryBuilds, startLibraryBuild } from './library-build.service';

/** `/api/projects/:projectId/library-builds`: meta-atom libraries computed by RCWA on the run workers. */
export function libraryBuildRoutes(ctx: AppContext) {
  const router = Router({ mergeParams: true });

  router.post('/estimate', requireProject('design'), async (req, res) => {
    const { spec } = parseInput(libraryEstimateRequestSchema, req.body);
    res.json(estimateLibraryBuild(ctx, spec));
  });

  router.post('/', requireProject('design'), async (req, res) => {
    const request = parseInput(libraryBuildRequestSchema, req.body);
    res.status(202).json({ build: await startLibraryBuild(ctx, projectAccess(req).project.id, currentUser(req).id, request) });
  });

  router.get('/', requireProject('read'), async (req, res) => {
    res.json({ builds: await listLibraryBuilds(projectAccess(req).project.id, currentUser(req).id) });
  });

  router.get('/:buildId', requireProject('read'), async (req, res) => {
    const buildId = parseId(req.params.buildId, 'buildId');
    res.json(await getLibraryBuild(projectAccess(req).project.id, currentUser(req).id, buildId));
  });

  router.post('/:buildId/cancel', requireProject('design'), async (req, res) => {
    const buildId = parseId(req.params.buildId, 'buildId');
    res.json({ build: await cancelLibraryBuild(ctx, projectAccess(req).project.id, currentUser(req).id, buildId) });
  });

  return router;
}
