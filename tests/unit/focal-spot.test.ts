/**
 * The focal spot's first zero (beam-analysis.ts analyzeFocus): against λf/D of a square aperture (Goodman,
 * Introduction to Fourier Optics, 3rd ed., §4.4.1) and 1.22 λf/D of a circular one (Born & Wolf, Principles
 * of Optics, §8.5.2; Goodman §4.4.2), at two focal lengths, with the other channel changed between runs.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import type { AtomLibrary, MetaAtom } from '../../shared/optics/atoms';
import { analyzeFocus, firstZeroOfCut } from '../../shared/optics/beam-analysis';
import { initFft } from '../../shared/optics/fft';
import { lensPhase } from '../../shared/optics/phase-terms';
import { runDesign } from '../../shared/optics/pipeline';
import { AngularSpectrumPropagator } from '../../shared/optics/propagation';
import type { GrayImage } from '../../shared/optics/target';
import type { CellGrid, ComplexField } from '../../shared/optics/types';
import { designSchema } from '../../shared/schemas/design';

beforeAll(async () => {
  await initFft();
});

const LAMBDA = 633e-9;
const PERIOD = 450e-9;
const TWO_PI = 2 * Math.PI;

/** Lossless atoms on a 32 × 32 grid of (αx, αy): the linear basis realized to within π/32 per axis. */
const gridLibrary: AtomLibrary = {
  name: 'ideal phase grid',
  lambda: LAMBDA,
  period: PERIOD,
  height: 600e-9,
  material: 'test',
  approximate: false,
  atoms: Array.from({ length: 32 * 32 }, (_, j): MetaAtom => ({
    id: `g${j}`,
    shape: 'rect',
    width: 100e-9,
    length: 200e-9,
    height: 600e-9,
    period: PERIOD,
    tx: 1,
    alphaX: (TWO_PI * (j % 32)) / 32,
    ty: 1,
    alphaY: (TWO_PI * Math.floor(j / 32)) / 32,
  })),
};

/** Our own pictures for the other channel: a bold "F" and a filled square. */
function letterF(): GrayImage {
  const s = 32;
  const on = (x: number, y: number) => (x >= 8 && x < 13 && y >= 4 && y < 28) || (y >= 4 && y < 9 && x >= 8 && x < 26) || (y >= 14 && y < 18 && x >= 8 && x < 22);
  return { width: s, height: s, pixels: Uint8Array.from({ length: s * s }, (_, i) => (on(i % s, Math.floor(i / s)) ? 255 : 0)) };
}
function square(): GrayImage {
  const s = 16;
  return { width: s, height: s, pixels: Uint8Array.from({ length: s * s }, (_, i) => (i % s > 3 && i % s < 12 && i / s > 3 && i / s < 12 ? 255 : 40)) };
}

function lensRun(n: number, focalLengthUm: number, other: 'letter' | 'square') {
  const d = designSchema.parse({
    name: 'lens beside a picture',
    setup: { wavelengthNm: LAMBDA * 1e9, periodNm: PERIOD * 1e9, cells: n },
    polarization: { kind: 'linear', angleDeg: 0 },
    channels: {
      a: {
        terms: [
          {
            kind: 'hologram',
            image: { source: 'demo', name: other === 'letter' ? 'lighthouse' : 'compass-rose' },
            window: { units: 'degrees', width: other === 'letter' ? 8 : 6, centerX: other === 'letter' ? 10 : -8, centerY: 6 },
            iterations: 10,
            seed: other === 'letter' ? 3 : 17,
          },
        ],
      },
      b: { terms: [{ kind: 'lens', focalLengthUm }] },
    },
  });
  return runDesign(d, {
    images: (ref) => (ref.source === 'demo' && ref.name === 'lighthouse' ? letterF() : square()),
    phaseMaps: () => {
      throw new Error('no phase maps in this test');
    },
    library: gridLibrary,
  });
}

/** Ideal lens phase lit over a disc of radius R (zero outside), as a complex field. */
function discLens(grid: CellGrid, focalLength: number, radius: number): ComplexField {
  const { n, period } = grid;
  const phase = lensPhase(grid, focalLength);
  const field: ComplexField = { n, re: new Float64Array(n * n), im: new Float64Array(n * n) };
  for (let iy = 0; iy < n; iy++) {
    for (let ix = 0; ix < n; ix++) {
      const x = (ix - (n - 1) / 2) * period;
      const y = (iy - (n - 1) / 2) * period;
      if (x * x + y * y > radius * radius) continue;
      const i = iy * n + ix;
      field.re[i] = Math.cos(phase[i]);
      field.im[i] = Math.sin(phase[i]);
    }
  }
  return field;
}

