/**
 * The picture convention (README "Picture convention"): x (u = sin θx) to the right and y (v = sin θy) up,
 * seen facing the device from the side the light goes to; a target picture appears upright in that view.
 *
 * Checked against the published sign convention, not against the engine's own arrays:
 * - Time dependence exp(−iωt): a transmitted phase exp(+i k sinθ x) sends the light towards +x (Goodman,
 *   Introduction to Fourier Optics, 3rd ed., §3.10 / §4.2: a linear phase ramp of spatial frequency fx shifts
 *   the Fraunhofer pattern to x = λ z fx). So a design with only a tilt of +10° in x and +5° in y must put
 *   the far-field peak at (u, v) = (sin 10°, sin 5°): right of and above the zero order in every PNG preview,
 *   read here pixel by pixel from the PNG files with pngjs (an independent decoder).
 * - A target picture with a bright mark in its top-left corner must appear top-left inside its window in the
 *   PNG previews, and top-left (smaller u, larger v) in a far field that numpy recomputes from the GDSII
 *   placements (read with the independent `gdsii` parser, tests/support/gds-read.ts) and the atom table
 *   (atoms.csv): each cell's Jones matrix R(θ)·diag(t_x e^{iα_x}, t_y e^{iα_y})·R(−θ) on the input, then
 *   numpy.fft.fft2 (kernel exp(−2πi k n / N), the Fraunhofer integral of Goodman eq. 4-25 up to constants).
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { PNG } from 'pngjs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sequentialColor } from '../../shared/optics/colormap';
import { buildTargetPlane } from '../../shared/optics/target';
import { readGdsLayout } from '../support/gds-read';
import { PYTHON } from '../support/python';

const ROOT = join(import.meta.dirname, '..', '..');
const BIN = join(ROOT, 'bin', 'phasewright.mjs');
const dir = mkdtempSync(join(tmpdir(), 'phasewright-orientation-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const N = 256;
const LAMBDA_NM = 633;
const PERIOD_NM = 450;
const DELTA_U = LAMBDA_NM / (N * PERIOD_NM);
const sinDeg = (deg: number) => Math.sin((deg * Math.PI) / 180);

function cli(args: string[]) {
  return spawnSync(process.execPath, [BIN, ...args], { cwd: dir, encoding: 'utf8', timeout: 240_000 });
}

const tiltDesign = {
  format: 'phasewright-design/1',
  name: 'Tilt only',
  setup: { wavelengthNm: LAMBDA_NM, periodNm: PERIOD_NM, cells: N },
  polarization: { kind: 'linear', angleDeg: 0 },
  channels: {
    a: { terms: [{ kind: 'tilt', thetaXDeg: 10, thetaYDeg: 5 }] },
    b: { terms: [{ kind: 'tilt', thetaXDeg: 10, thetaYDeg: 5 }] },
  },
};

/** Window of the marked picture: centre (10°, 8°), 16° wide (square picture). */
const MARK_WINDOW = { units: 'degrees', width: 16, centerX: 10, centerY: 8 };
const markDesign = {
  format: 'phasewright-design/1',
  name: 'Mark in the top-left corner',
  setup: { wavelengthNm: LAMBDA_NM, periodNm: PERIOD_NM, cells: N },
  polarization: { kind: 'linear', angleDeg: 0 },
  channels: {
    a: { terms: [{ kind: 'hologram', image: { source: 'file', path: 'mark.png' }, window: MARK_WINDOW, algorithm: 'gs', iterations: 40, seed: 3 }] },
    b: { terms: [{ kind: 'tilt', thetaXDeg: -12, thetaYDeg: -10 }] },
  },
};

/** The same picture meant for a flat screen (pre-distorted target, screen_a.png shows the screen). */
const screenDesign = {
  ...markDesign,
  name: 'Mark on a flat screen',
  channels: { ...markDesign.channels, a: { terms: [{ ...markDesign.channels.a.terms[0], seenOn: 'flat-screen' }] } },
};

/** A 32×32 grayscale picture, black, with a white 10×10 square in its top-left corner (rows 2…11, columns 2…11). */
function markPicture(): Buffer {
  const png = new PNG({ width: 32, height: 32 });
  for (let y = 0; y < 32; y++) {
    for (let x = 0; x < 32; x++) {
      const on = x >= 2 && x < 12 && y >= 2 && y < 12 ? 255 : 0;
      png.data.set([on, on, on, 255], 4 * (y * 32 + x));
    }
  }
  return PNG.sync.write(png);
}

let tiltOut = '';
let markOut = '';
let screenOut = '';
let mapOut = '';

