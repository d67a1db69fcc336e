/**
 * Copies of a far-field window at P ≥ λ/2 (src/features/designs/utils/window-copies.ts): the far field of a
 * sampled aperture repeats every λ/P in direction cosines (grating equation; Goodman, Introduction to Fourier
 * Optics, §4.4); a copy propagates only where it reaches inside u² + v² ≤ 1.
 */
import { describe, expect, it } from 'vitest';
import { copiesSentence, windowCopies } from '../../src/features/designs/utils/window-copies';

describe('window copies', () => {
  it('the demo setup (633 nm, 450 nm): a window at 16° has only evanescent copies, the nearest at u = −1.25…−1.02', () => {
    const step = 633 / 450; // 1.4067
    // Lighthouse window: 14° wide centred at 16° (demo design): u from sin 9° to sin 23°, near enough for this test.
    const uMin = Math.sin((9 * Math.PI) / 180);
    const uMax = Math.sin((23 * Math.PI) / 180);
    const window = { centerU: (uMin + uMax) / 2, centerV: 0, width: uMax - uMin, height: 0.24 };
    const copies = windowCopies(window, step);
    expect(copies).toHaveLength(8);
    expect(copies.every((c) => !c.propagates)).toBe(true);
    const left = copies.find((c) => c.m === -1 && c.n === 0)!;
    expect(left.uMin).toBeCloseTo(uMin - step, 12);
    expect(copiesSentence(window, step)).toBe('its copies are evanescent (the nearest at u = −1.25…−1.02): no effect here');
  });

  it('a period of 0.8 λ: the copy of a window at u = 0.5 lands at u = −0.75…−0.65 and propagates', () => {
    const step = 1 / 0.8; // 1.25
    const window = { centerU: 0.5, centerV: 0, width: 0.1, height: 0.1 };
    const live = windowCopies(window, step).filter((c) => c.propagates);
    expect(live.map((c) => [c.m, c.n])).toEqual([[-1, 0]]);
    expect(live[0].uMin).toBeCloseTo(-0.8, 12);
    expect(live[0].uMax).toBeCloseTo(-0.7, 12);
    expect(copiesSentence(window, step)).toMatch(/^a copy at u = −0\.80…−0\.70 propagates/);
  });

  it('a copy that only grazes the circle with a corner still propagates', () => {
    // Copy centred at (0.75, 0.75) of half-size 0.1: nearest corner at (0.65, 0.65), |r| = 0.919 < 1.
    const copies = windowCopies({ centerU: -0.5, centerV: -0.5, width: 0.2, height: 0.2 }, 1.25);
    const diagonal = copies.find((c) => c.m === 1 && c.n === 1)!;
    expect(diagonal.nearest).toBeCloseTo(Math.hypot(0.65, 0.65), 12);
    expect(diagonal.propagates).toBe(true);
  });
});
