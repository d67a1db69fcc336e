/**
 * Pictures meant for a flat screen (target.ts buildScreenTarget / screenView). Reference geometry: central
 * projection — a ray leaving the device in the direction with direction cosines (u, v, w), w = √(1 − u² − v²),
 * meets the plane z = L at (L·u/w, L·v/w); and conservation of power: the irradiance on the screen is power per
 * screen area.
 */
import { describe, expect, it } from 'vitest';
import { buildScreenTarget, screenDirection, screenFootprint, screenPoint, screenRect, screenView, type GrayImage } from '../../shared/optics/target';
import type { CellGrid } from '../../shared/optics/types';
import { screenSamples } from '../support/screen-samples';

const DEG = Math.PI / 180;
const lambda = 633e-9;
const n = 512;
const grid: CellGrid = { n, period: 450e-9, lambda };
const deltaU = lambda / (n * grid.period);

/** White picture, 2:1. */
const white: GrayImage = { width: 40, height: 20, pixels: new Uint8Array(800).fill(255) };

/** Three bright vertical stripes centred at 1/6, 1/2 and 5/6 of the width (our own test picture). */
function stripes(): GrayImage {
  const width = 60;
  const height = 30;
  const pixels = new Uint8Array(width * height);
  for (let y = 0; y < height; y++) for (const x of [9, 10, 29, 30, 49, 50]) pixels[y * width + x] = 255;
  return { width, height, pixels };
}

