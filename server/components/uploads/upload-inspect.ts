/**
 * What an uploaded file really is, read from its first bytes before anything decodes it: the type from the
 * magic bytes (PNG, JPEG, NumPy .npy — the declared type and the file name are not trusted) and the pixel
 * size from the header (PNG IHDR, JPEG start-of-frame marker, .npy shape). A file that claims an enormous
 * size is refused here, so a decompression bomb is never expanded.
 */
import { crc32 } from 'node:zlib';
import { AppError } from '../../lib/app-error';
import { UPLOAD_LIMITS, type UploadKind } from '../../../shared/schemas/uploads';

export type UploadMime = (typeof UPLOAD_LIMITS.mimeTypes)[number];

export interface InspectedUpload {
  mime: UploadMime;
  width: number;
  height: number;
}

const PNG_SIGNATURE = [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a];
const NPY_MAGIC = [0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59];

const startsWith = (bytes: Buffer, magic: number[]) => bytes.length >= magic.length && magic.every((b, i) => bytes[i] === b);

const ACCEPTED: Record<UploadKind, { mimes: UploadMime[]; text: string }> = {
  image: { mimes: ['image/png', 'image/jpeg'], text: 'PNG or JPEG' },
  'phase-map': { mimes: ['application/x-npy', 'image/png', 'image/jpeg'], text: 'NumPy .npy, PNG or JPEG' },
};

/** File-name extension of a stored type. */
export const EXTENSIONS: Record<UploadMime, string> = { 'image/png': 'png', 'image/jpeg': 'jpg', 'application/x-npy': 'npy' };

const broken = (what: string) => new AppError(400, `The file is damaged or incomplete: ${what}. Export it again and upload the new file.`, { file: what });

function sniff(bytes: Buffer): UploadMime | null {
  if (startsWith(bytes, PNG_SIGNATURE)) return 'image/png';
  if (bytes.length >= 3 && bytes[0] === 0xff && bytes[1] === 0xd8 && bytes[2] === 0xff) return 'image/jpeg';
  if (startsWith(bytes, NPY_MAGIC)) return 'application/x-npy';
  return null;
}

/** PNG: the IHDR chunk must come first (PNG spec §5.6); width and height are its first two uint32 (big-endian). */
function pngSize(bytes: Buffer): { width: number; height: number } {
  if (bytes.length < 33) throw broken('the PNG ends inside its header');
  const length = bytes.readUInt32BE(8);
  const type = bytes.toString('latin1', 12, 16);
  if (type !== 'IHDR' || length !== 13) throw broken('the PNG does not start with an IHDR header chunk');
  const crc = bytes.readUInt32BE(29);
  if (crc32(bytes.subarray(12, 29)) !== crc) throw broken('the PNG header checksum does not match');
  if (bytes.length < 45 || bytes.indexOf('IEND', 33, 'latin1') < 0) throw broken('the PNG has no end chunk (IEND)');
  return { width: bytes.readUInt32BE(16), height: bytes.readUInt32BE(20) };
}

/**
 * JPEG: walks the marker segments after SOI until a start-of-frame marker (SOF0…SOF15 except DHT C4,
 * JPG C8 and DAC CC), whose segment holds precision, height, width (ITU-T T.81 §B.2.2).
 */
function jpegSize(bytes: Buffer): { width: number; height: number } {
  let at = 2;
  while (at < bytes.length) {
    if (bytes[at] !== 0xff) throw broken('the JPEG marker structure is broken');
    while (at < bytes.length && bytes[at] === 0xff) at++;
    if (at >= bytes.length) break;
    const marker = bytes[at++];
    if (marker === 0x01 || (marker >= 0xd0 && marker <= 0xd7)) continue;
    if (marker === 0xd9 || marker === 0xda) throw broken('the JPEG has no frame header before its image data');
    if (at + 2 > bytes.length) break;
    const length = bytes.readUInt16BE(at);
    if (length < 2) throw broken('the JPEG has a segment of impossible length');
    const isFrame = marker >= 0xc0 && marker <= 0xcf && marker !== 0xc4 && marker !== 0xc8 && marker !== 0xcc;
    if (isFrame) {
      if (at + 7 > bytes.length) break;
      if (bytes.length < at + length + 2) throw broken('the JPEG ends right after its frame header');
      return { height: bytes.readUInt16BE(at + 3), width: bytes.readUInt16BE(at + 5) };
    }
    at += length;
  }
  throw broken('the JPEG ends before its frame header');
}

