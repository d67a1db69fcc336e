/**
 * Review pins in the picture's own coordinates (src/features/review/utils/pin-place.ts), against the grid
 * conventions of README "Conventions": cell ix at x = (ix − (N−1)/2)·P, far-field pixel ix at u = (ix − N/2)·λ/(N·P),
 * and u = sin θx (direction cosine).
 */
import { describe, expect, it } from 'vitest';
import { pictureKind, pinPlace, runGrid } from '../../src/features/review/utils/pin-place';

const grid = { n: 512, period: 450e-9, lambda: 633e-9 };
const step = 633 / (512 * 450);

describe('pin places', () => {
  it('a far-field pin at the zero-order pixel reads u = v = 0, one at pixel (N/2 + 63, N/2 + 38) reads its direction and angles', () => {
    const centre = (ix: number) => (ix + 0.5) / 512;
    expect(pinPlace('farfield_a.png', centre(256), centre(256), grid, 'top-is-negative')).toBe('u = 0.000, v = 0.000 (θx = 0.0°, θy = 0.0°)');
    const u = 63 * step;
    const v = 38 * step;
    const text = pinPlace('farfield_b_out-a.png', centre(256 + 63), centre(256 + 38), grid, 'top-is-negative')!;
    expect(text).toBe(`u = ${u.toFixed(3)}, v = ${v.toFixed(3)} (θx = ${((Math.asin(u) * 180) / Math.PI).toFixed(1)}°, θy = ${((Math.asin(v) * 180) / Math.PI).toFixed(1)}°)`);
    // With +v up the top row is pixel N − 1: pixel N/2 + 38 is row N − 1 − (N/2 + 38) from the top.
    expect(pinPlace('farfield_a.png', centre(256), centre(511 - (256 + 38)), grid, 'top-is-positive')).toMatch(new RegExp(`^u = 0\\.000, v = ${v.toFixed(3)} `));
  });

  it('a far-field corner beyond the unit circle says it is evanescent', () => {
    // P = 300 nm: the grid reaches λ/(2P) = 1.055, its corners lie outside u² + v² = 1.
    expect(pinPlace('farfield_a.png', 0.999, 0.999, { ...grid, period: 300e-9 }, 'top-is-negative')).toMatch(/\(evanescent\)$/);
    expect(pinPlace('farfield_a.png', 0.999, 256.5 / 512, { ...grid, period: 300e-9 }, 'top-is-negative')).toMatch(/^u = 1\.05\d, v = 0\.000 \(evanescent\)$/);
  });

  it('a cell map pin reads x, y in µm of the cell centre', () => {
    const centre = (ix: number) => (ix + 0.5) / 512;
    expect(pinPlace('phase_a.png', centre(0), centre(511), grid, 'top-is-negative')).toBe(`x = −${((511 / 2) * 0.45).toFixed(1)} µm, y = ${((511 / 2) * 0.45).toFixed(1)} µm`);
    expect(pictureKind('atom_index.png')).toBe('cell-map');
    expect(pictureKind('xz_slice_b.png')).toBe('other');
    expect(pinPlace('xz_slice_b.png', 0.5, 0.5, grid, 'top-is-negative')).toBeNull();
  });

  it('reads the grid from the run metrics', () => {
    expect(runGrid({ run: { cells: { value: 512 }, period: { value: 450e-9 }, wavelength: { value: 633e-9 } } })).toEqual(grid);
    expect(runGrid(null)).toBeNull();
  });
});
