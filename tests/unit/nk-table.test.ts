/**
 * Tabulated n, k(λ) materials (shared/optics/nk-table.ts): interpolation, range, reading limits, the spec's table
 * form, and `phasewright library build` with a material given as an n, k CSV.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { specProblems } from '../support/library-spec';
import { parseAtomLibraryCsv } from '../../shared/optics/atoms';
import { computeSweepAtom, parseLibrarySpec } from '../../shared/optics/library-builder';
import { refractiveIndex, SILICON_NITRIDE } from '../../shared/optics/materials';
import { NkTableError, parseNkTableCsv, tabulatedIndex, type NkPoint, type NkTable } from '../../shared/optics/nk-table';
import { materialIndex } from '../../shared/optics/rcwa';

const ROOT = join(import.meta.dirname, '..', '..');
const BIN = join(ROOT, 'bin', 'phasewright.mjs');
const dir = mkdtempSync(join(tmpdir(), 'phasewright-nk-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const film: NkTable = {
  name: 'test film',
  source: 'hand-made rows',
  points: [
    [500, 2.0, 0],
    [600, 2.1, 0.02],
    [700, 2.05, 0.01],
  ],
};

/** Luke et al. 2015's Si₃N₄ fit tabulated every `stepNm` from `fromNm` to `toNm` (k = 0). */
function nitrideRows(fromNm: number, toNm: number, stepNm: number): NkPoint[] {
  const rows: NkPoint[] = [];
  for (let nm = fromNm; nm <= toNm + 1e-9; nm += stepNm) rows.push([nm, refractiveIndex(SILICON_NITRIDE, nm * 1e-9), 0]);
  return rows;
}

const expectNkError = (f: () => unknown, message: RegExp, line?: number) => {
  try {
    f();
  } catch (error) {
    expect(error).toBeInstanceOf(NkTableError);
    expect((error as Error).message).toMatch(message);
    expect((error as NkTableError).line).toBe(line);
    return;
  }
  throw new Error('no error');
};

