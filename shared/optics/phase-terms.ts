/**
 * Analytic phase terms of a channel's recipe, evaluated at the cell centres of a CellGrid.
 * Cell (ix, iy) sits at x = (ix − (N−1)/2)·P, y = (iy − (N−1)/2)·P (types.ts), k = 2π/λ.
 * Every exported map is a Float64Array of length N², row-major, in radians, wrapped to (−π, π].
 * Time convention exp(−iωt): a phase that decreases with r (φ = −k r sinβ) bends light towards the axis.
 */
import type { CellGrid } from './types';

const TWO_PI = 2 * Math.PI;

/** One term of a phase recipe. Angles in radians, lengths in metres. */
export type PhaseTerm =
  | { kind: 'axicon'; coneHalfAngle?: number; numericalAperture?: number }
  | { kind: 'vortex'; charge: number }
  | { kind: 'lens'; focalLength: number }
  | { kind: 'tilt'; thetaX: number; thetaY: number }
  | { kind: 'custom'; phase: ArrayLike<number> };

/**
 * Wraps a phase to (−π, π]. Example: wrapPhase(3π/2) → −π/2, wrapPhase(−π) → π.
 */
export function wrapPhase(phi: number): number {
  return phi - TWO_PI * Math.ceil((phi - Math.PI) / TWO_PI);
}

/** Wraps every element of a phase map to (−π, π] in place and returns it. */
export function wrapPhaseMap(phase: Float64Array): Float64Array {
  for (let i = 0; i < phase.length; i++) phase[i] = wrapPhase(phase[i]);
  return phase;
}

/** Throws RangeError unless the grid has a positive integer size, period and wavelength. */
export function assertCellGrid(grid: CellGrid): void {
  if (!Number.isInteger(grid.n) || grid.n < 1) throw new RangeError(`Grid size N must be a positive integer, got ${grid.n}`);
  if (!(grid.period > 0) || !Number.isFinite(grid.period)) throw new RangeError(`Period P must be positive, got ${grid.period}`);
  if (!(grid.lambda > 0) || !Number.isFinite(grid.lambda)) throw new RangeError(`Wavelength λ must be positive, got ${grid.lambda}`);
}

/**
 * Coordinates of the cell centres along one axis, metres: (i − (N−1)/2)·P.
 * Example: N = 4, P = 1e-6 → [−1.5e-6, −0.5e-6, 0.5e-6, 1.5e-6].
 */
export function cellCoordinates(grid: CellGrid): Float64Array {
  const { n, period } = grid;
  const c = new Float64Array(n);
  for (let i = 0; i < n; i++) c[i] = (i - (n - 1) / 2) * period;
  return c;
}

function fillMap(grid: CellGrid, value: (x: number, y: number) => number): Float64Array {
  assertCellGrid(grid);
  const { n } = grid;
  const coordinate = cellCoordinates(grid);
  const phase = new Float64Array(n * n);
  for (let iy = 0; iy < n; iy++) {
    const y = coordinate[iy];
    for (let ix = 0; ix < n; ix++) phase[iy * n + ix] = wrapPhase(value(coordinate[ix], y));
  }
  return phase;
}

/** sinβ of an axicon term from its cone half-angle β or its numerical aperture NA = sinβ. */
export function axiconSinBeta(term: { coneHalfAngle?: number; numericalAperture?: number }): number {
  const hasAngle = term.coneHalfAngle !== undefined;
  const hasNa = term.numericalAperture !== undefined;
  if (hasAngle === hasNa) throw new RangeError('Axicon needs exactly one of coneHalfAngle (β) or numericalAperture (sinβ)');
  const sinBeta = hasAngle ? Math.sin(term.coneHalfAngle as number) : (term.numericalAperture as number);
  if (!(sinBeta > 0 && sinBeta < 1)) throw new RangeError(`Axicon sinβ must lie in (0, 1), got ${sinBeta}`);
  return sinBeta;
}

/**
 * Axicon: φ = −k·r·sinβ (cone half-angle β, NA = sinβ), giving a Bessel beam J₀(k sinβ r)
 * (Durnin, JOSA A 4, 651 (1987)). Example: λ = 1 µm, NA = 0.25 → at r = 1 µm φ = −π/2.
 */
export function axiconPhase(grid: CellGrid, cone: { coneHalfAngle?: number; numericalAperture?: number }): Float64Array {
  const sinBeta = axiconSinBeta(cone);
  const k = TWO_PI / grid.lambda;
  return fillMap(grid, (x, y) => -k * Math.hypot(x, y) * sinBeta);
}

