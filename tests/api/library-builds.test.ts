/**
 * Library builds through the API: a meta-atom library computed by RCWA on the run workers (both queue engines),
 * stored as a project or personal atom library that runs use; its cost estimate; cancel; bad specs; roles; the
 * run quotas and the build time limit.
 *
 * The stored atoms are checked against `computeAtom` called here directly. The engine itself is checked against
 * published and independent results in tests/unit/rcwa.test.ts: thin-film (Airy) formulas of Born & Wolf §1.6,
 * Rytov's form birefringence (Born & Wolf §15.5) and a numpy reference (tests/support/rcwa_reference.py).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { AtomLibraryDetail, AtomLibrarySummary } from '../../shared/schemas/atom-libraries';
import type { LibraryBuild, LibraryBuildResult } from '../../shared/schemas/library-builds';
import { FUSED_SILICA, SILICON_NITRIDE } from '../../shared/optics/materials';
import { computeAtom, type RcwaCell } from '../../shared/optics/rcwa';
import { fabReadme } from '../../server/components/fab/fab-readme';
import { LibraryBuildModel } from '../../server/components/library-builds/library-build.model';
import { createEmbeddedRunQueue } from '../../server/components/runs/run-queue';
import { deflectorDesign, download, waitForRun } from '../support/designs';
import { smallSpec, waitForBuild } from '../support/library-builds';
import { createTestApp, makeUser, RUN_QUEUE_ENGINES, signedInClient, type ApiClient, type TestApp } from '../support/test-app';

/** The cell of a w × l pillar of smallSpec, written out here rather than taken from the builder. */
function cell(widthNm: number, lengthNm: number): RcwaCell {
  return {
    period: 450e-9,
    superstrate: { kind: 'constant', n: 1, name: 'air' },
    substrate: { kind: 'sellmeier', material: FUSED_SILICA },
    pillar: { shape: 'rect', width: widthNm * 1e-9, length: lengthNm * 1e-9, height: 1200e-9, material: { kind: 'sellmeier', material: SILICON_NITRIDE } },
  };
}
const direct = (widthNm: number, lengthNm: number, harmonics: number) => computeAtom(cell(widthNm, lengthNm), { lambda: 633e-9, harmonics, illumination: 'substrate' });

/** 20 × 20 pillars (40…420 nm) at 11×11 harmonics: tens of seconds, long enough to cancel or time out. */
const longSpec = () => ({ ...smallSpec(1, 11), sweep: { minFeatureNm: 40, minGapNm: 30, stepNm: 20 } });

