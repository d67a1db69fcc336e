/**
 * The build page's reading of a sweep: the sizes it names agree with the builder's own parser
 * (`parseLibrarySpec`, shared/optics/library-builder.ts), and its maps over (w, l) are painted in the picture
 * convention (README "Picture convention": x — here the width w — to the right, y — the length l — up).
 */
import { describe, expect, it } from 'vitest';
import { paintIntensity, sequentialColor, upright } from '../../shared/optics/colormap';
import { parseLibrarySpec } from '../../shared/optics/library-builder';
import type { LibraryBuildAtom } from '../../shared/schemas/library-builds';
import { sweepMap, sweepSizes } from '../../src/features/library-builds/utils/sweep';

const spec = (periodNm: number, minFeatureNm: number, minGapNm: number, stepNm: number) => ({
  name: '',
  wavelengthNm: 633,
  periodNm,
  heightNm: 1200,
  pillar: 'silicon-nitride',
  substrate: 'fused-silica',
  superstrate: 'air',
  illumination: 'substrate' as const,
  sweep: { minFeatureNm, minGapNm, stepNm },
  harmonics: 5,
});

function atom(widthNm: number, lengthNm: number, tx: number): LibraryBuildAtom {
  return { id: `w${widthNm}-l${lengthNm}`, widthNm, lengthNm, tx, alphaX: 0, ty: 0, alphaY: 0, zeroOrderX: 0, zeroOrderY: 0, otherOrdersX: 0, otherOrdersY: 0, reflectedX: 0, reflectedY: 0 };
}

describe('the sizes of a sweep', () => {
  it.each([
    [450, 60, 50, 50],
    [450, 100, 150, 100],
    [400, 80, 60, 20],
    [400, 80, 70, 30],
    [500, 50, 50, 33.3],
    [450, 100, 50, 300],
  ])('P %d nm, smallest feature %d nm, gap %d nm, step %d nm: as the builder parses it', (P, feature, gap, step) => {
    const s = spec(P, feature, gap, step);
    const sizesNm = parseLibrarySpec(s).sizes.map((m) => m * 1e9);
    const mine = sweepSizes(s);
    expect(mine.count).toBe(sizesNm.length);
    expect(mine.firstNm).toBeCloseTo(sizesNm[0], 6);
    expect(mine.lastNm).toBeCloseTo(sizesNm[sizesNm.length - 1], 6);
  });
});

describe('the maps over (w, l)', () => {
  // Sweep order as the builder returns it: widths outer, lengths inner; t rises with w and more with l.
  const sizes = [100, 200, 300];
  const atoms = sizes.flatMap((w) => sizes.map((l) => atom(w, l, (w + 3 * l) / 1200)));

  it('puts w along a row and l down the rows of the map', () => {
    const map = sweepMap(atoms, sizes, (a) => a.tx);
    for (const [iw, w] of sizes.entries()) for (const [il, l] of sizes.entries()) expect(map[il * 3 + iw]).toBe((w + 3 * l) / 1200);
  });

  it('paints the smallest w at the left and the largest l at the top', () => {
    const map = sweepMap(atoms, sizes, (a) => a.tx);
    const picture = upright(paintIntensity(map, 3, 3, { kind: 'gamma', gamma: 1, max: 1 }));
    const pixel = (column: number, row: number) => Array.from(picture.data.subarray(4 * (row * 3 + column), 4 * (row * 3 + column) + 3));
    // Top left: w = 100 nm, l = 300 nm; bottom right: w = 300 nm, l = 100 nm; bottom left: the smallest of all.
    expect(pixel(0, 0)).toEqual(sequentialColor(Math.round(255 * ((100 + 900) / 1200)) / 255));
    expect(pixel(2, 2)).toEqual(sequentialColor(Math.round(255 * ((300 + 300) / 1200)) / 255));
    expect(pixel(0, 2)).toEqual(sequentialColor(Math.round(255 * ((100 + 300) / 1200)) / 255));
  });

  it('leaves cells no atom fills empty', () => {
    const map = sweepMap(atoms.slice(1), sizes, (a) => a.tx);
    expect(Number.isNaN(map[0])).toBe(true);
    expect(map.filter(Number.isNaN).length).toBe(1);
  });
});
