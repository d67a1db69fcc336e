import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import {
  ATOM_CSV_COLUMNS,
  atomLibraryToCsv,
  buildAtomLookup,
  largestPhaseGap,
  mapAtoms,
  parseAtomLibraryCsv,
  placementAngle,
  realizeDevice,
  validateAtomLibrary,
} from '../../shared/optics/atoms';
import type { AtomLibrary, MetaAtom } from '../../shared/optics/atoms';
import { demoAtomLibrary } from '../../shared/optics/demo-library';
import { jonesAt, synthesizeDecomposition, synthesizeJones } from '../../shared/optics/jones';
import type { JonesDecomposition } from '../../shared/optics/jones';
import { polarizationPair } from '../../shared/optics/polarization';
import { mulberry32 } from '../../shared/optics/random';
import { PYTHON } from '../support/python';

function atom(id: string, width: number, length: number, tx: number, alphaX: number, ty: number, alphaY: number): MetaAtom {
  return { id, shape: 'rect', width, length, height: 600e-9, period: 400e-9, tx, alphaX, ty, alphaY };
}

function library(atoms: MetaAtom[]): AtomLibrary {
  return { name: 'test library', lambda: 800e-9, period: 400e-9, height: 600e-9, material: 'test', approximate: false, atoms };
}

/** Eight atoms, phases 0, π/4, … on both axes (a valid minimal library). */
function eightLevelLibrary(): AtomLibrary {
  const atoms: MetaAtom[] = [];
  for (let i = 0; i < 8; i++) {
    atoms.push(atom(`a${i}`, 100e-9 + 20e-9 * i, 150e-9, 0.9, (i * Math.PI) / 4, 0.95, ((i + 3) * Math.PI) / 4));
  }
  return library(atoms);
}

function bruteForceCost(lib: AtomLibrary, dx: number, dy: number): number {
  let best = Infinity;
  for (const a of lib.atoms) {
    const c =
      (a.tx * Math.cos(a.alphaX) - Math.cos(dx)) ** 2 + (a.tx * Math.sin(a.alphaX) - Math.sin(dx)) ** 2 +
      (a.ty * Math.cos(a.alphaY) - Math.cos(dy)) ** 2 + (a.ty * Math.sin(a.alphaY) - Math.sin(dy)) ** 2;
    best = Math.min(best, c);
  }
  return best;
}

describe('library validation', () => {
  it('accepts a valid 8-level library', () => {
    expect(validateAtomLibrary(eightLevelLibrary())).toEqual([]);
  });

  it('names row, atom and field of planted errors', () => {
    const lib = eightLevelLibrary();
    lib.atoms[2].alphaX = Number.NaN;
    lib.atoms[4].tx = 1.2;
    lib.atoms[5] = { ...lib.atoms[1], id: 'twin' };
    lib.atoms[6].width = 500e-9;
    const issues = validateAtomLibrary(lib);
    const find = (row: number, field: string) => issues.find((i) => i.row === row && i.field === field);
    expect(find(3, 'alphaX')?.atomId).toBe('a2');
    expect(find(3, 'alphaX')?.message).toMatch(/row 3/);
    expect(find(5, 'tx')?.message).toMatch(/outside 0…1/);
    expect(find(6, 'geometry')?.message).toMatch(/a1 \(row 2\)/);
    expect(find(7, 'width')?.message).toMatch(/exceeds the period/);
    expect(issues.every((i) => i.severity === 'error')).toBe(true);
    const taller = eightLevelLibrary();
    taller.atoms[3].height = 700e-9;
    expect(validateAtomLibrary(taller)).toEqual([
      expect.objectContaining({ severity: 'warning', row: 4, atomId: 'a3', field: 'height' }),
    ]);
  });

  it('criterion: at least 8 atoms and no phase gap wider than 2π/8 per axis (Swanson 1989: sinc²(1/8) = 0.95)', () => {
    const few = library(eightLevelLibrary().atoms.slice(0, 6));
    const issues = validateAtomLibrary(few);
    expect(issues.some((i) => i.field === 'atoms' && /at least 8/.test(i.message))).toBe(true);
    expect(issues.some((i) => i.field === 'alphaX' && /gap/.test(i.message))).toBe(true);
    expect(largestPhaseGap([0, Math.PI / 2, Math.PI, (3 * Math.PI) / 2])).toBeCloseTo(Math.PI / 2, 14);
    expect(validateAtomLibrary(few, { minPhaseLevels: 4 }).filter((i) => i.field === 'atoms')).toEqual([]);
  });

  it('rejects an empty library and bad metadata', () => {
    const issues = validateAtomLibrary({ ...library([]), lambda: -1 });
    expect(issues.map((i) => i.field).sort()).toEqual(['atoms', 'lambda']);
  });
});