describe('focal spot first zero', () => {
  it('square device aperture: λf/D at f = 300 µm and 500 µm, unchanged when the other channel changes (Goodman §4.4.1)', async () => {
    const n = 128;
    const side = n * PERIOD;
    for (const f of [300, 500]) {
      const expected = (LAMBDA * f * 1e-6) / side;
      const zeros: number[] = [];
      for (const other of ['letter', 'square'] as const) {
        const run = await lensRun(n, f, other);
        const focus = run.channels.b.focus!;
        expect(focus.squareApertureZero).toBeCloseTo(expected, 15);
        // NA ≤ 0.1 here: the paraxial λf/D holds to within 1 % (edge-ray λ/(2 sinθ) differs by < 0.5 %).
        expect(Math.abs(focus.measuredFirstZero / expected - 1)).toBeLessThan(0.02);
        expect(run.metrics.channels.b.focalSpotZeroMeasured.value).toBeCloseTo(focus.measuredFirstZero, 12);
        // The plotted cut has its first minimum where the figure says.
        expect(firstZeroOfCut(focus.profile.radius, focus.profile.measured)).toBe(focus.measuredFirstZero);
        zeros.push(focus.measuredFirstZero);
      }
      // Changing channel A's picture, window and seed leaves the lens channel's figure where it was.
      expect(Math.abs(zeros[0] / zeros[1] - 1)).toBeLessThan(0.005);
    }
  });

  it('a spot of two cells (NA 0.34): the first zero at λ/(2 sin θ) of the edge ray, not a dip of the background far out', async () => {
    // At f = 80 µm on 57.6 µm the zero (≈ 0.95 µm) is two cells from the peak: samples at the cell centres miss it.
    const n = 128;
    const f = 80;
    const half = (n * PERIOD) / 2;
    // Focal field = Fourier transform of the pupil in direction cosines (Goodman §4.4.1 beyond the paraxial
    // range): the square's edge at sin θ = (D/2)/√((D/2)² + f²) puts the first zero at λ/(2 sin θ).
    const edgeRay = LAMBDA / (2 * (half / Math.hypot(half, f * 1e-6)));
    const zeros: number[] = [];
    for (const other of ['letter', 'square'] as const) {
      const focus = (await lensRun(n, f, other)).channels.b.focus!;
      expect(Math.abs(focus.measuredFirstZero / edgeRay - 1)).toBeLessThan(0.02);
      zeros.push(focus.measuredFirstZero);
    }
    expect(Math.abs(zeros[0] / zeros[1] - 1)).toBeLessThan(0.005);
  });

  it('circular aperture: 1.22 λf/D at f = 300 µm and 500 µm (Born & Wolf §8.5.2, Airy pattern)', () => {
    const n = 128;
    const grid: CellGrid = { n, period: PERIOD, lambda: LAMBDA };
    const radius = 25e-6;
    for (const f of [300e-6, 500e-6]) {
      const field = discLens(grid, f, radius);
      // Padding 2: the Airy rings would otherwise wrap round the 57.6 µm period of the unpadded spectrum.
      const focus = analyzeFocus(field, field, grid, f, radius, 0, { padding: 2 });
      const airy = (1.22 * LAMBDA * f) / (2 * radius);
      expect(Math.abs(focus.measuredFirstZero / airy - 1)).toBeLessThan(0.02);
      expect(focus.strehlVsDesign).toBeCloseTo(1, 6);
      // 1.22·f·λ/(50 µm) lies 40 % beyond λf/D of the 57.6 µm device side, so the test tells the two apart.
      expect(focus.measuredFirstZero / focus.squareApertureZero).toBeGreaterThan(1.3);
    }
  });

  it('the fine cut agrees with the field propagated onto the cells, at the cell centres', () => {
    const n = 64;
    const grid: CellGrid = { n, period: PERIOD, lambda: LAMBDA };
    const field = discLens(grid, 80e-6, 12e-6);
    for (let i = 0; i < field.re.length; i++) field.re[i] += 0.3 * Math.sin(i * 0.7);
    for (const padding of [1, 2]) {
      const propagator = new AngularSpectrumPropagator(field, grid, { padding });
      const plane = propagator.propagate(80e-6);
      const row = 20;
      const y = (row - (n - 1) / 2) * PERIOD;
      const x = Float64Array.from({ length: n }, (_, ix) => (ix - (n - 1) / 2) * PERIOD);
      const line = propagator.lineAt(80e-6, y, x);
      let largest = 0;
      for (let ix = 0; ix < n; ix++) largest = Math.max(largest, Math.hypot(plane.re[row * n + ix], plane.im[row * n + ix]));
      for (let ix = 0; ix < n; ix++) {
        expect(Math.abs(line.re[ix] - plane.re[row * n + ix])).toBeLessThan(1e-5 * largest);
        expect(Math.abs(line.im[ix] - plane.im[row * n + ix])).toBeLessThan(1e-5 * largest);
      }
    }
  });
});
