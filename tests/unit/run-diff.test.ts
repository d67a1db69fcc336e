/** Metric changes between two runs (shared/run-diff.ts) and the diverging colours of difference pictures. */
import { describe, expect, it } from 'vitest';
import { DIFFERENCE_A_BRIGHTER, DIFFERENCE_B_BRIGHTER, DIFFERENCE_ZERO, differenceColor } from '../../shared/optics/difference-colormap';
import { diffMetrics } from '../../shared/run-diff';

const metric = (value: number | null, unit = 'fraction') => ({ value, unit, meaning: 'test' });

describe('diffMetrics', () => {
  it('gives Δ = b − a and % = 100·Δ/|a| for every metric, in run a’s order then those only run b has', () => {
    const rows = diffMetrics(
      { 'channel A': { efficiency: metric(0.5), crosstalk: metric(-20, 'dB') }, run: { cells: metric(512, 'count') } },
      { 'channel A': { efficiency: metric(0.6), crosstalk: metric(-30, 'dB'), focalSpot: metric(1e-6, 'm') }, run: { cells: metric(256, 'count') } },
    );
    expect(rows.map((r) => `${r.section}.${r.key}`)).toEqual(['channel A.efficiency', 'channel A.crosstalk', 'run.cells', 'channel A.focalSpot']);
    expect(rows[0].delta).toBeCloseTo(0.1, 15);
    expect(rows[0].percent).toBeCloseTo(20, 12);
    // A negative value: the change is relative to its size, so −20 dB → −30 dB is −50 %.
    expect(rows[1]).toMatchObject({ a: -20, b: -30, delta: -10, percent: -50, unit: 'dB' });
    expect(rows[2]).toMatchObject({ delta: -256, percent: -50 });
    expect(rows[3]).toMatchObject({ a: null, b: 1e-6, delta: null, percent: null, unit: 'm' });
  });

  it('leaves the change out where a value is missing, not finite, or a is 0', () => {
    const rows = diffMetrics({ x: { p: metric(0), q: metric(null), r: metric(Number.NaN) } }, { x: { p: metric(0.2), q: metric(0.1), r: metric(0.1) } });
    expect(rows[0]).toMatchObject({ delta: 0.2, percent: null });
    expect(rows[1]).toMatchObject({ a: null, delta: null, percent: null });
    expect(rows[2]).toMatchObject({ a: null, delta: null });
    expect(diffMetrics(null, null)).toEqual([]);
  });
});

describe('differenceColor', () => {
  it('is the dark neutral at 0 and reaches teal (a brighter) at −1 and amber (b brighter) at +1, clamped beyond', () => {
    expect(differenceColor(0)).toEqual(DIFFERENCE_ZERO);
    expect(differenceColor(1)).toEqual(DIFFERENCE_B_BRIGHTER);
    expect(differenceColor(-1)).toEqual(DIFFERENCE_A_BRIGHTER);
    expect(differenceColor(5)).toEqual(DIFFERENCE_B_BRIGHTER);
    expect(differenceColor(Number.NaN)).toEqual(DIFFERENCE_ZERO);
  });

  it('grows as √|t|: a quarter of full scale is half way in colour', () => {
    const quarter = differenceColor(0.25);
    for (let c = 0; c < 3; c++) expect(quarter[c]).toBe(Math.round(DIFFERENCE_ZERO[c] + (DIFFERENCE_B_BRIGHTER[c] - DIFFERENCE_ZERO[c]) * 0.5));
  });
});
