/** How figures read on screen, in the CLI summary and in the report: the dB floor and rounded ticks. */
import { describe, expect, it } from 'vitest';
import { crosstalkDb } from '../../shared/optics/metrics';
import { DECIBEL_FLOOR, decibelText } from '../../shared/optics/run-metrics';
import { formatMetricValue } from '../../shared/display-names';
import { formatMetric } from '../../server/cli/phasewright';
import { roundTick } from '../../src/lib/format';

describe('power ratios at the numerical floor', () => {
  it('a channel that leaks nothing shows "below −100 dB", not its float32 floor', () => {
    // 10·log10 of a leak at float32 round-off of a unit signal: about −140 dB and below.
    const floor = crosstalkDb(1, 1e-33);
    expect(floor).toBeLessThan(DECIBEL_FLOOR);
    expect(decibelText(floor)).toBe('below −100 dB');
    expect(decibelText(-328.4)).toBe('below −100 dB');
    expect(formatMetricValue({ value: -328.4, unit: 'dB', meaning: '' })).toBe('below −100 dB');
    expect(formatMetric({ value: -328.4, unit: 'dB', meaning: '' })).toBe('below −100 dB');
  });

  it('a measurable crosstalk keeps its value', () => {
    expect(decibelText(-21.34)).toBe('-21.3 dB');
    expect(decibelText(-99.96)).toBe('-100.0 dB');
    expect(formatMetricValue({ value: -35.25, unit: 'dB', meaning: '' })).toBe('−35.3 dB');
  });
});

describe('axis ticks', () => {
  it('round to three significant digits and keep words', () => {
    expect(roundTick(0.30000000000000004)).toBe('0.3');
    expect(roundTick(0.08333333333333333)).toBe('0.0833');
    expect(roundTick('0.16666666666666666')).toBe('0.167');
    expect(roundTick(1234567)).toBe('1230000');
    expect(roundTick(0.08333333333333333, 2)).toBe('0.083');
    expect(roundTick('h12')).toBe('h12');
  });
});
