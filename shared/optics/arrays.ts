/**
 * Where the engine allocates the large result arrays of a run (phases, cell parameters, atom placement, far
 * fields). 'private': ordinary ArrayBuffers — the default, and the only choice in browsers without
 * cross-origin isolation. 'shared': SharedArrayBuffers, which other threads read without a copy: posting an
 * ordinary typed array to a worker copies it into fresh memory, measured ≈ 4.5 ms per MiB on the 2-core VMs
 * this runs on (first-touch page faults), so ≈ 0.5 s for the files of a 1024² run.
 * Example: float64Array(4, 'shared').buffer instanceof SharedArrayBuffer → true.
 */
export type ArrayMemory = 'private' | 'shared';

function buffer(bytes: number, memory: ArrayMemory): ArrayBuffer | SharedArrayBuffer {
  return memory === 'shared' ? new SharedArrayBuffer(bytes) : new ArrayBuffer(bytes);
}

export function float64Array(length: number, memory: ArrayMemory = 'private'): Float64Array {
  return new Float64Array(buffer(8 * length, memory));
}

export function float32Array(length: number, memory: ArrayMemory = 'private'): Float32Array {
  return new Float32Array(buffer(4 * length, memory));
}

export function int32Array(length: number, memory: ArrayMemory = 'private'): Int32Array {
  return new Int32Array(buffer(4 * length, memory));
}