/**
 * A phase map given as a picture (grey g → phase 2πg/256): grey rises by 16 per row from the bottom row to the
 * top row of a 128×128 picture, i.e. φ = 2π·8·(row from the bottom)/128 — a ramp exp(+i 2π·8 y/(N·P)) when the
 * top row is the largest y, which sends the light to v = +8·λ/(N·P) (Goodman): 8 far-field pixels above the zero order.
 */
const MAP_N = 128;
function rampPicture(): Buffer {
  const png = new PNG({ width: MAP_N, height: MAP_N });
  for (let row = 0; row < MAP_N; row++) {
    const grey = (16 * (MAP_N - 1 - row)) % 256;
    for (let x = 0; x < MAP_N; x++) png.data.set([grey, grey, grey, 255], 4 * (row * MAP_N + x));
  }
  return PNG.sync.write(png);
}
const mapDesign = {
  format: 'phasewright-design/1',
  name: 'Phase map given as a picture',
  setup: { wavelengthNm: LAMBDA_NM, periodNm: PERIOD_NM, cells: MAP_N },
  polarization: { kind: 'linear', angleDeg: 0 },
  channels: {
    a: { terms: [{ kind: 'custom', phaseMap: { source: 'file', path: 'ramp.png' } }] },
    b: { terms: [{ kind: 'custom', phaseMap: { source: 'file', path: 'ramp.png' } }] },
  },
};
beforeAll(() => {
  writeFileSync(join(dir, 'tilt.json'), JSON.stringify(tiltDesign));
  writeFileSync(join(dir, 'mark.json'), JSON.stringify(markDesign));
  writeFileSync(join(dir, 'mark.png'), markPicture());
  const tilt = cli(['run', 'tilt.json', '--out', 'tilt']);
  expect(tilt.status, tilt.stderr).toBe(0);
  const mark = cli(['run', 'mark.json', '--out', 'mark']);
  expect(mark.status, mark.stderr).toBe(0);
  writeFileSync(join(dir, 'screen.json'), JSON.stringify(screenDesign));
  const screen = cli(['run', 'screen.json', '--out', 'screen']);
  expect(screen.status, screen.stderr).toBe(0);
  screenOut = join(dir, 'screen');
  writeFileSync(join(dir, 'ramp.png'), rampPicture());
  writeFileSync(join(dir, 'map.json'), JSON.stringify(mapDesign));
  const map = cli(['run', 'map.json', '--out', 'map']);
  expect(map.status, map.stderr).toBe(0);
  mapOut = join(dir, 'map');
  tiltOut = join(dir, 'tilt');
  markOut = join(dir, 'mark');
}, 480_000);

/** Colour → level 0…255 of the far-field colour table (colormap.ts sequentialColor, 256 entries). */
const LEVELS = new Map(Array.from({ length: 256 }, (_, i) => [sequentialColor(i / 255).join(','), i]));

/** A far-field PNG read back: per pixel the level 0…255 of the colour table (NaN for other colours, e.g. outlines). */
function readLevels(path: string) {
  const { width, height, data } = PNG.sync.read(readFileSync(path));
  const level = new Float64Array(width * height);
  for (let i = 0; i < width * height; i++) level[i] = LEVELS.get(`${data[4 * i]},${data[4 * i + 1]},${data[4 * i + 2]}`) ?? NaN;
  return { width, height, level, data };
}

/**
 * Where the picture's brightest spot lies outside the zero order: centroid of the pixels within 2 levels of
 * the highest level found more than `reach` pixels from the picture's centre.
 */
function brightestSpot(path: string, reach = 4) {
  const { width, height, level } = readLevels(path);
  const away = (x: number, y: number) => Math.abs(x - width / 2) > reach || Math.abs(y - height / 2) > reach;
  let top = -1;
  for (let y = 0; y < height; y++) for (let x = 0; x < width; x++) if (away(x, y) && level[y * width + x] > top) top = level[y * width + x];
  let sx = 0;
  let sy = 0;
  let count = 0;
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      if (away(x, y) && level[y * width + x] >= top - 2) {
        sx += x;
        sy += y;
        count++;
      }
    }
  }
  return { x: sx / count, y: sy / count, top, width, height };
}

