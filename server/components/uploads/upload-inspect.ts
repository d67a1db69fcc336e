/**
 * What an uploaded file really is, and whether it is safe to decode, read from its structure before anything
 * decodes it: the type from the magic bytes (PNG, JPEG, NumPy .npy — the declared type and the file name are not
 * trusted), the pixel size from the header (PNG IHDR, JPEG start-of-frame, .npy shape) and the exact amount of
 * memory a decode needs. The limits come first: a file that claims too many pixels, would decode to more than
 * the decode budget, has too many progressive scans or an over-long .npy header is refused here, so nothing is
 * ever expanded past them. Runs on the input worker (input-worker.ts), never on the request thread.
 */
import { crc32 } from 'node:zlib';
import { readNpyHeader } from '../../../shared/optics/npy-decode';
import { UPLOAD_LIMITS, type UploadKind } from '../../../shared/schemas/uploads';
import { AppError } from '../../lib/app-error';

export type UploadMime = (typeof UPLOAD_LIMITS.mimeTypes)[number];

export interface InspectedUpload {
  mime: UploadMime;
  width: number;
  height: number;
}

/** Limits of inspecting and decoding an upload (server/config.ts). */
export interface UploadLimits {
  /** Most pixels per side. */
  maxSide: number;
  /** Most bytes a decode may produce: inflated PNG data, or the RGBA bitmap of a picture. */
  maxDecodedBytes: number;
  /** Most scans (SOS markers) in a JPEG. */
  jpegMaxScans: number;
  /** Longest .npy header, bytes. */
  npyMaxHeaderBytes: number;
}

/** A PNG as its chunks describe it (PNG spec §11.2.2): the header fields and the zlib stream of its IDAT chunks. */
export interface PngStructure {
  width: number;
  height: number;
  bitDepth: number;
  colourType: number;
  interlaced: boolean;
  /** Samples per pixel × bit depth. */
  bitsPerPixel: number;
  /** Exact size of the inflated image data: filter bytes and scanlines of every pass. */
  rawBytes: number;
  /** The IDAT chunks' data, in order. */
  idat: Buffer[];
}

const PNG_SIGNATURE = [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a];
const NPY_MAGIC = [0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59];
const MIB = 1024 * 1024;

const startsWith = (bytes: Buffer, magic: number[]) => bytes.length >= magic.length && magic.every((b, i) => bytes[i] === b);

const ACCEPTED: Record<UploadKind, { mimes: UploadMime[]; text: string }> = {
  image: { mimes: ['image/png', 'image/jpeg'], text: 'PNG or JPEG' },
  'phase-map': { mimes: ['application/x-npy', 'image/png', 'image/jpeg'], text: 'NumPy .npy, PNG or JPEG' },
};

/** File-name extension of a stored type. */
export const EXTENSIONS: Record<UploadMime, string> = { 'image/png': 'png', 'image/jpeg': 'jpg', 'application/x-npy': 'npy' };

export const broken = (what: string) =>
  new AppError(400, `The file is damaged or incomplete: ${what}. Export it again and upload the new file.`, { file: what });

const mib = (bytes: number) => `${Number((bytes / MIB).toFixed(1))} MiB`;

function sniff(bytes: Buffer): UploadMime | null {
  if (startsWith(bytes, PNG_SIGNATURE)) return 'image/png';
  if (bytes.length >= 3 && bytes[0] === 0xff && bytes[1] === 0xd8 && bytes[2] === 0xff) return 'image/jpeg';
  if (startsWith(bytes, NPY_MAGIC)) return 'application/x-npy';
  return null;
}

/** Samples per pixel and the name of each PNG colour type (PNG spec §11.2.2, table 11.1), with the bit depths allowed. */
const PNG_COLOUR: Record<number, { channels: number; name: string; depths: number[] }> = {
  0: { channels: 1, name: 'grey', depths: [1, 2, 4, 8, 16] },
  2: { channels: 3, name: 'RGB', depths: [8, 16] },
  3: { channels: 1, name: 'palette', depths: [1, 2, 4, 8] },
  4: { channels: 2, name: 'grey + alpha', depths: [8, 16] },
  6: { channels: 4, name: 'RGBA', depths: [8, 16] },
};

/** Adam7 passes: first column, first row, column step, row step (PNG spec §8.2). */
const ADAM7 = [
  [0, 0, 8, 8],
  [4, 0, 8, 8],
  [0, 4, 4, 8],
  [2, 0, 4, 4],
  [0, 2, 2, 4],
  [1, 0, 2, 2],
  [0, 1, 1, 2],
] as const;

