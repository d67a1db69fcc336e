import { Router } from 'express';
import { FINISHED_STATUSES, listRunsQuerySchema } from '../../../shared/schemas/runs';
import type { AppContext } from '../../context';
import { contentDisposition } from '../../lib/content-disposition';
import { parseId, parseInput } from '../../lib/validate';
import { currentUser } from '../auth/auth.middleware';
import { projectAccess, requireProject } from '../projects/project-access';
import { toleranceRoutes } from '../tolerance/tolerance.routes';
import { streamArtifact } from './run-artifacts';
import { artifactForDownload, cancelRun, deleteRunFiles, getRun, getRunSummary, listRuns, startRun } from './run.service';

/** Runs of a project, under `/api/projects/:projectId`. */
export function runRoutes(ctx: AppContext) {
  const router = Router({ mergeParams: true });
  router.use(toleranceRoutes(ctx));

  router.post('/revisions/:number/runs', requireProject('design'), async (req, res) => {
    const number = parseId(req.params.number, 'revision number');
    res.status(202).json({ run: await startRun(ctx, projectAccess(req).project.id, number, currentUser(req).id) });
  });

  router.get('/runs', requireProject('read'), async (req, res) => {
    const query = parseInput(listRunsQuerySchema, req.query, 'query');
    res.json({ runs: await listRuns(projectAccess(req).project.id, query) });
  });

  router.get('/runs/:runId', requireProject('read'), async (req, res) => {
    const runId = parseId(req.params.runId, 'runId');
    res.json({ run: await getRun(projectAccess(req).project.id, runId) });
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
      'Cache-Control': 'private, max-age=86400, immutable',
    });
    await streamArtifact(artifact.id, res);
    res.end();
  });

  /**
   * Server-Sent Events of one run: an `update` event with the RunSummary whenever the row changes (at
   * most every 250 ms), and a final one when the run has finished; then the stream ends.
   */
  router.get('/runs/:runId/events', requireProject('read'), async (req, res) => {
    const runId = parseId(req.params.runId, 'runId');
    const projectId = projectAccess(req).project.id;
    let summary = await getRunSummary(projectId, runId);
    res.set({ 'Content-Type': 'text/event-stream; charset=utf-8', 'Cache-Control': 'no-cache', Connection: 'keep-alive', 'X-Accel-Buffering': 'no' });
    res.flushHeaders();
    const send = () => res.write(`event: update\ndata: ${JSON.stringify(summary)}\n\n`);
    send();
    if (FINISHED_STATUSES.includes(summary.status)) return res.end();
    let timer: NodeJS.Timeout | null = null;
    let closed = false;
    const finish = () => {
      closed = true;
      unsubscribe();
      clearInterval(keepAlive);
      if (timer) clearTimeout(timer);
      res.end();
    };
    const refresh = async () => {
      timer = null;
      if (closed) return;
      try {
        summary = await getRunSummary(projectId, runId);
      } catch {
        return finish();
      }
      if (closed) return;
      send();
      if (FINISHED_STATUSES.includes(summary.status)) finish();
    };
    const unsubscribe = ctx.runQueue.onUpdate((id) => {
      if (id === runId && !timer && !closed) timer = setTimeout(() => void refresh(), 250);
    });
    const keepAlive = setInterval(() => res.write(': keep-alive\n\n'), 20_000);
    req.on('close', () => {
      if (!closed) finish();
    });
  });

  return router;
}
