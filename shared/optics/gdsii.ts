/**
 * GDSII stream writer for a metasurface layout (Calma, GDSII Stream Format Manual, release 6.0,
 * 1987). Streamed: `gdsiiChunks` yields Uint8Array pieces of bounded size, so a 2048² layout never
 * sits whole in memory.
 *
 * Layout conventions:
 * - Units: database unit 1 nm (1e-9 m), user unit 1 µm, i.e. UNITS = [1e-3 user units per database
 *   unit, 1e-9 metres per database unit] (both configurable).
 * - One structure `ATOM_<k>` per non-empty atom k of the library (with `usedAtomsOnly`: per non-empty atom
 *   some cell uses): a BOUNDARY rectangle of the
 *   atom's width (x) × length (y), centred on the structure origin to within half a database unit
 *   (sizes are rounded to whole database units, the width is kept exact).
 * - A top structure placing every cell with an SREF at its centre
 *   x = (ix − (N−1)/2)·P, y = (iy − (N−1)/2)·P (types.ts grid), with STRANS 0 (no reflection) and
 *   ANGLE in degrees, counter-clockwise, from `placementAngle` (θ mod 180°; 0 for squares).
 *   ANGLE is omitted when it is 0. Cells whose atom is 'empty' get no SREF.
 * - The layout is seen from above the pillars (light leaves towards the viewer): x right, y up.
 */
import type { AtomLibrary } from './atoms';
import { placementAngle } from './atoms';
import type { ProgressCallback } from './types';

/** What to write. Lengths in metres, θ in radians. */
export interface GdsiiLayout {
  n: number;
  period: number;
  /** Library index per cell, row-major N×N. */
  atomIndex: Int32Array;
  /** Cell rotation θ per cell, radians (as returned by the atom mapping). */
  theta: Float64Array;
  library: AtomLibrary;
  /** GDSII layer of the pillars, 0…32767, default 1. */
  layer?: number;
  /** GDSII datatype of the pillars, 0…32767, default 0. */
  datatype?: number;
  /** Library name, default 'PHASEWRIGHT'. */
  libraryName?: string;
  /** Top structure name, default 'METASURFACE'. */
  topName?: string;
  /** Database unit in metres, default 1e-9. */
  databaseUnit?: number;
  /** User unit in metres, default 1e-6. */
  userUnit?: number;
  /** Modification/access time written to BGNLIB/BGNSTR, default 2000-01-01T00:00:00Z (reproducible files). */
  timestamp?: Date;
  /** Write structures only for the atoms some cell uses (default false: every non-empty atom of the library). */
  usedAtomsOnly?: boolean;
  /** Target chunk size in bytes, default 1 MiB; chunks never exceed it by more than one record. */
  chunkSize?: number;
  onProgress?: ProgressCallback;
}

/** GDSII record types (manual, "Record Description"): type byte << 8 | data-type byte. */
export const GDS_RECORD = {
  HEADER: 0x0002,
  BGNLIB: 0x0102,
  LIBNAME: 0x0206,
  UNITS: 0x0305,
  ENDLIB: 0x0400,
  BGNSTR: 0x0502,
  STRNAME: 0x0606,
  ENDSTR: 0x0700,
  BOUNDARY: 0x0800,
  SREF: 0x0a00,
  LAYER: 0x0d02,
  DATATYPE: 0x0e02,
  XY: 0x1003,
  ENDEL: 0x1100,
  SNAME: 0x1206,
  STRANS: 0x1a01,
  ANGLE: 0x1c05,
} as const;

/** Stream format version written in HEADER (release 6.0). */
export const GDS_VERSION = 600;

const MAX_RECORD = 65534;

/**
 * Writes an 8-byte GDSII real ("excess-64"): sign bit, 7-bit base-16 exponent biased by 64, 56-bit
 * fraction M with 1/16 ≤ M < 1; value = (−1)^S · M · 16^(E−64); zero is all zero bytes (manual,
 * "Data Types"). Every double in range converts exactly (53 significant bits fit in the 56-bit
 * fraction). Throws RangeError for non-finite values or magnitudes outside 16^−65 … 16^63.
 * Example: encodeGdsReal8(1) → [0x41, 0x10, 0, 0, 0, 0, 0, 0].
 */
export function encodeGdsReal8(value: number, out: Uint8Array = new Uint8Array(8), offset = 0): Uint8Array {
  if (!Number.isFinite(value)) throw new RangeError(`GDSII real: ${value} is not finite`);
  if (value === 0) {
    out.fill(0, offset, offset + 8);
    return out;
  }
  const sign = value < 0 ? 0x80 : 0;
  const magnitude = Math.abs(value);
  let e = Math.floor(Math.log2(magnitude) / 4) + 1;
  let fraction = magnitude * 2 ** (-4 * e);
  while (fraction >= 1) {
    fraction /= 16;
    e += 1;
  }
  while (fraction < 1 / 16) {
    fraction *= 16;
    e -= 1;
  }
  const biased = e + 64;
  if (biased < 0 || biased > 127) throw new RangeError(`GDSII real: ${value} is outside the excess-64 range`);
  const mantissa = fraction * 2 ** 56; // an exact integer < 2^56
  const hi = Math.floor(mantissa / 2 ** 32);
  const lo = mantissa - hi * 2 ** 32;
  out[offset] = sign | biased;
  out[offset + 1] = (hi >>> 16) & 0xff;
  out[offset + 2] = (hi >>> 8) & 0xff;
  out[offset + 3] = hi & 0xff;
  out[offset + 4] = (lo >>> 24) & 0xff;
  out[offset + 5] = (lo >>> 16) & 0xff;
  out[offset + 6] = (lo >>> 8) & 0xff;
  out[offset + 7] = lo & 0xff;
  return out;
}