describe.each(RUN_QUEUE_ENGINES)('library builds on the %s run queue', (engine) => {
  let t: TestApp;
  let designer: ApiClient;
  let projectId: number;
  const base = () => `/api/projects/${projectId}/library-builds`;

  beforeAll(async () => {
    // Helper threads on: the build computes on two threads, as the benchmark measures.
    t = await createTestApp({ RUN_QUEUE: engine, RUN_HELPER_THREADS: 'true' });
    designer = await signedInClient(t.app, await makeUser({ name: 'Library Designer' }));
    projectId = (await designer.post('/api/projects', { name: `RCWA library (${engine})` })).body.project.id;
  });
  afterAll(async () => {
    await t?.close();
  });

  it('estimates a build from a formula: atoms, harmonics, seconds, how the figure was made, the lattice-diffraction warning', async () => {
    const res = await designer.post(`${base()}/estimate`, { spec: smallSpec(7, 5) });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body).toMatchObject({ atoms: 49, harmonics: 5 });
    expect(res.body.secondsPerAtom).toBeGreaterThan(0);
    expect(res.body.seconds).toBeGreaterThanOrEqual((res.body.secondsPerAtom * 49) / 2);
    expect(res.body.basis).toMatch(/formula, no atom computed/);
    // P = 450 nm ≥ λ/n = 633 nm / 1.457 = 434 nm in the fused-silica substrate the light enters through.
    expect(res.body.warnings.join('\n')).toMatch(/period 450\.0 nm ≥ λ\/n = 633\.0 nm\/1\.45\d+ = 434\.\d nm in the incident medium/);
  });

  it('computes a 7 × 7 library at 5×5 harmonics on the workers and stores it, not approximate, with its RCWA source; a run uses it', async () => {
    const started = await designer.post(base(), { spec: smallSpec(7, 5, 'Test nitride pillars'), scope: 'project', subsetSize: 8 });
    expect(started.status, JSON.stringify(started.body)).toBe(202);
    const queued = started.body.build as LibraryBuild;
    expect(queued).toMatchObject({ status: 'queued', scope: 'project', name: 'Test nitride pillars', libraryId: null, projectId });
    expect(queued.createdBy.name).toBe('Library Designer');
    expect(queued.estimateSeconds).toBeGreaterThan(0);
    expect(queued.warnings.join(' ')).toMatch(/incident medium/);

    const { build, result } = await waitForBuild(designer, projectId, queued.id);
    expect(build.status, build.error ?? '').toBe('succeeded');
    expect(build.progress).toMatchObject({ atom: 49, atoms: 49, fraction: 1 });
    expect(build.progress!.secondsPerAtom).toBeGreaterThan(0);
    expect(build.startedAt).not.toBeNull();
    expect(build.finishedAt).not.toBeNull();
    const r = result as LibraryBuildResult;
    const sizes = [60, 110, 160, 210, 260, 310, 360];
    expect(r.sizesNm).toEqual(sizes);
    expect(r.atoms.map((a) => a.id)).toEqual(sizes.flatMap((w) => sizes.map((l) => `w${w}-l${l}`)));

    // The stored library: a project library, selectable in the composer (usable), not approximate, its source RCWA.
    const list = (await designer.get(`/api/projects/${projectId}/atom-libraries`)).body.atomLibraries as AtomLibrarySummary[];
    const summary = list.find((l) => l.id === build.libraryId)!;
    expect(summary).toMatchObject({ name: 'Test nitride pillars', scope: 'project', approximate: false, usable: true, atomCount: 49, wavelengthNm: 633, periodNm: 450, heightNm: 1200 });
    expect(summary.source).toMatch(/^RCWA \(Fourier modal method, Li 1997 factorization\), 5×5 harmonics; /);
    for (const part of [/pillar [^;,]*silicon nitride/i, /substrate [^;,]*silica/i, /superstrate air/, /λ = 633 nm, P = 450 nm, height 1200 nm/, /light from the substrate side/]) {
      expect(summary.source).toMatch(part);
    }
    const library = (await designer.get(`/api/projects/${projectId}/atom-libraries/${build.libraryId}`)).body.atomLibrary as AtomLibraryDetail;

    // Two atoms against computeAtom called here: the stored values are the engine's to the last digit.
    for (const [w, l] of [
      [60, 360],
      [310, 160],
    ]) {
      const expected = direct(w, l, 5);
      const stored = library.atoms.find((a) => a.id === `w${w}-l${l}`)!;
      expect(stored).toMatchObject({ widthNm: w, lengthNm: l, heightNm: 1200 });
      for (const key of ['tx', 'alphaX', 'ty', 'alphaY'] as const) expect(stored[key]).toBeCloseTo(expected[key], 12);
      const powers = r.atoms.find((a) => a.id === `w${w}-l${l}`)!;
      expect(powers.zeroOrderX).toBeCloseTo(expected.x.zeroOrderTransmitted, 12);
      expect(powers.otherOrdersY).toBeCloseTo(expected.y.otherOrdersTransmitted, 12);
      expect(powers.reflectedX).toBeCloseTo(expected.x.reflected, 12);
    }

    // Convergence: the smallest, middle and largest square pillar at 1, 3 and 5 harmonics; 3×3 recomputed here.
    expect(r.convergence.map((c) => c.atomId)).toEqual(['w60-l60', 'w210-l210', 'w360-l360']);
    for (const c of r.convergence) expect(c.rows.map((row) => row.harmonics)).toEqual([1, 3, 5]);
    const at3 = direct(210, 210, 3);
    expect(r.convergence[1].rows[1].tx).toBeCloseTo(at3.tx, 12);
    expect(r.convergence[1].rows[1].alphaY).toBeCloseTo(at3.alphaY, 12);
    expect(r.convergence[2].rows[2]).toMatchObject({ tx: r.atoms[48].tx, alphaX: r.atoms[48].alphaX });
    expect(r.subset).toHaveLength(8);
    for (const id of r.subset!) expect(r.atoms.map((a) => a.id)).toContain(id);

    // A run with it: its atoms.csv is the library, its metrics and report say RCWA and not approximate.
    const saved = await designer.post(`/api/projects/${projectId}/revisions`, { design: { ...deflectorDesign(), atomLibrary: { source: 'library', id: build.libraryId } } });
    expect(saved.status, JSON.stringify(saved.body)).toBe(201);
    const run = await waitForRun(designer, projectId, (await designer.post(`/api/projects/${projectId}/revisions/${saved.body.revision.number}/runs`)).body.run.id);
    expect(run.status, run.error ?? '').toBe('succeeded');
    const metrics = JSON.parse((await download(designer, `/api/projects/${projectId}/runs/${run.id}/artifacts/metrics.json`)).body.toString('utf8'));
    expect(metrics.library).toMatchObject({ name: 'Test nitride pillars', atoms: 49, approximate: false, source: summary.source });
    // The run page reads the same record from the run's plot data.
    expect((run.plots as { library?: unknown }).library).toEqual(metrics.library);
    const report = (await designer.get(`/api/projects/${projectId}/runs/${run.id}/report`)).body.report;
    expect(report.library).toMatchObject({ approximate: false, source: summary.source });
    // The fab package's README says where the library comes from, not that an uploader vouched for it.
    const readme = fabReadme({
      folder: 'f',
      projectName: 'p',
      designName: 'd',
      revisionNumber: 1,
      runId: run.id,
      files: [],
      cells: 64,
      periodNm: 450,
      wavelengthNm: 633,
      gds: { layer: 1, datatype: 0, dbUnitNm: 1, regenerated: false },
      library: report.library,
      exportNote: '',
    });
    expect(readme).toContain(`Test nitride pillars — source: ${summary.source}.`);
    expect(readme).toMatch(/Not approximate: computed in Phasewright by rigorous coupled-wave analysis/);
  });

  it('cancel stops a running build at once: its row says cancelled, no library is stored, and the next build runs on the freed thread', async () => {
    const started = await designer.post(base(), { spec: longSpec(), scope: 'project' });
    expect(started.status, JSON.stringify(started.body)).toBe(202);
    const id = started.body.build.id as number;
    // Progress reaches the row while it computes: atom i of 400.
    const { build: running } = await waitForBuild(designer, projectId, id, (b) => (b.progress?.atom ?? 0) >= 2);
    expect(running).toMatchObject({ status: 'running', progress: { atoms: 400 } });
    const cancelled = await designer.post(`${base()}/${id}/cancel`);
    expect(cancelled.status, JSON.stringify(cancelled.body)).toBe(200);
    expect(cancelled.body.build).toMatchObject({ status: 'cancelled', libraryId: null });
    expect((await designer.post(`${base()}/${id}/cancel`)).status).toBe(409);

    // One pool thread in the tests: a build still computing would hold it for tens of seconds more.
    const t0 = Date.now();
    const next = await designer.post(base(), { spec: smallSpec(7, 5), scope: 'project' });
    const done = await waitForBuild(designer, projectId, next.body.build.id, undefined, 20_000);
    expect(done.build.status, done.build.error ?? '').toBe('succeeded');
    console.log(`${engine}: a 7 × 7 build after a cancel finished ${Date.now() - t0} ms after it was queued`);
    const after = (await designer.get(`${base()}/${id}`)).body;
    expect(after.build).toMatchObject({ status: 'cancelled', libraryId: null });
    expect(after.result).toBeNull();
    const listed = (await designer.get(base())).body.builds as LibraryBuild[];
    expect(listed.map((b) => b.id).slice(0, 2)).toEqual([next.body.build.id, id]);
  });
});

