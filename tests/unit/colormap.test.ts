import { describe, expect, it } from 'vitest';
import { cyclicColor, outlineRect, paintIntensity, paintPhase, poolMap, sequentialColor, subsampleMap, upright } from '../../shared/optics/colormap';

/** Relative luminance weights of ITU-R BT.709 (sRGB primaries). */
const luma = ([r, g, b]: number[]) => 0.2126 * r + 0.7152 * g + 0.0722 * b;

describe('preview colour maps', () => {
  it('the cyclic map closes on itself and changes smoothly', () => {
    expect(cyclicColor(0)).toEqual([242, 89, 89]);
    expect(cyclicColor(2 * Math.PI)).toEqual(cyclicColor(0));
    expect(cyclicColor(-Math.PI)).toEqual(cyclicColor(Math.PI));
    for (let k = 0; k < 360; k++) {
      const a = cyclicColor((k * Math.PI) / 180);
      const b = cyclicColor(((k + 1) * Math.PI) / 180);
      expect(Math.max(...a.map((v, i) => Math.abs(v - b[i])))).toBeLessThanOrEqual(2);
    }
  });

  it('the sequential map rises in luminance from its first to its last stop', () => {
    // A sequential map must read as "more is brighter" (common practice, no published source for the
    // margins): every 5 % step of the value brightens the colour, and the whole map spans most of 0…255.
    const steps = Array.from({ length: 21 }, (_, k) => luma(sequentialColor(k / 20)));
    for (let k = 1; k < steps.length; k++) expect(steps[k] - steps[k - 1]).toBeGreaterThan(2);
    expect(steps[20] - steps[0]).toBeGreaterThan(150);
  });

  it('paints phases mod 2π and intensities on a log scale to the peak', () => {
    const phase = paintPhase(Float64Array.of(0.3, 0.3 + 2 * Math.PI), 2, 1);
    expect(Array.from(phase.data.slice(0, 4))).toEqual(Array.from(phase.data.slice(4, 8)));
    const img = paintIntensity(Float32Array.of(1, 1e-2, 1e-4, 0), 4, 1, { kind: 'log', floorDb: -40 });
    expect(Array.from(img.data.slice(0, 3))).toEqual(sequentialColor(1));
    // −20 dB is the middle of the 40 dB range: the middle stop, to within one table step.
    const middle = sequentialColor(0.5);
    Array.from(img.data.slice(4, 7)).forEach((v, i) => expect(Math.abs(v - middle[i])).toBeLessThanOrEqual(1));
    expect(Array.from(img.data.slice(8, 11))).toEqual(sequentialColor(0));
    expect(Array.from(img.data.slice(12, 15))).toEqual(sequentialColor(0));
  });

  it('pools intensities, subsamples phases and outlines windows inside the picture', () => {
    expect(Array.from(poolMap(Float32Array.of(1, 3, 5, 7), 2, 2))).toEqual([4]);
    expect(Array.from(subsampleMap(Float64Array.from({ length: 16 }, (_, i) => i), 4, 2))).toEqual([0, 2, 8, 10]);
    const img = paintIntensity(new Float32Array(25), 5, 5, { kind: 'gamma' });
    outlineRect(img, { x0: 1, y0: 1, width: 3, height: 3 }, [1, 2, 3]);
    let marked = 0;
    for (let i = 0; i < 25; i++) if (img.data[4 * i] === 1 && img.data[4 * i + 1] === 2) marked++;
    expect(marked).toBe(8);
  });
});

describe('upright (README "Picture convention": y up)', () => {
  it('puts the last map row at the top of the picture', () => {
    const image = { width: 1, height: 2, data: new Uint8ClampedArray([255, 0, 0, 255, 0, 0, 255, 255]) };
    expect(Array.from(upright(image).data)).toEqual([0, 0, 255, 255, 255, 0, 0, 255]);
  });
});
