/**
 * Design rules per project, the layout preview and the fab package of a small run (64² cells, analytic
 * channels: no phase retrieval). The zip is read back with Python's zipfile and numpy (independent of the
 * archiver that wrote it), the GDSII inside with the independent `gdsii` parser; the record layout checked
 * is that of the GDSII Stream Format Manual, release 6.0 (Calma, 1987): UNITS = [user units per database
 * unit, metres per database unit], SREF … ANGLE in degrees counter-clockwise, LAYER / DATATYPE of BOUNDARY.
 */
import { execFileSync } from 'node:child_process';
import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { readGdsLayout } from '../support/gds-read';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { FabExportModel } from '../../server/components/fab/fab.model';
import { parseAtomLibraryCsv, placementAngle, type AtomLibrary } from '../../shared/optics/atoms';
import { decodeNpy } from '../../shared/optics/npy-decode';
import type { LayoutRegion, RunDesignCheck } from '../../shared/schemas/fab';
import { deflectorDesign, download, waitForRun } from '../support/designs';
import { createTestApp, makeUser, signedInClient, type ApiClient, type TestApp } from '../support/test-app';
import { PYTHON } from '../support/python';

let t: TestApp;
let owner: ApiClient;
let designer: ApiClient;
let projectId: number;
let work: string;

beforeAll(async () => {
  t = await createTestApp();
  const ownerUser = await makeUser({ name: 'Fab Owner' });
  const designerUser = await makeUser({ name: 'Fab Designer' });
  owner = await signedInClient(t.app, ownerUser);
  designer = await signedInClient(t.app, designerUser);
  projectId = (await owner.post('/api/projects', { name: 'Fab Package' })).body.project.id;
  await owner.post(`/api/projects/${projectId}/members`, { email: designerUser.email, role: 'designer' });
  work = await mkdtemp(join(tmpdir(), 'pw-fab-'));
});
afterAll(async () => {
  await t?.close();
  if (work) await rm(work, { recursive: true, force: true });
});

function put(client: ApiClient, url: string, body: object) {
  return client.agent.put(url).set('x-csrf-token', client.csrfToken).send(body);
}

async function finishedRun(): Promise<number> {
  const revision = await owner.post(`/api/projects/${projectId}/revisions`, { design: deflectorDesign() });
  expect(revision.status, JSON.stringify(revision.body)).toBe(201);
  const started = await owner.post(`/api/projects/${projectId}/revisions/${revision.body.revision.number}/runs`);
  const run = await waitForRun(owner, projectId, started.body.run.id);
  expect(run.status, run.error ?? '').toBe('succeeded');
  return run.id;
}

async function artifact(runId: number, name: string): Promise<Buffer> {
  const res = await download(owner, `/api/projects/${projectId}/runs/${runId}/artifacts/${name}`);
  expect(res.status).toBe(200);
  return res.body as Buffer;
}

/** The run's stored arrays and library, decoded independently of the server's reader. */
async function runArrays(runId: number) {
  const index = decodeNpy(new Uint8Array(await artifact(runId, 'atom_index.npy')));
  const theta = decodeNpy(new Uint8Array(await artifact(runId, 'theta.npy')));
  const { library } = parseAtomLibraryCsv((await artifact(runId, 'atoms.csv')).toString('utf8'));
  return { n: index.shape[0], atomIndex: index.data as Int32Array, theta: theta.data as Float64Array, library };
}

/** Lists the zip with Python's zipfile and loads every .npy member with numpy straight from the zip. */
const PY_LIST = `
import io, json, sys, zipfile
import numpy as np
z = zipfile.ZipFile(sys.argv[1])
assert z.testzip() is None, 'CRC mismatch'
out = {'files': {i.filename: i.file_size for i in z.infolist()}, 'npy': {}}
for name in z.namelist():
    if name.endswith('.npy'):
        a = np.load(io.BytesIO(z.read(name)))
        out['npy'][name] = {'shape': list(a.shape), 'dtype': str(a.dtype), 'sum': float(a.astype('float64').sum())}
gds = [n for n in z.namelist() if n.endswith('.gds')]
open(sys.argv[2], 'wb').write(z.read(gds[0]))
print(json.dumps(out))
`;

