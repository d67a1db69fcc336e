/**
 * Tabulated refractive index n, k(λ): a material measured (ellipsometry) or copied from a catalogue, as a table
 * of vacuum wavelengths with n and k, linearly interpolated between rows and refused outside the table.
 *
 * CSV form (`parseNkTableCsv`): a header `wavelength_nm,n,k`, then one row per wavelength in nanometres,
 * ascending; `#` lines are comments, `# name: …` and `# source: …` name the material and where the numbers come
 * from. Rows and line length are limited while reading (NkTableError at the first excess).
 */

/** One row: vacuum wavelength in nm, n, k (k ≥ 0 absorbs; time dependence exp(−iωt)). */
export type NkPoint = readonly [wavelengthNm: number, n: number, k: number];

/** A tabulated material: name, where the numbers come from, rows by ascending wavelength. */
export interface NkTable {
  name: string;
  source: string;
  points: readonly NkPoint[];
}

/** Limits of reading a table, checked while reading. */
export interface NkTableLimits {
  /** Most data rows. */
  maxRows: number;
  /** Longest line (CSV) in characters. */
  maxLineChars: number;
}

/** Defaults; the server passes its configuration (NK_TABLE_MAX_ROWS, NK_TABLE_MAX_LINE_CHARS). */
export const NK_TABLE_LIMITS: NkTableLimits = { maxRows: 4000, maxLineChars: 200 };

/** Longest name and source text of a table. */
export const NK_TABLE_TEXT_LIMITS = { name: 120, source: 300 } as const;

/** The documented header of the CSV form. */
export const NK_TABLE_HEADER = ['wavelength_nm', 'n', 'k'] as const;

/** A table that cannot be used: `line` is the line of the CSV (or the row index + 1 of a JSON table) at fault. */
export class NkTableError extends Error {
  constructor(
    message: string,
    readonly line?: number,
  ) {
    super(line === undefined ? message : `line ${line}: ${message}`);
    this.name = 'NkTableError';
  }
}

/**
 * Checks rows of a table (wavelength ascending and positive, n > 0, 0 ≤ k ≤ 10, at least two rows, at most
 * `maxRows`); throws NkTableError naming the row. `lineOf(i)` maps row i to the line reported.
 */
export function checkNkPoints(points: readonly NkPoint[], limits: NkTableLimits = NK_TABLE_LIMITS, lineOf: (i: number) => number = (i) => i + 1): void {
  if (points.length > limits.maxRows) throw new NkTableError(`the table holds ${points.length} rows, more than ${limits.maxRows}`);
  if (points.length < 2) throw new NkTableError('the table needs at least two rows (wavelength_nm, n, k) to interpolate between');
  points.forEach(([lambda, n, k], i) => {
    if (!(Number.isFinite(lambda) && lambda > 0)) throw new NkTableError(`the wavelength must be a positive number of nanometres, got ${lambda}`, lineOf(i));
    if (!(Number.isFinite(n) && n > 0 && n <= 20)) throw new NkTableError(`n must be a number above 0 and at most 20, got ${n}`, lineOf(i));
    if (!(Number.isFinite(k) && k >= 0 && k <= 20)) throw new NkTableError(`k must be a number from 0 to 20 (0: no absorption), got ${k}`, lineOf(i));
    if (i > 0 && !(lambda > points[i - 1][0])) {
      throw new NkTableError(`wavelengths must rise from row to row: ${lambda} nm follows ${points[i - 1][0]} nm`, lineOf(i));
    }
  });
}

/**
 * Parses an n, k table in CSV (see the module comment). Throws NkTableError with the line at fault: a line
 * longer than `maxLineChars` or a row past `maxRows` stops the reading there.
 * Example: parseNkTableCsv('wavelength_nm,n,k\n500,2.0,0\n600,2.1,0.01') → { name: '', source: '', points: [[500, 2, 0], [600, 2.1, 0.01]] }.
 */