describe('library builds: validation, roles, personal libraries', () => {
  let t: TestApp;
  let owner: ApiClient;
  let ownerId: number;
  let colleague: ApiClient;
  let viewer: ApiClient;
  let projectId: number;
  const base = () => `/api/projects/${projectId}/library-builds`;

  beforeAll(async () => {
    t = await createTestApp({ NK_TABLE_MAX_ROWS: '5' });
    const ownerUser = await makeUser({ name: 'Owner' });
    ownerId = ownerUser.id;
    owner = await signedInClient(t.app, ownerUser);
    const colleagueUser = await makeUser({ name: 'Colleague' });
    const viewerUser = await makeUser({ name: 'Viewer' });
    colleague = await signedInClient(t.app, colleagueUser);
    viewer = await signedInClient(t.app, viewerUser);
    projectId = (await owner.post('/api/projects', { name: 'Library roles' })).body.project.id;
    await owner.post(`/api/projects/${projectId}/members`, { email: colleagueUser.email, role: 'designer' });
    await owner.post(`/api/projects/${projectId}/members`, { email: viewerUser.email, role: 'viewer' });
  });
  afterAll(async () => {
    await t?.close();
  });

  it('a bad spec gets 400 naming each field and what to fix; so do a missing scope, too few atoms and a subset larger than the sweep', async () => {
    const bad = await owner.post(base(), { spec: { ...smallSpec(7, 5), periodNm: -1, harmonics: 4, pillar: 'unobtainium' }, scope: 'project' });
    expect(bad.status).toBe(400);
    expect(bad.body.details['spec.periodNm']).toMatch(/from 50 to 5000 nm, got -1/);
    expect(bad.body.details['spec.harmonics']).toMatch(/odd whole number/);
    expect(bad.body.details['spec.pillar']).toMatch(/unknown material 'unobtainium'/);
    expect(bad.body.error).toMatch(/3 problems/);
    const longName = await owner.post(base(), { spec: { ...smallSpec(7, 5), pillar: { name: 'x'.repeat(61), n: 2 } }, scope: 'project' });
    expect(longName.status).toBe(400);
    expect(longName.body.details['spec.pillar.name']).toBe('at most 60 characters');
    const noScope = await owner.post(base(), { spec: smallSpec(7, 5) });
    expect(noScope.status).toBe(400);
    expect(noScope.body.details.scope).toMatch(/project, personal/);
    // Fewer than eight atoms cannot cover 2π in eight steps: the library check every upload passes refuses them.
    const few = await owner.post(base(), { spec: smallSpec(2, 5), scope: 'project' });
    expect(few.status).toBe(400);
    expect(few.body.details['spec.sweep.stepNm']).toMatch(/2 × 2 = 4 atoms; an atom library needs at least 8/);
    const subset = await owner.post(base(), { spec: smallSpec(3, 5), scope: 'project', subsetSize: 10 });
    expect(subset.status).toBe(400);
    expect(subset.body.details.subsetSize).toMatch(/at most 9/);
    const estimate = await owner.post(`${base()}/estimate`, { spec: { ...smallSpec(7, 5), sweep: { minFeatureNm: 500, minGapNm: 0, stepNm: 10 } } });
    expect(estimate.status).toBe(400);
    expect(estimate.body.details['spec.sweep.minFeatureNm']).toMatch(/no pillar fits/);
    expect((await owner.get(base())).body.builds).toEqual([]);
  });

  it('a tabulated n, k material within NK_TABLE_MAX_ROWS builds on the workers; a longer table gets 400 naming the limit', async () => {
    // Rows near Si₃N₄'s index at 633 nm (n ≈ 2.02; Luke et al. 2015 — here only as plausible numbers).
    const rows = (count: number) => Array.from({ length: count }, (_, i) => [560 + 40 * i, 2.03 - 0.002 * i, 0]);
    const long = await owner.post(`${base()}/estimate`, { spec: { ...smallSpec(7, 5), pillar: { name: 'Lab nitride', source: 'ellipsometry', table: rows(6) } } });
    expect(long.status).toBe(400);
    expect(long.body.details['spec.pillar.table']).toMatch(/6 rows is more than 5/);
    const started = await owner.post(base(), { spec: { ...smallSpec(7, 5, 'Tabulated nitride'), pillar: { name: 'Lab nitride', source: 'ellipsometry', table: rows(5) } }, scope: 'project' });
    expect(started.status, JSON.stringify(started.body)).toBe(202);
    const { build } = await waitForBuild(owner, projectId, started.body.build.id);
    expect(build.status, build.error ?? '').toBe('succeeded');
    expect(build.libraryId).not.toBeNull();
  });

  it('with sweep.anyRotation the stored library keeps only the pillars that clear the smallest gap at any rotation; the plots keep the whole grid', async () => {
    const spec = { ...smallSpec(9, 5, 'Rotation-safe nitride'), sweep: { minFeatureNm: 60, minGapNm: 50, stepNm: 40, anyRotation: true } };
    const started = await owner.post(base(), { spec, scope: 'project' });
    expect(started.status, JSON.stringify(started.body)).toBe(202);
    const { build, result } = await waitForBuild(owner, projectId, started.body.build.id);
    expect(result!.atoms).toHaveLength(81);
    // Counted here from the geometry alone: squares up to P − gap = 400 nm; other rectangles with √(w² + l²) ≤ 400 nm.
    const sizes = result!.sizesNm;
    let fitting = 0;
    for (const w of sizes) for (const l of sizes) if (w === l ? w <= 400 : Math.hypot(w, l) <= 400) fitting++;
    expect(fitting).toBeLessThan(81);
    expect(build.status, build.error ?? '').toBe('succeeded');
    const stored = (await owner.get(`/api/projects/${projectId}/atom-libraries/${build.libraryId}`)).body.atomLibrary;
    expect(stored.atomCount).toBe(fitting);
    // The build's result says so too (the build page shows "keeps N of these 81 atoms").
    expect(result!.storedCount).toBe(fitting);
  });

  it('a build whose phases leave a gap larger than 2π/8 stores no library and says why; its atoms stay for the plots', async () => {
    // 3 × 3 pillars (60, 110, 160 nm): the phases leave a gap of several radians on each axis.
    const started = await owner.post(base(), { spec: smallSpec(3, 5), scope: 'project' });
    expect(started.status, JSON.stringify(started.body)).toBe(202);
    const { build, result } = await waitForBuild(owner, projectId, started.body.build.id);
    expect(build.status).toBe('failed');
    expect(build.error).toMatch(/cannot make an atom library runs could use: phases on the x axis leave a gap of \d+\.\d+ rad, more than 2π\/8 = 0\.785 rad/);
    expect(build.error).toMatch(/kept for the plots; take a finer sweep step/);
    expect(build.libraryId).toBeNull();
    expect(result!.atoms).toHaveLength(9);
  });

  it('a build left running by a stopped server is taken up again at the next start; after three starts it fails saying so', async () => {
    const spec = smallSpec(7, 5, 'Interrupted pillars');
    const row = { projectId, scope: 'project' as const, name: spec.name, spec, subsetSize: null, estimateSeconds: 1, warnings: [], createdById: ownerId, queuedAt: new Date() };
    const interrupted = await LibraryBuildModel.create({ ...row, status: 'running', attempts: 1, startedAt: new Date() });
    const worn = await LibraryBuildModel.create({ ...row, status: 'running', attempts: 3, startedAt: new Date() });
    // A second start of the queue, as `npm start` after a stop: its recovery finds both rows.
    const restarted = createEmbeddedRunQueue({ logger: t.ctx.logger, threads: 1 });
    try {
      await restarted.start();
      const { build } = await waitForBuild(owner, projectId, interrupted.id);
      expect(build.status, build.error ?? '').toBe('succeeded');
      expect((await LibraryBuildModel.findByPk(interrupted.id))?.attempts).toBe(2);
      const failed = (await owner.get(`${base()}/${worn.id}`)).body.build as LibraryBuild;
      expect(failed).toMatchObject({ status: 'failed', libraryId: null });
      expect(failed.error).toMatch(/the server stopped during this library build 3 times; start a smaller one/);
    } finally {
      await restarted.stop();
    }
  });

  it('a viewer reads builds but cannot start or cancel one', async () => {
    const started = await viewer.post(base(), { spec: smallSpec(7, 5), scope: 'personal' });
    expect(started.status).toBe(403);
    expect((await viewer.post(`${base()}/estimate`, { spec: smallSpec(7, 5) })).status).toBe(403);
    expect((await viewer.get(base())).status).toBe(200);
  });

  it('a personal build and its library are seen by the person who started it only', async () => {
    const started = await colleague.post(base(), { spec: smallSpec(7, 5, 'My own pillars'), scope: 'personal' });
    expect(started.status, JSON.stringify(started.body)).toBe(202);
    const id = started.body.build.id as number;
    const { build } = await waitForBuild(colleague, projectId, id);
    expect(build.status, build.error ?? '').toBe('succeeded');
    const mine = (await colleague.get(`/api/projects/${projectId}/atom-libraries`)).body.atomLibraries as AtomLibrarySummary[];
    expect(mine.find((l) => l.id === build.libraryId)).toMatchObject({ scope: 'personal', approximate: false, usable: true, owner: { name: 'Colleague' } });
    for (const other of [owner, viewer]) {
      const theirs = (await other.get(`/api/projects/${projectId}/atom-libraries`)).body.atomLibraries as AtomLibrarySummary[];
      expect(theirs.map((l) => l.id)).not.toContain(build.libraryId);
      expect((await other.get(`/api/projects/${projectId}/atom-libraries/${build.libraryId}`)).status).toBe(404);
      expect((await other.get(`${base()}/${id}`)).status).toBe(404);
      expect(((await other.get(base())).body.builds as LibraryBuild[]).map((b) => b.id)).not.toContain(id);
    }
    expect((await owner.post(`${base()}/${id}/cancel`)).status).toBe(404);
    expect(((await colleague.get(base())).body.builds as LibraryBuild[]).map((b) => b.id)).toContain(id);
  });
});

