import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parseGDS, RecordType } from 'gdsii';
import { Jimp } from 'jimp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sequentialColor } from '../../shared/optics/colormap';
import { PYTHON } from '../support/python';

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
  return JSON.parse(execFileSync(PYTHON, ['-c', script, ...paths], { maxBuffer: 16 << 20 }).toString()) as Record<
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

/**
 * A circular-basis twin-image design: left-circular input A, right-circular input B (PRODUCT.md handedness
 * convention), a hologram per channel in windows left and right of the zero order.
 */
const circularDesign = {
  format: 'phasewright-design/1',
  name: 'CLI circular check',
  setup: { wavelengthNm: LAMBDA_NM, periodNm: PERIOD_NM, cells: N },
  polarization: { kind: 'circular', handedness: 'left' },
  channels: {
    a: { terms: [{ kind: 'hologram', image: { source: 'demo', name: 'lighthouse' }, window: { units: 'degrees', width: 14, centerX: 16 }, iterations: 12, seed: 3 }] },
    b: { terms: [{ kind: 'hologram', image: { source: 'demo', name: 'compass-rose' }, window: { units: 'degrees', width: 14, centerX: -16 }, iterations: 12, seed: 5 }] },
  },
};

let parallelOut = '';
let sequentialOut = '';
let circularOut = '';
let run: ReturnType<typeof cli>;
let circularRun: ReturnType<typeof cli>;

beforeAll(() => {
  // The custom map, written by numpy: a phase ramp of 5 periods across the device, float32 → +5 px in x.
  execFileSync(PYTHON, ['-c', `import numpy as np; x = np.arange(${N}); np.save('${join(dir, 'ramp.npy')}', np.tile(2*np.pi*5*x/${N}, (${N}, 1)).astype(np.float32))`]);
  writeFileSync(join(dir, 'design.json'), JSON.stringify(design));
  parallelOut = join(dir, 'out');
  sequentialOut = join(dir, 'out-sequential');
  run = cli(['run', 'design.json', '--out', 'out']);
  writeFileSync(join(dir, 'circular.json'), JSON.stringify(circularDesign));
  circularOut = join(dir, 'out-circular');
  circularRun = cli(['run', 'circular.json', '--out', 'out-circular']);
}, 240_000);

