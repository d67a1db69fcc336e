/**
 * The full check of an upload: inspect its structure against the limits (upload-inspect.ts), then decode it
 * once, so that only a file that really decodes is kept. A PNG's image data is inflated with its exact size
 * as the output cap and its scanlines checked (decodePng); a JPEG is decoded by jpeg-js (through Jimp) with
 * its memory bounded; a .npy by decodeNpy, with every value finite. Runs on the input worker (input-worker.ts) under its time and heap limits.
 */
import { createHash } from 'node:crypto';
import { inflateSync } from 'node:zlib';
import { decodeNpy } from '../../../shared/optics/npy-decode';
import type { UploadKind } from '../../../shared/schemas/uploads';
import { AppError } from '../../lib/app-error';
import { broken, inspectUploadStructure, JPEG_MEMORY_FACTOR, pngPasses, type InspectedUpload, type PngStructure, type UploadLimits } from './upload-inspect';

const MIB = 1024 * 1024;

/**
 * Decodes a PNG's image data as far as it can fail: the zlib stream inflated with its exact size as the cap
 * (a stream that inflates further is refused at the first byte past it, so a bomb never expands), then every
 * scanline's filter type checked (0…4, PNG spec §9.2) in every pass. Undoing the filters cannot fail, so a PNG
 * that passes decodes; nothing larger than the inflated data is ever allocated.
 */
function decodePng(png: PngStructure): void {
  let inflated: Buffer;
  try {
    inflated = inflateSync(Buffer.concat(png.idat), { maxOutputLength: png.rawBytes });
  } catch (error) {
    if ((error as { code?: string }).code === 'ERR_BUFFER_TOO_LARGE') {
      throw new AppError(
        400,
        `The PNG's image data inflates to more than the ${png.rawBytes} bytes its header declares (${png.width}×${png.height}${png.interlaced ? ', interlaced' : ''}); the file is damaged or made to exhaust memory. Export it again.`,
        { file: 'image data too long' },
      );
    }
    throw broken('the PNG image data is not a valid zlib stream');
  }
  if (inflated.length !== png.rawBytes) throw broken(`the PNG image data holds ${inflated.length} of the ${png.rawBytes} bytes its header declares`);
  let at = 0;
  for (const { columns, rows } of pngPasses(png.width, png.height, png.interlaced)) {
    const stride = 1 + Math.ceil((columns * png.bitsPerPixel) / 8);
    for (let r = 0; r < rows; r++, at += stride) {
      if (inflated[at] > 4) throw broken(`a PNG scanline has the unknown filter type ${inflated[at]}`);
    }
  }
}

async function decodePicture(bytes: Buffer, png: PngStructure | null, limits: UploadLimits): Promise<{ width: number; height: number }> {
  if (png) {
    decodePng(png);
    return png;
  }
  const { Jimp } = await import('jimp');
  const picture = await Jimp.fromBuffer(bytes, {
    'image/jpeg': { maxMemoryUsageInMB: Math.ceil((1.5 * JPEG_MEMORY_FACTOR * limits.maxDecodedBytes) / MIB), maxResolutionInMP: (limits.maxSide * limits.maxSide) / 1e6 },
  });
  return picture.bitmap;
}

/** An upload that decodes: its type, size and SHA-256 (hex). */
export interface CheckedUpload extends InspectedUpload {
  sha256: string;
}

/**
 * Inspects and decodes an upload of `kind`; returns its type, size and SHA-256. Throws AppError (4xx) naming the
 * problem. Example: checkUpload(a 64×32 PNG, 'image', limits) → { mime: 'image/png', width: 64, height: 32, sha256: '…' }.
 */
export async function checkUpload(bytes: Buffer, kind: UploadKind, limits: UploadLimits): Promise<CheckedUpload> {
  const { png, ...inspected } = inspectUploadStructure(bytes, kind, limits);
  try {
    if (inspected.mime === 'application/x-npy') {
      const decoded = decodeNpy(new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength), { maxHeaderBytes: limits.npyMaxHeaderBytes });
      if (decoded.data.some((v) => !Number.isFinite(v))) {
        throw new AppError(400, 'The phase map holds values that are not finite numbers (NaN or infinity)', { file: 'non-finite values' });
      }
      return { ...inspected, sha256: sha256(bytes) };
    }
    const picture = await decodePicture(bytes, png, limits);
    if (picture.width !== inspected.width || picture.height !== inspected.height) throw new Error('decoded size differs from the header');
  } catch (error) {
    if (error instanceof AppError) throw error;
    throw new AppError(400, 'The file is damaged or incomplete: it could not be decoded. Export it again and upload the new file.', { file: 'cannot be decoded' });
  }
  return { ...inspected, sha256: sha256(bytes) };
}

const sha256 = (bytes: Buffer) => createHash('sha256').update(bytes).digest('hex');