describe('library builds under the run quotas and their time limit', () => {
  let t: TestApp;
  let designer: ApiClient;
  let projectId: number;
  const base = () => `/api/projects/${projectId}/library-builds`;

  beforeAll(async () => {
    t = await createTestApp({ RUNS_PER_USER: '1', LIBRARY_BUILD_TIME_LIMIT_MINUTES: '0.03' });
    designer = await signedInClient(t.app, await makeUser({ name: 'Busy Designer' }));
    projectId = (await designer.post('/api/projects', { name: 'Library quotas' })).body.project.id;
  });
  afterAll(async () => {
    await t?.close();
  });

  it('a build counts as a run: the next build or run gets 429 naming RUNS_PER_USER; past LIBRARY_BUILD_TIME_LIMIT_MINUTES it fails saying so', async () => {
    const first = await designer.post(base(), { spec: longSpec(), scope: 'project' });
    expect(first.status, JSON.stringify(first.body)).toBe(202);
    const second = await designer.post(base(), { spec: smallSpec(7, 5), scope: 'project' });
    expect(second.status).toBe(429);
    expect(second.body.error).toMatch(/runs, tolerance studies and library builds queued or running.*\(RUNS_PER_USER = 1\)/);
    const revision = await designer.post(`/api/projects/${projectId}/revisions`, { design: deflectorDesign() });
    const run = await designer.post(`/api/projects/${projectId}/revisions/${revision.body.revision.number}/runs`);
    expect(run.status).toBe(429);
    expect(run.body.error).toMatch(/RUNS_PER_USER = 1/);

    const { build } = await waitForBuild(designer, projectId, first.body.build.id);
    expect(build.status).toBe('failed');
    expect(build.error).toMatch(/time limit of 0\.03 minutes \(LIBRARY_BUILD_TIME_LIMIT_MINUTES\)/);
    expect(build.libraryId).toBeNull();
    // The estimate says beforehand that such a build cannot finish in time.
    const estimate = await designer.post(`${base()}/estimate`, { spec: longSpec() });
    expect(estimate.body.warnings.join(' ')).toMatch(/exceeds the time limit of 0\.03 min \(LIBRARY_BUILD_TIME_LIMIT_MINUTES\)/);
    // The slot is free again.
    const again = await designer.post(base(), { spec: smallSpec(7, 5), scope: 'project' });
    expect(again.status, JSON.stringify(again.body)).toBe(202);
    await designer.post(`${base()}/${again.body.build.id}/cancel`);
  });
});
