/** Leaves of a design by dotted path (arrays by index), in the design's own order. */
export function flattenDesign(value: unknown, prefix = '', out = new Map<string, unknown>()): Map<string, unknown> {
  if (value !== null && typeof value === 'object') {
    const entries = Array.isArray(value) ? value.map((entry, index) => [String(index), entry] as const) : Object.entries(value);
    if (entries.length === 0) out.set(prefix, value);
    for (const [key, entry] of entries) flattenDesign(entry, prefix ? `${prefix}.${key}` : key, out);
  } else {
    out.set(prefix, value);
  }
  return out;
}

/** Union of the paths of two flattened designs: a's order first, then b's extra paths after their neighbours. */
export function mergePaths(a: Map<string, unknown>, b: Map<string, unknown>): string[] {
  const merged = [...a.keys()];
  let insertAt = 0;
  for (const key of b.keys()) {
    const index = merged.indexOf(key);
    if (index >= 0) {
      insertAt = index + 1;
    } else {
      merged.splice(insertAt, 0, key);
      insertAt += 1;
    }
  }
  return merged;
}

/** True when the change at `changePath` touches the leaf at `path` (same leaf, or a parent that was added or removed). */
export function changeTouches(changePath: string, path: string): boolean {
  return changePath === path || path.startsWith(`${changePath}.`) || changePath.startsWith(`${path}.`);
}