export function parseNkTableCsv(text: string, limits: Partial<NkTableLimits> = {}): NkTable {
  const lim: NkTableLimits = { ...NK_TABLE_LIMITS, ...limits };
  const points: NkPoint[] = [];
  const lines: number[] = [];
  const meta: Record<string, string> = {};
  let header = false;
  let at = text.charCodeAt(0) === 0xfeff ? 1 : 0;
  for (let line = 1; at <= text.length; line++) {
    let end = text.indexOf('\n', at);
    if (end < 0) end = text.length;
    if (end - at > lim.maxLineChars) throw new NkTableError(`the line is longer than ${lim.maxLineChars} characters`, line);
    const content = text.slice(at, end).replace(/\r$/, '').trim();
    at = end + 1;
    if (content === '') continue;
    if (content.startsWith('#')) {
      const m = /^#\s*(name|source)\s*:\s*(.*)$/i.exec(content);
      if (m) meta[m[1].toLowerCase()] = m[2].trim();
      continue;
    }
    const cells = content.split(',').map((c) => c.trim());
    if (!header) {
      if (cells.length !== 3 || cells.some((c, i) => c.toLowerCase() !== NK_TABLE_HEADER[i])) {
        throw new NkTableError(`the first row must be the header ${NK_TABLE_HEADER.join(',')} (wavelength in nm, n, k), got "${content.slice(0, 60)}"`, line);
      }
      header = true;
      continue;
    }
    if (points.length >= lim.maxRows) throw new NkTableError(`the table holds more than ${lim.maxRows} rows`, line);
    if (cells.length !== 3) throw new NkTableError(`a row has three numbers (wavelength_nm, n, k), this one has ${cells.length} cells`, line);
    const values = cells.map((c) => (c === '' ? Number.NaN : Number(c)));
    const bad = values.findIndex((v) => !Number.isFinite(v));
    if (bad >= 0) throw new NkTableError(`${NK_TABLE_HEADER[bad]} is not a number: "${cells[bad].slice(0, 40)}"`, line);
    points.push([values[0], values[1], values[2]]);
    lines.push(line);
  }
  if (!header) throw new NkTableError(`the file holds no header row ${NK_TABLE_HEADER.join(',')}`);
  checkNkPoints(points, lim, (i) => lines[i]);
  const name = (meta.name ?? '').slice(0, NK_TABLE_TEXT_LIMITS.name);
  const source = (meta.source ?? '').slice(0, NK_TABLE_TEXT_LIMITS.source);
  return { name, source, points };
}

/** The table's wavelength range, nm. */
export function nkTableRange(table: NkTable): { minNm: number; maxNm: number } {
  return { minNm: table.points[0][0], maxNm: table.points[table.points.length - 1][0] };
}

/**
 * n and k at vacuum wavelength `lambda` (metres), linearly interpolated between the two rows around it.
 * Throws RangeError naming the table's range when λ lies outside it.
 * Example: tabulatedIndex({ name: 'film', source: '', points: [[500, 2, 0], [600, 2.1, 0.02]] }, 550e-9) → { n: 2.05, k: 0.01 }.
 */
export function tabulatedIndex(table: NkTable, lambda: number): { n: number; k: number } {
  const nm = lambda * 1e9;
  const { minNm, maxNm } = nkTableRange(table);
  if (!(nm >= minNm && nm <= maxNm)) {
    const label = table.name || 'the tabulated material';
    throw new RangeError(`${label}: the wavelength ${Number(nm.toFixed(3))} nm is outside the table's range ${minNm}–${maxNm} nm${table.source ? ` (${table.source})` : ''}`);
  }
  const p = table.points;
  let lo = 0;
  let hi = p.length - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (p[mid][0] <= nm) lo = mid;
    else hi = mid;
  }
  const f = (nm - p[lo][0]) / (p[hi][0] - p[lo][0]);
  return { n: p[lo][1] + f * (p[hi][1] - p[lo][1]), k: p[lo][2] + f * (p[hi][2] - p[lo][2]) };
}
