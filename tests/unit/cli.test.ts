import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parseGDS, RecordType } from 'gdsii';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

const ROOT = join(import.meta.dirname, '..', '..');
const BIN = join(ROOT, 'bin', 'phasewright.mjs');
const dir = mkdtempSync(join(tmpdir(), 'phasewright-cli-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const N = 128;
const LAMBDA_NM = 633;
const PERIOD_NM = 450;

function cli(args: string[]) {
  return spawnSync(process.execPath, [BIN, ...args], { cwd: dir, encoding: 'utf8', timeout: 120_000 });
}

/** numpy (independent reader) loads each array and reports dtype, shape and a few reductions. */
function numpySummary(paths: string[]) {
  const script = `
import json, sys, numpy as np
out = {}
for p in sys.argv[1:]:
    a = np.load(p, allow_pickle=False)
    out[p.split('/')[-1]] = {'dtype': a.dtype.str, 'shape': list(a.shape), 'min': float(a.min()), 'max': float(a.max()),
                             'sum': float(a.astype(np.float64).sum()), 'argmax': [int(v) for v in np.unravel_index(np.argmax(a), a.shape)]}
print(json.dumps(out))`;
  return JSON.parse(execFileSync('python3', ['-c', script, ...paths], { maxBuffer: 16 << 20 }).toString()) as Record<
    string,
    { dtype: string; shape: number[]; min: number; max: number; sum: number; argmax: number[] }
  >;
}

const design = {
  format: 'phasewright-design/1',
  name: 'CLI check',
  setup: { wavelengthNm: LAMBDA_NM, periodNm: PERIOD_NM, cells: N },
  polarization: { kind: 'linear', angleDeg: 0 },
  channels: {
    a: {
      terms: [
        { kind: 'hologram', image: { source: 'demo', name: 'lighthouse' }, window: { units: 'degrees', width: 12, centerX: 14 }, iterations: 12, seed: 5 },
      ],
    },
    b: {
      terms: [
        // Grating equation: a tilt of sinθ = m·λ/(N·P) moves the first order by m far-field pixels.
        { kind: 'tilt', thetaYDeg: (Math.asin((-6 * LAMBDA_NM) / (N * PERIOD_NM)) * 180) / Math.PI },
        { kind: 'custom', phaseMap: { source: 'file', path: 'ramp.npy' } },
      ],
    },
  },
};

let parallelOut = '';
let sequentialOut = '';
let run: ReturnType<typeof cli>;

beforeAll(() => {
  // The custom map, written by numpy: a phase ramp of 5 periods across the device, float32 → +5 px in x.
  execFileSync('python3', ['-c', `import numpy as np; x = np.arange(${N}); np.save('${join(dir, 'ramp.npy')}', np.tile(2*np.pi*5*x/${N}, (${N}, 1)).astype(np.float32))`]);
  writeFileSync(join(dir, 'design.json'), JSON.stringify(design));
  parallelOut = join(dir, 'out');
  sequentialOut = join(dir, 'out-sequential');
  run = cli(['run', 'design.json', '--out', 'out']);
}, 180_000);

describe('phasewright run (command line, end to end)', () => {
  it('exits 0, prints the summary on stdout and progress on stderr', () => {
    expect(run.status, run.stderr).toBe(0);
    expect(run.stdout).toMatch(/Phasewright run of "CLI check": 128×128 cells/);
    expect(run.stdout).toMatch(/layout\.gds/);
    expect(run.stderr).toMatch(/phase retrieval/);
    expect(run.stderr).toMatch(/APPROXIMATE/);
  });

  it('writes .npy arrays that numpy reads with the documented dtype, shape and ranges', () => {
    const names = ['phase_a', 'phase_b', 'delta_x', 'delta_y', 'theta', 'atom_index', 'farfield_a', 'farfield_b'];
    const s = numpySummary(names.map((n) => join(parallelOut, `${n}.npy`)));
    for (const name of ['phase_a', 'phase_b', 'delta_x', 'delta_y', 'theta']) {
      expect(s[`${name}.npy`].dtype).toBe('<f8');
      expect(s[`${name}.npy`].shape).toEqual([N, N]);
      expect(s[`${name}.npy`].min).toBeGreaterThan(-Math.PI - 1e-12);
      expect(s[`${name}.npy`].max).toBeLessThanOrEqual(Math.PI + 1e-12);
    }
    // Canonical decomposition of jones.ts: θ ∈ (−π/4, π/4].
    expect(s['theta.npy'].min).toBeGreaterThan(-Math.PI / 4 - 1e-12);
    expect(s['theta.npy'].max).toBeLessThanOrEqual(Math.PI / 4 + 1e-12);
    const atoms = readFileSync(join(parallelOut, 'atoms.csv'), 'utf8')
      .split('\n')
      .filter((l) => l && !l.startsWith('#'))
      .slice(1);
    expect(s['atom_index.npy'].dtype).toBe('<i4');
    expect(s['atom_index.npy'].min).toBeGreaterThanOrEqual(0);
    expect(s['atom_index.npy'].max).toBeLessThan(atoms.length);
    for (const name of ['farfield_a', 'farfield_b']) {
      const f = s[`${name}.npy`];
      expect(f.dtype).toBe('<f4');
      expect(f.shape).toEqual([N, N]);
      expect(f.min).toBeGreaterThanOrEqual(0);
      // Unitary far field: at most the incident power N² comes out; the demo atoms transmit most of it.
      expect(f.sum).toBeLessThanOrEqual(N * N * (1 + 1e-5));
      expect(f.sum).toBeGreaterThan(0.8 * N * N);
    }
    // Channel B: tilt −6 px in y plus the numpy ramp +5 px in x, zero order at (N/2, N/2) (fftshifted).
    expect(s['farfield_b.npy'].argmax).toEqual([N / 2 - 6, N / 2 + 5]);
  });

  it('writes metrics with units and the input Jones vectors as [re, im] pairs, and the design with defaults filled in', () => {
    const metrics = JSON.parse(readFileSync(join(parallelOut, 'metrics.json'), 'utf8'));
    expect(metrics.inputs.a).toEqual([
      [1, 0],
      [0, 0],
    ]);
    expect(metrics.inputs.b[1][0]).toBeCloseTo(1, 15);
    expect(metrics.metrics.channels.a.efficiency.unit).toBe('fraction');
    expect(metrics.metrics.channels.a.crosstalk.unit).toBe('dB');
    expect(metrics.convergence.a.fourierError).toHaveLength(12);
    const written = JSON.parse(readFileSync(join(parallelOut, 'design.json'), 'utf8'));
    expect(written.channels.a.terms[0].algorithm).toBe('weighted-gs');
    expect(written.atomLibrary).toEqual({ source: 'demo' });
  });

  it('streams a GDSII layout that the independent gdsii parser reads: one SREF per non-empty cell', () => {
    const lines = readFileSync(join(parallelOut, 'atoms.csv'), 'utf8')
      .split('\n')
      .filter((l) => l && !l.startsWith('#'));
    const shapeColumn = lines[0].split(',').indexOf('shape');
    const shapes = lines.slice(1).map((l) => l.split(',')[shapeColumn]);
    const index = new Int32Array(readFileSync(join(parallelOut, 'atom_index.npy')).buffer.slice(128));
    let filled = 0;
    for (const j of index) if (shapes[j] !== 'empty') filled++;
    let srefs = 0;
    let inTop = false;
    for (const record of parseGDS(new Uint8Array(readFileSync(join(parallelOut, 'layout.gds'))))) {
      if (record.tag === RecordType.STRNAME) inTop = record.data === 'METASURFACE';
      if (record.tag === RecordType.SREF && inTop) srefs++;
    }
    expect(index.length).toBe(N * N);
    expect(srefs).toBe(filled);
  });

  it('writes PNG previews of the design size', () => {
    for (const name of ['farfield_a', 'farfield_b', 'farfield_extra', 'phase_a', 'phase_b', 'atom_index', 'rotation']) {
      const bytes = readFileSync(join(parallelOut, `${name}.png`));
      expect(Array.from(bytes.subarray(0, 8))).toEqual([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
      // IHDR width and height (PNG specification, big-endian at bytes 16…23).
      expect(bytes.readUInt32BE(16)).toBe(N);
      expect(bytes.readUInt32BE(20)).toBe(N);
    }
  });

  it('gives the same phases with --sequential as with the two worker threads (seeded retrieval)', () => {
    const again = cli(['run', 'design.json', '--out', sequentialOut, '--sequential']);
    expect(again.status, again.stderr).toBe(0);
    for (const name of ['phase_a.npy', 'phase_b.npy', 'atom_index.npy']) {
      expect(readFileSync(join(sequentialOut, name)).equals(readFileSync(join(parallelOut, name)))).toBe(true);
    }
  }, 120_000);

  it('rejects a bad design with exit code 2 and a message naming the field, without a stack trace', () => {
    const bad = { ...design, setup: { wavelengthNm: LAMBDA_NM, periodNm: PERIOD_NM, cells: 100 } };
    writeFileSync(join(dir, 'bad.json'), JSON.stringify(bad));
    const result = cli(['run', 'bad.json', '--out', 'bad-out']);
    expect(result.status).toBe(2);
    expect(result.stderr).toMatch(/setup\.cells: cells must be one of 64, 128, 256, 512, 1024, 2048/);
    expect(result.stderr).not.toMatch(/\n\s+at /);
    expect(existsSync(join(dir, 'bad-out'))).toBe(false);

    writeFileSync(join(dir, 'broken.json'), '{ "name": ');
    const broken = cli(['run', 'broken.json', '--out', 'bad-out']);
    expect(broken.status).toBe(2);
    expect(broken.stderr).toMatch(/not valid JSON/);

    const wrongMap = { ...design, channels: { ...design.channels, b: { terms: [{ kind: 'custom', phaseMap: { source: 'file', path: 'missing.npy' } }] } } };
    writeFileSync(join(dir, 'missing.json'), JSON.stringify(wrongMap));
    const missing = cli(['run', 'missing.json', '--out', 'bad-out']);
    expect(missing.status).toBe(2);
    expect(missing.stderr).toMatch(/channels\.b\.terms\.0\.phaseMap: cannot read/);
  });

  it('prints usage with --help and exits 2 on an unknown command', () => {
    const help = cli(['--help']);
    expect(help.status).toBe(0);
    expect(help.stdout).toMatch(/phasewright run DESIGN\.json --out DIR/);
    const unknown = cli(['paint']);
    expect(unknown.status).toBe(2);
    expect(unknown.stderr).toMatch(/unknown command 'paint'/);
  });
});