/**
 * Name of the structure holding library atom k. Example: atomStructureName(12) → 'ATOM_12'.
 */
export function atomStructureName(k: number): string {
  return `ATOM_${k}`;
}

function checkName(name: string, what: string): void {
  if (!/^[A-Za-z0-9_?$]{1,32}$/.test(name)) {
    throw new RangeError(`GDSII ${what} '${name}' must be 1–32 characters of A–Z, a–z, 0–9, _, ?, $`);
  }
}

function checkInt16(v: number, what: string): void {
  if (!Number.isInteger(v) || v < 0 || v > 32767) throw new RangeError(`GDSII ${what} must be an integer 0…32767, got ${v}`);
}

/** Appends records to a buffer; the generator flushes it in chunks. */
class RecordWriter {
  buffer: Uint8Array<ArrayBuffer>;
  view: DataView;
  pos = 0;

  constructor(capacity: number) {
    this.buffer = new Uint8Array(capacity);
    this.view = new DataView(this.buffer.buffer);
  }

  private begin(type: number, payload: number): void {
    const length = 4 + payload;
    if (length > MAX_RECORD) throw new RangeError(`GDSII record of ${length} bytes exceeds the format limit`);
    if (this.pos + length > this.buffer.length) this.grow(length);
    this.view.setUint16(this.pos, length, false);
    this.view.setUint16(this.pos + 2, type, false);
    this.pos += 4;
  }

  private grow(extra: number): void {
    const next = new Uint8Array(Math.max(this.buffer.length * 2, this.pos + extra));
    next.set(this.buffer.subarray(0, this.pos));
    this.buffer = next;
    this.view = new DataView(next.buffer);
  }

  empty(type: number): void {
    this.begin(type, 0);
  }

  int16s(type: number, values: readonly number[]): void {
    this.begin(type, 2 * values.length);
    for (const v of values) {
      this.view.setInt16(this.pos, v, false);
      this.pos += 2;
    }
  }

  int32s(type: number, values: readonly number[]): void {
    this.begin(type, 4 * values.length);
    for (const v of values) {
      this.view.setInt32(this.pos, v, false);
      this.pos += 4;
    }
  }

  reals(type: number, values: readonly number[]): void {
    this.begin(type, 8 * values.length);
    for (const v of values) {
      encodeGdsReal8(v, this.buffer, this.pos);
      this.pos += 8;
    }
  }

  string(type: number, text: string): void {
    const padded = text.length % 2 === 0 ? text.length : text.length + 1;
    this.begin(type, padded);
    for (let i = 0; i < text.length; i++) this.buffer[this.pos + i] = text.charCodeAt(i) & 0x7f;
    if (padded !== text.length) this.buffer[this.pos + text.length] = 0;
    this.pos += padded;
  }

  take(): Uint8Array {
    const chunk = this.buffer.slice(0, this.pos);
    this.pos = 0;
    return chunk;
  }
}

function timeFields(date: Date): number[] {
  return [date.getUTCFullYear(), date.getUTCMonth() + 1, date.getUTCDate(), date.getUTCHours(), date.getUTCMinutes(), date.getUTCSeconds()];
}

/**
 * Streams the GDSII file of a layout as Uint8Array chunks (see module comment for the structure,
 * units, and angle convention). Coordinates are rounded to whole database units.
 * Example: [...gdsiiChunks(layout)] concatenated starts with 00 06 00 02 02 58 (HEADER, version 600).
 */