/** The reduced images of a PNG: the image itself, or the seven Adam7 passes, empty ones left out (PNG spec §8.2). */
export function pngPasses(width: number, height: number, interlaced: boolean): { columns: number; rows: number }[] {
  if (!interlaced) return [{ columns: width, rows: height }];
  return ADAM7.map(([x0, y0, dx, dy]) => ({ columns: Math.max(0, Math.ceil((width - x0) / dx)), rows: Math.max(0, Math.ceil((height - y0) / dy)) })).filter(
    (p) => p.columns > 0 && p.rows > 0,
  );
}

/**
 * Bytes of a PNG's image data once inflated: per (reduced) image, rows × (1 filter byte + ⌈columns · bits per
 * pixel / 8⌉); an interlaced image is seven reduced images, empty passes taking no bytes (PNG spec §7.2, §8.2).
 * Example: pngRawBytes(1, 1, 8, true) → 2 (only pass 1 holds the pixel); pngRawBytes(4096, 4096, 64, false) → 134 221 824.
 */
export function pngRawBytes(width: number, height: number, bitsPerPixel: number, interlaced: boolean): number {
  return pngPasses(width, height, interlaced).reduce((sum, p) => sum + p.rows * (1 + Math.ceil((p.columns * bitsPerPixel) / 8)), 0);
}

/**
 * Walks a PNG's chunks (PNG spec §5.3): each length within the file, each CRC right, IHDR first with a valid
 * colour type and bit depth, PLTE before the image data of a palette image, the IDAT chunks, IEND last. Checks
 * the pixel size and the decode budget from the header before collecting any image data.
 */
export function pngStructure(bytes: Buffer, limits: UploadLimits): PngStructure {
  if (bytes.length < 33) throw broken('the PNG ends inside its header');
  if (bytes.readUInt32BE(8) !== 13 || bytes.toString('latin1', 12, 16) !== 'IHDR') throw broken('the PNG does not start with an IHDR header chunk');
  if (crc32(bytes.subarray(12, 29)) !== bytes.readUInt32BE(29)) throw broken('the PNG header checksum does not match');
  const width = bytes.readUInt32BE(16);
  const height = bytes.readUInt32BE(20);
  const [bitDepth, colourType, compression, filter, interlace] = bytes.subarray(24, 29);
  const colour = PNG_COLOUR[colourType];
  if (!colour || !colour.depths.includes(bitDepth) || compression !== 0 || filter !== 0 || interlace > 1) {
    throw broken(`the PNG header has an impossible format (colour type ${colourType}, bit depth ${bitDepth})`);
  }
  checkSide(width, height, limits);
  const interlaced = interlace === 1;
  const bitsPerPixel = colour.channels * bitDepth;
  const rawBytes = pngRawBytes(width, height, bitsPerPixel, interlaced);
  const decoded = Math.max(rawBytes, width * height * 4);
  if (decoded > limits.maxDecodedBytes) {
    throw new AppError(
      413,
      `The PNG would decode to ${mib(decoded)} of pixel data (${width}×${height}, ${colour.name}, ${bitDepth} bits per sample${interlaced ? ', interlaced' : ''}); at most ${mib(limits.maxDecodedBytes)} is decoded. Save it with 8 bits per sample, as grey, or with fewer pixels.`,
      { file: 'too much pixel data' },
    );
  }
  const idat: Buffer[] = [];
  let palette = false;
  let ended = false;
  let at = 33;
  while (at < bytes.length && !ended) {
    if (at + 12 > bytes.length) throw broken('the PNG ends inside a chunk header');
    const length = bytes.readUInt32BE(at);
    const type = bytes.toString('latin1', at + 4, at + 8);
    if (length > 0x7fffffff || at + 12 + length > bytes.length) throw broken(`the PNG ends inside its ${/^[A-Za-z]{4}$/.test(type) ? type : 'last'} chunk`);
    if (crc32(bytes.subarray(at + 4, at + 8 + length)) !== bytes.readUInt32BE(at + 8 + length)) throw broken(`a PNG ${type} chunk checksum does not match`);
    if (type === 'IDAT') {
      if (colourType === 3 && !palette) throw broken('the palette PNG has no palette (PLTE) before its image data');
      idat.push(bytes.subarray(at + 8, at + 8 + length));
    } else if (type === 'PLTE') palette = true;
    else if (type === 'IEND') ended = true;
    else if (type === 'IHDR') throw broken('the PNG has a second header chunk');
    at += 12 + length;
  }
  if (!ended) throw broken('the PNG has no end chunk (IEND)');
  if (idat.length === 0) throw broken('the PNG has no image data (IDAT)');
  return { width, height, bitDepth, colourType, interlaced, bitsPerPixel, rawBytes, idat };
}

