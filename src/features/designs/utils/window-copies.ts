/**
 * Copies of a far-field window when P ≥ λ/2. A device sampled at period P has a far field that repeats every
 * λ/P in u = sin θx and in v = sin θy (grating equation, Goodman, Introduction to Fourier Optics, §4.4): a
 * window at u also sends light to u ± λ/P, v ± λ/P. A copy that lies wholly outside the unit circle
 * u² + v² ≤ 1 is evanescent and carries nothing away; one that reaches inside it propagates.
 * Pure: rectangles in, words out.
 */

export interface WindowRect {
  centerU: number;
  centerV: number;
  width: number;
  height: number;
}

export interface WindowCopy {
  /** Shift in units of λ/P along u and v (−1, 0 or 1; never both 0). */
  m: number;
  n: number;
  uMin: number;
  uMax: number;
  vMin: number;
  vMax: number;
  /** Distance of the copy's nearest point from the centre, in sin θ; below 1 the copy propagates. */
  nearest: number;
  propagates: boolean;
}

/** The 8 nearest copies of a window for the repeat `step` = λ/P (farther ones are beyond sin θ = 2). */
export function windowCopies(window: WindowRect, step: number): WindowCopy[] {
  const copies: WindowCopy[] = [];
  for (const n of [-1, 0, 1]) {
    for (const m of [-1, 0, 1]) {
      if (m === 0 && n === 0) continue;
      const uMin = window.centerU - window.width / 2 + m * step;
      const uMax = uMin + window.width;
      const vMin = window.centerV - window.height / 2 + n * step;
      const vMax = vMin + window.height;
      const du = uMin > 0 ? uMin : uMax < 0 ? -uMax : 0;
      const dv = vMin > 0 ? vMin : vMax < 0 ? -vMax : 0;
      const nearest = Math.hypot(du, dv);
      copies.push({ m, n, uMin, uMax, vMin, vMax, nearest, propagates: nearest < 1 });
    }
  }
  return copies;
}

const num = (v: number) => (Math.abs(v) < 5e-3 ? '0' : v.toFixed(2).replace('-', '−'));
const span = (a: number, b: number) => `${num(a)}…${num(b)}`;

/** Where a copy lies, in words: its u range for a shift along u, v range along v, both for a diagonal one. */
export function copyPlace(copy: WindowCopy): string {
  const parts: string[] = [];
  if (copy.m !== 0) parts.push(`u = ${span(copy.uMin, copy.uMax)}`);
  if (copy.n !== 0) parts.push(`v = ${span(copy.vMin, copy.vMax)}`);
  return parts.join(', ');
}

/**
 * One sentence on a window's copies. Example: a 0.1-wide window at u = 0.17 with λ/P = 1.41 → "its copies are
 * evanescent (the nearest at u = −1.29…−1.19): no effect here".
 */
export function copiesSentence(window: WindowRect, step: number): string {
  const copies = windowCopies(window, step);
  const live = copies.filter((c) => c.propagates);
  if (live.length === 0) {
    const closest = copies.reduce((a, b) => (b.nearest < a.nearest ? b : a));
    return `its copies are evanescent (the nearest at ${copyPlace(closest)}): no effect here`;
  }
  const places = live.map(copyPlace).join('; ');
  return `${live.length === 1 ? 'a copy' : `${live.length} copies`} at ${places} ${live.length === 1 ? 'propagates' : 'propagate'}: part of this window's light leaves the device there too, as a second picture`;
}