describe('best-atom mapping (PRODUCT.md "Atom mapping")', () => {
  const rand = mulberry32(99);

  it('picks the atom that matches a target exactly, with zero cost', () => {
    const lib = demoAtomLibrary();
    const n = 4;
    const picks = [5, 40, 123, 300, 17, 250, 77, 402, 1, 2, 3, 4, 200, 201, 202, 203];
    const d: JonesDecomposition = {
      n,
      deltaX: Float64Array.from(picks, (k) => lib.atoms[k].alphaX),
      deltaY: Float64Array.from(picks, (k) => lib.atoms[k].alphaY),
      theta: new Float64Array(n * n),
    };
    // Make those atoms lossless so that an exact phase match is an exact complex match.
    const lossless = { ...lib, atoms: lib.atoms.map((a) => ({ ...a, tx: 1, ty: 1 })) };
    const m = mapAtoms(d, lossless);
    expect(Array.from(m.atomIndex)).toEqual(picks);
    for (let i = 0; i < n * n; i++) expect(m.cost[i]).toBeLessThan(1e-12);
  });

  it('equals a brute-force search over all atoms (exact candidate lookup)', () => {
    const lib = demoAtomLibrary();
    const n = 100;
    const d: JonesDecomposition = {
      n,
      deltaX: Float64Array.from({ length: n * n }, () => (rand() - 0.5) * 6 * Math.PI),
      deltaY: Float64Array.from({ length: n * n }, () => (rand() - 0.5) * 6 * Math.PI),
      theta: new Float64Array(n * n),
    };
    for (const bins of [16, 256]) {
      const m = mapAtoms(d, lib, { lookup: buildAtomLookup(lib, bins) });
      for (let i = 0; i < n * n; i++) {
        const a = lib.atoms[m.atomIndex[i]];
        const ex = m.errorX!;
        const ey = m.errorY!;
        // cost reported = cost of the chosen atom = brute-force minimum
        expect(m.cost[i]).toBeCloseTo(bruteForceCost(lib, d.deltaX[i], d.deltaY[i]), 6);
        expect(ex.re[i]).toBeCloseTo(a.tx * Math.cos(a.alphaX) - Math.cos(d.deltaX[i]), 12);
        expect(ey.im[i]).toBeCloseTo(a.ty * Math.sin(a.alphaY) - Math.sin(d.deltaY[i]), 12);
        expect(m.cost[i]).toBeCloseTo(ex.re[i] ** 2 + ex.im[i] ** 2 + ey.re[i] ** 2 + ey.im[i] ** 2, 6);
      }
    }
  });

  it('realized device equals the ideal Jones field for a perfect library', () => {
    const pair = polarizationPair({ kind: 'elliptical', psi: 0.4, chi: -0.25 });
    const n = 16;
    const levels = 8;
    const phiA = Float64Array.from({ length: n * n }, () => (Math.floor(rand() * levels) * 2 * Math.PI) / levels);
    const phiB = Float64Array.from({ length: n * n }, () => (Math.floor(rand() * levels) * 2 * Math.PI) / levels);
    const d = synthesizeDecomposition(phiA, phiB, pair);
    // A perfect library: one lossless atom for every (δx, δy) that occurs.
    const seen = new Map<string, MetaAtom>();
    for (let i = 0; i < n * n; i++) {
      const key = `${d.deltaX[i].toFixed(9)},${d.deltaY[i].toFixed(9)}`;
      if (!seen.has(key)) seen.set(key, atom(`p${seen.size}`, 100e-9 + seen.size * 1e-9, 200e-9, 1, d.deltaX[i], 1, d.deltaY[i]));
    }
    const lib = library([...seen.values()]);
    const m = mapAtoms(d, lib);
    const realized = realizeDevice(m.atomIndex, m.theta, lib);
    const ideal = synthesizeJones(phiA, phiB, pair);
    for (let i = 0; i < n * n; i++) {
      const r = jonesAt(realized, i);
      const j = jonesAt(ideal, i);
      for (const key of ['xx', 'xy', 'yx', 'yy'] as const) {
        expect(Math.hypot(r[key][0] - j[key][0], r[key][1] - j[key][1])).toBeLessThan(1e-9);
      }
    }
  });

  it('with axis swap, places an atom turned by 90° when that matches better', () => {
    const lib = library([atom('only', 100e-9, 300e-9, 1, 0.2, 1, 2.5)]);
    const d: JonesDecomposition = { n: 1, deltaX: Float64Array.of(2.5), deltaY: Float64Array.of(0.2), theta: Float64Array.of(0.1) };
    const plain = mapAtoms(d, lib);
    const swapped = mapAtoms(d, lib, { allowAxisSwap: true });
    expect(plain.cost[0]).toBeGreaterThan(1);
    expect(swapped.cost[0]).toBeLessThan(1e-12);
    expect(swapped.swapped[0]).toBe(1);
    expect(swapped.theta[0]).toBeCloseTo(0.1 + Math.PI / 2, 14);
    // Same Jones matrix as the target: R(θ)·diag(e^{2.5i}, e^{0.2i})·R(θ)ᵀ.
    const realized = jonesAt(realizeDevice(swapped.atomIndex, swapped.theta, lib), 0);
    const c = Math.cos(0.1);
    const s = Math.sin(0.1);
    expect(realized.xx[0]).toBeCloseTo(c * c * Math.cos(2.5) + s * s * Math.cos(0.2), 12);
    expect(realized.xy[1]).toBeCloseTo(c * s * (Math.sin(2.5) - Math.sin(0.2)), 12);
  });

  it('rejects mismatched planes and foreign lookups', () => {
    const lib = eightLevelLibrary();
    const d: JonesDecomposition = { n: 2, deltaX: new Float64Array(4), deltaY: new Float64Array(3), theta: new Float64Array(4) };
    expect(() => mapAtoms(d, lib)).toThrow(RangeError);
    const ok: JonesDecomposition = { n: 1, deltaX: new Float64Array(1), deltaY: new Float64Array(1), theta: new Float64Array(1) };
    expect(() => mapAtoms(ok, lib, { lookup: buildAtomLookup(demoAtomLibrary()) })).toThrow(RangeError);
    const nan: JonesDecomposition = { n: 1, deltaX: Float64Array.of(Number.NaN), deltaY: new Float64Array(1), theta: new Float64Array(1) };
    expect(() => mapAtoms(nan, lib)).toThrow(/non-finite/);
  });

  it('placementAngle: θ mod π for rectangles, 0 for squares', () => {
    const rect = atom('r', 100e-9, 300e-9, 1, 0, 1, 0);
    const square = atom('s', 200e-9, 200e-9, 1, 0, 1, 0);
    expect(placementAngle(rect, -Math.PI / 6)).toBeCloseTo((5 * Math.PI) / 6, 14);
    expect(placementAngle(rect, Math.PI + 0.2)).toBeCloseTo(0.2, 14);
    expect(placementAngle(square, 0.7)).toBe(0);
  });
});

