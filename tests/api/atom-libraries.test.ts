import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { atomLibraryToCsv, ATOM_CSV_COLUMNS } from '../../shared/optics/atoms';
import { demoAtomLibrary } from '../../shared/optics/demo-library';
import type { AtomCsvProblem, AtomLibraryDetail, AtomLibrarySummary } from '../../shared/schemas/atom-libraries';
import { eightAtomCsv, uploadAtomLibrary } from '../support/atom-libraries';
import { deflectorDesign, download, waitForRun } from '../support/designs';
import { createTestApp, makeUser, signedInClient, type ApiClient, type TestApp } from '../support/test-app';

let t: TestApp;
let designer: ApiClient;
let projectId: number;
/** The demo library (633 nm, 450 nm) as lab data would arrive: our own CSV of it. */
const demoCsv = atomLibraryToCsv(demoAtomLibrary());

beforeAll(async () => {
  t = await createTestApp();
  designer = await signedInClient(t.app, await makeUser({ name: 'Library Designer' }));
  projectId = (await designer.post('/api/projects', { name: 'Library project' })).body.project.id;
});
afterAll(async () => {
  await t?.close();
});

/** 1-based line of the file that starts with `prefix`. */
function lineOf(csv: string, prefix: string): number {
  const index = csv.split('\n').findIndex((l) => l.startsWith(prefix));
  if (index < 0) throw new Error(`no line starts with ${prefix}`);
  return index + 1;
}

/** The CSV with the atom row `atomId` changed by `edit` (cells in ATOM_CSV_COLUMNS order). */
function editRow(csv: string, atomId: string, edit: (cells: string[]) => string[]): string {
  return csv
    .split('\n')
    .map((l) => (l.startsWith(`${atomId},`) ? edit(l.split(',')).join(',') : l))
    .join('\n');
}

const col = (name: (typeof ATOM_CSV_COLUMNS)[number]) => ATOM_CSV_COLUMNS.indexOf(name);

async function expectProblems(csv: string | Buffer, fields: Record<string, string> = {}) {
  const res = await uploadAtomLibrary(designer, projectId, csv, fields);
  expect(res.status, JSON.stringify(res.body)).toBe(400);
  expect(res.body.error).toMatch(/fix/);
  expect(Array.isArray(res.body.problems)).toBe(true);
  return res.body as { error: string; details: Record<string, string>; problems: AtomCsvProblem[] };
}

describe('CSV validation names the row and column', () => {
  it('a missing column', async () => {
    const cut = col('t_y');
    const csv = eightAtomCsv()
      .split('\n')
      .map((l) => (l.startsWith('#') || l === '' ? l : l.split(',').filter((_, i) => i !== cut).join(',')))
      .join('\n');
    const body = await expectProblems(csv);
    expect(body.details.t_y).toMatch(/missing columns: t_y/);
    expect(body.problems).toEqual([{ row: null, column: 't_y', atomId: null, message: 'missing columns: t_y' }]);
  });

  it('a cell that is not a number, and one that says NaN', async () => {
    let csv = editRow(eightAtomCsv(), 'p2', (c) => c.map((v, i) => (i === col('t_x') ? 'high' : v)));
    csv = editRow(csv, 'p5', (c) => c.map((v, i) => (i === col('phase_y_rad') ? 'NaN' : v)));
    const body = await expectProblems(csv);
    expect(body.details[`row ${lineOf(csv, 'p2,')}, t_x`]).toMatch(/t_x is not a number \(high\)/);
    expect(body.details[`row ${lineOf(csv, 'p5,')}, phase_y_rad`]).toMatch(/phase_y_rad is not a number \(NaN\)/);
    expect(body.problems.find((p) => p.column === 't_x')).toMatchObject({ row: lineOf(csv, 'p2,'), atomId: 'p2' });
  });

  it('an amplitude above 1', async () => {
    const csv = editRow(eightAtomCsv(), 'p3', (c) => c.map((v, i) => (i === col('t_x') ? '1.2' : v)));
    const body = await expectProblems(csv);
    expect(body.details[`row ${lineOf(csv, 'p3,')}, t_x`]).toMatch(/tx = 1\.2 lies outside 0…1/);
  });

  it('a duplicate atom (same id, same geometry)', async () => {
    const lines = eightAtomCsv().split('\n');
    const first = lines.findIndex((l) => l.startsWith('p1,'));
    const csv = [...lines.slice(0, -1), lines[first], ''].join('\n');
    const twinLine = csv.split('\n').length - 1;
    const body = await expectProblems(csv);
    expect(body.details[`row ${twinLine}, atom_id`]).toMatch(new RegExp(`id repeats line ${first + 1}`));
    expect(body.details[`row ${twinLine}, width_nm/length_nm/height_nm`]).toMatch(new RegExp(`same geometry as atom p1 \\(line ${first + 1}\\)`));
  });

  it('too few atoms to cover 2π', async () => {
    const csv = eightAtomCsv()
      .split('\n')
      .filter((l) => !/^p[3-7],/.test(l))
      .join('\n');
    const body = await expectProblems(csv);
    expect(body.details.atoms).toMatch(/holds 3 atoms; at least 8 are needed to cover 2π/);
    expect(body.details.phase_x_rad).toMatch(/gap/);
  });

  it('no design wavelength, no name, and a file that is not text', async () => {
    const csv = eightAtomCsv()
      .split('\n')
      .filter((l) => !l.startsWith('# design_wavelength_nm') && !l.startsWith('# name'))
      .join('\n');
    const body = await expectProblems(csv);
    expect(body.details.design_wavelength_nm).toMatch(/design_wavelength_nm: 633/);
    expect(body.details.name).toMatch(/no name/);
    const fixed = await uploadAtomLibrary(designer, projectId, csv, { name: 'Named in the form', wavelengthNm: '800' });
    expect(fixed.status, JSON.stringify(fixed.body)).toBe(201);
    expect(fixed.body.atomLibrary).toMatchObject({ name: 'Named in the form', wavelengthNm: 800, periodNm: 400, heightNm: 600 });
    const binary = await expectProblems(Buffer.from([0x50, 0x4b, 0x03, 0x04, 0x00, 0x00]));
    expect(binary.details.file).toMatch(/not text/);
  });

  it('bad form fields and a missing file get 400 naming the field', async () => {
    const scope = await uploadAtomLibrary(designer, projectId, eightAtomCsv(), { scope: 'everyone' });
    expect(scope.status).toBe(400);
    expect(scope.body.details.scope).toMatch(/personal, project/);
    const noFile = await designer.agent.post(`/api/projects/${projectId}/atom-libraries`).set('x-csrf-token', designer.csrfToken).field('scope', 'project');
    expect(noFile.status).toBe(400);
    expect(noFile.body.details.file).toBe('missing');
  });
});

