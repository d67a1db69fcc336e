import { Router } from 'express';
import { listRunsQuerySchema } from '../../../shared/schemas/runs';
import type { AppContext } from '../../context';
import { contentDisposition } from '../../lib/content-disposition';
import { parseId, parseInput } from '../../lib/validate';
import { currentUser } from '../auth/auth.middleware';
import { projectAccess, requireProject } from '../projects/project-access';
import { toleranceRoutes } from '../tolerance/tolerance.routes';
import { streamArtifact } from './run-artifacts';
import { runComparisonRoutes } from './run-comparison.routes';
import { openRunEventStream } from './run-event-stream';
import { readTile, sendTile, tileManifest } from './run-tiles';
import { artifactForDownload, cancelRun, deleteRunFiles, getRunAnswer, listRuns, startRun } from './run.service';
import { cachedList, runLists } from '../../db/list-caches';

/** A succeeded run's files never change (a new run gets a new id): browsers keep them a day without asking again. */
const IMMUTABLE = 'private, max-age=86400, immutable';

/** Runs of a project, under `/api/projects/:projectId`. */
export function runRoutes(ctx: AppContext) {
  const router = Router({ mergeParams: true });
  router.use(toleranceRoutes(ctx));
  router.use(runComparisonRoutes(ctx));

  router.post('/revisions/:number/runs', requireProject('design'), async (req, res) => {
    const number = parseId(req.params.number, 'revision number');
    res.status(202).json({ run: await startRun(ctx, projectAccess(req).project.id, number, currentUser(req).id) });
  });

  router.get('/runs', requireProject('read'), async (req, res) => {
    const query = parseInput(listRunsQuerySchema, req.query, 'query');
    const projectId = projectAccess(req).project.id;
    res.type('application/json').send(await cachedList(runLists, projectId, query, async () => ({ runs: await listRuns(projectId, query) })));
  });

  router.get('/runs/:runId', requireProject('read'), async (req, res) => {
    const runId = parseId(req.params.runId, 'runId');
    res.type('application/json').send(await getRunAnswer(projectAccess(req).project.id, runId));
  });

  router.post('/runs/:runId/cancel', requireProject('design'), async (req, res) => {
    const runId = parseId(req.params.runId, 'runId');
    res.json({ run: await cancelRun(ctx, projectAccess(req).project.id, runId) });
  });

  router.delete('/runs/:runId/files', requireProject('design'), async (req, res) => {
    const runId = parseId(req.params.runId, 'runId');
    res.json({ run: await deleteRunFiles(ctx, projectAccess(req).project.id, runId, currentUser(req).id) });
  });

  router.get('/runs/:runId/artifacts/:name', requireProject('read'), async (req, res) => {
    const runId = parseId(req.params.runId, 'runId');
    const { project } = projectAccess(req);
    const { artifact, fileName } = await artifactForDownload(project.id, project.name, runId, String(req.params.name));
    res.set({
      'Content-Type': artifact.mime,
      'Content-Length': String(artifact.size),
      'Content-Disposition': contentDisposition('attachment', fileName),
      'X-Content-Type-Options': 'nosniff',
      'Cache-Control': IMMUTABLE,
    });
    await streamArtifact(artifact.id, res);
    res.end();
  });

  /** Tile pyramids of the large previews (run-tiles.ts): a picture's manifest, then single 256-px tiles. */
  router.get('/runs/:runId/tiles/:picture', requireProject('read'), async (req, res) => {
    const runId = parseId(req.params.runId, 'runId');
    const tiles = await tileManifest(projectAccess(req).project.id, runId, String(req.params.picture));
    res.set('Cache-Control', IMMUTABLE).json({ tiles });
  });

  router.get('/runs/:runId/tiles/:picture/:level/:x/:y', requireProject('read'), async (req, res) => {
    const runId = parseId(req.params.runId, 'runId');
    sendTile(res, await readTile(projectAccess(req).project.id, runId, String(req.params.picture), req.params), IMMUTABLE);
  });

  /** Server-Sent Events of one run (run-event-stream.ts): `update` events until it finishes, capped per person. */
  router.get('/runs/:runId/events', requireProject('read'), async (req, res) => {
    const runId = parseId(req.params.runId, 'runId');
    const stream = await openRunEventStream(ctx, projectAccess(req).project.id, runId, currentUser(req).id);
    res.set({ 'Content-Type': 'text/event-stream; charset=utf-8', 'Cache-Control': 'no-cache', Connection: 'keep-alive', 'X-Accel-Buffering': 'no' });
    res.flushHeaders();
    stream({
      send: (event, data) => res.write(`event: ${event}\ndata: ${JSON.stringify(data)}\n\n`),
      comment: (text) => res.write(`: ${text}\n\n`),
      end: () => res.end(),
      onClose: (listener) => res.on('close', listener),
    });
  });

  return router;
}