describe('interpolation', () => {
  it('is linear between rows (hand-computed points)', () => {
    // 550 nm: halfway 500 → 600: n = (2.0 + 2.1)/2 = 2.05, k = 0.01.
    const mid = tabulatedIndex(film, 550e-9);
    expect(mid.n).toBeCloseTo(2.05, 12);
    expect(mid.k).toBeCloseTo(0.01, 12);
    // 625 nm: a quarter of 600 → 700: n = 2.1 − 0.25·0.05 = 2.0875, k = 0.02 − 0.25·0.01 = 0.0175.
    const quarter = tabulatedIndex(film, 625e-9);
    expect(quarter.n).toBeCloseTo(2.0875, 12);
    expect(quarter.k).toBeCloseTo(0.0175, 12);
    // On a row, and at both ends, the row itself.
    expect(tabulatedIndex(film, 600e-9)).toEqual({ n: 2.1, k: 0.02 });
    expect(tabulatedIndex(film, 500e-9)).toEqual({ n: 2.0, k: 0 });
    expect(tabulatedIndex(film, 700e-9).n).toBeCloseTo(2.05, 12);
    // The RCWA material gives the same n + ik.
    expect(materialIndex({ kind: 'table', table: film }, 625e-9).im).toBeCloseTo(0.0175, 12);
  });

  it('refuses wavelengths outside the table, naming its range', () => {
    expect(() => tabulatedIndex(film, 499.9e-9)).toThrow(/test film: the wavelength 499\.9 nm is outside the table's range 500–700 nm \(hand-made rows\)/);
    expect(() => tabulatedIndex(film, 701e-9)).toThrow(RangeError);
    expect(() => materialIndex({ kind: 'table', table: film }, 800e-9)).toThrow(/outside the table's range 500–700 nm/);
  });

  it("reproduces Luke et al. 2015's Sellmeier fit to its interpolation error", () => {
    // Rows every 2 nm: the linear interpolation error is at most h²/8 · max|n''|; measured here against the fit itself.
    const table: NkTable = { name: 'Si₃N₄ tabulated', source: 'Luke et al., Opt. Lett. 40, 4823 (2015), tabulated', points: nitrideRows(600, 700, 2) };
    let worst = 0;
    for (let nm = 600; nm <= 700; nm += 0.37) worst = Math.max(worst, Math.abs(tabulatedIndex(table, nm * 1e-9).n - refractiveIndex(SILICON_NITRIDE, nm * 1e-9)));
    expect(worst).toBeLessThan(2e-6);
    expect(worst).toBeGreaterThan(0); // 633 nm lies between rows: the table is really interpolated
  });
});

describe('the CSV form', () => {
  it('reads the documented header, comment lines, name and source, CRLF and a byte-order mark', () => {
    const text = '\uFEFF# name: PECVD SiN\r\n# source: ellipsometry, 2026-10\r\nwavelength_nm, n, k\r\n# a comment between rows\r\n500,2.0,0\r\n\r\n600, 2.1, 0.02\r\n';
    expect(parseNkTableCsv(text)).toEqual({
      name: 'PECVD SiN',
      source: 'ellipsometry, 2026-10',
      points: [
        [500, 2, 0],
        [600, 2.1, 0.02],
      ],
    });
  });

  it('names the line at fault', () => {
    expectNkError(() => parseNkTableCsv('lambda,n,k\n500,2,0\n600,2,0'), /first row must be the header wavelength_nm,n,k/, 1);
    expectNkError(() => parseNkTableCsv('wavelength_nm,n,k\n500,2,0\n600,two,0'), /^line 3: n is not a number: "two"/, 3);
    expectNkError(() => parseNkTableCsv('wavelength_nm,n,k\n500,2,0\n# note\n450,2,0'), /^line 4: wavelengths must rise from row to row: 450 nm follows 500 nm/, 4);
    expectNkError(() => parseNkTableCsv('wavelength_nm,n,k\n500,2,0,1'), /three numbers/, 2);
    expectNkError(() => parseNkTableCsv('wavelength_nm,n,k\n500,2,-0.1\n600,2,0'), /k must be a number from 0 to 20/, 2);
    expectNkError(() => parseNkTableCsv('wavelength_nm,n,k\n500,2,0'), /at least two rows/);
    expectNkError(() => parseNkTableCsv('# only comments\n'), /no header row/);
  });

  it('stops reading at the first row or line past the limits', () => {
    const rows = ['wavelength_nm,n,k', '500,2,0', '510,2,0', '520,2,0', '530,2,0', 'not,a,row'].join('\n');
    // Row 4 (line 5) is past maxRows = 3: the error is there, before the bad line 6 is looked at.
    expectNkError(() => parseNkTableCsv(rows, { maxRows: 3 }), /more than 3 rows/, 5);
    expect(parseNkTableCsv(rows.split('\n').slice(0, 5).join('\n'), { maxRows: 4 }).points).toHaveLength(4);
    const long = `wavelength_nm,n,k\n500,2,0\n# ${'x'.repeat(300)}\nnot,a,row`;
    expectNkError(() => parseNkTableCsv(long), /longer than 200 characters/, 3);
    expectNkError(() => parseNkTableCsv(`wavelength_nm,n,k\n500,2,${'0'.repeat(40)}\n600,2,0`, { maxLineChars: 30 }), /longer than 30 characters/, 2);
  });
});

/** The demo scenario's cell at 5×5 harmonics, one atom (w = l = 200 nm). */
const spec = {
  wavelengthNm: 633,
  periodNm: 450,
  heightNm: 1200,
  pillar: 'silicon-nitride',
  substrate: 'fused-silica',
  illumination: 'substrate',
  sweep: { minFeatureNm: 200, minGapNm: 250, stepNm: 50 },
  harmonics: 5,
};

const problemsOf = specProblems;

describe('tabulated materials in a library spec', () => {
  it("a table made from Luke et al.'s fit gives computeAtom's results of the fit, to interpolation error", () => {
    const named = computeSweepAtom(parseLibrarySpec(spec), 0);
    const tabulated = parseLibrarySpec({ ...spec, pillar: { name: 'Si₃N₄ tabulated', source: 'Luke et al. 2015, every 2 nm', table: nitrideRows(600, 700, 2) } });
    expect(tabulated.pillar.kind).toBe('table');
    const atom = computeSweepAtom(tabulated, 0);
    // Δn < 2e-6 (above); the phase moves by about k·H·Δn ≈ 12 rad · 2e-6, the amplitude by less.
    expect(Math.abs(atom.atom.alphaX - named.atom.alphaX)).toBeLessThan(1e-4);
    expect(Math.abs(atom.atom.tx - named.atom.tx)).toBeLessThan(1e-5);
    expect(Math.abs(atom.powers.reflectedX - named.powers.reflectedX)).toBeLessThan(1e-5);
    expect(atom.atom.alphaX).not.toBe(named.atom.alphaX); // really computed from the table
  });

  it('names each problem of a table with its field', () => {
    const rows = nitrideRows(600, 700, 10);
    expect(problemsOf({ ...spec, pillar: { name: 'SiN', table: [...rows.slice(0, 3), [605, 2, 0], ...rows.slice(3)] } })).toEqual([
      { field: 'pillar.table[3]', message: 'wavelengths must rise from row to row: 605 nm follows 620 nm' },
    ]);
    expect(problemsOf({ ...spec, pillar: { name: 'SiN', table: rows.filter((r) => r[0] >= 640) } })).toEqual([
      { field: 'pillar.table', message: "SiN: the wavelength 633 nm is outside the table's range 640–700 nm" },
    ]);
    expect(problemsOf({ ...spec, pillar: { table: rows } })[0].field).toBe('pillar.name');
    expect(problemsOf({ ...spec, pillar: { name: 'SiN', table: [[600, 2, 0], [700, '2', 0]] } })[0]).toEqual({
      field: 'pillar.table[1]',
      message: 'each row is [wavelength nm, n, k], three numbers; got [700,"2",0]',
    });
    expect(problemsOf({ ...spec, pillar: { name: 'SiN', table: rows, colour: 'red' } })[0].message).toMatch(/unknown key colour/);
    // A file name is for the command line; a spec that reaches parseLibrarySpec (e.g. from the browser) holds the rows.
    expect(problemsOf({ ...spec, pillar: { nkCsv: 'sin.csv' } })).toEqual([
      { field: 'pillar.nkCsv', message: 'a file name is read by the command line only: give the rows here as "table": [[λ nm, n, k], …] with a "name"' },
    ]);
  });

  it('counts rows against the limit before reading them', () => {
    // 11 rows with maxRows 10: refused by count (the rows' own faults are not reached).
    const rows: unknown[] = nitrideRows(600, 700, 10);
    rows[5] = 'not a row';
    expect(problemsOf({ ...spec, substrate: { name: 'glass', table: rows } }, { nkLimits: { maxRows: 10 } })).toEqual([
      { field: 'substrate.table', message: '11 rows is more than 10: thin the table' },
    ]);
  });
});

describe('phasewright library build with an n, k CSV material', () => {
  function cli(args: string[]) {
    return spawnSync(process.execPath, [BIN, ...args], { cwd: dir, encoding: 'utf8', timeout: 120_000 });
  }

  it('reads the CSV relative to the spec and matches the build with the named material', () => {
    const csv = ['# name: Si₃N₄ from a table', '# source: Luke et al. 2015, tabulated every 5 nm', 'wavelength_nm,n,k', ...nitrideRows(600, 700, 5).map((r) => r.join(','))].join('\n');
    writeFileSync(join(dir, 'sin.csv'), csv);
    writeFileSync(join(dir, 'named.json'), JSON.stringify(spec));
    writeFileSync(join(dir, 'table.json'), JSON.stringify({ ...spec, pillar: { nkCsv: 'sin.csv' } }));
    const named = cli(['library', 'build', 'named.json', '--out', 'named.csv']);
    const table = cli(['library', 'build', 'table.json', '--out', 'out/table.csv']);
    expect(named.status).toBe(0);
    expect(table.stderr).not.toMatch(/phasewright: (?!warning|note)/);
    expect(table.status).toBe(0);
    const a = parseAtomLibraryCsv(readFileSync(join(dir, 'named.csv'), 'utf8')).library;
    const b = parseAtomLibraryCsv(readFileSync(join(dir, 'out', 'table.csv'), 'utf8')).library;
    expect(b.source).toMatch(/pillar Si₃N₄ from a table \(n, k tabulated 600–700 nm, Luke et al\. 2015, tabulated every 5 nm\)/);
    expect(b.atoms).toHaveLength(1);
    expect(Math.abs(b.atoms[0].alphaX - a.atoms[0].alphaX)).toBeLessThan(1e-3);
    expect(Math.abs(b.atoms[0].tx - a.atoms[0].tx)).toBeLessThan(1e-4);
  });

  it('exits 2 naming the field, the file and the line for a bad table', () => {
    writeFileSync(join(dir, 'bad.csv'), 'wavelength_nm,n,k\n600,2,0\n700,x,0\n');
    writeFileSync(join(dir, 'bad.json'), JSON.stringify({ ...spec, pillar: { nkCsv: 'bad.csv' } }));
    const res = cli(['library', 'build', 'bad.json', '--out', 'bad-out.csv']);
    expect(res.status).toBe(2);
    expect(res.stderr).toMatch(/phasewright: pillar\.nkCsv: .*bad\.csv, line 3: n is not a number: "x"/);
    writeFileSync(join(dir, 'missing.json'), JSON.stringify({ ...spec, substrate: { nkCsv: 'nowhere.csv' } }));
    const missing = cli(['library', 'build', 'missing.json', '--out', 'bad-out.csv']);
    expect(missing.status).toBe(2);
    expect(missing.stderr).toMatch(/substrate\.nkCsv: cannot read .*nowhere\.csv \(ENOENT\)/);
  });
});