/** Bytes per value of the plain number types decodeNpy reads. */
const NPY_ITEM = /^[<>|=]([fiu])([1248])$/;

/** .npy (NEP 1): magic, version, header length, a dict with descr / fortran_order / shape; the data follows. */
function npySize(bytes: Buffer): { width: number; height: number } {
  if (bytes.length < 10) throw broken('the .npy file ends inside its header');
  const major = bytes[6];
  if (major !== 1 && major !== 2 && major !== 3) throw broken(`the .npy format version ${major} is not known`);
  const headerLength = major === 1 ? bytes.readUInt16LE(8) : bytes.length >= 12 ? bytes.readUInt32LE(8) : Infinity;
  const start = major === 1 ? 10 : 12;
  if (start + headerLength > bytes.length) throw broken('the .npy file ends inside its header');
  const header = bytes.toString('latin1', start, start + headerLength);
  const descr = /'descr'\s*:\s*'([^']+)'/.exec(header)?.[1];
  const shape = /'shape'\s*:\s*\(([^)]*)\)/.exec(header)?.[1];
  if (!descr || shape === undefined) throw broken('the .npy header has no descr or shape');
  const item = NPY_ITEM.exec(descr);
  if (!item) {
    throw new AppError(400, `The .npy array holds '${descr}' values; a phase map needs plain numbers (float32/64, int or uint)`, { file: 'unsupported dtype' });
  }
  const dims = shape
    .split(',')
    .map((s) => s.trim())
    .filter(Boolean)
    .map(Number);
  if (dims.length !== 2 || dims.some((d) => !Number.isInteger(d) || d < 0)) {
    throw new AppError(400, `A phase map must be a 2-D array (rows, columns); this .npy has shape (${shape.trim()})`, { file: 'not 2-D' });
  }
  const [height, width] = dims;
  checkSide(width, height);
  const expected = start + headerLength + height * width * Number(item[2]);
  if (bytes.length < expected) throw broken(`the .npy data is shorter than its shape (${height}, ${width}) needs`);
  return { width, height };
}

function checkSide(width: number, height: number) {
  if (width === 0 || height === 0) {
    throw new AppError(400, `The file declares ${width}×${height} pixels; it must have at least one pixel`, { file: 'empty picture' });
  }
  if (width > UPLOAD_LIMITS.maxSide || height > UPLOAD_LIMITS.maxSide) {
    throw new AppError(
      400,
      `The file declares ${width}×${height} pixels; at most ${UPLOAD_LIMITS.maxSide} per side is accepted. Scale it down and upload again.`,
      { file: 'too many pixels' },
    );
  }
}

/**
 * Type and pixel size of an upload of `kind`, from its bytes only. Throws AppError 400 (empty, damaged,
 * too many pixels) or 415 (not a type the kind accepts).
 * Example: a 64×32 PNG uploaded as 'image' → { mime: 'image/png', width: 64, height: 32 }.
 */
export function inspectUpload(bytes: Buffer, kind: UploadKind): InspectedUpload {
  if (bytes.length === 0) throw new AppError(400, 'The file is empty', { file: 'empty' });
  const mime = sniff(bytes);
  const accepted = ACCEPTED[kind];
  if (!mime || !accepted.mimes.includes(mime)) {
    const found = mime ? `a ${mime === 'application/x-npy' ? 'NumPy .npy file' : mime.slice(6).toUpperCase() + ' picture'}` : 'of a type we do not read';
    throw new AppError(415, `This file is ${found}; ${kind === 'image' ? 'an image' : 'a phase map'} must be ${accepted.text}`, { file: `must be ${accepted.text}` });
  }
  const size = mime === 'image/png' ? pngSize(bytes) : mime === 'image/jpeg' ? jpegSize(bytes) : npySize(bytes);
  checkSide(size.width, size.height);
  return { mime, ...size };
}