/**
 * Vortex (helical phase) of integer topological charge ℓ (either sign): φ = ℓ·atan2(y, x).
 * Example: ℓ = 2 at (x, y) = (0, +1) → φ = π.
 */
export function vortexPhase(grid: CellGrid, charge: number): Float64Array {
  if (!Number.isInteger(charge)) throw new RangeError(`Topological charge ℓ must be an integer, got ${charge}`);
  return fillMap(grid, (x, y) => charge * Math.atan2(y, x));
}

/**
 * Hyperbolic lens focusing a normally incident plane wave at distance f: φ = −k(√(r² + f²) − f)
 * (aberration-free at the design wavelength); f < 0 gives the diverging lens φ = +k(√(r²+f²) − |f|).
 * Example: λ = 1 µm, f = 1 mm → φ = 0 on the axis and φ = −π/2 at r = √((f + λ/4)² − f²) ≈ 22.36 µm.
 */
export function lensPhase(grid: CellGrid, focalLength: number): Float64Array {
  if (!(focalLength !== 0 && Number.isFinite(focalLength))) throw new RangeError(`Focal length must be finite and non-zero, got ${focalLength}`);
  const k = TWO_PI / grid.lambda;
  const f = focalLength;
  const sign = Math.sign(f);
  return fillMap(grid, (x, y) => -sign * k * (Math.sqrt(x * x + y * y + f * f) - Math.abs(f)));
}

/**
 * Tilt (linear phase) deflecting the beam to angles θx, θy: φ = k(x·sinθx + y·sinθy).
 * Example: λ = 1 µm, θx = asin(0.5), x = 1 µm → φ = π.
 */
export function tiltPhase(grid: CellGrid, thetaX: number, thetaY: number): Float64Array {
  const k = TWO_PI / grid.lambda;
  const sx = Math.sin(thetaX);
  const sy = Math.sin(thetaY);
  return fillMap(grid, (x, y) => k * (x * sx + y * sy));
}

/**
 * A user-supplied phase map (radians, row-major N×N), validated and wrapped to (−π, π].
 * Example: customPhase({n: 2, …}, [0, 4, −4, 7]) → [0, 4 − 2π, −4 + 2π, 7 − 2π].
 */
export function customPhase(grid: CellGrid, phase: ArrayLike<number>): Float64Array {
  assertCellGrid(grid);
  const size = grid.n * grid.n;
  if (phase.length !== size) throw new RangeError(`Custom phase map must have ${grid.n}×${grid.n} = ${size} values, got ${phase.length}`);
  const out = new Float64Array(size);
  for (let i = 0; i < size; i++) {
    const value = phase[i];
    if (!Number.isFinite(value)) throw new RangeError(`Custom phase map has a non-finite value at index ${i}`);
    out[i] = wrapPhase(value);
  }
  return out;
}

/** Phase map of one recipe term (radians, wrapped). Example: phaseOfTerm(grid, {kind: 'vortex', charge: 1}). */
export function phaseOfTerm(grid: CellGrid, term: PhaseTerm): Float64Array {
  switch (term.kind) {
    case 'axicon':
      return axiconPhase(grid, term);
    case 'vortex':
      return vortexPhase(grid, term.charge);
    case 'lens':
      return lensPhase(grid, term.focalLength);
    case 'tilt':
      return tiltPhase(grid, term.thetaX, term.thetaY);
    case 'custom':
      return customPhase(grid, term.phase);
    default: {
      const unknown: never = term;
      throw new RangeError(`Unknown phase term ${JSON.stringify(unknown)}`);
    }
  }
}

/**
 * Sum of phase maps (each N×N), wrapped to (−π, π]. Example: sumPhaseMaps(2, [[3, 0, 0, 0], [1, 0, 0, 0]])[0] → 4 − 2π.
 */
export function sumPhaseMaps(n: number, maps: ArrayLike<number>[]): Float64Array {
  const out = new Float64Array(n * n);
  for (const map of maps) {
    if (map.length !== n * n) throw new RangeError(`Phase map has ${map.length} values, expected ${n * n}`);
    for (let i = 0; i < out.length; i++) out[i] += map[i];
  }
  return wrapPhaseMap(out);
}

/** Sum of the recipe terms' phase maps on the grid, wrapped to (−π, π]; an empty list gives zeros. */
export function sumPhaseTerms(grid: CellGrid, terms: PhaseTerm[]): Float64Array {
  assertCellGrid(grid);
  return sumPhaseMaps(grid.n, terms.map((term) => phaseOfTerm(grid, term)));
}
