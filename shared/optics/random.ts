/**
 * Small seeded pseudo-random generator for reproducible runs (same seed → same start phase on every
 * platform). Algorithm: mulberry32 (Tommy Ettinger, public-domain 32-bit generator; common practice,
 * no published paper), period 2³².
 */

/**
 * Returns a generator of uniform numbers in [0, 1) from a 32-bit integer seed.
 * Example: the first value of mulberry32(1) is 0.6270739405881613 (tests/fixtures/mulberry32.py, the published C code rewritten in Python).
 */
export function mulberry32(seed: number): () => number {
  let state = seed >>> 0;
  return () => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/**
 * The generator's next `out.length` values into `out`, exactly as mulberry32(seed)'s calls would return them, in
 * one loop (a call per value returns each value boxed in a fresh heap object: garbage for the collector when
 * millions are drawn). `state` carries the generator between fills; start it as Uint32Array.of(seed).
 * Example: mulberry32Fill(Uint32Array.of(1), out) puts 0.6270739405881613 in out[0], as mulberry32(1)() gives.
 */
export function mulberry32Fill(state: Uint32Array, out: Float64Array): void {
  let s = state[0];
  for (let i = 0; i < out.length; i++) {
    s = (s + 0x6d2b79f5) >>> 0;
    let t = s;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    out[i] = ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  }
  state[0] = s;
}
