/**
 * The atom-library builder (shared/optics/library-builder.ts) and `phasewright library build`. RCWA sweeps are
 * tiny (2 × 2 or 3 × 3 atoms at 5×5–7×7 harmonics) so that the file runs in seconds.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { specProblems } from '../support/library-spec';
import { parseAtomLibraryCsv, atomLibraryToCsv, libraryMedia, type LibraryIssue, type MetaAtom } from '../../shared/optics/atoms';
import {
  buildAtomLibrary,
  coveringRadius,
  estimateBuildCost,
  LIBRARY_MATERIALS,
  parseLibrarySpec,
  proposeSubset,
  specCell,
  torusDistance,
} from '../../shared/optics/library-builder';
import { computeAtom } from '../../shared/optics/rcwa';

const ROOT = join(import.meta.dirname, '..', '..');
const BIN = join(ROOT, 'bin', 'phasewright.mjs');
const dir = mkdtempSync(join(tmpdir(), 'phasewright-library-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** The demo scenario's cell: Si₃N₄ pillars 1200 nm tall, P = 450 nm, 633 nm, on fused silica, light from air. */
const demoSpec = {
  format: 'phasewright-library-spec/1',
  name: 'test sweep',
  wavelengthNm: 633,
  periodNm: 450,
  heightNm: 1200,
  pillar: 'silicon-nitride',
  substrate: 'fused-silica',
  illumination: 'superstrate',
  sweep: { minFeatureNm: 100, minGapNm: 100, stepNm: 200 },
  harmonics: 5,
};

/** A 2 × 2 sweep cannot cover the phase circle: the reader's coverage errors are expected, nothing else. */
const coverageIssue = (i: LibraryIssue): boolean =>
  i.row === 0 && ((['alphaX', 'alphaY'].includes(i.field) && /leave a gap/.test(i.message)) || (i.field === 'atoms' && /at least 8 are needed/.test(i.message)));

const problemsOf = specProblems;

