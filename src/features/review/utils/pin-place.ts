/**
 * Where a review pin sits, in the picture's own coordinates rather than "% across": a far field by its direction
 * (u = sin θx, v = sin θy, and the angles θx, θy), a map of the cells by x, y in µm. Pins are stored as fractions
 * of the picture (0…1 across, 0…1 down); the previews cover the whole N×N grid (pooled or subsampled), so a
 * fraction maps onto the grid directly. Grid conventions of README "Conventions": cell ix at
 * x = (ix − (N−1)/2)·P; far-field pixel ix at u = (ix − N/2)·λ/(N·P). Alias-free for the unit tests.
 */

export interface PinGrid {
  /** Cells per side N. */
  n: number;
  /** Lattice period P, metres. */
  period: number;
  /** Wavelength λ, metres. */
  lambda: number;
}

/**
 * Which way the previews' rows run. 'top-is-positive': +y (+v) up, as server/cli/previews.ts paints every run
 * with a picture record (README "Picture convention"); 'top-is-negative': row 0 at the top is the smallest y
 * (v) — the previews of runs made before it.
 */
export type RowDirection = 'top-is-negative' | 'top-is-positive';


export type PictureKind = 'far-field' | 'cell-map' | 'other';

/** What a run picture shows, by its file name. Example: 'farfield_a_out-b.png' → 'far-field'; 'phase_a.png' → 'cell-map'. */
export function pictureKind(artifact: string): PictureKind {
  if (/^farfield_/.test(artifact)) return 'far-field';
  if (/^(phase_[ab]|atom_index|rotation|delta_[xy]|theta)\.png$/.test(artifact)) return 'cell-map';
  return 'other';
}

const DEG = 180 / Math.PI;
const fixed = (v: number, digits: number) => (Math.abs(v) < 0.5 * 10 ** -digits ? (0).toFixed(digits) : v.toFixed(digits)).replace('-', '−');

/**
 * The pin's place in words, or null for a picture without its own coordinates (then callers say "% across").
 * Example: far field at the zero-order pixel → 'u = 0.000, v = 0.000 (θx = 0.0°, θy = 0.0°)'.
 */
export function pinPlace(artifact: string, fx: number, fy: number, grid: PinGrid | null, rows: RowDirection): string | null {
  if (!grid || !(grid.n > 0 && grid.period > 0 && grid.lambda > 0)) return null;
  const kind = pictureKind(artifact);
  if (kind === 'other') return null;
  const { n } = grid;
  // Continuous cell (pixel) index under the point: the picture's width spans N of them.
  const col = fx * n - 0.5;
  const rowDown = fy * n - 0.5;
  const row = rows === 'top-is-negative' ? rowDown : n - 1 - rowDown;
  if (kind === 'cell-map') {
    const x = (col - (n - 1) / 2) * grid.period * 1e6;
    const y = (row - (n - 1) / 2) * grid.period * 1e6;
    return `x = ${fixed(x, 1)} µm, y = ${fixed(y, 1)} µm`;
  }
  const step = grid.lambda / (n * grid.period);
  const u = (col - n / 2) * step;
  const v = (row - n / 2) * step;
  const direction = `u = ${fixed(u, 3)}, v = ${fixed(v, 3)}`;
  if (u * u + v * v > 1) return `${direction} (evanescent)`;
  return `${direction} (θx = ${fixed(Math.asin(u) * DEG, 1)}°, θy = ${fixed(Math.asin(v) * DEG, 1)}°)`;
}

/** The grid of a run from its "run" metrics section (cells, period, wavelength), or null when it has none. */
export function runGrid(metrics: Record<string, Record<string, { value: number | null }>> | null | undefined): PinGrid | null {
  const group = metrics?.run ?? metrics?.device;
  const n = group?.cells?.value;
  const period = group?.period?.value;
  const lambda = group?.wavelength?.value;
  return typeof n === 'number' && typeof period === 'number' && typeof lambda === 'number' ? { n, period, lambda } : null;
}