describe('a valid library', () => {
  let libraryId: number;

  it('is stored, listed after the demo library, and downloads as the same CSV', async () => {
    const res = await uploadAtomLibrary(designer, projectId, demoCsv, { scope: 'project' });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const created = res.body.atomLibrary as AtomLibraryDetail;
    libraryId = created.id as number;
    expect(created).toMatchObject({ scope: 'project', wavelengthNm: 633, periodNm: 450, heightNm: 1200, approximate: true, atomCount: 498, usable: true, canDelete: true });
    expect(created.owner?.name).toBe('Library Designer');
    const list = (await designer.get(`/api/projects/${projectId}/atom-libraries`)).body.atomLibraries as AtomLibrarySummary[];
    expect(list[0]).toMatchObject({ id: 'demo', scope: 'demo', approximate: true, canDelete: false });
    expect(list.map((l) => l.id)).toContain(libraryId);
    const detail = (await designer.get(`/api/projects/${projectId}/atom-libraries/${libraryId}`)).body.atomLibrary as AtomLibraryDetail;
    expect(detail.atoms).toHaveLength(498);
    expect(detail.atoms[1]).toMatchObject({ id: demoAtomLibrary().atoms[1].id, widthNm: 120, heightNm: 1200 });
    const csv = await download(designer, `/api/projects/${projectId}/atom-libraries/${libraryId}/csv`);
    expect(csv.status).toBe(200);
    expect(csv.headers['content-type']).toMatch(/^text\/csv/);
    expect(csv.body.toString('utf8')).toBe(demoCsv);
  });

  it('the demo library reads as approximate and cannot be deleted', async () => {
    const demo = await designer.get(`/api/projects/${projectId}/atom-libraries/demo`);
    expect(demo.body.atomLibrary).toMatchObject({ id: 'demo', approximate: true, atomCount: 498 });
    expect((await download(designer, `/api/projects/${projectId}/atom-libraries/demo/csv`)).body.toString('utf8')).toBe(demoCsv);
    expect((await designer.delete(`/api/projects/${projectId}/atom-libraries/demo`)).status).toBe(403);
    expect((await designer.get(`/api/projects/${projectId}/atom-libraries/abc`)).status).toBe(400);
    expect((await designer.get(`/api/projects/${projectId}/atom-libraries/999999`)).status).toBe(404);
  });

  it('a design at another wavelength is refused, naming both values', async () => {
    const design = { ...deflectorDesign(), setup: { wavelengthNm: 700, periodNm: 450, cells: 64 }, atomLibrary: { source: 'library', id: libraryId } };
    const res = await designer.post(`/api/projects/${projectId}/revisions`, { design });
    expect(res.status).toBe(400);
    expect(res.body.details['design.atomLibrary.id']).toMatch(/wavelength of 700 nm, the library was made for 633 nm/);
  });

  it('a run with an uploaded library uses that library: its atoms.csv and metrics are the upload\'s; the library cannot be deleted while used', async () => {
    // A library unlike the demo one in name, label and every transmission, so a run that fell back to the
    // demo library (or to any other) shows up in its atoms.csv and metrics.json.
    const demo = demoAtomLibrary();
    const changed = {
      ...demo,
      name: 'Lab pillars, measured batch 7',
      approximate: false,
      source: 'measured on the lab bench',
      atoms: demo.atoms.map((atom) => ({ ...atom, tx: atom.tx * 0.9, ty: atom.ty * 0.85, alphaX: atom.alphaX + 0.25, alphaY: atom.alphaY + 0.25 })),
    };
    const changedCsv = atomLibraryToCsv(changed);
    expect(changedCsv).not.toBe(demoCsv);
    const uploaded = await uploadAtomLibrary(designer, projectId, changedCsv, { scope: 'project' });
    expect(uploaded.status, JSON.stringify(uploaded.body)).toBe(201);
    const changedId = uploaded.body.atomLibrary.id as number;
    expect(uploaded.body.atomLibrary).toMatchObject({ name: 'Lab pillars, measured batch 7', approximate: false });

    const design = { ...deflectorDesign(), atomLibrary: { source: 'library', id: changedId } };
    const saved = await designer.post(`/api/projects/${projectId}/revisions`, { design, message: 'lab library' });
    expect(saved.status, JSON.stringify(saved.body)).toBe(201);
    const number = saved.body.revision.number;
    const started = await designer.post(`/api/projects/${projectId}/revisions/${number}/runs`);
    expect(started.status).toBe(202);
    const run = await waitForRun(designer, projectId, started.body.run.id);
    expect(run.status, run.error ?? '').toBe('succeeded');
    const atoms = await download(designer, `/api/projects/${projectId}/runs/${run.id}/artifacts/atoms.csv`);
    expect(atoms.status).toBe(200);
    expect(atoms.body.toString('utf8')).toBe(changedCsv);
    const metrics = JSON.parse((await download(designer, `/api/projects/${projectId}/runs/${run.id}/artifacts/metrics.json`)).body.toString('utf8'));
    expect(metrics.library).toMatchObject({ name: 'Lab pillars, measured batch 7', atoms: 498, approximate: false, source: 'measured on the lab bench' });

    const detail = (await designer.get(`/api/projects/${projectId}/atom-libraries/${changedId}`)).body.atomLibrary as AtomLibraryDetail;
    expect(detail.usedBy).toEqual([number]);
    const refused = await designer.delete(`/api/projects/${projectId}/atom-libraries/${changedId}`);
    expect(refused.status).toBe(409);
    expect(refused.body.error).toMatch(new RegExp(`revision ${number} of this project`));
  });

  it('an unused library is deleted by its uploader', async () => {
    const res = await uploadAtomLibrary(designer, projectId, eightAtomCsv('Short-lived'));
    expect(res.status).toBe(201);
    const id = res.body.atomLibrary.id;
    expect((await designer.delete(`/api/projects/${projectId}/atom-libraries/${id}`)).status).toBe(204);
    expect((await designer.get(`/api/projects/${projectId}/atom-libraries/${id}`)).status).toBe(404);
  });
});

