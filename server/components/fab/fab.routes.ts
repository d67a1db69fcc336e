import { Router } from 'express';
import { rateLimit } from 'express-rate-limit';
import { exportOverrideSchema, fabPackageQuerySchema, layoutRegionQuerySchema, projectDesignRulesSchema, type LayoutRegion } from '../../../shared/schemas/fab';
import type { AppContext } from '../../context';
import { AppError } from '../../lib/app-error';
import { contentDisposition } from '../../lib/content-disposition';
import { parseId, parseInput } from '../../lib/validate';
import { recordAudit } from '../audit/audit.service';
import { currentUser } from '../auth/auth.middleware';
import { projectAccess, requireProject } from '../projects/project-access';
import { findRun } from '../runs/run.service';
import { getProjectDesignRules, saveProjectDesignRules } from './design-rules.service';
import { prepareFabPackage, reportInputOf } from './fab-package';
import { ExportOverrideModel } from './fab.model';
import { layoutRegion } from './layout-jobs';
import { designCheckOf, withOverrides } from './run-data';

/**
 * Design rules of a project, and the layout preview, design check, export override and fab package of its
 * runs, under `/api/projects/:projectId`. The costly ones run on the layout worker (layout-jobs.ts) and are
 * rate-limited per person (FAB_REQUESTS_PER_MINUTE).
 */
export function fabRoutes(ctx: AppContext) {
  const router = Router({ mergeParams: true });
  const perMinute = ctx.config.FAB_REQUESTS_PER_MINUTE;
  /** Per person: layout regions, design checks, reports, overrides and fab packages share one budget. */
  const layoutJobLimiter = rateLimit({
    windowMs: 60_000,
    limit: perMinute,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    keyGenerator: (req) => `user:${currentUser(req).id}`,
    handler: (_req, _res, next) =>
      next(
        new AppError(
          429,
          `Too many layout, design-check, report and fab-package requests: the limit is ${perMinute} a minute per person (FAB_REQUESTS_PER_MINUTE). Wait a minute and try again.`,
        ),
      ),
  });

  router.get('/design-rules', requireProject('read'), async (req, res) => {
    res.json(await getProjectDesignRules(projectAccess(req).project.id));
  });

  router.put('/design-rules', requireProject('manage'), async (req, res) => {
    const rules = parseInput(projectDesignRulesSchema, req.body);
    res.json(await saveProjectDesignRules(projectAccess(req).project.id, rules, currentUser(req).id));
  });

  /** Pillars and design-rule violations of a square region of at most 128 × 128 cells (layout worker). */
  router.get('/runs/:runId/layout', requireProject('read'), layoutJobLimiter, async (req, res) => {
    const runId = parseId(req.params.runId, 'runId');
    const query = parseInput(layoutRegionQuerySchema, req.query, 'query');
    const body: LayoutRegion = await layoutRegion(ctx.config, await findRun(projectAccess(req).project.id, runId), query);
    res.json(body);
  });

  router.get('/runs/:runId/design-check', requireProject('read'), layoutJobLimiter, async (req, res) => {
    const runId = parseId(req.params.runId, 'runId');
    const { latestOverrideId: _latest, ...check } = await designCheckOf(ctx.config, await findRun(projectAccess(req).project.id, runId));
    res.json({ check });
  });

  /** Everything the print-friendly report page shows, as one model (the same one report.html is drawn from). */
  router.get('/runs/:runId/report', requireProject('read'), layoutJobLimiter, async (req, res) => {
    const runId = parseId(req.params.runId, 'runId');
    const { project } = projectAccess(req);
    const run = await findRun(project.id, runId);
    const { latestOverrideId: _latest, ...check } = await designCheckOf(ctx.config, run);
    res.json({ report: await reportInputOf(run, project.name, check) });
  });

  router.post('/runs/:runId/export-override', requireProject('manage'), layoutJobLimiter, async (req, res) => {
    const runId = parseId(req.params.runId, 'runId');
    const { reason } = parseInput(exportOverrideSchema, req.body);
    const run = await findRun(projectAccess(req).project.id, runId);
    const check = await designCheckOf(ctx.config, run);
    if (check.total === 0) throw new AppError(409, `Run ${run.id} has no design-rule violations; it can be exported without an override`);
    const row = await ExportOverrideModel.create({ runId: run.id, userId: currentUser(req).id, reason, counts: check.counts, at: new Date() });
    await recordAudit('export-override', { projectId: run.projectId, detail: { runId: run.id, overrideId: row.id, violations: check.total, reason } });
    // The design-rule result is the same as a moment ago; only the overrides changed.
    const { latestOverrideId: _latest, ...after } = await withOverrides(run.id, check);
    res.status(201).json({ override: { id: row.id, reason: row.reason, at: row.at.toISOString() }, check: after });
  });

  router.get('/runs/:runId/fab-package.zip', requireProject('read'), layoutJobLimiter, async (req, res) => {
    const runId = parseId(req.params.runId, 'runId');
    const query = parseInput(fabPackageQuerySchema, req.query, 'query');
    const { project } = projectAccess(req);
    const run = await findRun(project.id, runId);
    const { fileName, write } = await prepareFabPackage(ctx.config, run, project.name, currentUser(req).id, query);
    res.set({
      'Content-Type': 'application/zip',
      'Content-Disposition': contentDisposition('attachment', fileName),
      'X-Content-Type-Options': 'nosniff',
      'Cache-Control': 'private, no-store',
    });
    await write(res);
  });

  return router;
}
