/**
 * Hostile and broken inputs, made in code (nothing large is committed): floods, decompression bombs, headers
 * that make naive parsers backtrack, files that claim more than they hold, truncated and mislabelled files.
 * Each maker is deterministic and cheap: the bombs are built from repeated deflate blocks, not by compressing
 * gigabytes.
 */
import { crc32, deflateRawSync, constants as zlibConstants } from 'node:zlib';
import { ATOM_CSV_COLUMNS } from '../../shared/optics/atoms';
import { encodeNpy } from '../../shared/optics/npy';

const MIB = 1024 * 1024;
const PNG_SIGNATURE = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);

/** The atom-library flood of issue 10: the documented header, a wavelength line and 100 000 lines holding `x`. */
export function csvFlood(lines = 100_000): Buffer {
  return Buffer.from(`${ATOM_CSV_COLUMNS.join(',')}\n# design_wavelength_nm: 633\n${'x\n'.repeat(lines)}`);
}

/** A PNG chunk with its CRC (PNG spec §5.3). */
export function pngChunk(type: string, data: Buffer): Buffer {
  const head = Buffer.alloc(8);
  head.writeUInt32BE(data.length, 0);
  head.write(type, 4, 'latin1');
  const crc = Buffer.alloc(4);
  crc.writeUInt32BE(crc32(Buffer.concat([head.subarray(4), data])), 0);
  return Buffer.concat([head, data, crc]);
}

/**
 * A zlib stream (RFC 1950) that inflates to `bytes` zero bytes, made without compressing them: one raw-deflate
 * block sequence for 1 MiB of zeros, flushed to a byte boundary and not final, is repeated (its back-references
 * only ever reach zeros), then one for the rest, an empty final block and the Adler-32 of the zeros (a = 1,
 * b = count mod 65521). Example: zeroZlib(1 GiB) is ≈ 1 MB long.
 */
export function zeroZlib(bytes: number): Buffer {
  const zeros = (n: number) => deflateRawSync(Buffer.alloc(n), { level: 9, finishFlush: zlibConstants.Z_SYNC_FLUSH });
  const whole = Math.floor(bytes / MIB);
  const rest = bytes - whole * MIB;
  const adler = Buffer.alloc(4);
  adler.writeUInt32BE(((bytes % 65521) * 65536 + 1) >>> 0, 0);
  const blocks = new Array<Buffer>(whole).fill(whole > 0 ? zeros(MIB) : Buffer.alloc(0));
  return Buffer.concat([Buffer.from([0x78, 0xda]), ...blocks, rest > 0 ? zeros(rest) : Buffer.alloc(0), Buffer.from([0x03, 0x00]), adler]);
}

/** A PNG with the given IHDR fields and IDAT holding `idat` (PNG spec §11.2.2). */
export function pngWith(ihdr: { width: number; height: number; bitDepth: number; colourType: number; interlace: 0 | 1 }, idat: Buffer, extra: Buffer[] = []): Buffer {
  const head = Buffer.alloc(13);
  head.writeUInt32BE(ihdr.width, 0);
  head.writeUInt32BE(ihdr.height, 4);
  head[8] = ihdr.bitDepth;
  head[9] = ihdr.colourType;
  head[12] = ihdr.interlace;
  return Buffer.concat([PNG_SIGNATURE, pngChunk('IHDR', head), ...extra, pngChunk('IDAT', idat), pngChunk('IEND', Buffer.alloc(0))]);
}

/** 1×1 grey, Adam7-interlaced (2 bytes of image data), whose IDAT inflates to 1.1 GiB of zeros. */
export function interlacedPngBomb(): Buffer {
  return pngWith({ width: 1, height: 1, bitDepth: 8, colourType: 0, interlace: 1 }, zeroZlib(1100 * MIB));
}

/** 4096×4096 RGBA at 16 bits per sample: a valid black picture of 4096 · (1 + 4096 · 8) = 128 MiB of pixel data. */
export function big16BitPng(): Buffer {
  return pngWith({ width: 4096, height: 4096, bitDepth: 16, colourType: 6, interlace: 0 }, zeroZlib(4096 * (1 + 4096 * 8)));
}

/** A .npy file (format 2.0) with a raw header text; the data bytes follow. */
export function npyWithHeader(header: string, data = Buffer.alloc(0)): Buffer {
  const text = Buffer.from(header, 'latin1');
  const head = Buffer.from([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, 2, 0, 0, 0, 0, 0]);
  head.writeUInt32LE(text.length, 8);
  return Buffer.concat([head, text, data]);
}

/**
 * A .npy whose header repeats `'shape':(` until it is `length` bytes long: a backtracking pattern such as
 * /'shape'\s*:\s*\(([^)]*)\)/ costs O(length²) on it. 16 MiB − 1 KiB keeps the file under the upload limit.
 */
