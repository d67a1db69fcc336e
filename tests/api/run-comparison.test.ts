/**
 * Comparing two runs of a project: GET /runs/compare (summaries, every metric with Δ and %, the far fields'
 * common brightness scale) and GET /runs/compare/far-field.png (run a, run b, the difference b − a). The
 * scales are checked against numpy reading the runs' own farfield_*.npy files; the peak of a +10° tilt sits
 * at u = sin 10° (grating equation, sign convention exp(−iωt): Goodman, Introduction to Fourier Optics).
 */
import { execFileSync } from 'node:child_process';
import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { PNG } from 'pngjs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DesignInput } from '../../shared/schemas/design';
import type { RunComparison } from '../../shared/schemas/run-comparison';
import type { RunDetail } from '../../shared/schemas/runs';
import { deflectorDesign, download, waitForRun } from '../support/designs';
import { PYTHON } from '../support/python';
import { ApiClient, createTestApp, makeUser, signedInClient, type TestApp } from '../support/test-app';

let t: TestApp;
let owner: ApiClient;
let viewer: ApiClient;
let outsider: ApiClient;
let projectId: number;
let otherProjectRunId: number;
let work: string;
/** run 1: tilt +10° in A; run 2: tilt +12° in A; run 3: run 1 on 128² cells; run 4: run 1 with P = 500 nm. */
const runs: RunDetail[] = [];

function deflector(change: (d: DesignInput) => void): DesignInput {
  const design = deflectorDesign();
  change(design);
  return design;
}

async function runDesign(client: ApiClient, project: number, design: DesignInput): Promise<RunDetail> {
  const saved = await client.post(`/api/projects/${project}/revisions`, { design, message: '' });
  expect(saved.status, JSON.stringify(saved.body)).toBe(201);
  const started = await client.post(`/api/projects/${project}/revisions/${saved.body.revision.number}/runs`);
  expect(started.status).toBe(202);
  const run = await waitForRun(client, project, started.body.run.id);
  expect(run.status, run.error ?? '').toBe('succeeded');
  return run;
}

beforeAll(async () => {
  t = await createTestApp();
  const ownerUser = await makeUser({ name: 'Compare Owner' });
  const viewerUser = await makeUser({ name: 'Compare Viewer' });
  owner = await signedInClient(t.app, ownerUser);
  viewer = await signedInClient(t.app, viewerUser);
  outsider = await signedInClient(t.app, await makeUser({ name: 'Compare Outsider' }));
  projectId = (await owner.post('/api/projects', { name: 'Deflector comparisons' })).body.project.id;
  await owner.post(`/api/projects/${projectId}/members`, { email: viewerUser.email, role: 'viewer' }).expect(201);
  const tilt = (deg: number) => (d: DesignInput) => {
    d.channels.a.terms = [{ kind: 'tilt', thetaXDeg: deg }];
  };
  runs.push(await runDesign(owner, projectId, deflector(tilt(10))));
  runs.push(await runDesign(owner, projectId, deflector(tilt(12))));
  runs.push(await runDesign(owner, projectId, deflector((d) => void (d.setup.cells = 128))));
  runs.push(await runDesign(owner, projectId, deflector((d) => void (d.setup.periodNm = 500))));
  const other = (await owner.post('/api/projects', { name: 'Another project' })).body.project.id;
  otherProjectRunId = (await runDesign(owner, other, deflectorDesign())).id;
  work = await mkdtemp(join(tmpdir(), 'pw-compare-'));
}, 120_000);

afterAll(async () => {
  if (work) await rm(work, { recursive: true, force: true });
  await t?.close();
});

const compareUrl = (a: number | string, b: number | string) => `/api/projects/${projectId}/runs/compare?a=${a}&b=${b}`;
const pictureUrl = (a: number, b: number, channel: string, show: string) =>
  `/api/projects/${projectId}/runs/compare/far-field.png?a=${a}&b=${b}&channel=${channel}&show=${show}`;

async function npyPath(run: RunDetail, name: string): Promise<string> {
  const res = await download(owner, `/api/projects/${projectId}/runs/${run.id}/artifacts/${name}`);
  expect(res.status).toBe(200);
  const path = join(work, `run${run.id}-${name}`);
  await writeFile(path, res.body);
  return path;
}

/**
 * numpy's reading of two far fields: each mean-pooled to side m, times (N/m)²/N² (flat illumination: the
 * incident power is N² cells of amplitude 1), the brightest pixel more than 2 px from the zero order at
 * (m/2, m/2) of either, the largest |b − a|, and where each map and the difference peak (row, column).
 */
const PY_SCALES = `
import json, sys
import numpy as np
m = int(sys.argv[3])
def pooled(path):
    f = np.load(path).astype(np.float64)
    n = f.shape[0]
    k = n // m
    return f.reshape(m, k, m, k).mean(axis=(1, 3)) * k * k / (n * n)
a, b = pooled(sys.argv[1]), pooled(sys.argv[2])
y, x = np.mgrid[0:m, 0:m]
away = (np.abs(x - m // 2) > 2) | (np.abs(y - m // 2) > 2)
d = b - a
print(json.dumps({
  "fullScale": max(a[away].max(), b[away].max()),
  "differenceScale": np.abs(d).max(),
  "peakA": [int(v) for v in np.unravel_index(np.argmax(np.where(away, a, 0)), a.shape)],
  "peakB": [int(v) for v in np.unravel_index(np.argmax(np.where(away, b, 0)), b.shape)],
}))
`;

