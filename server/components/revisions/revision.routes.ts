import { Router } from 'express';
import { compareRevisionsQuerySchema, createRevisionSchema } from '../../../shared/schemas/revisions';
import { parseId, parseInput } from '../../lib/validate';
import { currentUser } from '../auth/auth.middleware';
import { projectAccess, requireProject } from '../projects/project-access';
import { compareRevisions, createRevision, getRevision, listRevisions } from './revision.service';

/** `/api/projects/:projectId/revisions`: saved designs are immutable, so there is no update or delete. */
export function revisionRoutes() {
  const router = Router({ mergeParams: true });

  router.get('/', requireProject('read'), async (req, res) => {
    res.json({ revisions: await listRevisions(projectAccess(req).project.id) });
  });

  router.post('/', requireProject('design'), async (req, res) => {
    const input = parseInput(createRevisionSchema, req.body);
    res.status(201).json({ revision: await createRevision(projectAccess(req).project.id, currentUser(req).id, input) });
  });

  router.get('/compare', requireProject('read'), async (req, res) => {
    const { a, b } = parseInput(compareRevisionsQuerySchema, req.query, 'query');
    res.json(await compareRevisions(projectAccess(req).project.id, a, b));
  });

  router.get('/:number', requireProject('read'), async (req, res) => {
    const number = parseId(req.params.number, 'revision number');
    res.json({ revision: await getRevision(projectAccess(req).project.id, number) });
  });

  return router;
}
