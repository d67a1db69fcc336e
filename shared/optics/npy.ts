/**
 * Encoder for NumPy `.npy` files, format version 1.0 (NEP 1, "A simple file format for NumPy
 * arrays"; numpy.lib.format): magic "\x93NUMPY", version bytes 1 0, a little-endian uint16 header
 * length, an ASCII Python-literal dict {'descr', 'fortran_order', 'shape'} padded with spaces and
 * ended by '\n' so that the data starts at a multiple of 64 bytes, then the raw little-endian data
 * in C (row-major) order. Pure: returns bytes, writes nothing.
 */

/** Typed arrays the encoder accepts and their NumPy dtype strings. */
export type NpyArray = Float32Array | Float64Array | Int32Array | Uint8Array;

const MAGIC = [0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59]; // \x93NUMPY
const ALIGN = 64;

/**
 * NumPy dtype string of a typed array: Float32Array '<f4', Float64Array '<f8', Int32Array '<i4',
 * Uint8Array '|u1'. Example: npyDescr(new Float64Array(1)) → '<f8'.
 */
export function npyDescr(data: NpyArray): string {
  if (data instanceof Float64Array) return '<f8';
  if (data instanceof Float32Array) return '<f4';
  if (data instanceof Int32Array) return '<i4';
  if (data instanceof Uint8Array) return '|u1';
  throw new RangeError('npy: unsupported array type');
}

/**
 * The .npy v1.0 header (magic … padding '\n') for `data` with `shape` (C order). Throws RangeError
 * when the shape does not match the element count or the header would exceed 65535 bytes.
 * Example: npyHeader(new Float32Array(6), [2, 3]).length → 128 (10 + 60-character dict + '\n', padded to 64).
 */
export function npyHeader(data: NpyArray, shape: readonly number[]): Uint8Array {
  for (const d of shape) {
    if (!Number.isInteger(d) || d < 0) throw new RangeError(`npy: shape entries must be non-negative integers, got ${d}`);
  }
  const elements = shape.reduce((p, d) => p * d, 1);
  if (elements !== data.length) throw new RangeError(`npy: shape (${shape.join(', ')}) holds ${elements} elements, array has ${data.length}`);
  const shapeText = shape.length === 1 ? `(${shape[0]},)` : `(${shape.join(', ')})`;
  const dict = `{'descr': '${npyDescr(data)}', 'fortran_order': False, 'shape': ${shapeText}, }`;
  const unpadded = MAGIC.length + 2 + 2 + dict.length + 1;
  const total = Math.ceil(unpadded / ALIGN) * ALIGN;
  const headerLength = total - MAGIC.length - 4;
  if (headerLength > 65535) throw new RangeError('npy: header too long for format version 1.0');
  const out = new Uint8Array(total);
  out.set(MAGIC, 0);
  out[6] = 1;
  out[7] = 0;
  out[8] = headerLength & 0xff;
  out[9] = headerLength >>> 8;
  let at = 10;
  for (let i = 0; i < dict.length; i++) out[at++] = dict.charCodeAt(i);
  while (at < total - 1) out[at++] = 0x20;
  out[total - 1] = 0x0a;
  return out;
}

const LITTLE_ENDIAN = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;

function littleEndianBytes(data: NpyArray): Uint8Array {
  const raw = new Uint8Array(data.buffer, data.byteOffset, data.byteLength);
  if (LITTLE_ENDIAN || data.BYTES_PER_ELEMENT === 1) return raw;
  const swapped = new Uint8Array(raw.length);
  const size = data.BYTES_PER_ELEMENT;
  for (let i = 0; i < raw.length; i += size) {
    for (let b = 0; b < size; b++) swapped[i + b] = raw[i + size - 1 - b];
  }
  return swapped;
}

/**
 * The .npy file as chunks: the header, then the array's bytes (a view of `data`, no copy, on a
 * little-endian host). Stream them to a file or a zip entry in order.
 * Example: npyChunks(new Int32Array([1, 2]), [2]) → [128-byte header, 8 data bytes].
 */
export function npyChunks(data: NpyArray, shape: readonly number[] = [data.length]): Uint8Array[] {
  return [npyHeader(data, shape), littleEndianBytes(data)];
}

/**
 * The whole .npy file in one array (copies the data). numpy.load reads it back with the same
 * dtype, shape and values.
 * Example: encodeNpy(new Float64Array([1.5]), [1]).length → 128 + 8.
 */
export function encodeNpy(data: NpyArray, shape: readonly number[] = [data.length]): Uint8Array {
  const [header, body] = npyChunks(data, shape);
  const out = new Uint8Array(header.length + body.length);
  out.set(header, 0);
  out.set(body, header.length);
  return out;
}
