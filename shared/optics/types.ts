/**
 * Shared data shapes of the optics engine.
 *
 * Conventions used by every module of `shared/optics`:
 * - Lengths are in metres, angles in radians, phases in radians.
 * - Grids are square, N×N cells, stored row-major: index = iy * n + ix, ix along x, iy along y.
 * - Cell (ix, iy) sits at x = (ix − (N−1)/2)·P, y = (iy − (N−1)/2)·P, so the grid is centred on the optical axis.
 * - Complex data is kept as separate real and imaginary planes.
 * - Time convention exp(−iωt): a field travelling along +z is exp(+ikz).
 */

/** The cell grid of a design: N cells per side, period P, design wavelength λ. */
export interface CellGrid {
  /** Cells per side, N. */
  n: number;
  /** Lattice period P in metres. */
  period: number;
  /** Design wavelength λ in metres (vacuum). */
  lambda: number;
}

/** A square complex field, real and imaginary planes of length n·n. */
export interface ComplexField {
  n: number;
  re: Float64Array;
  im: Float64Array;
}

/** A complex 2-vector (Jones vector) as [re, im] pairs: [[xRe, xIm], [yRe, yIm]]. */
export type JonesVector = [[number, number], [number, number]];

/**
 * A spatially varying Jones matrix, one 2×2 complex matrix per cell:
 * output = J · input, with J = [[xx, xy], [yx, yy]].
 */
export interface JonesField {
  n: number;
  xx: ComplexField;
  xy: ComplexField;
  yx: ComplexField;
  yy: ComplexField;
}

/** Reports progress of a long computation: fraction in 0…1 and a short stage name. */
export type ProgressCallback = (fraction: number, stage: string, detail?: Record<string, number>) => void;

/** Cooperative cancellation: long loops call `throwIfAborted()` between iterations. */
export interface CancelSignal {
  readonly aborted: boolean;
  throwIfAborted(): void;
}