async function unzip(zip: Buffer, tag: string) {
  const zipPath = join(work, `${tag}.zip`);
  const gdsPath = join(work, `${tag}.gds`);
  await writeFile(zipPath, zip);
  const listing = JSON.parse(execFileSync(PYTHON, ['-c', PY_LIST, zipPath, gdsPath], { encoding: 'utf8' })) as {
    files: Record<string, number>;
    npy: Record<string, { shape: number[]; dtype: string; sum: number }>;
  };
  const { readFile } = await import('node:fs/promises');
  return { ...listing, gds: new Uint8Array(await readFile(gdsPath)) };
}

/** GDSII read back with the independent parser, flattened over structures. */
function readGds(bytes: Uint8Array) {
  const back = readGdsLayout(bytes);
  const all = [...back.structures.values()];
  return {
    units: back.units,
    structures: [...back.structures.keys()],
    boundaries: all.flatMap((s) => s.boundaries.map(({ layer, datatype }) => ({ layer, datatype }))),
    srefs: all.flatMap((s) => s.srefs),
  };
}

function nonEmpty(library: AtomLibrary, atomIndex: Int32Array): number[] {
  const cells: number[] = [];
  atomIndex.forEach((k, i) => {
    if (library.atoms[k].shape !== 'empty') cells.push(i);
  });
  return cells;
}

describe('design rules of a project', () => {
  it('reads the defaults, lets the owner change them, refuses bad values and other roles', async () => {
    const initial = await designer.get(`/api/projects/${projectId}/design-rules`);
    expect(initial.status).toBe(200);
    // Defaults = DEFAULT_DESIGN_RULES of shared/optics/drc.ts (common practice, no published source).
    expect(initial.body).toMatchObject({ rules: { minGapNm: 50, minFeatureNm: 100, maxAspectRatio: 10 }, isDefault: true });
    const bad = await put(owner, `/api/projects/${projectId}/design-rules`, { minGapNm: -5, minFeatureNm: 100, maxAspectRatio: 10 });
    expect(bad.status).toBe(400);
    expect(bad.body.details.minGapNm).toMatch(/greater than 0/);
    const missing = await put(owner, `/api/projects/${projectId}/design-rules`, { minGapNm: 40 });
    expect(missing.status).toBe(400);
    expect(Object.keys(missing.body.details)).toEqual(expect.arrayContaining(['minFeatureNm', 'maxAspectRatio']));
    expect((await put(designer, `/api/projects/${projectId}/design-rules`, { minGapNm: 40, minFeatureNm: 100, maxAspectRatio: 10 })).status).toBe(403);
    const saved = await put(owner, `/api/projects/${projectId}/design-rules`, { minGapNm: 40, minFeatureNm: 90, maxAspectRatio: 12 });
    expect(saved.status).toBe(200);
    expect(saved.body).toMatchObject({ rules: { minGapNm: 40, minFeatureNm: 90, maxAspectRatio: 12 }, isDefault: false, updatedBy: { name: 'Fab Owner' } });
    await put(owner, `/api/projects/${projectId}/design-rules`, { minGapNm: 50, minFeatureNm: 100, maxAspectRatio: 10 });
  });
});