function numpyScales(pathA: string, pathB: string, m: number) {
  return JSON.parse(execFileSync(PYTHON, ['-c', PY_SCALES, pathA, pathB, String(m)], { encoding: 'utf8' })) as {
    fullScale: number;
    differenceScale: number;
    peakA: [number, number];
    peakB: [number, number];
  };
}

async function picture(a: number, b: number, channel: string, show: string): Promise<PNG> {
  const res = await download(owner, pictureUrl(a, b, channel, show));
  expect(res.status, res.body.toString('utf8').slice(0, 200)).toBe(200);
  expect(res.headers['content-type']).toBe('image/png');
  return PNG.sync.read(res.body);
}

/**
 * The colour at array index [iv, iu] (numpy's row, column; iv grows with v) of a picture painted +v up
 * (README "Picture convention"): the array's row iv is the picture's row height − 1 − iv.
 */
const pixel = (png: PNG, [iv, iu]: [number, number]) => {
  const at = 4 * ((png.height - 1 - iv) * png.width + iu);
  return [...png.data.subarray(at, at + 3)];
};

describe('run comparison', () => {
  it('lists every metric of both runs with its change b − a and the change in % of a', async () => {
    const res = await viewer.get(compareUrl(runs[0].id, runs[1].id));
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const comparison = res.body.comparison as RunComparison;
    expect(comparison.a).toMatchObject({ id: runs[0].id, revisionNumber: runs[0].revisionNumber, status: 'succeeded' });
    expect(comparison.b).toMatchObject({ id: runs[1].id, revisionNumber: runs[1].revisionNumber });
    const count = (run: RunDetail) => Object.values(run.metrics ?? {}).reduce((sum, group) => sum + Object.keys(group).length, 0);
    expect(comparison.metrics.length).toBe(count(runs[0]));
    for (const row of comparison.metrics) {
      const a = runs[0].metrics![row.section][row.key].value;
      const b = runs[1].metrics![row.section][row.key].value;
      expect(row.a).toBe(a);
      expect(row.b).toBe(b);
      if (a === null || b === null) {
        expect(row.delta).toBeNull();
        continue;
      }
      expect(row.delta).toBeCloseTo(b - a, 12);
      if (a === 0) expect(row.percent).toBeNull();
      else expect(row.percent!).toBeCloseTo((100 * (b - a)) / Math.abs(a), 9);
    }
    // The design did not change its grid: the device section's figures stay as they were.
    expect(comparison.metrics.filter((r) => r.section === 'run' && r.key === 'cells').map((r) => r.delta)).toEqual([0]);
  });

  it('paints both far fields on one brightness scale, the one numpy finds in the stored arrays', async () => {
    const [one, two] = runs;
    const res = await owner.get(compareUrl(one.id, two.id));
    const farFields = (res.body.comparison as RunComparison).farFields!;
    expect(farFields.side).toBe(64);
    expect(farFields.differenceNote).toBeNull();
    const expected = numpyScales(await npyPath(one, 'farfield_a.npy'), await npyPath(two, 'farfield_a.npy'), 64);
    const scale = farFields.scales.find((s) => s.channel === 'a')!;
    // float32 arrays, sums in float32 on the server: agreement to 1e-5 relative.
    expect(scale.fullScale).toBeCloseTo(expected.fullScale, 5);
    expect(Math.abs(scale.fullScale / expected.fullScale - 1)).toBeLessThan(1e-5);
    expect(Math.abs(scale.differenceScale! / expected.differenceScale - 1)).toBeLessThan(1e-5);

    // The +10° tilt's peak at u = sin 10° (Goodman): column 32 + sin 10°/(λ/NP) on the centre row.
    const deltaU = 633 / (64 * 450);
    expect(expected.peakA).toEqual([32, 32 + Math.round(Math.sin((10 * Math.PI) / 180) / deltaU)]);
    expect(expected.peakB[1]).toBe(32 + Math.round(Math.sin((12 * Math.PI) / 180) / deltaU));

    const pictureA = await picture(one.id, two.id, 'a', 'a');
    const pictureB = await picture(one.id, two.id, 'a', 'b');
    expect([pictureA.width, pictureA.height]).toEqual([64, 64]);
    // The brighter run's peak is full scale (the top colour); the other run's peak, on the same scale, is not brighter.
    const top = [255, 246, 224];
    const brighterIsB = scale.fullScale === expected.fullScale && pixel(pictureB, expected.peakB).join() === top.join();
    expect(pixel(brighterIsB ? pictureB : pictureA, brighterIsB ? expected.peakB : expected.peakA)).toEqual(top);

    // The difference b − a: amber (red above blue) where run 2's beam went, teal (blue above red) where run 1's was.
    const difference = await picture(one.id, two.id, 'a', 'difference');
    const [r2, , b2] = pixel(difference, expected.peakB);
    const [r1, , b1] = pixel(difference, expected.peakA);
    expect(r2).toBeGreaterThan(b2);
    expect(b1).toBeGreaterThan(r1);
  });

  it('pools a larger design to the smaller one’s side, each as its share of its own incident power', async () => {
    const [one, , large] = runs;
    const res = await owner.get(compareUrl(one.id, large.id));
    const farFields = (res.body.comparison as RunComparison).farFields!;
    expect(farFields.side).toBe(64);
    const expected = numpyScales(await npyPath(one, 'farfield_b.npy'), await npyPath(large, 'farfield_b.npy'), 64);
    const scale = farFields.scales.find((s) => s.channel === 'b')!;
    expect(Math.abs(scale.fullScale / expected.fullScale - 1)).toBeLessThan(1e-5);
    expect(Math.abs(scale.differenceScale! / expected.differenceScale - 1)).toBeLessThan(1e-5);
    expect((await picture(one.id, large.id, 'b', 'difference')).width).toBe(64);
  });

  it('draws no difference between runs that sample different directions, and says why', async () => {
    const [one, , , wide] = runs;
    const res = await owner.get(compareUrl(one.id, wide.id));
    const farFields = (res.body.comparison as RunComparison).farFields!;
    expect(farFields.differenceNote).toMatch(/different directions/);
    expect(farFields.scales.every((s) => s.differenceScale === null)).toBe(true);
    expect(farFields.extent.a).toBeCloseTo(633 / 450 / 2, 12);
    expect(farFields.extent.b).toBeCloseTo(633 / 500 / 2, 12);
    const diff = await owner.get(pictureUrl(one.id, wide.id, 'a', 'difference'));
    expect(diff.status).toBe(409);
    expect(diff.body.error).toMatch(/different directions/);
    expect((await owner.get(pictureUrl(one.id, wide.id, 'a', 'b'))).status).toBe(200);

    // Swapped sides: the same scales, the extents and the pictures change places.
    const back = (await owner.get(compareUrl(wide.id, one.id))).body.comparison as RunComparison;
    expect(back.farFields!.scales).toEqual(farFields.scales);
    expect(back.farFields!.extent).toEqual({ a: farFields.extent.b, b: farFields.extent.a });
    const forward = await download(owner, pictureUrl(one.id, wide.id, 'b', 'b'));
    const reversed = await download(owner, pictureUrl(wide.id, one.id, 'b', 'a'));
    expect(reversed.body.equals(forward.body)).toBe(true);
  });

  it('shows the metrics of a run whose files were deleted, and says why its far fields are missing', async () => {
    const gone = await runDesign(owner, projectId, deflector((d) => void (d.name = 'Files deleted later')));
    expect((await owner.delete(`/api/projects/${projectId}/runs/${gone.id}/files`)).status).toBe(200);
    const res = await viewer.get(compareUrl(runs[0].id, gone.id));
    expect(res.status).toBe(200);
    const comparison = res.body.comparison as RunComparison;
    expect(comparison.farFields).toBeNull();
    expect(comparison.farFieldsNote).toBe(`No far fields to compare: the files of run ${gone.id} were deleted.`);
    expect(comparison.metrics.length).toBeGreaterThan(5);
    const picture = await viewer.get(pictureUrl(runs[0].id, gone.id, 'a', 'a'));
    expect(picture.status).toBe(409);
    expect(picture.body.error).toMatch(/were deleted/);
  });

  it('answers bad ids and bad choices with a 4xx saying what to fix', async () => {
    const [one, two] = runs;
    const cases: [string, number, RegExp][] = [
      [compareUrl('abc', two.id), 400, /a: must be a run id/],
      [compareUrl(one.id, one.id), 400, /choose two different runs/],
      [`/api/projects/${projectId}/runs/compare?a=${one.id}`, 400, /b: must be a run id/],
      [compareUrl(one.id, 99999999), 404, /This project has no run 99999999/],
      [compareUrl(otherProjectRunId, one.id), 404, new RegExp(`This project has no run ${otherProjectRunId}`)],
      [pictureUrl(one.id, two.id, 'c', 'a'), 400, /channel must be a or b/],
      [pictureUrl(one.id, two.id, 'a', 'sum'), 400, /show must be a, b or difference/],
    ];
    for (const [url, status, message] of cases) {
      const res = await owner.get(url);
      expect(res.status, url).toBe(status);
      expect(res.body.error, url).toMatch(message);
    }
  });

  it('lets members of the project read comparisons (viewers too) and nobody else', async () => {
    const [one, two] = runs;
    expect((await viewer.get(pictureUrl(one.id, two.id, 'b', 'a'))).status).toBe(200);
    expect((await outsider.get(compareUrl(one.id, two.id))).status).toBe(404);
    expect((await outsider.get(pictureUrl(one.id, two.id, 'a', 'a'))).status).toBe(404);
    const anonymous = await (await new ApiClient(t.app).start()).get(compareUrl(one.id, two.id));
    expect(anonymous.status).toBe(401);
  });
});
