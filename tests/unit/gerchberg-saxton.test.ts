import { execFileSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { beforeAll, describe, expect, it } from 'vitest';
import { initFft } from '../../shared/optics/fft';
import { mulberry32, mulberry32Fill } from '../../shared/optics/random';
import { buildTargetPlane, placeWindow, type GrayImage } from '../../shared/optics/target';
import type { CellGrid } from '../../shared/optics/types';
import { PYTHON } from '../support/python';
import { describeRetrieval } from '../support/retrieval-suite';

beforeAll(async () => {
  await initFft();
});

describeRetrieval('Gerchberg–Saxton family (JavaScript per-pixel steps)');

const lambda = 633e-9;
const grid: CellGrid = { n: 128, period: lambda, lambda };

describe('target placement', () => {
  it('throws RangeError when the window leaves the propagating region (direction-cosine step λ/(N·P))', () => {
    const fine: CellGrid = { n: 256, period: lambda / 4, lambda }; // Δu = 1/64: the grid spans u ∈ [−2, 2)
    expect(() => placeWindow(fine, { units: 'direction-cosine', width: 0.3, centerX: 0.9, centerY: 0 }, 1)).toThrow(/propagating region/);
    const w = placeWindow(fine, { units: 'direction-cosine', width: 0.25, centerX: 0.5, centerY: 0 }, 1);
    expect(w).toEqual({ x0: 152, y0: 120, width: 16, height: 16 });
    expect(() => placeWindow(grid, { units: 'cells', width: 40, centerX: 50, centerY: 0 }, 1)).toThrow(/does not fit/);
  });

  it('applies gamma and takes the square root of intensity', () => {
    const image: GrayImage = { width: 2, height: 1, pixels: [0.25, 1] };
    const t = buildTargetPlane(grid, image, { units: 'cells', width: 2, height: 1, centerX: 10, centerY: 0 }, { gamma: 2 });
    const row = t.window.y0 * grid.n + t.window.x0;
    // intensity = 0.25² = 0.0625 → amplitude 0.25; 1 → 1.
    expect(t.amplitude[row]).toBeCloseTo(0.25, 12);
    expect(t.amplitude[row + 1]).toBeCloseTo(1, 12);
  });
});

describe('mulberry32', () => {
  it('matches an independent implementation of the published algorithm', () => {
    // Reference: tests/fixtures/mulberry32.py, the public-domain mulberry32 C code (Ettinger 2017) rewritten
    // in Python with explicit 32-bit wrap-around; values divided by 2³² exactly, so equality is exact.
    const seeds = [1, 42, 0x7fffffff, 0x80000007, 0xffffffff];
    const count = 64;
    const script = fileURLToPath(new URL('../fixtures/mulberry32.py', import.meta.url));
    const expected = JSON.parse(execFileSync(PYTHON, [script, String(count), ...seeds.map(String)], { encoding: 'utf8' })) as Record<string, number[]>;
    for (const seed of seeds) {
      const random = mulberry32(seed);
      expect(Array.from({ length: count }, () => random())).toEqual(expected[String(seed)]);
      // The filling form (the retrieval's start phase), in two fills of unequal length: the same values.
      const state = Uint32Array.of(seed);
      const first = new Float64Array(24);
      const rest = new Float64Array(count - 24);
      mulberry32Fill(state, first);
      mulberry32Fill(state, rest);
      expect([...first, ...rest]).toEqual(expected[String(seed)]);
    }
    // The same script's first values, kept as literals so a change of the fixture itself shows up here.
    expect(expected['1'].slice(0, 2)).toEqual([0.6270739405881613, 0.002735721180215478]);
    expect(expected['42'][0]).toBe(0.6011037519201636);
  });
});
