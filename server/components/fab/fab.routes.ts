import { Router } from 'express';
import { placementAngle } from '../../../shared/optics/atoms';
import { exportOverrideSchema, fabPackageQuerySchema, layoutRegionQuerySchema, projectDesignRulesSchema, type LayoutPillar, type LayoutRegion } from '../../../shared/schemas/fab';
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
import { designCheckOf, loadRunLayout, regionViolations } from './run-data';

/**
 * Design rules of a project, and the layout preview, design check, export override and fab package of its
 * runs, under `/api/projects/:projectId`.
 */
export function fabRoutes() {
  const router = Router({ mergeParams: true });

  router.get('/design-rules', requireProject('read'), async (req, res) => {
    res.json(await getProjectDesignRules(projectAccess(req).project.id));
  });

  router.put('/design-rules', requireProject('manage'), async (req, res) => {
    const rules = parseInput(projectDesignRulesSchema, req.body);
    res.json(await saveProjectDesignRules(projectAccess(req).project.id, rules, currentUser(req).id));
  });

  /** Pillars and design-rule violations of a square region of at most 128 × 128 cells. */
  router.get('/runs/:runId/layout', requireProject('read'), async (req, res) => {
    const runId = parseId(req.params.runId, 'runId');
    const query = parseInput(layoutRegionQuerySchema, req.query, 'query');
    const layout = await loadRunLayout(await findRun(projectAccess(req).project.id, runId));
    const { n, atomIndex, theta, library } = layout;
    if (query.x0 >= n || query.y0 >= n) {
      throw new AppError(400, `x0 and y0 must be less than the layout's ${n} cells`, query.x0 >= n ? { x0: `must be 0…${n - 1}` } : { y0: `must be 0…${n - 1}` });
    }
    const width = Math.min(query.size, n - query.x0);
    const height = Math.min(query.size, n - query.y0);
    const centre = (n - 1) / 2;
    const periodNm = layout.design.setup.periodNm;
    const pillars: LayoutPillar[] = [];
    for (let iy = query.y0; iy < query.y0 + height; iy++) {
      for (let ix = query.x0; ix < query.x0 + width; ix++) {
        const i = iy * n + ix;
        const atom = library.atoms[atomIndex[i]];
        if (!atom || atom.shape === 'empty') continue;
        pillars.push({
          ix,
          iy,
          xNm: (ix - centre) * periodNm,
          yNm: (iy - centre) * periodNm,
          widthNm: atom.width * 1e9,
          lengthNm: atom.length * 1e9,
          angleDeg: (placementAngle(atom, theta[i]) * 180) / Math.PI,
          atom: atomIndex[i],
        });
      }
    }
    const body: LayoutRegion = {
      n,
      periodNm,
      x0: query.x0,
      y0: query.y0,
      width,
      height,
      pillars,
      violations: regionViolations(layout, layout.design.designRules, query.x0, query.y0, width, height),
    };
    res.json(body);
  });

  router.get('/runs/:runId/design-check', requireProject('read'), async (req, res) => {
    const runId = parseId(req.params.runId, 'runId');
    const { latestOverrideId: _latest, ...check } = await designCheckOf(await findRun(projectAccess(req).project.id, runId));
    res.json({ check });
  });

  /** Everything the print-friendly report page shows, as one model (the same one report.html is drawn from). */
  router.get('/runs/:runId/report', requireProject('read'), async (req, res) => {
    const runId = parseId(req.params.runId, 'runId');
    const { project } = projectAccess(req);
    const run = await findRun(project.id, runId);
    const { latestOverrideId: _latest, ...check } = await designCheckOf(run);
    res.json({ report: await reportInputOf(run, project.name, check) });
  });

  router.post('/runs/:runId/export-override', requireProject('manage'), async (req, res) => {
    const runId = parseId(req.params.runId, 'runId');
    const { reason } = parseInput(exportOverrideSchema, req.body);
    const run = await findRun(projectAccess(req).project.id, runId);
    const check = await designCheckOf(run);
    if (check.total === 0) throw new AppError(409, `Run ${run.id} has no design-rule violations; it can be exported without an override`);
    const row = await ExportOverrideModel.create({ runId: run.id, userId: currentUser(req).id, reason, counts: check.counts, at: new Date() });
    await recordAudit('export-override', { projectId: run.projectId, detail: { runId: run.id, overrideId: row.id, violations: check.total, reason } });
    const { latestOverrideId: _latest, ...after } = await designCheckOf(run);
    res.status(201).json({ override: { id: row.id, reason: row.reason, at: row.at.toISOString() }, check: after });
  });

  router.get('/runs/:runId/fab-package.zip', requireProject('read'), async (req, res) => {
    const runId = parseId(req.params.runId, 'runId');
    const query = parseInput(fabPackageQuerySchema, req.query, 'query');
    const { project } = projectAccess(req);
    const run = await findRun(project.id, runId);
    const { fileName, write } = await prepareFabPackage(run, project.name, currentUser(req).id, query);
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
