/**
 * The differences between two designs (or any two JSON values), leaf by leaf: one entry per changed
 * value, named by its dotted path (array elements by index, e.g. `channels.a.terms.0.window.width`).
 * Pure, no I/O: the server answers revision comparisons with it and the client can run it on a draft.
 */
import type { DesignChange } from './schemas/revisions';

type Json = null | boolean | number | string | Json[] | { [key: string]: Json };

const isObject = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null && !Array.isArray(v);

/**
 * Every changed leaf from `a` to `b`, in key order of `a` then keys only in `b`. A value present on one side
 * only is reported with `null` on the other; when the kind of value differs (object vs number, array vs
 * object) the whole value is one change. Equal designs give [].
 * Example: diffDesigns({ setup: { cells: 64 } }, { setup: { cells: 128 } }) → [{ path: 'setup.cells', a: 64, b: 128 }].
 */
export function diffDesigns(a: unknown, b: unknown): DesignChange[] {
  const changes: DesignChange[] = [];
  walk(a as Json, b as Json, '', changes);
  return changes;
}

function join(path: string, key: string | number): string {
  return path ? `${path}.${key}` : String(key);
}

function walk(a: Json | undefined, b: Json | undefined, path: string, out: DesignChange[]) {
  if (Array.isArray(a) && Array.isArray(b)) {
    const length = Math.max(a.length, b.length);
    for (let i = 0; i < length; i++) walk(a[i], b[i], join(path, i), out);
    return;
  }
  if (isObject(a) && isObject(b)) {
    const keys = [...Object.keys(a), ...Object.keys(b).filter((k) => !(k in a))];
    for (const key of keys) walk(a[key] as Json | undefined, b[key] as Json | undefined, join(path, key), out);
    return;
  }
  if (a === undefined && b === undefined) return;
  if (a !== undefined && b !== undefined && sameLeaf(a, b)) return;
  out.push({ path: path || '(design)', a: a ?? null, b: b ?? null });
}

function sameLeaf(a: Json, b: Json): boolean {
  if (typeof a !== typeof b) return false;
  if (typeof a === 'object' || typeof b === 'object') return JSON.stringify(a) === JSON.stringify(b);
  return a === b;
}
