/**
 * Handing large arrays to a worker thread: posting a typed array copies it through the structured-clone
 * serializer (measured ≈ 0.8 s for the ~100 MiB of a 1024² run's layout and far fields), while a view on a
 * SharedArrayBuffer is passed without copying. Arrays the engine did not allocate in shared memory are copied
 * there once (a memcpy, though still paying the first-touch page faults of fresh memory).
 */

type Numeric = Float64Array | Float32Array | Int32Array | Uint8Array;

function sharedCopy<T extends Numeric>(array: T): T {
  const Type = array.constructor as new (buffer: SharedArrayBuffer) => T;
  const copy = new Type(new SharedArrayBuffer(array.byteLength));
  copy.set(array as never);
  return copy;
}

/**
 * The same plain data (objects, arrays, numbers, strings) with every typed array not yet in shared memory
 * replaced by a copy there (the engine allocates its large results there itself with memory 'shared'); other
 * values are kept. Example: shareArrays({ n: 2, map: new Float32Array(4) }).map.buffer is a
 * SharedArrayBuffer.
 */
export function shareArrays<T>(value: T): T {
  if (ArrayBuffer.isView(value) && !(value instanceof DataView)) {
    return value.buffer instanceof SharedArrayBuffer ? value : (sharedCopy(value as unknown as Numeric) as T);
  }
  if (Array.isArray(value)) return value.map((item) => shareArrays(item)) as T;
  if (value && typeof value === 'object' && Object.getPrototypeOf(value) === Object.prototype) {
    const out: Record<string, unknown> = {};
    for (const [key, item] of Object.entries(value)) out[key] = shareArrays(item);
    return out as T;
  }
  return value;
}