describe('build spec validation', () => {
  it('accepts the demo spec and lays the sweep from the smallest feature to P − smallest gap', () => {
    const r = parseLibrarySpec({ ...demoSpec, sweep: { minFeatureNm: 80, minGapNm: 70, stepNm: 50 } });
    // 80, 130, …, 380 ≤ 450 − 70 = 380: seven sizes.
    expect(r.sizes.map((s) => Math.round(s * 1e9))).toEqual([80, 130, 180, 230, 280, 330, 380]);
    expect(r.spec.superstrate).toBe('air');
  });

  it('names every field at fault with what to fix', () => {
    const problems = problemsOf({ ...demoSpec, periodNm: -1, harmonics: 8, pillar: 'unobtainium', illumination: 'sideways', colour: 'red' });
    const fields = problems.map((p) => p.field).sort();
    expect(fields).toEqual(['colour', 'harmonics', 'illumination', 'periodNm', 'pillar']);
    expect(problems.find((p) => p.field === 'periodNm')!.message).toBe('must be a number from 50 to 5000 nm, got -1');
    expect(problems.find((p) => p.field === 'harmonics')!.message).toMatch(/odd whole number/);
    expect(problems.find((p) => p.field === 'pillar')!.message).toMatch(/unknown material 'unobtainium': use one of air, fused-silica, silicon-nitride/);
  });

  it('checks the sweep, constant materials and wavelength ranges', () => {
    expect(problemsOf({ ...demoSpec, sweep: { minFeatureNm: 300, minGapNm: 200, stepNm: 10 } })[0]).toEqual({
      field: 'sweep.minFeatureNm',
      message: 'the smallest feature 300 nm exceeds period − smallest gap = 250 nm: no pillar fits',
    });
    expect(problemsOf({ ...demoSpec, sweep: { minFeatureNm: 10, minGapNm: 0, stepNm: 1 } })[0].field).toBe('sweep.stepNm');
    expect(problemsOf({ ...demoSpec, pillar: { n: 0.5 } })[0].field).toBe('pillar.n');
    expect(problemsOf({ ...demoSpec, pillar: { n: 3.5, k: -1 } })[0].field).toBe('pillar.k');
    // Malitson's fit holds from 0.21 µm: 150 nm is outside (and is refused rather than extrapolated).
    expect(problemsOf({ ...demoSpec, wavelengthNm: 205 }).map((p) => p.field)).toEqual(['pillar', 'substrate']);
    // Amorphous silicon's index depends on the film: a name alone is refused, with the way to give n, k.
    expect(problemsOf({ ...demoSpec, pillar: 'amorphous-silicon' })[0].message).toMatch(/give your film's measured index/);
    expect(parseLibrarySpec({ ...demoSpec, pillar: { name: 'my a-Si:H', n: 3.6, k: 0.01 } }).pillar).toMatchObject({ kind: 'constant', n: 3.6, k: 0.01 });
  });

  it('listed materials give published indices at 633 nm', () => {
    const at = (id: string, lambda: number) => LIBRARY_MATERIALS.find((m) => m.id === id)!.index!(lambda).n;
    // Rutile n_o ≈ 2.58 at 633 nm (DeVore 1951; value from memory); GaN n_o ≈ 2.38 at 633 nm (Barker & Ilegems 1973; from memory).
    expect(at('titanium-dioxide', 633e-9)).toBeCloseTo(2.584, 2);
    expect(at('gallium-nitride', 633e-9)).toBeCloseTo(2.385, 2);
    // Malitson 1965: n(632.8 nm) = 1.457018 (materials.ts example).
    expect(at('fused-silica', 632.8e-9)).toBeCloseTo(1.457018, 6);
    for (const m of LIBRARY_MATERIALS) expect(m.source.length).toBeGreaterThan(5);
  });
});

describe('the sweep', () => {
  it("keeps computeAtom's results, marks the library not approximate and reports progress", async () => {
    const r = parseLibrarySpec(demoSpec); // sizes 100, 300 nm: 2 × 2 atoms
    const seen: number[] = [];
    const built = await buildAtomLibrary(r, { onProgress: (f) => seen.push(f) });
    expect(seen).toEqual([0.25, 0.5, 0.75, 1]);
    expect(built.library.approximate).toBe(false);
    expect(built.library.source).toMatch(
      /^RCWA .*5×5 harmonics; light from the superstrate side \(substrate n = 1\.4570, superstrate n = 1\.0000\); λ = 633 nm, P = 450 nm, height 1200 nm; pillar silicon nitride .*Luke/,
    );
    // The side and the indices, read back from the source line (what every copy of a library keeps).
    expect(libraryMedia({ source: built.library.source })).toEqual({ lightFrom: 'superstrate', substrateIndex: 1.457, superstrateIndex: 1 });
    expect(built.library.atoms).toHaveLength(4);
    const atom = built.library.atoms[1]; // w 100 nm, l 300 nm
    expect([atom.width, atom.length]).toEqual([100e-9, 300e-9]);
    const direct = computeAtom(specCell(r, 100e-9, 300e-9), { lambda: 633e-9, harmonics: 5, illumination: 'superstrate' });
    expect([atom.tx, atom.ty, atom.alphaX, atom.alphaY]).toEqual([direct.tx, direct.ty, direct.alphaX, direct.alphaY]);
    expect(built.powers[1].zeroOrderX).toBe(direct.x.zeroOrderTransmitted);
    expect(built.powers[1].otherOrdersY).toBe(direct.y.otherOrdersTransmitted);
    // The zeroth-order transmittance is |t|² (power-normalized Jones entries) for an axis-aligned pillar.
    expect(built.powers[1].zeroOrderX).toBeCloseTo(atom.tx ** 2, 9);

    // The CSV round-trips through the existing reader with approximate: false and the source line.
    const read = parseAtomLibraryCsv(atomLibraryToCsv(built.library));
    expect(read.issues.filter((i) => !coverageIssue(i))).toEqual([]);
    expect(read.library.approximate).toBe(false);
    expect(read.library.source).toBe(built.library.source);
    expect(libraryMedia(read.library).lightFrom).toBe('superstrate');
    expect(read.library.atoms.map((a) => a.alphaX)).toEqual(built.library.atoms.map((a) => a.alphaX));
    expect(read.library.atoms.map((a) => Math.round(a.width * 1e13) / 1e4)).toEqual([100, 100, 300, 300]);
  });

  it('warns with the numbers when the lattice diffracts (demo scenario: P = 450 nm ≥ 633 nm / 1.457 = 434.5 nm)', async () => {
    const r = parseLibrarySpec({ ...demoSpec, sweep: { minFeatureNm: 200, minGapNm: 250, stepNm: 50 } }); // one atom
    const built = await buildAtomLibrary(r);
    // Malitson 1965: n(633 nm) = 1.4570; λ/n = 434.5 nm < 450 nm, in the exit medium for light from the air side.
    expect(built.warnings).toEqual([
      'period 450.0 nm ≥ λ/n = 633.0 nm/1.4570 = 434.5 nm in the exit medium (the substrate): the lattice itself diffracts there, and part of the light leaves the cell in orders other than the zeroth',
    ]);
    expect(built.powers[0].otherOrdersX).toBeGreaterThan(1e-3);
    // Below the limit (P = 400 nm) there is no warning and no power in other orders.
    const quiet = await buildAtomLibrary(parseLibrarySpec({ ...demoSpec, periodNm: 400, sweep: { minFeatureNm: 200, minGapNm: 200, stepNm: 50 } }));
    expect(quiet.warnings).toEqual([]);
    expect(quiet.powers[0].otherOrdersX).toBeLessThan(1e-12);
  });

  it('stops at an abort between atoms', async () => {
    const controller = new AbortController();
    const run = buildAtomLibrary(parseLibrarySpec(demoSpec), { signal: controller.signal, onProgress: () => controller.abort(new Error('stop')) });
    await expect(run).rejects.toThrow('stop');
  });

  it('estimates the cost as atoms × measured time per atom', () => {
    let t = 0;
    const cost = estimateBuildCost(parseLibrarySpec(demoSpec), () => (t += 50)); // each clock read advances 50 ms
    expect(cost).toEqual({ atoms: 4, secondsPerAtom: 0.05, seconds: 0.2 });
  });
});

describe('proposed subset', () => {
  const atom = (alphaX: number, alphaY: number, t: number, id: string): MetaAtom => ({ id, shape: 'rect', width: 1e-7, length: 1e-7, height: 1e-6, period: 4e-7, tx: t, ty: t, alphaX, alphaY });
  // A 4 × 4 grid of phases spaced π/2 at amplitude 0.95, the origin at 1, and dim atoms beside the best points.
  const grid: MetaAtom[] = [];
  for (let i = 0; i < 4; i++) for (let j = 0; j < 4; j++) grid.push(atom((i * Math.PI) / 2, (j * Math.PI) / 2, i === 0 && j === 0 ? 1 : 0.95, `g${i}${j}`));
  grid.push(atom(Math.PI + 0.05, Math.PI + 0.05, 0.3, 'dim-a'), atom(Math.PI + 0.02, 0.02, 0.6, 'dim-b'));

  it('picks the four points spaced π apart on the torus (known answer), never the dim ones', () => {
    const ids = proposeSubset(grid, 4).map((i) => grid[i].id);
    expect(ids[0]).toBe('g00');
    expect(ids[1]).toBe('g22');
    expect(new Set(ids)).toEqual(new Set(['g00', 'g22', 'g02', 'g20']));
    // Covering radius of that subset over the bright grid: every grid point is within (π/2)·√2 of a pick.
    expect(coveringRadius(grid, proposeSubset(grid, 4), 0.5)).toBeCloseTo((Math.PI / 2) * Math.SQRT2, 12);
    // All 16 bright atoms at n = 16: the whole grid (no dim atom), covering radius 0 over the bright ones.
    const all = proposeSubset(grid, 16).map((i) => grid[i].id);
    expect(all.some((id) => id.startsWith('dim'))).toBe(false);
    expect(coveringRadius(grid, proposeSubset(grid, 16), 0.5)).toBe(0);
  });

  it('weights distance by transmission: of two equally far atoms the brighter wins', () => {
    const set = [atom(0, 0, 1, 'origin'), atom(Math.PI, 0, 0.8, 'dim'), atom(0, Math.PI, 0.9, 'bright')];
    expect(proposeSubset(set, 2).map((i) => set[i].id)).toEqual(['origin', 'bright']);
    expect(torusDistance({ alphaX: 0.1, alphaY: 0 }, { alphaX: 2 * Math.PI - 0.1, alphaY: 0 })).toBeCloseTo(0.2, 12);
  });
});

describe('phasewright library build', () => {
  function cli(args: string[]) {
    return spawnSync(process.execPath, [BIN, ...args], { cwd: dir, encoding: 'utf8', timeout: 120_000 });
  }

  it('writes atoms.csv that the reader accepts, with progress on stderr and the diffraction warning', () => {
    writeFileSync(join(dir, 'spec.json'), JSON.stringify(demoSpec));
    const res = cli(['library', 'build', 'spec.json', '--out', 'lib/atoms.csv']);
    expect(res.stderr).toMatch(/2 × 2 = 4 atoms at 5×5 harmonics/);
    expect(res.stderr).toMatch(/\[100%\] atom 4\/4/);
    expect(res.stderr).toMatch(/warning: period 450\.0 nm ≥ λ\/n = 633\.0 nm\/1\.4570 = 434\.5 nm in the exit medium/);
    expect(res.status).toBe(0);
    const read = parseAtomLibraryCsv(readFileSync(join(dir, 'lib', 'atoms.csv'), 'utf8'));
    expect(read.issues.filter((i) => !coverageIssue(i))).toEqual([]);
    expect(res.stderr).toMatch(/note: phases on the x axis leave a gap/);
    expect(read.library.approximate).toBe(false);
    expect(read.library.source).toMatch(/^RCWA .*5×5 harmonics/);
    expect(read.library.atoms).toHaveLength(4);
    const powers = readFileSync(join(dir, 'lib', 'atoms.powers.csv'), 'utf8').trim().split('\n');
    expect(powers).toHaveLength(5);
    const direct = computeAtom(specCell(parseLibrarySpec(demoSpec), 300e-9, 300e-9), { lambda: 633e-9, harmonics: 5, illumination: 'superstrate' });
    expect(read.library.atoms[3].tx).toBe(direct.tx);
  });

  it('--threads 2 computes the same file on worker threads', () => {
    const res = cli(['library', 'build', 'spec.json', '--out', 'threads/atoms.csv', '--threads', '2']);
    expect(res.stderr).toMatch(/4 atoms at 5×5 harmonics, 2 worker threads/);
    expect(res.status).toBe(0);
    expect(readFileSync(join(dir, 'threads', 'atoms.csv'), 'utf8')).toBe(readFileSync(join(dir, 'lib', 'atoms.csv'), 'utf8'));
    expect(readFileSync(join(dir, 'threads', 'atoms.powers.csv'), 'utf8')).toBe(readFileSync(join(dir, 'lib', 'atoms.powers.csv'), 'utf8'));
  });

  it('exits 2 naming the field for a bad spec, and for missing arguments', () => {
    writeFileSync(join(dir, 'bad.json'), JSON.stringify({ ...demoSpec, sweep: { ...demoSpec.sweep, stepNm: 'big' } }));
    const bad = cli(['library', 'build', 'bad.json', '--out', 'x.csv']);
    expect(bad.status).toBe(2);
    expect(bad.stderr).toMatch(/sweep\.stepNm: must be a number from 0\.5 to 5000 nm, got "big"/);
    const noOut = cli(['library', 'build', 'spec.json']);
    expect(noOut.status).toBe(2);
    expect(noOut.stderr).toMatch(/--out/);
    expect(cli(['library', 'make']).status).toBe(2);
    const threads = cli(['library', 'build', 'spec.json', '--out', 'x.csv', '--threads', '0']);
    expect(threads.status).toBe(2);
    expect(threads.stderr).toMatch(/--threads needs a whole number from 1 to 16, got 0/);
  });
});
