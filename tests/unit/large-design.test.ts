/**
 * A 4096² twin-image design through the command line with two iterations per channel (the one heavy test of
 * the largest size: about a minute on a quiet 2-core machine, several when it is loaded). Checked against
 * code that is not ours:
 * - every array's dtype and shape read by numpy (headers only, memory-mapped);
 * - layout.gds read by the independent `gdsii` parser (tests/support/gds-read.ts): one SREF per non-empty
 *   cell, 16 777 216 placements, each at its cell's centre, naming the cell's atom of atom_index.npy;
 * - the far field under input A recomputed by numpy from the layout as the parser read it (each placement's
 *   atom and angle) and atoms.csv: J = R(θ)·diag(tx e^{iαx}, ty e^{iαy})·R(θ)ᵀ per cell, E = J·a, unitary
 *   fft2 (numpy.fft, norm='ortho'), fftshift; its central 2048² crop (the zero order and both image windows)
 *   compared with farfield_a.npy.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, expect, it } from 'vitest';
import { countGdsPlacements } from '../support/gds-read';
import { PYTHON } from '../support/python';

const ROOT = join(import.meta.dirname, '..', '..');
const BIN = join(ROOT, 'bin', 'phasewright.mjs');
const N = 4096;
const PERIOD_NM = 450;
const dir = mkdtempSync(join(tmpdir(), 'phasewright-4096-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const design = {
  format: 'phasewright-design/1',
  name: '4096² twin image',
  setup: { wavelengthNm: 633, periodNm: PERIOD_NM, cells: N },
  polarization: { kind: 'circular', handedness: 'left' },
  channels: {
    a: { terms: [{ kind: 'hologram', image: { source: 'demo', name: 'lighthouse' }, window: { units: 'degrees', width: 14, centerX: 16 }, iterations: 2, seed: 11 }] },
    b: { terms: [{ kind: 'hologram', image: { source: 'demo', name: 'compass-rose' }, window: { units: 'degrees', width: 14, centerX: -16 }, iterations: 2, seed: 23 }] },
  },
};

const NUMPY_CHECK = `
import csv, json, sys
import numpy as np
out, n, crop = sys.argv[1], int(sys.argv[2]), int(sys.argv[3])
result = {'arrays': {}}
for name in ['phase_a', 'phase_b', 'delta_x', 'delta_y', 'theta', 'atom_index', 'farfield_a', 'farfield_b']:
    a = np.load(f'{out}/{name}.npy', mmap_mode='r')
    result['arrays'][name] = {'dtype': a.dtype.str, 'shape': list(a.shape)}
rows = [r for r in csv.reader(open(f'{out}/atoms.csv')) if r and not r[0].startswith('#')]
head, rows = rows[0], rows[1:]
col = {h: i for i, h in enumerate(head)}
A = np.array([float(r[col['t_x']]) * np.exp(1j * float(r[col['phase_x_rad']])) for r in rows])
B = np.array([float(r[col['t_y']]) * np.exp(1j * float(r[col['phase_y_rad']])) for r in rows])
atom = np.fromfile(f'{out}/gds-atom.bin', dtype='<i4').reshape(n, n)
angle = np.deg2rad(np.fromfile(f'{out}/gds-angle.bin', dtype='<f8')).reshape(n, n)
index = np.load(f'{out}/atom_index.npy')
placed = atom >= 0
result['gdsAtomsMatch'] = bool(np.array_equal(atom[placed], index[placed]))
k = np.where(placed, atom, index)
del atom, index, placed
a = np.array([complex(*c) for c in json.load(open(f'{out}/metrics.json'))['inputs']['a']])
S, D = ((A + B) / 2)[k], ((A - B) / 2)[k]
del k
c2, s2 = np.cos(2 * angle), np.sin(2 * angle)
del angle
# R(θ)·diag(A, B)·R(θ)ᵀ = S·I + D·[[cos 2θ, sin 2θ], [sin 2θ, −cos 2θ]]
ex = S * a[0] + D * (c2 * a[0] + s2 * a[1])
intensity = np.abs(np.fft.fftshift(np.fft.fft2(ex, norm='ortho'))) ** 2
del ex
ey = S * a[1] + D * (s2 * a[0] - c2 * a[1])
del S, D, c2, s2
intensity += np.abs(np.fft.fftshift(np.fft.fft2(ey, norm='ortho'))) ** 2
del ey
lo, hi = n // 2 - crop // 2, n // 2 + crop // 2
ours = np.load(f'{out}/farfield_a.npy', mmap_mode='r')[lo:hi, lo:hi].astype(np.float64)
ref = intensity[lo:hi, lo:hi]
result['crop'] = {'peak': float(ref.max()), 'maxAbsDiff': float(np.abs(ours - ref).max()), 'sumOurs': float(ours.sum()), 'sumRef': float(ref.sum())}
print(json.dumps(result))
`;

it('runs a 4096² twin-image design from the command line: arrays, 16.7 M GDSII placements, far field as numpy computes it', { timeout: 1_500_000 }, () => {
  writeFileSync(join(dir, 'design.json'), JSON.stringify(design));
  const out = join(dir, 'out');
  const run = spawnSync(process.execPath, [BIN, 'run', 'design.json', '--out', out], { cwd: dir, encoding: 'utf8', timeout: 900_000 });
  expect(run.status, run.stderr).toBe(0);

  // GDSII: the independent parser walks all ~100 M records; the placements it finds are handed to numpy.
  const layout = countGdsPlacements(readFileSync(join(out, 'layout.gds')), { n: N, periodNm: PERIOD_NM });
  expect(layout.units.metersPerUnit).toBeCloseTo(1e-9, 15);
  expect(layout.placements).toBe(N * N); // the demo library's atoms used here are all pillars: no empty cells
  expect(layout.offGrid).toBe(0);
  expect(layout.repeated).toBe(0);
  writeFileSync(join(out, 'gds-atom.bin'), layout.atom);
  writeFileSync(join(out, 'gds-angle.bin'), layout.angleDeg);

  const check = spawnSync(PYTHON, ['-c', NUMPY_CHECK, out, String(N), '2048'], { encoding: 'utf8', timeout: 300_000, maxBuffer: 1 << 20 });
  expect(check.status, check.stderr).toBe(0);
  const result = JSON.parse(check.stdout) as {
    arrays: Record<string, { dtype: string; shape: number[] }>;
    gdsAtomsMatch: boolean;
    crop: { peak: number; maxAbsDiff: number; sumOurs: number; sumRef: number };
  };
  const f8 = { dtype: '<f8', shape: [N, N] };
  expect(result.arrays).toEqual({
    phase_a: f8,
    phase_b: f8,
    delta_x: f8,
    delta_y: f8,
    theta: f8,
    atom_index: { dtype: '<i4', shape: [N, N] },
    farfield_a: { dtype: '<f4', shape: [N, N] },
    farfield_b: { dtype: '<f4', shape: [N, N] },
  });
  expect(result.gdsAtomsMatch).toBe(true);
  // farfield_a.npy is float32 (relative step 2⁻²³ ≈ 1.2e-7) from float32 transforms (PFFFT); measured at 4e-8 of
  // the zero-order peak in the largest difference and 6e-8 in the crop's sum. 1e-6 leaves room for that; a layout
  // whose rotations are mirrored (θ → −θ) differs by the whole peak.
  expect(result.crop.maxAbsDiff).toBeLessThan(1e-6 * result.crop.peak);
  expect(Math.abs(result.crop.sumOurs / result.crop.sumRef - 1)).toBeLessThan(1e-6);
});
