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

/**
 * Longest header read by default, bytes. numpy writes a few hundred bytes (its own reader refuses more than
 * 10 000 unless told otherwise: numpy.lib.format._MAX_HEADER_SIZE).
 */
export const NPY_MAX_HEADER_BYTES = 65_536;

/** What the header of a .npy file says, checked against the length of the file. */
export interface NpyHeader {
  descr: string;
  fortranOrder: boolean;
  shape: number[];
  /** Byte offset of the data. */
  dataOffset: number;
  /** Values the shape holds. */
  count: number;
  /** Bytes per value. */
  itemSize: number;
  kind: 'f' | 'i' | 'u';
  littleEndian: boolean;
}

const NUMBER_DTYPE = /^([<>|=])([fiu])([1248])$/;

/**
 * The header dict `{'descr': …, 'fortran_order': …, 'shape': (…), }` read by one left-to-right scan (no
 * regular expression that could backtrack): each character is looked at once, so the cost is linear in the
 * header. Python literal syntax as numpy writes it; anything else is a RangeError naming the character.
 */
function parseHeaderDict(text: string): { descr: string; fortranOrder: boolean; shape: number[] } {
  let i = 0;
  const fail = (what: string): never => {
    throw new RangeError(`npy: the header ${what} (at character ${i})`);
  };
  const blank = () => {
    while (i < text.length && (text[i] === ' ' || text[i] === '\t' || text[i] === '\n' || text[i] === '\r')) i++;
  };
  const expect = (ch: string) => {
    blank();
    if (text[i] !== ch) fail(`should have '${ch}' here`);
    i++;
  };
  const string = (): string => {
    blank();
    const quote = text[i];
    if (quote !== "'" && quote !== '"') fail('should have a quoted name here');
    const end = text.indexOf(quote, i + 1);
    if (end < 0) fail('has a quoted text that never ends');
    const value = text.slice(i + 1, end);
    if (value.includes('\\')) fail('has an escape sequence in a quoted text');
    i = end + 1;
    return value;
  };
  const word = (): string => {
    blank();
    const start = i;
    while (i < text.length && /[A-Za-z]/.test(text[i])) i++;
    return text.slice(start, i);
  };
  const tuple = (): number[] => {
    expect('(');
    const dims: number[] = [];
    for (;;) {
      blank();
      if (text[i] === ')') break;
      const start = i;
      while (i < text.length && text[i] >= '0' && text[i] <= '9' && i - start < 16) i++;
      if (i === start) fail('shape should hold whole numbers');
      const dim = Number(text.slice(start, i));
      if (text[i] === 'L') i++;
      if (!Number.isSafeInteger(dim)) fail('shape has a number too large');
      dims.push(dim);
      blank();
      if (text[i] === ',') i++;
      else if (text[i] !== ')') fail("shape should continue with ',' or ')'");
    }
    i++;
    return dims;
  };
  const values: { descr?: string; fortranOrder?: boolean; shape?: number[] } = {};
  expect('{');
  for (;;) {
    blank();
    if (text[i] === '}') break;
    const key = string();
    expect(':');
    if (key === 'descr' && values.descr === undefined) {
      blank();
      if (text[i] === '[') fail('describes a structured dtype (a list of fields), which is not a plain number type');
      values.descr = string();
    } else if (key === 'fortran_order' && values.fortranOrder === undefined) {
      const w = word();
      if (w !== 'True' && w !== 'False') fail('fortran_order should be True or False');
      values.fortranOrder = w === 'True';
    } else if (key === 'shape' && values.shape === undefined) {
      values.shape = tuple();
    } else {
      fail(key === 'descr' || key === 'fortran_order' || key === 'shape' ? `repeats the key '${key}'` : `has an unexpected key '${key.slice(0, 40)}'`);
    }
    blank();
    if (text[i] === ',') i++;
    else if (text[i] !== '}') fail("should continue with ',' or '}'");
  }
  i++;
  blank();
  if (i < text.length) fail('has text after its closing brace');
  if (values.descr === undefined || values.fortranOrder === undefined || values.shape === undefined) {
    throw new RangeError('npy: the header must give descr, fortran_order and shape');
  }
  return { descr: values.descr, fortranOrder: values.fortranOrder, shape: values.shape };
}

/**
 * Reads and checks the header of a .npy file before any data: magic, version, header length (at most
 * `maxHeaderBytes`, checked before the header is read), the dict (linear scan), a plain number dtype, and
 * that the data the shape needs is present. Throws RangeError naming the problem.
 * Example: readNpyHeader(encodeNpy(new Float64Array(6), [2, 3])) → { descr: '<f8', shape: [2, 3], count: 6, dataOffset: 128, … }.
 */
export function readNpyHeader(bytes: Uint8Array, options: { maxHeaderBytes?: number } = {}): NpyHeader {
  const maxHeader = options.maxHeaderBytes ?? NPY_MAX_HEADER_BYTES;
  if (bytes.length < 10 || MAGIC.some((b, i) => bytes[i] !== b)) throw new RangeError('npy: not a NumPy .npy file (magic bytes missing)');
  const major = bytes[6];
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  let headerLength: number;
  let headerStart: number;
  if (major === 1) {
    headerLength = view.getUint16(8, true);
    headerStart = 10;
  } else if (major === 2 || major === 3) {
    if (bytes.length < 12) throw new RangeError('npy: the file ends inside its header');
    headerLength = view.getUint32(8, true);
    headerStart = 12;
  } else {
    throw new RangeError(`npy: unsupported format version ${major}.${bytes[7]}`);
  }
  if (headerLength > maxHeader) {
    throw new RangeError(`npy: the header is ${headerLength} bytes long; at most ${maxHeader} are accepted (numpy writes a few hundred)`);
  }
  if (headerStart + headerLength > bytes.length) throw new RangeError('npy: the file ends inside its header');
  let text = '';
  for (let i = headerStart; i < headerStart + headerLength; i++) text += String.fromCharCode(bytes[i]);
  const { descr, fortranOrder, shape } = parseHeaderDict(text);
  const m = NUMBER_DTYPE.exec(descr);
  if (!m || (m[2] === 'f' && (m[3] === '1' || m[3] === '2')) || (m[2] === 'u' && m[3] === '8')) {
    throw new RangeError(`npy: dtype '${descr.slice(0, 40)}' is not a plain number type (f4, f8, i1…i8, u1…u4)`);
  }
  const itemSize = Number(m[3]);
  const dataOffset = headerStart + headerLength;
  const available = bytes.length - dataOffset;
  let count = 1;
  for (const d of shape) {
    count *= d;
    if (count * itemSize > available) {
      throw new RangeError(`npy: data holds ${available} bytes, shape (${shape.join(', ')}) needs ${shape.reduce((p, v) => p * v, itemSize)}`);
    }
  }
  return { descr, fortranOrder, shape, dataOffset, count, itemSize, kind: m[2] as NpyHeader['kind'], littleEndian: m[1] !== '>' };
}

/**
 * Decodes a .npy file. Throws RangeError for anything else (wrong magic, object or structured dtype, a header
 * longer than `options.maxHeaderBytes`, truncated data). Example: decodeNpy(encodeNpy(Float64Array.of(1, 2), [2]))
 * → { descr: '<f8', shape: [2], data: Float64Array [1, 2] }.
 */
export function decodeNpy(bytes: Uint8Array, options: { maxHeaderBytes?: number } = {}): DecodedNpy {
  const { descr, fortranOrder: fortran, shape, dataOffset: offset, count, itemSize: size, kind, littleEndian: little } = readNpyHeader(bytes, options);
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
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