describe('library CSV', () => {
  const dir = mkdtempSync(join(tmpdir(), 'phasewright-atoms-'));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('round-trips through parseAtomLibraryCsv', () => {
    const lib = demoAtomLibrary();
    const text = atomLibraryToCsv(lib);
    expect(text.split('\n')[0]).toBe(ATOM_CSV_COLUMNS.join(','));
    const { library: back, issues } = parseAtomLibraryCsv(text);
    expect(issues).toEqual([]);
    expect(back.name).toBe(lib.name);
    expect(back.approximate).toBe(true);
    expect(back.lambda).toBeCloseTo(lib.lambda, 18);
    expect(back.atoms.length).toBe(lib.atoms.length);
    back.atoms.forEach((a, i) => {
      const o = lib.atoms[i];
      expect(a.id).toBe(o.id);
      expect(a.shape).toBe(o.shape);
      expect(a.width).toBeCloseTo(o.width, 15);
      expect(a.length).toBeCloseTo(o.length, 15);
      expect(a.alphaX).toBe(o.alphaX);
      expect(a.ty).toBe(o.ty);
    });
  });

  it('is readable by numpy.genfromtxt with the same values', () => {
    const lib = demoAtomLibrary();
    const path = join(dir, 'atoms.csv');
    writeFileSync(path, atomLibraryToCsv(lib));
    const script = `
import json, sys, numpy as np
a = np.genfromtxt(sys.argv[1], delimiter=',', names=True, comments='#', dtype=None, encoding='utf-8')
print(json.dumps({'names': list(a.dtype.names), 'n': int(a.shape[0]), 'w': a['width_nm'].tolist(), 'px': a['phase_x_rad'].tolist(), 'id': [str(s) for s in a['atom_id']]}))`;
    const out = JSON.parse(execFileSync(PYTHON, ['-c', script, path]).toString());
    expect(out.names).toEqual([...ATOM_CSV_COLUMNS]);
    expect(out.n).toBe(lib.atoms.length);
    out.w.forEach((w: number, i: number) => expect(w).toBeCloseTo(lib.atoms[i].width * 1e9, 6));
    out.px.forEach((p: number, i: number) => expect(p).toBe(lib.atoms[i].alphaX));
    expect(out.id[1]).toBe(lib.atoms[1].id);
  });

  it('reports bad cells with line and column', () => {
    const text = [
      '# name: lab table',
      '# design_wavelength_nm: 800',
      '# period_nm: 400',
      '# height_nm: 600',
      ATOM_CSV_COLUMNS.join(','),
      'a,rect,100,150,600,400,0.9,0.1,0.9,0.2',
      'b,rect,abc,150,600,400,0.9,0.1,0.9,0.2',
    ].join('\n');
    const { issues } = parseAtomLibraryCsv(text, { material: 'test' });
    const bad = issues.find((i) => i.field === 'width_nm');
    expect(bad?.line).toBe(7);
    expect(bad?.row).toBe(2);
    expect(bad?.atomId).toBe('b');
    expect(issues.filter((i) => i.row === 2 && i.field === 'width')).toEqual([]);
    expect(parseAtomLibraryCsv('a,b\n1,2').issues[0].message).toMatch(/missing columns/);
  });

  it('gives every issue its CSV column and names lines of the file, not atom rows', () => {
    const lib = eightLevelLibrary();
    lib.atoms[4].tx = 1.3;
    lib.atoms.push({ ...lib.atoms[1] });
    const text = atomLibraryToCsv(lib);
    const lines = text.split('\n');
    const lineOf = (prefix: string, from = 0) => lines.findIndex((l, i) => i >= from && l.startsWith(prefix)) + 1;
    const twinLine = lineOf('a1,', lineOf('a1,'));
    const { issues } = parseAtomLibraryCsv(text);
    const amplitude = issues.find((i) => i.field === 'tx');
    expect(amplitude).toMatchObject({ column: 't_x', line: lineOf('a4,'), row: 5 });
    const repeat = issues.find((i) => i.field === 'id');
    expect(repeat).toMatchObject({ column: 'atom_id', line: twinLine, row: 9 });
    expect(repeat?.message).toBe(`atom a1 (line ${twinLine}): id repeats line ${lineOf('a1,')}`);
    expect(issues.find((i) => i.field === 'geometry')?.column).toBe('width_nm/length_nm/height_nm');
    expect(parseAtomLibraryCsv('atom_id,width_nm\n').issues[0].column).toContain('t_x');
  });
});