describe('personal and project libraries across projects', () => {
  it('a personal library follows its owner; a project library stays in its project', async () => {
    const other = (await designer.post('/api/projects', { name: 'Second project' })).body.project.id;
    const personal = (await uploadAtomLibrary(designer, projectId, eightAtomCsv('Mine everywhere'), { scope: 'personal' })).body.atomLibrary.id;
    const local = (await uploadAtomLibrary(designer, projectId, eightAtomCsv('Only here'), { scope: 'project' })).body.atomLibrary.id;
    const listed = (await designer.get(`/api/projects/${other}/atom-libraries`)).body.atomLibraries as AtomLibrarySummary[];
    expect(listed.map((l) => l.id)).toContain(personal);
    expect(listed.map((l) => l.id)).not.toContain(local);
    expect((await designer.get(`/api/projects/${other}/atom-libraries/${local}`)).status).toBe(404);

    const setup = { wavelengthNm: 800, periodNm: 400, cells: 64 };
    const usePersonal = await designer.post(`/api/projects/${other}/revisions`, { design: { ...deflectorDesign(), setup, atomLibrary: { source: 'library', id: personal } } });
    expect(usePersonal.status, JSON.stringify(usePersonal.body)).toBe(201);
    const useLocal = await designer.post(`/api/projects/${other}/revisions`, { design: { ...deflectorDesign(), setup, atomLibrary: { source: 'library', id: local } } });
    expect(useLocal.status).toBe(400);
    expect(useLocal.body.details['design.atomLibrary.id']).toMatch(/belongs to another project/);

    // A stranger's project sees neither, and cannot use them.
    const stranger = await signedInClient(t.app, await makeUser({ name: 'Stranger' }));
    const theirs = (await stranger.post('/api/projects', { name: 'Elsewhere' })).body.project.id;
    const theirList = (await stranger.get(`/api/projects/${theirs}/atom-libraries`)).body.atomLibraries as AtomLibrarySummary[];
    expect(theirList.map((l) => l.id)).toEqual(['demo']);
    const borrowed = await stranger.post(`/api/projects/${theirs}/revisions`, { design: { ...deflectorDesign(), setup, atomLibrary: { source: 'library', id: personal } } });
    expect(borrowed.status).toBe(400);
    expect(borrowed.body.details['design.atomLibrary.id']).toMatch(/personal library that its owner has not shared with this project/);
  });
});
