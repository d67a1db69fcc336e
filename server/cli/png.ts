/**
 * PNG files of the previews, encoded with jimp (pngjs inside). RGB without alpha, zlib level 6 and the
 * 'up' row filter: measured here about 3× faster than jimp's defaults (level 9, adaptive filter) for
 * 1024² previews, at a few percent larger files.
 */
import { writeFile } from 'node:fs/promises';
import type { RgbaImage } from '../../shared/optics/colormap';

/** jimp is loaded on first use: it takes about 0.5 s to load, and a run that paints on a worker never needs it here. */
async function loadJimp() {
  return (await import('jimp')).Jimp;
}

const PNG_OPTIONS = { deflateLevel: 6, filterType: 2, colorType: 2, inputHasAlpha: true } as const;

/** Encodes an RGBA picture as PNG bytes. Example: a 1×1 picture → a valid 1×1 PNG. */
export async function encodePng(image: RgbaImage): Promise<Buffer> {
  const Jimp = await loadJimp();
  const picture = new Jimp({ width: image.width, height: image.height });
  picture.bitmap.data.set(image.data);
  return picture.getBuffer('image/png', PNG_OPTIONS);
}

/** Writes an RGBA picture as a PNG file; returns its size in bytes. */
export async function writePng(path: string, image: RgbaImage): Promise<number> {
  const bytes = await encodePng(image);
  await writeFile(path, bytes);
  return bytes.length;
}

/** Reads a PNG or JPEG file as 8-bit grayscale: luma 0.299 R + 0.587 G + 0.114 B (ITU-R BT.601), times alpha. */
export async function readGrayImage(path: string): Promise<{ width: number; height: number; pixels: Uint8Array }> {
  const Jimp = await loadJimp();
  const picture = await Jimp.read(path);
  const { width, height, data } = picture.bitmap;
  const pixels = new Uint8Array(width * height);
  for (let i = 0; i < pixels.length; i++) {
    const luma = 0.299 * data[4 * i] + 0.587 * data[4 * i + 1] + 0.114 * data[4 * i + 2];
    pixels[i] = Math.round((luma * data[4 * i + 3]) / 255);
  }
  return { width, height, pixels };
}
