/**
 * Illumination of the device: amplitude of the incident beam at every cell centre (types.ts grid).
 * Flat: amplitude 1. Gaussian: a(r) = exp(−r²/w²) with waist w (1/e² intensity radius), centred on the axis.
 */
import type { CellGrid } from './types';
import { assertCellGrid, cellCoordinates } from './phase-terms';

export type Illumination = { kind: 'flat' } | { kind: 'gaussian'; waist: number };

/**
 * Incident amplitude per cell, row-major N×N, written into `out` when given (length N²). Example: Gaussian with
 * w = P·√2 on N = 2 → every cell at r² = P²/2 has amplitude exp(−1/4) ≈ 0.7788.
 */
export function illuminationAmplitude(grid: CellGrid, illumination: Illumination = { kind: 'flat' }, out?: Float64Array): Float64Array {
  assertCellGrid(grid);
  const { n } = grid;
  if (out && out.length !== n * n) throw new RangeError(`Illumination output must have ${n * n} values, got ${out.length}`);
  const amplitude = out ?? new Float64Array(n * n);
  if (illumination.kind === 'flat') return amplitude.fill(1);
  const w = illumination.waist;
  if (!(w > 0) || !Number.isFinite(w)) throw new RangeError(`Gaussian waist must be positive, got ${w}`);
  const c = cellCoordinates(grid);
  for (let iy = 0; iy < n; iy++) {
    for (let ix = 0; ix < n; ix++) amplitude[iy * n + ix] = Math.exp(-(c[ix] * c[ix] + c[iy] * c[iy]) / (w * w));
  }
  return amplitude;
}

/** Incident power Σ a² over the cells (units: |E|² · cell). Example: flat illumination on N = 64 → 4096. */
export function incidentPower(amplitude: Float64Array): number {
  let sum = 0;
  for (let i = 0; i < amplitude.length; i++) sum += amplitude[i] * amplitude[i];
  return sum;
}
