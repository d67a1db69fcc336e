/**
 * What a library build costs, without computing any atom: the request thread answers the estimate route from
 * this formula (no RCWA there), the worker uses the same convergence ladder, and bench/rcwa.ts prints the
 * formula beside measured times so the constants can be checked on the machine at hand.
 */

/** Size of each mirror-symmetry sector's eigenproblem at N × N harmonics (rcwa.ts solves two of them per atom). */
export function sectorSize(harmonics: number): number {
  return ((harmonics + 1) / 2) ** 2 + ((harmonics - 1) / 2) ** 2;
}

/*
 * Seconds per atom on one thread ≈ FIXED + LINEAR · S + CUBIC · S³, S = sectorSize(harmonics). The cubic term is
 * the eigendecompositions and solves; the linear one what grows with the harmonics alone (Toeplitz matrices,
 * the diagonal blocks of the scattering-matrix products); the fixed one the bare cell and the set-up. Constants
 * fitted by hand to per-atom times of bench/rcwa.ts on this 2-core VM (Si₃N₄ pillars 1200 nm tall on fused
 * silica, P = 450 nm, λ = 633 nm, one thread): README's 24 ms at 5×5, 31 ms at 7×7, 76 ms at 11×11 and 276 ms
 * at 15×15 (a quieter hour), and 21×21 measured on 2026-12-03 at 6.5 s under load 14.7 — about 2 s scaled by
 * that run's own 15×15 ratio (0.88 s against 0.276 s). The formula gives 21, 31, 91, 300 ms and 1.7 s. Taller
 * pillars, films and a loaded machine cost more: the estimate is a guide, and the build's progress shows the
 * real time per atom.
 */
const FIXED_SECONDS = 0.01;
const LINEAR_SECONDS = 0.8e-3;
const CUBIC_SECONDS = 1.4e-7;

/** The formula in words, for the estimate's `basis`. */
const shown = (value: number) => Number(value.toPrecision(3));
export const PER_ATOM_FORMULA = `seconds per atom ≈ ${shown(FIXED_SECONDS * 1e3)} ms + ${shown(LINEAR_SECONDS * 1e3)} ms × S + ${shown(CUBIC_SECONDS * 1e9)} ns × S³`;

/** Estimated seconds of one atom on one thread. Example: secondsPerAtom(11) ≈ 0.091. */
export function secondsPerAtom(harmonics: number): number {
  const s = sectorSize(harmonics);
  return FIXED_SECONDS + LINEAR_SECONDS * s + CUBIC_SECONDS * s ** 3;
}

/**
 * The harmonics of the convergence report: 1, 3, 5 up to the build's own for 5 or fewer, otherwise 5, 9, 13, …
 * below it and the build's own last. Example: convergenceLadder(11) → [5, 9, 11].
 */
export function convergenceLadder(harmonics: number): number[] {
  if (harmonics <= 5) return Array.from({ length: (harmonics + 1) / 2 }, (_, i) => 2 * i + 1);
  const ladder: number[] = [];
  for (let h = 5; h < harmonics; h += 4) ladder.push(h);
  ladder.push(harmonics);
  return ladder;
}

/** Pillars of the convergence report: the smallest, the middle and the largest square pillar of the sweep. */
export function convergenceSizeIndices(count: number): number[] {
  return [...new Set([0, Math.floor(count / 2), count - 1])].filter((i) => i >= 0 && i < count);
}

/** Threads one build computes on: two helper threads when the runs of this pool get them, else the pool thread. */
export function buildLanes(parallel: boolean): number {
  return parallel ? 2 : 1;
}

/** The build's wall time: the sweep on `lanes` threads, then the convergence report's smaller harmonics on one. */
export function estimateBuildSeconds(atoms: number, sizes: number, harmonics: number, lanes: number): { secondsPerAtom: number; seconds: number } {
  const perAtom = secondsPerAtom(harmonics);
  const lower = convergenceLadder(harmonics).slice(0, -1);
  const report = convergenceSizeIndices(sizes).length * lower.reduce((sum, h) => sum + secondsPerAtom(h), 0);
  return { secondsPerAtom: perAtom, seconds: (atoms * perAtom) / lanes + report };
}
