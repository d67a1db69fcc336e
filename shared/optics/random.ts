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
