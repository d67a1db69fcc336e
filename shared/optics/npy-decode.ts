/**
 * Reader for NumPy `.npy` files (NEP 1, "A simple file format for NumPy arrays"; numpy.lib.format),
 * versions 1.0, 2.0 and 3.0: magic "\x93NUMPY", two version bytes, a little-endian header length (uint16
 * for 1.0, uint32 for 2.0/3.0), a Python-literal dict {'descr', 'fortran_order', 'shape'}, then the raw
 * data. Numeric dtypes f4, f8, i1…i8 (i8 only within ±2⁵³), u1…u4, either byte order; Fortran order is
 * turned into C (row-major) order. Pure: bytes in, typed array out.
 */

/** A decoded array: C-ordered values, its shape and the file's dtype string. */
export interface DecodedNpy {
  descr: string;
  shape: number[];
  data: Float32Array | Float64Array | Int8Array | Int16Array | Int32Array | Uint8Array | Uint16Array | Uint32Array;
}

const MAGIC = [0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59];

function parseHeader(text: string): { descr: string; fortran: boolean; shape: number[] } {
  const descr = /'descr'\s*:\s*'([^']+)'/.exec(text);
  const fortran = /'fortran_order'\s*:\s*(True|False)/.exec(text);
  const shape = /'shape'\s*:\s*\(([^)]*)\)/.exec(text);
  if (!descr || !fortran || !shape) throw new RangeError(`npy: header is not a descr/fortran_order/shape dict: ${text.trim()}`);
  const dims = shape[1]
    .split(',')
    .map((s) => s.trim())
    .filter((s) => s !== '')
    .map((s) => {
      const v = Number(s.replace(/L$/, ''));
      if (!Number.isInteger(v) || v < 0) throw new RangeError(`npy: bad shape entry '${s}'`);
      return v;
    });
  return { descr: descr[1], fortran: fortran[1] === 'True', shape: dims };
}

/**
 * Decodes a .npy file. Throws RangeError for anything else (wrong magic, object or structured dtype,
 * truncated data). Example: decodeNpy(encodeNpy(Float64Array.of(1, 2), [2])) → { descr: '<f8', shape: [2], data: Float64Array [1, 2] }.
 */
export function decodeNpy(bytes: Uint8Array): DecodedNpy {
  if (bytes.length < 10 || MAGIC.some((b, i) => bytes[i] !== b)) throw new RangeError('npy: not a NumPy .npy file (magic bytes missing)');
  const major = bytes[6];
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  let headerLength: number;
  let headerStart: number;
  if (major === 1) {
    headerLength = view.getUint16(8, true);
    headerStart = 10;
  } else if (major === 2 || major === 3) {
    headerLength = view.getUint32(8, true);
    headerStart = 12;
  } else {
    throw new RangeError(`npy: unsupported format version ${major}.${bytes[7]}`);
  }
  if (headerStart + headerLength > bytes.length) throw new RangeError('npy: header runs past the end of the file');
  let text = '';
  for (let i = headerStart; i < headerStart + headerLength; i++) text += String.fromCharCode(bytes[i]);
  const { descr, fortran, shape } = parseHeader(text);
  const m = /^([<>|=])([fiu])(\d)$/.exec(descr);
  if (!m) throw new RangeError(`npy: dtype '${descr}' is not a plain number type (f4, f8, i1…i8, u1…u4)`);
  const [, order, kind, sizeText] = m;
  const size = Number(sizeText);
  const little = order !== '>';
  const count = shape.reduce((p, d) => p * d, 1);
  const offset = headerStart + headerLength;
  if (offset + count * size > bytes.length) throw new RangeError(`npy: data holds ${bytes.length - offset} bytes, shape (${shape.join(', ')}) needs ${count * size}`);
  const read = readerOf(kind, size, view, little);
  if (!read) throw new RangeError(`npy: dtype '${descr}' is not supported`);
  const data = allocate(kind, size, count);
  const rank = shape.length;
  if (!fortran || rank < 2) {
    for (let i = 0; i < count; i++) data[i] = read(offset + i * size);
  } else {
    // Fortran order: the first index varies fastest. Walk the file in order and place each value at its C index.
    const index = new Array<number>(rank).fill(0);
    const stride = new Array<number>(rank).fill(1);
    for (let d = rank - 2; d >= 0; d--) stride[d] = stride[d + 1] * shape[d + 1];
    for (let i = 0; i < count; i++) {
      let c = 0;
      for (let d = 0; d < rank; d++) c += index[d] * stride[d];
      data[c] = read(offset + i * size);
      for (let d = 0; d < rank; d++) {
        if (++index[d] < shape[d]) break;
        index[d] = 0;
      }
    }
  }
  return { descr, shape, data };
}

function readerOf(kind: string, size: number, view: DataView, little: boolean): ((at: number) => number) | null {
  if (kind === 'f' && size === 4) return (at) => view.getFloat32(at, little);
  if (kind === 'f' && size === 8) return (at) => view.getFloat64(at, little);
  if (kind === 'i' && size === 1) return (at) => view.getInt8(at);
  if (kind === 'i' && size === 2) return (at) => view.getInt16(at, little);
  if (kind === 'i' && size === 4) return (at) => view.getInt32(at, little);
  if (kind === 'i' && size === 8) {
    return (at) => {
      const v = view.getBigInt64(at, little);
      if (v > BigInt(Number.MAX_SAFE_INTEGER) || v < BigInt(-Number.MAX_SAFE_INTEGER)) throw new RangeError('npy: int64 value beyond ±2⁵³');
      return Number(v);
    };
  }
  if (kind === 'u' && size === 1) return (at) => view.getUint8(at);
  if (kind === 'u' && size === 2) return (at) => view.getUint16(at, little);
  if (kind === 'u' && size === 4) return (at) => view.getUint32(at, little);
  return null;
}

function allocate(kind: string, size: number, count: number): DecodedNpy['data'] {
  if (kind === 'f') return size === 4 ? new Float32Array(count) : new Float64Array(count);
  if (kind === 'u') return size === 1 ? new Uint8Array(count) : size === 2 ? new Uint16Array(count) : new Uint32Array(count);
  if (size === 1) return new Int8Array(count);
  if (size === 2) return new Int16Array(count);
  if (size === 4) return new Int32Array(count);
  return new Float64Array(count);
}
