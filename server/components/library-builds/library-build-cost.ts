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
 * Seconds per atom on one thread ≈ LINEAR · S + CUBIC · S³, S = sectorSize(harmonics). The cubic term is the
 * eigendecompositions and solves; the linear one what grows with the harmonics alone (Toeplitz matrices,
 * scattering-matrix products on the diagonal blocks, the bare cell). Constants fitted (least squares, by
 * hand) to the median times per atom that bench/rcwa.ts measured on this 2-core VM on 2026-12-03 for Si₃N₄
 * pillars, 1200 nm tall, P = 450 nm, λ = 633 nm, while other sessions loaded the machine (load average 3–3.5):
 * 5×5 0.05 s, 9×9 0.14 s, 11×11 0.18 s, 13×13 0.25 s, 15×15 0.31 s, 17×17 0.54 s. Taller pillars and more
 * films cost more; the estimate is a guide, the build's own progress shows the real time per atom.
 */
const LINEAR_SECONDS = 2.3e-3;
const CUBIC_SECONDS = 6.7e-8;

/** The formula in words, for the estimate's `basis`. */
export const PER_ATOM_FORMULA = `seconds per atom ≈ ${LINEAR_SECONDS * 1e3} ms × S + ${CUBIC_SECONDS * 1e9} ns × S³`;

/** Estimated seconds of one atom on one thread. Example: secondsPerAtom(11) ≈ 0.16. */
export function secondsPerAtom(harmonics: number): number {
  const s = sectorSize(harmonics);
  return LINEAR_SECONDS * s + CUBIC_SECONDS * s ** 3;
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