export function* gdsiiChunks(layout: GdsiiLayout): Generator<Uint8Array, void, undefined> {
  const { n, period, atomIndex, theta, library } = layout;
  const count = n * n;
  if (!Number.isInteger(n) || n < 1) throw new RangeError(`GDSII layout: n must be a positive integer, got ${n}`);
  if (atomIndex.length !== count || theta.length !== count) throw new RangeError(`GDSII layout: atomIndex and theta must hold ${n}² cells`);
  if (!(period > 0)) throw new RangeError(`GDSII layout: period must be positive, got ${period}`);
  const layer = layout.layer ?? 1;
  const datatype = layout.datatype ?? 0;
  checkInt16(layer, 'layer');
  checkInt16(datatype, 'datatype');
  const libraryName = layout.libraryName ?? 'PHASEWRIGHT';
  const topName = layout.topName ?? 'METASURFACE';
  checkName(libraryName, 'library name');
  checkName(topName, 'top structure name');
  const dbu = layout.databaseUnit ?? 1e-9;
  const userUnit = layout.userUnit ?? 1e-6;
  if (!(dbu > 0) || !(userUnit > 0)) throw new RangeError('GDSII layout: units must be positive');
  const chunkSize = layout.chunkSize ?? 1 << 20;
  if (!(chunkSize >= 1024)) throw new RangeError('GDSII layout: chunkSize must be at least 1024 bytes');
  const atoms = library.atoms;
  for (let k = 0; k < atoms.length; k++) {
    if (atomStructureName(k) === topName) throw new RangeError(`GDSII layout: top name '${topName}' collides with an atom structure`);
  }
  const stamp = timeFields(layout.timestamp ?? new Date(Date.UTC(2000, 0, 1)));
  const toDb = (metres: number): number => {
    const v = Math.round(metres / dbu);
    if (Math.abs(v) > 2147483647) throw new RangeError(`GDSII layout: coordinate ${metres} m does not fit in 32 bits of ${dbu} m units`);
    return v;
  };

  const w = new RecordWriter(chunkSize + 4096);
  w.int16s(GDS_RECORD.HEADER, [GDS_VERSION]);
  w.int16s(GDS_RECORD.BGNLIB, [...stamp, ...stamp]);
  w.string(GDS_RECORD.LIBNAME, libraryName);
  w.reals(GDS_RECORD.UNITS, [dbu / userUnit, dbu]);

  const used = new Uint8Array(atoms.length).fill(layout.usedAtomsOnly ? 0 : 1);
  if (layout.usedAtomsOnly) for (let i = 0; i < count; i++) if (atomIndex[i] >= 0 && atomIndex[i] < atoms.length) used[atomIndex[i]] = 1;
  for (let k = 0; k < atoms.length; k++) {
    const atom = atoms[k];
    if (atom.shape === 'empty' || !used[k]) continue;
    const wDb = toDb(atom.width);
    const lDb = toDb(atom.length);
    if (wDb < 1 || lDb < 1) throw new RangeError(`GDSII layout: atom ${atom.id} is smaller than one database unit`);
    const x0 = -Math.floor(wDb / 2);
    const y0 = -Math.floor(lDb / 2);
    const x1 = x0 + wDb;
    const y1 = y0 + lDb;
    w.int16s(GDS_RECORD.BGNSTR, [...stamp, ...stamp]);
    w.string(GDS_RECORD.STRNAME, atomStructureName(k));
    w.empty(GDS_RECORD.BOUNDARY);
    w.int16s(GDS_RECORD.LAYER, [layer]);
    w.int16s(GDS_RECORD.DATATYPE, [datatype]);
    w.int32s(GDS_RECORD.XY, [x0, y0, x1, y0, x1, y1, x0, y1, x0, y0]);
    w.empty(GDS_RECORD.ENDEL);
    w.empty(GDS_RECORD.ENDSTR);
    if (w.pos >= chunkSize) yield w.take();
  }

  w.int16s(GDS_RECORD.BGNSTR, [...stamp, ...stamp]);
  w.string(GDS_RECORD.STRNAME, topName);
  const centre = (n - 1) / 2;
  const names = atoms.map((_, k) => atomStructureName(k));
  const xy = [0, 0];
  for (let iy = 0; iy < n; iy++) {
    const y = toDb((iy - centre) * period);
    for (let ix = 0; ix < n; ix++) {
      const i = iy * n + ix;
      const k = atomIndex[i];
      if (!(k >= 0 && k < atoms.length)) throw new RangeError(`GDSII layout: cell (${ix}, ${iy}) refers to atom ${k}`);
      const atom = atoms[k];
      if (atom.shape === 'empty') continue;
      w.empty(GDS_RECORD.SREF);
      w.string(GDS_RECORD.SNAME, names[k]);
      const angle = (placementAngle(atom, theta[i]) * 180) / Math.PI;
      if (angle !== 0) {
        w.int16s(GDS_RECORD.STRANS, [0]);
        w.reals(GDS_RECORD.ANGLE, [angle]);
      }
      xy[0] = toDb((ix - centre) * period);
      xy[1] = y;
      w.int32s(GDS_RECORD.XY, xy);
      w.empty(GDS_RECORD.ENDEL);
      if (w.pos >= chunkSize) yield w.take();
    }
    layout.onProgress?.((iy + 1) / n, 'gdsii');
  }
  w.empty(GDS_RECORD.ENDSTR);
  w.empty(GDS_RECORD.ENDLIB);
  yield w.take();
}

/**
 * The whole GDSII file in one array (small layouts, tests); see `gdsiiChunks`.
 * Example: gdsiiBytes(layout).length → total size in bytes.
 */
export function gdsiiBytes(layout: GdsiiLayout): Uint8Array {
  const chunks = [...gdsiiChunks(layout)];
  const total = chunks.reduce((s, c) => s + c.length, 0);
  const out = new Uint8Array(total);
  let at = 0;
  for (const c of chunks) {
    out.set(c, at);
    at += c.length;
  }
  return out;
}