/** A JPEG decode may use this many times the decode budget: it keeps every component's coefficients besides the picture. */
export const JPEG_MEMORY_FACTOR = 2;

/**
 * Bytes a JPEG decode holds at once (jpeg-js, the decoder behind Jimp): the RGBA picture (4 bytes per pixel) and,
 * per component, 256 bytes per 8×8 block of coefficients, blocks padded to whole MCUs (ITU-T T.81 §A.2).
 * Example: jpegDecodeBytes(4096, 4096, [{ h: 1, v: 1 }]) → 128 MiB (64 MiB picture + 64 MiB coefficients).
 */
export function jpegDecodeBytes(width: number, height: number, sampling: { h: number; v: number }[]): number {
  const hMax = Math.max(1, ...sampling.map((c) => c.h));
  const vMax = Math.max(1, ...sampling.map((c) => c.v));
  const mcusPerLine = Math.ceil(width / (8 * hMax));
  const mcusPerColumn = Math.ceil(height / (8 * vMax));
  return width * height * 4 + sampling.reduce((sum, c) => sum + mcusPerLine * Math.max(1, c.h) * mcusPerColumn * Math.max(1, c.v) * 256, 0);
}

/**
 * JPEG: walks every marker segment (ITU-T T.81 §B.1.1.4) and the entropy-coded data after each start-of-scan
 * (SOS), to the end-of-image marker (EOI), counting the scans: a progressive file past `jpegMaxScans` is
 * refused before any decode (each scan makes a decoder walk the whole coefficient plane). The first
 * start-of-frame (SOF0…SOF15 except DHT C4, JPG C8 and DAC CC) gives precision, height, width (§B.2.2).
 */
function jpegSize(bytes: Buffer, limits: UploadLimits): { width: number; height: number } {
  let frame: { width: number; height: number } | null = null;
  let scans = 0;
  let at = 2;
  while (at < bytes.length) {
    if (bytes[at] !== 0xff) throw broken('the JPEG marker structure is broken');
    while (at < bytes.length && bytes[at] === 0xff) at++;
    if (at >= bytes.length) break;
    const marker = bytes[at++];
    if (marker === 0x01 || (marker >= 0xd0 && marker <= 0xd7)) continue;
    if (marker === 0xd9) {
      if (!frame) throw broken('the JPEG has no frame header');
      if (scans === 0) throw broken('the JPEG has no image data');
      return frame;
    }
    if (at + 2 > bytes.length) break;
    const length = bytes.readUInt16BE(at);
    if (length < 2) throw broken('the JPEG has a segment of impossible length');
    if (at + length > bytes.length) break;
    const isFrame = marker >= 0xc0 && marker <= 0xcf && marker !== 0xc4 && marker !== 0xc8 && marker !== 0xcc;
    if (isFrame && !frame) {
      const components = length >= 8 ? bytes[at + 7] : 0;
      if (components === 0 || length < 8 + 3 * components) throw broken('the JPEG frame header is too short');
      frame = { height: bytes.readUInt16BE(at + 3), width: bytes.readUInt16BE(at + 5) };
      checkSide(frame.width, frame.height, limits);
      const sampling = Array.from({ length: components }, (_, c) => ({ h: bytes[at + 9 + 3 * c] >> 4, v: bytes[at + 9 + 3 * c] & 15 }));
      const needed = jpegDecodeBytes(frame.width, frame.height, sampling);
      if (needed > JPEG_MEMORY_FACTOR * limits.maxDecodedBytes) {
        throw new AppError(
          413,
          `The JPEG (${frame.width}×${frame.height}, ${components} colour component${components === 1 ? '' : 's'}) would need ${mib(needed)} to decode; at most ${mib(JPEG_MEMORY_FACTOR * limits.maxDecodedBytes)} is used. Save it with fewer pixels, with colour subsampling (4:2:0), or as PNG.`,
          { file: 'too much pixel data' },
        );
      }
    }
    at += length;
    if (marker !== 0xda) continue;
    if (!frame) throw broken('the JPEG has no frame header before its image data');
    if (++scans > limits.jpegMaxScans) {
      throw new AppError(
        400,
        `The JPEG has more than ${limits.jpegMaxScans} scans (progressive passes); ordinary progressive files have about 10. Save it again as a baseline JPEG or as PNG.`,
        { file: 'too many scans' },
      );
    }
    // Entropy-coded data: runs to the next marker that is neither a stuffed 0xFF00 nor a restart marker.
    for (;;) {
      at = bytes.indexOf(0xff, at);
      if (at < 0 || at + 1 >= bytes.length) throw broken('the JPEG ends inside its image data');
      const next = bytes[at + 1];
      if (next === 0x00 || (next >= 0xd0 && next <= 0xd7) || next === 0xff) at += next === 0xff ? 1 : 2;
      else break;
    }
  }
  throw broken(frame ? 'the JPEG ends before its end marker (EOI)' : 'the JPEG ends before its frame header');
}

