/**
 * PNG files of the previews and the pictures of image holograms. PNG goes through pngjs (jimp's own PNG
 * codec, loaded in ~25 ms where jimp takes ~0.6 s); other formats (JPEG) through jimp, loaded on first use.
 * Previews: RGB without alpha, zlib level 6 and the 'up' row filter: measured here about 3× faster than
 * level 9 with the adaptive filter for 1024² previews, at a few percent larger files.
 */
import { readFile, writeFile } from 'node:fs/promises';
import { PNG } from 'pngjs';
import type { RgbaImage } from '../../shared/optics/colormap';

async function loadJimp() {
  return (await import('jimp')).Jimp;
}

const PNG_OPTIONS = { deflateLevel: 6, filterType: 2, colorType: 2, inputHasAlpha: true } as const;
const PNG_SIGNATURE = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);

/** Encodes an RGBA picture as PNG bytes. Example: a 1×1 picture → a valid 1×1 PNG. */
export async function encodePng(image: RgbaImage): Promise<Buffer> {
  const data = Buffer.from(image.data.buffer, image.data.byteOffset, image.data.byteLength);
  return PNG.sync.write({ width: image.width, height: image.height, data } as PNG, PNG_OPTIONS);
}

/** Writes an RGBA picture as a PNG file; returns its size in bytes. */
export async function writePng(path: string, image: RgbaImage): Promise<number> {
  const bytes = await encodePng(image);
  await writeFile(path, bytes);
  return bytes.length;
}

/** Reads a PNG or JPEG file as 8-bit grayscale: luma 0.299 R + 0.587 G + 0.114 B (ITU-R BT.601), times alpha. */
export async function readGrayImage(path: string): Promise<{ width: number; height: number; pixels: Uint8Array }> {
  const bytes = await readFile(path);
  const { width, height, data } = bytes.subarray(0, 8).equals(PNG_SIGNATURE) ? PNG.sync.read(bytes) : (await (await loadJimp()).read(bytes)).bitmap;
  const pixels = new Uint8Array(width * height);
  for (let i = 0; i < pixels.length; i++) {
    const luma = 0.299 * data[4 * i] + 0.587 * data[4 * i + 1] + 0.114 * data[4 * i + 2];
    pixels[i] = Math.round((luma * data[4 * i + 3]) / 255);
  }
  return { width, height, pixels };
}
