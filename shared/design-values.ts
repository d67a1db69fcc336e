/**
 * Design values in a designer's words, for every place that shows a design or a change to it (revision
 * compare, the design report): enumerated values by display words instead of their stored spelling,
 * uploaded pictures by their file name, and a changed number as a signed difference in its unit.
 * Pure, no I/O.
 */
import { PHASE_TERM_LABELS } from './schemas/design';

/** Display words of the enumerated design values, by the field's own key (the last part of its path). */
export const DESIGN_VALUE_WORDS: Readonly<Record<string, Readonly<Record<string, string>>>> = {
  algorithm: { gs: 'Gerchberg–Saxton', 'weighted-gs': 'weighted Gerchberg–Saxton', mraf: 'MRAF' },
  seenOn: { 'far-field': 'far field (evenly in sin θ)', 'flat-screen': 'flat screen facing the device' },
  units: { degrees: 'degrees', 'direction-cosine': 'direction cosines (sin θ)', cells: 'far-field cells' },
  kind: { linear: 'linear', circular: 'circular', elliptical: 'elliptical', plane: 'plane wave', gaussian: 'Gaussian beam', ...PHASE_TERM_LABELS },
  handedness: { left: 'left-handed', right: 'right-handed' },
  source: { demo: 'demo', upload: 'uploaded file', file: 'file', library: 'project library' },
  lightFrom: { substrate: 'through the substrate', superstrate: 'onto the pillars (from the superstrate)' },
};

/**
 * Words of one enumerated value, or null when the key or value has none.
 * Example: valueWords('algorithm', 'weighted-gs') → 'weighted Gerchberg–Saxton'.
 */
export function valueWords(key: string, value: unknown): string | null {
  if (typeof value !== 'string') return null;
  return DESIGN_VALUE_WORDS[key]?.[value] ?? null;
}

/** Units whose changes read as a difference (angles, lengths, window coordinates). */
const DIFFERENCE_UNITS = new Set(['°', 'nm', 'µm', 'mm', 'sin θ', 'cells', 'planes', '×']);

const plain = (v: number) => String(Number(v.toPrecision(6)));

/**
 * A change of a number as a signed difference in its unit, or null when a difference says nothing
 * (no unit of length or angle, e.g. a seed). Example: signedChange(10, 15, '°') → '+5°';
 * signedChange(450, 400, 'nm') → '−50 nm'.
 */
export function signedChange(a: number, b: number, unit: string | undefined): string | null {
  if (!unit || !DIFFERENCE_UNITS.has(unit) || !Number.isFinite(a) || !Number.isFinite(b)) return null;
  const d = b - a;
  const text = `${d > 0 ? '+' : d < 0 ? '−' : '±'}${plain(Math.abs(d))}`;
  return unit === '°' || unit === '×' ? `${text}${unit}` : `${text} ${unit}`;
}

/**
 * A picture or phase map by the name a person knows it by: an upload by its file name (when known), a demo
 * picture by its name, a file by its path. Example: assetName({ source: 'upload', id: 2 }, new Map([[2, 'F.png']]))
 * → '“F.png” (upload 2)'.
 */
export function assetName(ref: { source: string; id?: unknown; name?: unknown; path?: unknown }, uploadNames?: ReadonlyMap<number, string>): string {
  if (ref.source === 'upload') {
    const name = typeof ref.id === 'number' ? uploadNames?.get(ref.id) : undefined;
    if (name) return `“${name}” (upload ${String(ref.id)})`;
    return uploadNames ? `upload ${String(ref.id)} (no longer in the project)` : `upload ${String(ref.id)}`;
  }
  if (ref.source === 'demo') return `demo picture “${String(ref.name)}”`;
  return `file ${String(ref.path)}`;
}