/** .npy (NEP 1): the header read and checked against the bytes present by readNpyHeader; a phase map is 2-D. */
function npySize(bytes: Buffer, limits: UploadLimits): { width: number; height: number } {
  let header;
  try {
    header = readNpyHeader(bytes, { maxHeaderBytes: limits.npyMaxHeaderBytes });
  } catch (error) {
    if (!(error instanceof RangeError)) throw error;
    const text = error.message.replace(/^npy: /, '');
    if (/not a plain number type/.test(text)) {
      throw new AppError(400, `The .npy array's ${text}; a phase map needs plain numbers (float32/64, int or uint)`, { file: 'unsupported dtype' });
    }
    if (/^the header is \d+ bytes long/.test(text)) {
      throw new AppError(400, `The .npy ${text.replace(/^the /, '')}. Save the array again with numpy.save.`, { file: 'header too long' });
    }
    if (/^data holds/.test(text)) throw broken(`the .npy data is shorter than its shape needs (${text})`);
    throw broken(`the .npy file cannot be read: ${text}`);
  }
  if (header.shape.length !== 2) {
    throw new AppError(400, `A phase map must be a 2-D array (rows, columns); this .npy has shape (${header.shape.join(', ')})`, { file: 'not 2-D' });
  }
  const [height, width] = header.shape;
  return { width, height };
}

function checkSide(width: number, height: number, limits: UploadLimits) {
  if (width === 0 || height === 0) {
    throw new AppError(400, `The file declares ${width}×${height} pixels; it must have at least one pixel`, { file: 'empty picture' });
  }
  if (width > limits.maxSide || height > limits.maxSide) {
    throw new AppError(400, `The file declares ${width}×${height} pixels; at most ${limits.maxSide} per side is accepted. Scale it down and upload again.`, {
      file: 'too many pixels',
    });
  }
}

/**
 * Type and pixel size of an upload of `kind`, from its structure only (no decoding). Throws AppError 400
 * (empty, damaged, too many pixels or scans), 413 (would decode past the budget) or 415 (not a type the kind
 * accepts). Example: a 64×32 PNG uploaded as 'image' → { mime: 'image/png', width: 64, height: 32 }.
 */
export function inspectUpload(bytes: Buffer, kind: UploadKind, limits: UploadLimits): InspectedUpload {
  const { mime, width, height } = inspectUploadStructure(bytes, kind, limits);
  return { mime, width, height };
}

/** inspectUpload, with the chunk structure of a PNG (null for other types) so that its decode does not walk the chunks again. */
export function inspectUploadStructure(bytes: Buffer, kind: UploadKind, limits: UploadLimits): InspectedUpload & { png: PngStructure | null } {
  if (bytes.length === 0) throw new AppError(400, 'The file is empty', { file: 'empty' });
  const mime = sniff(bytes);
  const accepted = ACCEPTED[kind];
  if (!mime || !accepted.mimes.includes(mime)) {
    const found = mime ? `a ${mime === 'application/x-npy' ? 'NumPy .npy file' : mime.slice(6).toUpperCase() + ' picture'}` : 'of a type we do not read';
    throw new AppError(415, `This file is ${found}; ${kind === 'image' ? 'an image' : 'a phase map'} must be ${accepted.text}`, { file: `must be ${accepted.text}` });
  }
  const png = mime === 'image/png' ? pngStructure(bytes, limits) : null;
  const size = png ?? (mime === 'image/jpeg' ? jpegSize(bytes, limits) : npySize(bytes, limits));
  checkSide(size.width, size.height, limits);
  return { mime, width: size.width, height: size.height, png };
}