describe('far-field previews follow the published sign convention (Goodman: exp(+ik sinθ x) goes to +x)', () => {
  it('a tilt of +10° in x and +5° in y lights (sin 10°, sin 5°), right of and above the zero order, in every far-field PNG', () => {
    const names = readdirSync(tiltOut).filter((name) => /^farfield_.*\.png$/.test(name));
    // Totals and components under inputs A, B and the extra input.
    expect(names.length).toBeGreaterThanOrEqual(9);
    let checked = 0;
    for (const name of names) {
      const spot = brightestSpot(join(tiltOut, name));
      // A component the tilt sends no light to (e.g. the y part under an x input) is dark: nothing to locate.
      if (spot.top < 128) continue;
      checked++;
      const factor = N / spot.width;
      // PNG column c shows far-field column c·factor…; u = (column − N/2)·Δu. PNG rows run downwards from the top, v up.
      const u = ((spot.x + 0.5) * factor - 0.5 - N / 2) * DELTA_U;
      const v = (N / 2 - 0.5 - (spot.y + 0.5) * factor + 0.5) * DELTA_U;
      expect(Math.abs(u - sinDeg(10)), `${name}: u = ${u}`).toBeLessThan(1.5 * DELTA_U * factor);
      expect(Math.abs(v - sinDeg(5)), `${name}: v = ${v}`).toBeLessThan(1.5 * DELTA_U * factor);
      // Right of and above the zero order, in picture terms.
      expect(spot.x, name).toBeGreaterThan(spot.width / 2 + 10 / factor);
      expect(spot.y, name).toBeLessThan(spot.height / 2 - 5 / factor);
    }
    expect(checked).toBeGreaterThanOrEqual(6);
  });

  it('metrics.json gives every far-field PNG the frame that reads the peak back at (sin 10°, sin 5°)', () => {
    const { pictures } = JSON.parse(readFileSync(join(tiltOut, 'metrics.json'), 'utf8')) as {
      pictures: { convention: number; frames: Record<string, { x: { from: number; to: number; label: string }; y: { from: number; to: number; label: string } }> };
    };
    expect(pictures.convention).toBe(2);
    for (const name of ['farfield_a.png', 'farfield_b.png', 'farfield_extra.png']) {
      const { x, y } = pictures.frames[name];
      expect(x.label).toBe('u = sin θx');
      expect(y.label).toBe('v = sin θy');
      const spot = brightestSpot(join(tiltOut, name));
      // Picture fractions → values: x from the left edge, y from the top edge (the top edge is y.to).
      const u = x.from + ((spot.x + 0.5) / spot.width) * (x.to - x.from);
      const v = y.to - ((spot.y + 0.5) / spot.height) * (y.to - y.from);
      expect(Math.abs(u - sinDeg(10)), name).toBeLessThan(1.5 * DELTA_U);
      expect(Math.abs(v - sinDeg(5)), name).toBeLessThan(1.5 * DELTA_U);
    }
  });
});

describe('a phase map given as a picture is read with its top row at the largest y', () => {
  it('a grey ramp rising towards the picture’s top sends the light up: 8 pixels above the zero order', () => {
    const spot = brightestSpot(join(mapOut, 'farfield_a.png'), 2);
    expect(spot.x).toBeCloseTo(MAP_N / 2, 0);
    // PNG row of far-field row N/2 + 8 (v = +8Δu): (N − 1) − (N/2 + 8).
    expect(Math.abs(spot.y - (MAP_N - 1 - (MAP_N / 2 + 8)))).toBeLessThanOrEqual(1);
  });
});