export function npyBacktrackingHeader(length = 16 * MIB - 1024): Buffer {
  const start = "{'descr': '<f8', 'fortran_order': False, ";
  const unit = "'shape':(";
  return npyWithHeader(start + unit.repeat(Math.floor((length - start.length) / unit.length)));
}

/** A .npy that declares 4096×4096 float64 values (128 MiB) and holds 16 bytes of them. */
export function npyShortData(): Buffer {
  return npyWithHeader("{'descr': '<f8', 'fortran_order': False, 'shape': (4096, 4096), }\n", Buffer.alloc(16));
}

/** A 3×4 float64 phase map stored column by column (fortran_order: True); `values` in C order. */
export function npyFortran(values: number[] = Array.from({ length: 12 }, (_, i) => i * 0.25)): Buffer {
  const data = Buffer.alloc(8 * 12);
  for (let r = 0; r < 3; r++) for (let c = 0; c < 4; c++) data.writeDoubleLE(values[r * 4 + c], 8 * (c * 3 + r));
  return npyWithHeader("{'descr': '<f8', 'fortran_order': True, 'shape': (3, 4), }\n", data);
}

/** A JPEG segment: marker, length, payload (ITU-T T.81 §B.1.1.4). */
function segment(marker: number, payload: Buffer): Buffer {
  const head = Buffer.from([0xff, marker, 0, 0]);
  head.writeUInt16BE(payload.length + 2, 2);
  return Buffer.concat([head, payload]);
}

/**
 * A progressive (SOF2) 4096×4096 grey JPEG with `scans` DC scans, each a few bytes of entropy-coded data: a
 * decoder walks the whole coefficient plane once per scan.
 */
export function progressiveJpegManyScans(scans = 3000): Buffer {
  const dqt = segment(0xdb, Buffer.concat([Buffer.from([0x00]), Buffer.alloc(64, 1)]));
  const sof2 = segment(0xc2, Buffer.from([8, 0x10, 0x00, 0x10, 0x00, 1, 1, 0x11, 0]));
  const counts = Buffer.alloc(16);
  counts[0] = 1;
  const dht = segment(0xc4, Buffer.concat([Buffer.from([0x00]), counts, Buffer.from([0])]));
  const sos = segment(0xda, Buffer.from([1, 1, 0x00, 0, 0, 0]));
  const scan = Buffer.concat([sos, Buffer.alloc(8)]);
  return Buffer.concat([Buffer.from([0xff, 0xd8]), dqt, sof2, dht, ...new Array<Buffer>(scans).fill(scan), Buffer.from([0xff, 0xd9])]);
}

/**
 * A baseline JPEG that declares a 4096×4096 colour picture without subsampling (4:4:4) and holds one short scan:
 * a decoder would need 256 MiB for it.
 */
export function bigColourJpeg(): Buffer {
  const sof0 = segment(0xc0, Buffer.from([8, 0x10, 0x00, 0x10, 0x00, 3, 1, 0x11, 0, 2, 0x11, 0, 3, 0x11, 0]));
  const sos = segment(0xda, Buffer.from([3, 1, 0x00, 2, 0x00, 3, 0x00, 0, 63, 0]));
  return Buffer.concat([Buffer.from([0xff, 0xd8]), sof0, sos, Buffer.alloc(8), Buffer.from([0xff, 0xd9])]);
}

/** A small valid 16×16 grey PNG (filter 0, zeros), for truncation. */
export function smallPng(): Buffer {
  return pngWith({ width: 16, height: 16, bitDepth: 8, colourType: 0, interlace: 0 }, zeroZlib(16 * 17));
}

/** A small valid phase map, for truncation. */
export function smallNpy(): Buffer {
  return Buffer.from(encodeNpy(new Float64Array(64).fill(0.5), [8, 8]));
}

/** `{"name": [[[…]]]}` nested `depth` deep (about 2·depth bytes). */
export function deepJson(depth = 100_000, key = 'name'): string {
  return `{"${key}": ${'['.repeat(depth)}${']'.repeat(depth)}}`;
}

/** Text that must be stored and shown exactly as typed: markup, SQL, quotes, non-Latin scripts, emoji. */
export const VERBATIM_TEXTS = [
  `<script>alert("x")</script><img src=x onerror=alert(1)>`,
  `Robert'); DROP TABLE users; -- " OR 1=1 #`,
  'Фазовая маска — 偏振复用超表面 — مرشح الاستقطاب — 🌈🔬',
] as const;

/** `n` characters of four-byte UTF-8 (astral plane), the widest a column can be asked to hold. */
export function longAstralText(n: number): string {
  return '𝛌'.repeat(n);
}
