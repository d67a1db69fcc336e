import { Router, type Response } from 'express';
import { createShareLinkSchema } from '../../../shared/schemas/access';
import type { AppContext } from '../../context';
import { contentDisposition } from '../../lib/content-disposition';
import { parseId, parseInput } from '../../lib/validate';
import { currentUser } from '../auth/auth.middleware';
import { projectAccess, requireProject } from '../projects/project-access';
import { streamArtifact } from '../runs/run-artifacts';
import { readTile, sendTile, tileManifest } from '../runs/run-tiles';
import { artifactForDownload } from '../runs/run.service';
import { createShareLink, getSharedRun, listShareLinks, resolveShareLink, revokeShareLink } from './share-link.service';

/** Owners' management of a run's share links, under `/api/projects/:projectId`. */
export function shareLinkRoutes(ctx: AppContext) {
  const router = Router({ mergeParams: true });

  router.get('/runs/:runId/share-links', requireProject('manage'), async (req, res) => {
    const runId = parseId(req.params.runId, 'runId');
    res.json({ shareLinks: await listShareLinks(projectAccess(req).project.id, runId) });
  });

  router.post('/runs/:runId/share-links', requireProject('manage'), async (req, res) => {
    const runId = parseId(req.params.runId, 'runId');
    const { expiresAt } = parseInput(createShareLinkSchema, req.body);
    res.status(201).json(await createShareLink(ctx, projectAccess(req).project.id, runId, currentUser(req).id, expiresAt));
  });

  router.delete('/share-links/:linkId', requireProject('manage'), async (req, res) => {
    const linkId = parseId(req.params.linkId, 'linkId');
    res.json({ shareLink: await revokeShareLink(projectAccess(req).project.id, linkId) });
  });

  return router;
}

function noStore(res: Response) {
  res.set({ 'Cache-Control': 'no-store', 'Referrer-Policy': 'no-referrer', 'X-Robots-Tag': 'noindex' });
}

/** What a share link opens without an account, under `/api/shared/:token`: one run and its files. */
export function sharedRoutes() {
  const router = Router();

  router.get('/:token', async (req, res) => {
    noStore(res);
    res.json(await getSharedRun(String(req.params.token)));
  });

  router.get('/:token/artifacts/:name', async (req, res) => {
    noStore(res);
    const { link, project } = await resolveShareLink(String(req.params.token));
    const { artifact, fileName } = await artifactForDownload(project.id, project.name, link.runId, String(req.params.name));
    res.set({
      'Content-Type': artifact.mime,
      'Content-Length': String(artifact.size),
      'Content-Disposition': contentDisposition('attachment', fileName),
      'X-Content-Type-Options': 'nosniff',
    });
    await streamArtifact(artifact.id, res);
    res.end();
  });

  router.get('/:token/tiles/:picture', async (req, res) => {
    noStore(res);
    const { link, project } = await resolveShareLink(String(req.params.token));
    res.json({ tiles: await tileManifest(project.id, link.runId, String(req.params.picture)) });
  });

  router.get('/:token/tiles/:picture/:level/:x/:y', async (req, res) => {
    noStore(res);
    const { link, project } = await resolveShareLink(String(req.params.token));
    sendTile(res, await readTile(project.id, link.runId, String(req.params.picture), req.params), 'no-store');
  });

  return router;
}