describe('flat-screen target', () => {
  it('screenPoint and screenDirection are the central projection and its inverse', () => {
    const [u, v] = [Math.sin(30 * DEG), 0.2];
    const w = Math.sqrt(1 - u * u - v * v);
    expect(screenPoint(u, v)).toEqual([u / w, v / w]);
    const [x, y] = screenPoint(u, v);
    const back = screenDirection(x, y);
    expect(back[0]).toBeCloseTo(u, 14);
    expect(back[1]).toBeCloseTo(v, 14);
    // A ray at 45° in the x–z plane meets the screen at X = L·tan 45° = L.
    expect(screenPoint(Math.SQRT1_2, 0)[0]).toBeCloseTo(1, 14);
  });

  it('screenFootprint: the box of directions landing on a screen rectangle, extremes on its edges', () => {
    const line = screenFootprint({ x0: 1, x1: 2, y0: 0, y1: 0 });
    expect(line.uMin).toBeCloseTo(1 / Math.SQRT2, 12);
    expect(line.uMax).toBeCloseTo(2 / Math.sqrt(5), 12);
    // Straddling the axis in y: u is largest on the axis (|Y| = 0), v extremes at the near edge X = 1.
    const box = screenFootprint({ x0: 1, x1: 2, y0: -1, y1: 1 });
    expect(box.uMax).toBeCloseTo(2 / Math.sqrt(5), 12);
    expect(box.uMin).toBeCloseTo(1 / Math.sqrt(3), 12);
    expect(box.vMax).toBeCloseTo(1 / Math.sqrt(3), 12);
    expect(box.vMin).toBeCloseTo(-1 / Math.sqrt(3), 12);
  });

  it('screenRect: edges at tan of the edge angles; an omitted height keeps the picture aspect on the screen', () => {
    const rect = screenRect({ centerX: 0, centerY: 0, width: 2 * Math.atan(0.5) }, 2);
    expect(rect.x0).toBeCloseTo(-0.5, 14);
    expect(rect.x1).toBeCloseTo(0.5, 14);
    expect(rect.y0).toBeCloseTo(-0.25, 14);
    expect(rect.y1).toBeCloseTo(0.25, 14);
    const off = screenRect({ centerX: 20 * DEG, centerY: 5 * DEG, width: 10 * DEG, height: 4 * DEG }, 1);
    expect(off.x0).toBeCloseTo(Math.tan(15 * DEG), 14);
    expect(off.x1).toBeCloseTo(Math.tan(25 * DEG), 14);
    expect(off.y1).toBeCloseTo(Math.tan(7 * DEG), 14);
    expect(() => screenRect({ centerX: 80 * DEG, centerY: 0, width: 30 * DEG }, 1)).toThrow(RangeError);
  });

  it('stripes of the picture land where the central projection puts them on the screen, though curved in the far field', () => {
    const spec = { centerX: 20 * DEG, centerY: 0, width: 36 * DEG };
    const rect = screenRect(spec, 2);
    const target = buildScreenTarget(grid, stripes(), spec);
    const { x0, y0, width, height } = target.window;
    let rows = 0;
    for (let iy = y0 + 2; iy < y0 + height - 2; iy++) {
      // Bright runs along this far-field row: their centres, as screen fractions across the picture.
      const fractions: number[] = [];
      let run: number[] = [];
      for (let ix = x0; ix <= x0 + width; ix++) {
        const bright = ix < x0 + width && target.amplitude[iy * n + ix] > 0.5;
        if (bright) run.push(ix);
        else if (run.length) {
          const centre = run.reduce((s, v) => s + v, 0) / run.length;
          const [x] = screenPoint((centre - n / 2) * deltaU, (iy - n / 2) * deltaU);
          fractions.push((x - rect.x0) / (rect.x1 - rect.x0));
          run = [];
        }
      }
      if (fractions.length !== 3) continue;
      rows++;
      // One far-field pixel is at most ≈ 1/150 of the picture's width here.
      fractions.forEach((f, k) => expect(f).toBeCloseTo([1 / 6, 1 / 2, 5 / 6][k], 1.8));
    }
    expect(rows).toBeGreaterThan(50);
    // In direction cosines the stripes are not evenly spaced: the gap on the far side is narrower.
    const row = Math.round(n / 2);
    const centres = [1 / 6, 1 / 2, 5 / 6].map((f) => screenDirection(rect.x0 + f * (rect.x1 - rect.x0), 0)[0]);
    expect(centres[2] - centres[1]).toBeLessThan(0.9 * (centres[1] - centres[0]));
    expect(target.amplitude[row * n + Math.round(n / 2 + centres[1] / deltaU)]).toBeGreaterThan(0.5);
  });

  it('a white picture gives the same irradiance everywhere on the screen: equal power on equal screen areas', () => {
    const spec = { centerX: 18 * DEG, centerY: 8 * DEG, width: 36 * DEG };
    const rect = screenRect(spec, 2);
    const target = buildScreenTarget(grid, white, spec);
    // Power of the far-field pixels whose screen point falls in a sub-rectangle (intensity × du dv).
    const powerIn = (fx0: number, fx1: number, fy0: number, fy1: number) => {
      const [ax, bx] = [rect.x0 + fx0 * (rect.x1 - rect.x0), rect.x0 + fx1 * (rect.x1 - rect.x0)];
      const [ay, by] = [rect.y0 + fy0 * (rect.y1 - rect.y0), rect.y0 + fy1 * (rect.y1 - rect.y0)];
      let sum = 0;
      for (let iy = 0; iy < n; iy++) {
        for (let ix = 0; ix < n; ix++) {
          const a = target.amplitude[iy * n + ix];
          if (a === 0) continue;
          const [x, y] = screenPoint((ix - n / 2) * deltaU, (iy - n / 2) * deltaU);
          if (x >= ax && x < bx && y >= ay && y < by) sum += a * a;
        }
      }
      return sum;
    };
    const centre = powerIn(0.4, 0.6, 0.4, 0.6);
    const nearCorner = powerIn(0.75, 0.95, 0.05, 0.25);
    const farCorner = powerIn(0.05, 0.25, 0.75, 0.95);
    // Pixel counting on a 512² grid: a few per cent.
    expect(nearCorner / centre).toBeCloseTo(1, 1);
    expect(farCorner / centre).toBeCloseTo(1, 1);
    // Without the w⁻⁴ factor the far corner (largest angle) would get visibly less per screen area.
    const w = (fx: number, fy: number) => {
      const [u, v] = screenDirection(rect.x0 + fx * (rect.x1 - rect.x0), rect.y0 + fy * (rect.y1 - rect.y0));
      return Math.sqrt(1 - u * u - v * v);
    };
    expect(w(0.85, 0.85) ** 4 / w(0.5, 0.5) ** 4).toBeLessThan(0.8);
  });

  it('screenView undoes the pre-distortion: the target seen on the screen is the picture, dark around it', () => {
    const spec = { centerX: -20 * DEG, centerY: 15 * DEG, width: 30 * DEG };
    const target = buildScreenTarget(grid, white, spec);
    const intensity = Float32Array.from(target.amplitude, (a) => a * a);
    const view = screenView(intensity, grid, screenRect(spec, 2), { side: 200 });
    const inside: number[] = [];
    let outside = 0;
    for (const { fx, fy, value } of screenSamples(view)) {
      if (fx > 0.05 && fx < 0.95 && fy > 0.05 && fy < 0.95) inside.push(value);
      else if (fx < -0.05 || fx > 1.05 || fy < -0.05 || fy > 1.05) outside = Math.max(outside, value);
    }
    const mean = inside.reduce((s, v) => s + v, 0) / inside.length;
    const spread = Math.sqrt(inside.reduce((s, v) => s + (v - mean) ** 2, 0) / inside.length) / mean;
    expect(spread).toBeLessThan(0.02);
    expect(outside).toBe(0);
  });

  it('refuses a window that leaves the grid, naming the far-field columns it needs', () => {
    expect(() => buildScreenTarget({ n: 64, period: 450e-9, lambda }, white, { centerX: 60 * DEG, centerY: 0, width: 20 * DEG })).toThrow(/outside the 64×64 grid/);
  });
});