describe('a clean layout', () => {
  let runId: number;
  beforeAll(async () => {
    runId = await finishedRun();
  }, 60_000);

  it('passes the design-rule check and records the rules used', async () => {
    const res = await designer.get(`/api/projects/${projectId}/runs/${runId}/design-check`);
    expect(res.status).toBe(200);
    const check = res.body.check as RunDesignCheck;
    expect(check).toMatchObject({ total: 0, exportAllowed: true, rules: { minGapNm: 50, minFeatureNm: 100, maxAspectRatio: 10 } });
    const design = JSON.parse((await artifact(runId, 'design.json')).toString('utf8'));
    expect(design.designRules).toEqual({ minGapNm: 50, minFeatureNm: 100, maxAspectRatio: 10 });
  });

  it('returns the pillars of a corner region from the stored arrays', async () => {
    const { n, atomIndex, theta, library } = await runArrays(runId);
    const res = await designer.get(`/api/projects/${projectId}/runs/${runId}/layout?x0=${n - 5}&y0=0&size=8`);
    expect(res.status).toBe(200);
    const region = res.body as LayoutRegion;
    // Clipped at the layout's edge: 5 columns × 8 rows.
    expect(region).toMatchObject({ n, x0: n - 5, y0: 0, width: 5, height: 8, periodNm: 450 });
    const expected = [];
    for (let iy = 0; iy < 8; iy++) {
      for (let ix = n - 5; ix < n; ix++) {
        const atom = library.atoms[atomIndex[iy * n + ix]];
        if (atom.shape === 'empty') continue;
        expected.push({
          ix,
          iy,
          // Cell centres of README "Conventions": x = (ix − (N−1)/2)·P.
          xNm: expect.closeTo((ix - (n - 1) / 2) * 450, 6),
          yNm: expect.closeTo((iy - (n - 1) / 2) * 450, 6),
          widthNm: expect.closeTo(atom.width * 1e9, 6),
          lengthNm: expect.closeTo(atom.length * 1e9, 6),
          angleDeg: expect.closeTo((placementAngle(atom, theta[iy * n + ix]) * 180) / Math.PI, 9),
        });
      }
    }
    expect(region.pillars.length).toBeGreaterThan(0);
    expect(region.pillars).toEqual(expected.map((e) => expect.objectContaining(e)));
    expect(region.violations).toEqual([]);
  });

  it('names what to fix for a bad region', async () => {
    const big = await designer.get(`/api/projects/${projectId}/runs/${runId}/layout?x0=0&y0=0&size=129`);
    expect(big.status).toBe(400);
    expect(big.body.details.size).toMatch(/between 1 and 128/);
    const outside = await designer.get(`/api/projects/${projectId}/runs/${runId}/layout?x0=64&y0=0&size=8`);
    expect(outside.status).toBe(400);
    expect(outside.body.error).toMatch(/less than the layout's 64 cells/);
    const word = await designer.get(`/api/projects/${projectId}/runs/${runId}/layout?x0=left`);
    expect(word.status).toBe(400);
    expect(word.body.details.x0).toMatch(/whole number/);
  });

  it('streams a fab package with the stored GDSII for the default options', async () => {
    const res = await download(designer, `/api/projects/${projectId}/runs/${runId}/fab-package.zip`);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toBe('application/zip');
    expect(res.headers['content-disposition']).toMatch(/fab-package\.zip"/);
    const zip = await unzip(res.body as Buffer, 'default');
    const folder = Object.keys(zip.files)[0].split('/')[0];
    expect(folder).toMatch(/^fab-package-r\d+-run\d+$/);
    const names = Object.keys(zip.files).map((f) => f.slice(folder.length + 1));
    expect(names).toEqual(
      expect.arrayContaining([
        'layout.gds',
        'report.html',
        'export.json',
        'design.json',
        'metrics.json',
        'drc.json',
        'atoms.csv',
        'arrays/atom_index.npy',
        'arrays/theta.npy',
        'arrays/phase_a.npy',
        'arrays/delta_x.npy',
        'previews/atom_index.png',
      ]),
    );
    for (const [name, size] of Object.entries(zip.files)) expect(size, name).toBeGreaterThan(0);
    // The stored file, byte for byte.
    expect(Buffer.from(zip.gds).equals(await artifact(runId, 'layout.gds'))).toBe(true);
    const units = readGds(zip.gds).units;
    expect(units.metersPerUnit).toBeCloseTo(1e-9, 20);
    expect(zip.npy[`${folder}/arrays/atom_index.npy`]).toMatchObject({ shape: [64, 64], dtype: 'int32' });
    expect(zip.npy[`${folder}/arrays/theta.npy`]).toMatchObject({ shape: [64, 64], dtype: 'float64' });
  });

  it('regenerates the GDSII with the requested layer, datatype and database unit', async () => {
    const { atomIndex, theta, library, n } = await runArrays(runId);
    const res = await download(designer, `/api/projects/${projectId}/runs/${runId}/fab-package.zip?layer=7&datatype=3&dbUnitNm=0.5`);
    expect(res.status).toBe(200);
    const zip = await unzip(res.body as Buffer, 'options');
    const gds = readGds(zip.gds);
    // UNITS: 0.5 nm database unit, user unit 1 µm → 5e-4 user units per database unit.
    expect(gds.units.metersPerUnit).toBeCloseTo(0.5e-9, 20);
    expect(gds.units.userUnit).toBeCloseTo(5e-4, 15);
    const cells = nonEmpty(library, atomIndex);
    const used = new Set(cells.map((i) => atomIndex[i]));
    expect(gds.srefs).toHaveLength(cells.length);
    expect(gds.structures).toHaveLength(used.size + 1);
    expect(gds.boundaries.length).toBe(used.size);
    for (const b of gds.boundaries) expect(b).toEqual({ layer: 7, datatype: 3 });
    // Cells are written row by row; each ANGLE is θ reduced mod 180° (0 for square pillars, placementAngle).
    cells.forEach((i, j) => {
      const atom = library.atoms[atomIndex[i]];
      const ref = gds.srefs[j];
      expect(ref.name).toBe(`ATOM_${atomIndex[i]}`);
      expect(ref.angle).toBeCloseTo((placementAngle(atom, theta[i]) * 180) / Math.PI, 9);
      const ix = i % n;
      expect(ref.x).toBe(Math.round(((ix - (n - 1) / 2) * 450e-9) / 0.5e-9));
    });
    const before = await FabExportModel.count({ where: { runId } });
    expect(before).toBeGreaterThanOrEqual(2);
    const last = await FabExportModel.findOne({ where: { runId }, order: [['id', 'DESC']] });
    expect(last!.options).toEqual({ layer: 7, datatype: 3, dbUnitNm: 0.5, regenerated: true });
  });

  it('refuses bad export options with the field to fix', async () => {
    const res = await designer.get(`/api/projects/${projectId}/runs/${runId}/fab-package.zip?layer=300`);
    expect(res.status).toBe(400);
    expect(res.body.details.layer).toMatch(/between 0 and 255/);
    const unit = await designer.get(`/api/projects/${projectId}/runs/${runId}/fab-package.zip?dbUnitNm=abc`);
    expect(unit.status).toBe(400);
    expect(unit.body.details.dbUnitNm).toMatch(/decimal number/);
  });
});

describe('a layout that breaks the project rules', () => {
  let runId: number;
  beforeAll(async () => {
    // 420 nm minimum gap in a 450 nm lattice: every neighbour pair of pillars wider than 30 nm fails.
    const saved = await put(owner, `/api/projects/${projectId}/design-rules`, { minGapNm: 420, minFeatureNm: 100, maxAspectRatio: 10 });
    expect(saved.status).toBe(200);
    runId = await finishedRun();
  }, 60_000);
  afterAll(async () => {
    await put(owner, `/api/projects/${projectId}/design-rules`, { minGapNm: 50, minFeatureNm: 100, maxAspectRatio: 10 });
  });

  it('finds the planted gap violations with cells, values and limits', async () => {
    const check = (await designer.get(`/api/projects/${projectId}/runs/${runId}/design-check`)).body.check as RunDesignCheck;
    expect(check.rules.minGapNm).toBe(420);
    expect(check.counts.gap).toBeGreaterThan(0);
    expect(check.exportAllowed).toBe(false);
    const first = check.violations[0];
    expect(first).toMatchObject({ kind: 'gap', unit: 'nm', limit: 420 });
    expect(first.value).toBeLessThan(420);
    expect(first.neighbour).not.toBeNull();
    const region = (await designer.get(`/api/projects/${projectId}/runs/${runId}/layout?x0=${first.ix}&y0=${first.iy}&size=2`)).body as LayoutRegion;
    expect(region.violations).toEqual(expect.arrayContaining([expect.objectContaining({ kind: 'gap', ix: first.ix, iy: first.iy, neighbour: first.neighbour })]));
  });

  it('refuses export (409) until an owner overrides with a reason; a designer may not override', async () => {
    const refused = await designer.get(`/api/projects/${projectId}/runs/${runId}/fab-package.zip`);
    expect(refused.status).toBe(409);
    expect(refused.body.error).toMatch(/^Export refused: \d+ design-rule violations? \(\d+ gap\)/);
    expect(Number(refused.body.details.gap)).toBeGreaterThan(0);
    const url = `/api/projects/${projectId}/runs/${runId}/export-override`;
    expect((await designer.post(url, { reason: 'The fab can resolve these gaps on our tool.' })).status).toBe(403);
    const short = await owner.post(url, { reason: 'ok' });
    expect(short.status).toBe(400);
    expect(short.body.details.reason).toMatch(/at least 10 characters/);
    const reason = 'Test structure only: gaps below 420 nm are fine for this dose test.';
    const ok = await owner.post(url, { reason });
    expect(ok.status).toBe(201);
    expect(ok.body.check).toMatchObject({ exportAllowed: true, overrides: [{ reason, by: { name: 'Fab Owner' } }] });

    const res = await download(designer, `/api/projects/${projectId}/runs/${runId}/fab-package.zip`);
    expect(res.status).toBe(200);
    const zip = await unzip(res.body as Buffer, 'override');
    expect(Object.keys(zip.files).some((f) => f.endsWith('/report.html'))).toBe(true);
    const html = execFileSync(PYTHON, ['-c', 'import sys, zipfile; z = zipfile.ZipFile(sys.argv[1]); print(z.read([n for n in z.namelist() if n.endswith("report.html")][0]).decode())', join(work, 'override.zip')], {
      encoding: 'utf8',
    });
    expect(html).toContain('Test structure only: gaps below 420 nm are fine for this dose test.');
    expect(html).toContain('Export override by Fab Owner');
    expect(html).toContain('ANSI Z136.1 / IEC 60825-1');
    expect(html).toMatch(/cleanroom’s own procedures/);
    expect(html).toContain('(approximate)');
    const last = await FabExportModel.findOne({ where: { runId }, order: [['id', 'DESC']] });
    expect(last!.overrideId).toBe(ok.body.override.id);
  });
});

describe('the package explains itself', () => {
  it('README.txt names every file, its units, the frame, the library and the cautions; report.html names the uploaded picture by file name', async () => {
    // Our own bold "F" on black, uploaded under its own file name.
    const { Jimp } = await import('jimp');
    const image = new Jimp({ width: 32, height: 32, color: 0x000000ff });
    for (let y = 4; y < 28; y++) for (let x = 8; x < 26; x++) if (x < 13 || y < 9 || (y >= 14 && y < 18 && x < 22)) image.setPixelColor(0xffffffff, x, y);
    const uploaded = await owner.agent
      .post(`/api/projects/${projectId}/uploads`)
      .set('x-csrf-token', owner.csrfToken)
      .field('kind', 'image')
      .attach('file', await image.getBuffer('image/png'), { filename: 'bold-F.png', contentType: 'image/png' });
    expect(uploaded.status, JSON.stringify(uploaded.body)).toBe(201);
    const design = deflectorDesign() as { channels: { a: { terms: object[] } } };
    design.channels.a.terms = [{ kind: 'hologram', image: { source: 'upload', id: uploaded.body.upload.id }, window: { units: 'degrees', width: 8, centerX: 10, centerY: 6 }, iterations: 4 }];
    const revision = await owner.post(`/api/projects/${projectId}/revisions`, { design });
    expect(revision.status, JSON.stringify(revision.body)).toBe(201);
    const started = await owner.post(`/api/projects/${projectId}/revisions/${revision.body.revision.number}/runs`);
    const run = await waitForRun(owner, projectId, started.body.run.id);
    expect(run.status, run.error ?? '').toBe('succeeded');
    const check = (await owner.get(`/api/projects/${projectId}/runs/${run.id}/design-check`)).body.check as RunDesignCheck;
    if (!check.exportAllowed) {
      const override = await owner.post(`/api/projects/${projectId}/runs/${run.id}/export-override`, { reason: 'Test structure: the package text is what is checked here.' });
      expect(override.status, JSON.stringify(override.body)).toBe(201);
    }
    const res = await download(owner, `/api/projects/${projectId}/runs/${run.id}/fab-package.zip`);
    expect(res.status).toBe(200);
    const zipPath = join(work, 'readme.zip');
    await writeFile(zipPath, res.body as Buffer);
    // Read back with Python's zipfile, independent of the archiver that wrote it.
    const read = (suffix: string) =>
      execFileSync(PYTHON, ['-c', 'import sys, zipfile; z = zipfile.ZipFile(sys.argv[1]); print(z.read([n for n in z.namelist() if n.endswith(sys.argv[2])][0]).decode())', zipPath, suffix], { encoding: 'utf8' });
    const names = JSON.parse(execFileSync(PYTHON, ['-c', 'import sys, json, zipfile; print(json.dumps(zipfile.ZipFile(sys.argv[1]).namelist()))', zipPath], { encoding: 'utf8' })) as string[];
    const folder = names[0].split('/')[0];
    expect(names).toContain(`${folder}/README.txt`);
    const readme = read('/README.txt');
    for (const name of names) expect(readme, name).toContain(name.slice(folder.length + 1));
    expect(readme).toMatch(/phase_a\.npy\s+Designed phase of channel A per cell, radians/);
    expect(readme).toMatch(/database unit 1 nm/);
    expect(readme).toContain('x to the right and y up, seen facing the device from the side the light goes to');
    expect(readme).toContain('"Picture convention"');
    expect(readme).toContain('APPROXIMATE');
    expect(readme).toContain('ANSI Z136.1 / IEC 60825-1');
    expect(readme).toMatch(/cleanroom’s own procedures/);
    expect(readme).toMatch(/own rules come first/);

    const html = read('/report.html');
    expect(html).toContain('target picture bold-F.png');
    expect(html).not.toMatch(/image upload \d/);
    expect(html.match(/\(approximate\)/g)).toHaveLength(1);
  });
});