/** PNG signature and IHDR width/height (PNG specification: big-endian at bytes 16…23). */
function expectPng(path: string, side: number) {
  const bytes = readFileSync(path);
  expect(Array.from(bytes.subarray(0, 8))).toEqual([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
  expect(bytes.readUInt32BE(16)).toBe(side);
  expect(bytes.readUInt32BE(20)).toBe(side);
}

const WINDOW_A_OUTLINE = [90, 225, 255];
/** Colour → level 0…255 of the far-field colour table (colormap.ts sequentialColor, 256 entries). */
const LEVELS = new Map(Array.from({ length: 256 }, (_, i) => [sequentialColor(i / 255).join(','), i]));

/**
 * A far-field preview read back: the box inside the window outline of `outline` colour, and per pixel the
 * intensity relative to the picture's full scale — previews.ts paints gamma 0.5, so I/Imax = (level/255)².
 */
async function readFarField(path: string, outline: number[]) {
  const { width, height, data } = (await Jimp.read(path)).bitmap;
  let x0 = width;
  let y0 = height;
  let x1 = -1;
  let y1 = -1;
  const intensity = new Float64Array(width * height);
  for (let i = 0; i < width * height; i++) {
    const rgb = [data[4 * i], data[4 * i + 1], data[4 * i + 2]];
    if (rgb.every((v, k) => v === outline[k])) {
      const x = i % width;
      const y = Math.floor(i / width);
      x0 = Math.min(x0, x);
      x1 = Math.max(x1, x);
      y0 = Math.min(y0, y);
      y1 = Math.max(y1, y);
      continue;
    }
    const level = LEVELS.get(rgb.join(','));
    intensity[i] = level === undefined ? NaN : (level / 255) ** 2;
  }
  const inside = (x: number, y: number) => x > x0 && x < x1 && y > y0 && y < y1;
  let windowSum = 0;
  for (let y = 0; y < height; y++) for (let x = 0; x < width; x++) if (inside(x, y)) windowSum += intensity[y * width + x];
  return { box: { x0, y0, x1, y1 }, windowSum };
}


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

  it('writes PNG previews of the design size, far fields split into the output states', () => {
    for (const name of ['farfield_a', 'farfield_b', 'farfield_extra', 'phase_a', 'phase_b', 'atom_index', 'rotation']) expectPng(join(parallelOut, `${name}.png`), N);
    for (const input of ['a', 'b', 'extra']) {
      for (const component of ['out-a', 'out-b']) expectPng(join(parallelOut, `farfield_${input}_${component}.png`), N);
      // Linear x/y basis: the output states are x and y themselves, so no separate x and y pictures.
      for (const component of ['x', 'y']) expect(existsSync(join(parallelOut, `farfield_${input}_${component}.png`))).toBe(false);
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
    expect(result.stderr).toMatch(/setup\.cells: cells must be one of 64, 128, 256, 512, 1024, 2048, 4096/);
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

  it('--tiles writes the tile pyramids the server stores for its run pages; --tiles=SIDE is checked', () => {
    // A 512² design: above one 256-px tile, so each picture has two levels (512 and 256 px).
    const tiled = { ...design, setup: { ...design.setup, cells: 512 }, channels: { a: design.channels.a, b: { terms: [{ kind: 'tilt', thetaXDeg: 3 }] } } };
    writeFileSync(join(dir, 'tiled.json'), JSON.stringify(tiled));
    const result = cli(['run', 'tiled.json', '--out', 'out-tiled', '--tiles', '--sequential']);
    expect(result.status, result.stderr).toBe(0);
    for (const picture of ['farfield_a', 'farfield_b', 'farfield_extra', 'phase_a', 'phase_b', 'atom_index', 'rotation']) {
      const bytes = readFileSync(join(dir, 'out-tiled', `${picture}.tiles`));
      // README "Tile pyramids": PNG tiles, the JSON index, its length (uint32 LE) and "PWTILES1".
      expect(bytes.subarray(bytes.length - 8).toString('latin1')).toBe('PWTILES1');
      const indexBytes = bytes.readUInt32LE(bytes.length - 12);
      const index = JSON.parse(bytes.subarray(bytes.length - 12 - indexBytes, bytes.length - 12).toString('utf8'));
      expect(index).toMatchObject({ format: 'phasewright-tiles/1', width: 512, height: 512, tileSize: 256 });
      expect(index.tiles.map((level: unknown[]) => level.length)).toEqual([4, 1]);
      expect(result.stdout).toContain(`${picture}.tiles`);
    }
    const bad = cli(['run', 'tiled.json', '--out', 'out-tiled-bad', '--tiles=100']);
    expect(bad.status).toBe(2);
    expect(bad.stderr).toMatch(/--tiles=SIDE needs a whole number of pixels from 256 to 65536, not '100'/);
  }, 120_000);
});

describe('far-field previews split into output polarization components (circular basis)', () => {
  it('writes the total, the two output states and x, y for every input', () => {
    expect(circularRun.status, circularRun.stderr).toBe(0);
    for (const input of ['a', 'b', 'extra']) {
      expectPng(join(circularOut, `farfield_${input}.png`), N);
      for (const component of ['out-a', 'out-b', 'x', 'y']) expectPng(join(circularOut, `farfield_${input}_${component}.png`), N);
    }
  });

  it("under input A puts the light of A's window in λA*, on one scale for all components", async () => {
    // Mueller et al., Phys. Rev. Lett. 118, 113901 (2017): J = [e^{iφA} λA*, e^{iφB} λB*]·[λA, λB]⁻¹ sends
    // input A to λA* carrying φA; light a real atom fails to convert keeps A's own state (λB* for a circular
    // pair) and no phase, so it lands in the zero order, not in A's window.
    const part = (component: string) => readFarField(join(circularOut, `farfield_a_${component}.png`), WINDOW_A_OUTLINE);
    const [outA, outB, x, y] = await Promise.all(['out-a', 'out-b', 'x', 'y'].map(part));
    // The outline sits where the grating equation puts the window: centre at sin 16° / (λ/(N·P)) px right of
    // the zero order (N/2, N/2), direction-cosine step λ/(N·P) (PRODUCT.md, far field & sampling).
    const centreX = N / 2 + Math.sin((16 * Math.PI) / 180) / (LAMBDA_NM / (N * PERIOD_NM));
    expect(Math.abs((outA.box.x0 + outA.box.x1) / 2 - centreX)).toBeLessThan(2);
    expect(Math.abs((outA.box.y0 + outA.box.y1) / 2 - N / 2)).toBeLessThan(2);
    expect(outB.box).toEqual(outA.box);
    expect(Number.isNaN(outA.windowSum + outB.windowSum + x.windowSum + y.windowSum)).toBe(false);
    expect(outA.windowSum / (outA.windowSum + outB.windowSum)).toBeGreaterThan(0.9);
    // One scale: power is the same in any orthonormal output basis, |Fx|² + |Fy|² = |FA|² + |FB|²; and
    // circular light (λA*) splits evenly between x and y. Tolerances: 8-bit levels and saturated pixels.
    expect((x.windowSum + y.windowSum) / (outA.windowSum + outB.windowSum)).toBeGreaterThan(0.9);
    expect((x.windowSum + y.windowSum) / (outA.windowSum + outB.windowSum)).toBeLessThan(1.1);
    expect(x.windowSum / (x.windowSum + y.windowSum)).toBeCloseTo(0.5, 1);
    // The full-precision metric agrees: the other output state is at least 10 dB down in A's window.
    const metrics = JSON.parse(readFileSync(join(circularOut, 'metrics.json'), 'utf8'));
    expect(metrics.metrics.channels.a.crosstalk.value).toBeLessThan(-10);
  });
});