describe('a target picture is upright: its top-left mark appears top-left', () => {
  const outline = [90, 225, 255];

  /** Intensity centroid inside the outlined window of a PNG, relative to the window's centre (x right, y down in PNG rows). */
  function markInPng(path: string) {
    const { width, height, level, data } = readLevels(path);
    let x0 = width;
    let y0 = height;
    let x1 = -1;
    let y1 = -1;
    for (let i = 0; i < width * height; i++) {
      if (data[4 * i] === outline[0] && data[4 * i + 1] === outline[1] && data[4 * i + 2] === outline[2]) {
        x0 = Math.min(x0, i % width);
        x1 = Math.max(x1, i % width);
        y0 = Math.min(y0, Math.floor(i / width));
        y1 = Math.max(y1, Math.floor(i / width));
      }
    }
    let sum = 0;
    let sx = 0;
    let sy = 0;
    for (let y = y0 + 1; y < y1; y++) {
      for (let x = x0 + 1; x < x1; x++) {
        const intensity = (level[y * width + x] / 255) ** 2;
        sum += intensity;
        sx += intensity * x;
        sy += intensity * y;
      }
    }
    return { dx: (sx / sum - (x0 + x1) / 2) / (x1 - x0), dy: (sy / sum - (y0 + y1) / 2) / (y1 - y0), windowTop: y0, height };
  }

  it('on the flat screen (screen_a.png) of a picture meant for one, and in that run’s far field', () => {
    for (const path of [join(screenOut, 'screen_a.png'), join(screenOut, 'farfield_a.png')]) {
      const mark = markInPng(path);
      expect(mark.dx, path).toBeLessThan(-0.15);
      expect(mark.dy, path).toBeLessThan(-0.15);
    }
  });

  it('in the far-field PNG previews of the channel (total and its own output component)', () => {
    for (const name of ['farfield_a.png', 'farfield_a_out-a.png']) {
      const mark = markInPng(join(markOut, name));
      // Left of the window's centre and above it (PNG rows grow downwards), by a good part of the window.
      expect(mark.dx, name).toBeLessThan(-0.15);
      expect(mark.dy, name).toBeLessThan(-0.15);
      // The window itself (centred at v = sin 8° > 0) is in the upper half of the picture.
      expect(mark.windowTop, name).toBeLessThan(mark.height / 2);
    }
  });

  it('in a far field numpy recomputes from the GDSII placements and the atom table', () => {
    const layout = readGdsLayout(new Uint8Array(readFileSync(join(markOut, 'layout.gds'))));
    const top = [...layout.structures.values()].find((s) => s.srefs.length > 0)!;
    const dbuNm = layout.units.metersPerUnit * 1e9;
    const placements = top.srefs.map((s) => [Number(s.name.replace(/^ATOM_/, '')), s.x * dbuNm, s.y * dbuNm, s.angle]);
    writeFileSync(join(dir, 'placements.json'), JSON.stringify(placements));
    const script = String.raw`
import csv, json, sys, numpy as np
placements, atoms_csv, n, period, lam = sys.argv[1], sys.argv[2], int(sys.argv[3]), float(sys.argv[4]), float(sys.argv[5])
rows = [r for r in csv.reader(l for l in open(atoms_csv) if not l.startswith('#'))]
head, rows = rows[0], rows[1:]
col = {name: i for i, name in enumerate(head)}
def jones(r, theta):
    tx = float(r[col['t_x']]) * np.exp(1j * float(r[col['phase_x_rad']]))
    ty = float(r[col['t_y']]) * np.exp(1j * float(r[col['phase_y_rad']]))
    c, s = np.cos(theta), np.sin(theta)
    R = np.array([[c, -s], [s, c]])
    return R @ np.diag([tx, ty]) @ R.T
# Cells without a placement are bare: the library's empty atom (README, atom table).
shape = col.get('shape')
empty = [r for r in rows if shape is not None and r[shape] == 'empty']
ex = np.zeros((n, n), complex)
ey = np.zeros((n, n), complex)
if empty:
    j = jones(empty[0], 0.0) @ np.array([1, 0])
    ex[:], ey[:] = j[0], j[1]
for k, x, y, angle in json.load(open(placements)):
    ix = int(round(x / period + (n - 1) / 2))
    iy = int(round(y / period + (n - 1) / 2))
    j = jones(rows[k], np.radians(angle)) @ np.array([1, 0])   # input A: linear x
    ex[iy, ix], ey[iy, ix] = j[0], j[1]
far = np.abs(np.fft.fftshift(np.fft.fft2(ex))) ** 2 + np.abs(np.fft.fftshift(np.fft.fft2(ey))) ** 2
du = lam / (n * period)
u = (np.arange(n) - n // 2) * du
U, V = np.meshgrid(u, u)              # array [iy, ix]: V grows with iy, i.e. with y
uc, vc, half = np.sin(np.radians(10)), np.sin(np.radians(8)), np.sin(np.radians(8)) * 1.0
inside = (np.abs(U - uc) < half) & (np.abs(V - vc) < half)
w = far * inside
print(json.dumps({'du': float((w * (U - uc)).sum() / w.sum()), 'dv': float((w * (V - vc)).sum() / w.sum()),
                  'windowShare': float(w.sum() / far.sum())}))`;
    const out = JSON.parse(
      execFileSync(PYTHON, ['-c', script, join(dir, 'placements.json'), join(markOut, 'atoms.csv'), String(N), String(PERIOD_NM), String(LAMBDA_NM)], { maxBuffer: 16 << 20 }).toString(),
    ) as { du: number; dv: number; windowShare: number };
    // The hologram's light is in its window, and its centroid sits left of (smaller u) and above (larger v) the window centre.
    expect(out.windowShare).toBeGreaterThan(0.2);
    expect(out.du).toBeLessThan(-0.02);
    expect(out.dv).toBeGreaterThan(0.02);
  });

  it('the engine places the picture’s top row at the largest v (buildTargetPlane)', () => {
    // 2×2 picture: top row white, bottom row black, in a 2×2-cell window at the centre of an 8×8 grid.
    const plane = buildTargetPlane({ n: 8, period: 1, lambda: 1 }, { width: 2, height: 2, pixels: new Uint8Array([255, 255, 0, 0]) }, { units: 'cells', width: 2, centerX: 0, centerY: 0 });
    const { x0, y0 } = plane.window;
    expect(plane.amplitude[(y0 + 1) * 8 + x0]).toBe(1);
    expect(plane.amplitude[y0 * 8 + x0]).toBe(0);
  });
});
