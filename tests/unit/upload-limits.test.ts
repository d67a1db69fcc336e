/**
 * The arithmetic behind the upload limits: the exact inflated size of a PNG's image data (checked against a
 * pixel-by-pixel count over the Adam7 pattern of PNG spec §8.2), the PNG structure walk, and the JSON depth scan.
 */
import { describe, expect, it } from 'vitest';
import { inspectUpload, jpegDecodeBytes, pngRawBytes, type UploadLimits } from '../../server/components/uploads/upload-inspect';
import { jsonDepth } from '../../server/lib/json-depth';
import { mulberry32 } from '../../shared/optics/random';
import { big16BitPng, interlacedPngBomb, pngWith, progressiveJpegManyScans, zeroZlib } from '../support/hostile-corpus';

/** PNG spec §8.2: the pass (1…7) of each pixel of an 8×8 tile. */
const ADAM7_TILE = [
  [1, 6, 4, 6, 2, 6, 4, 6],
  [7, 7, 7, 7, 7, 7, 7, 7],
  [5, 6, 5, 6, 5, 6, 5, 6],
  [7, 7, 7, 7, 7, 7, 7, 7],
  [3, 6, 4, 6, 3, 6, 4, 6],
  [7, 7, 7, 7, 7, 7, 7, 7],
  [5, 6, 5, 6, 5, 6, 5, 6],
  [7, 7, 7, 7, 7, 7, 7, 7],
];

/** Inflated bytes counted pixel by pixel: per pass, the rows it touches × (filter byte + its pixels of a row). */
function countedRawBytes(width: number, height: number, bitsPerPixel: number): number {
  let total = 0;
  for (let pass = 1; pass <= 7; pass++) {
    const columns = new Set<number>();
    const rows = new Set<number>();
    for (let y = 0; y < height; y++) {
      for (let x = 0; x < width; x++) {
        if (ADAM7_TILE[y % 8][x % 8] === pass) {
          columns.add(x);
          rows.add(y);
        }
      }
    }
    if (rows.size > 0) total += rows.size * (1 + Math.ceil((columns.size * bitsPerPixel) / 8));
  }
  return total;
}

const limits: UploadLimits = { maxSide: 4096, maxDecodedBytes: 64 * 1024 * 1024, jpegMaxScans: 100, npyMaxHeaderBytes: 65_536 };

describe('PNG image data size', () => {
  it('matches a pixel-by-pixel count of the Adam7 passes for random sizes and depths', () => {
    const random = mulberry32(10);
    for (let i = 0; i < 200; i++) {
      const width = 1 + Math.floor(random() * 40);
      const height = 1 + Math.floor(random() * 40);
      const bits = [1, 2, 4, 8, 16, 24, 32, 48, 64][Math.floor(random() * 9)];
      expect(pngRawBytes(width, height, bits, true), `${width}×${height}, ${bits} bits`).toBe(countedRawBytes(width, height, bits));
      expect(pngRawBytes(width, height, bits, false)).toBe(height * (1 + Math.ceil((width * bits) / 8)));
    }
    expect(pngRawBytes(1, 1, 8, true)).toBe(2);
    expect(pngRawBytes(4096, 4096, 64, false)).toBe(134_221_824);
  });

  it('inspection refuses what would decode past the budget and passes the bomb to the capped inflate', () => {
    expect(() => inspectUpload(big16BitPng(), 'image', limits)).toThrow(/decode to 128 MiB of pixel data \(4096×4096, RGBA, 16 bits per sample\); at most 64 MiB/);
    // The 1×1 bomb has a valid structure: only inflating it with its 2-byte cap finds it out (upload-decode.ts).
    expect(inspectUpload(interlacedPngBomb(), 'image', limits)).toEqual({ mime: 'image/png', width: 1, height: 1 });
    const palette = pngWith({ width: 4, height: 4, bitDepth: 8, colourType: 3, interlace: 0 }, zeroZlib(4 * 5));
    expect(() => inspectUpload(palette, 'image', limits)).toThrow(/no palette \(PLTE\) before its image data/);
    const impossible = pngWith({ width: 4, height: 4, bitDepth: 16, colourType: 3, interlace: 0 }, zeroZlib(4 * 9));
    expect(() => inspectUpload(impossible, 'image', limits)).toThrow(/impossible format \(colour type 3, bit depth 16\)/);
  });

  it('JPEG decode memory is estimated from the frame header: picture plus coefficients of each component', () => {
    const MIB = 1024 * 1024;
    expect(jpegDecodeBytes(4096, 4096, [{ h: 1, v: 1 }])).toBe(128 * MIB);
    // 4:4:4 colour: three full-size coefficient planes; 4:2:0: luma full size, two chroma planes a quarter each.
    expect(jpegDecodeBytes(4096, 4096, [{ h: 1, v: 1 }, { h: 1, v: 1 }, { h: 1, v: 1 }])).toBe(256 * MIB);
    expect(jpegDecodeBytes(4096, 4096, [{ h: 2, v: 2 }, { h: 1, v: 1 }, { h: 1, v: 1 }])).toBe(160 * MIB);
    // Blocks are padded to whole MCUs: 17×9 pixels in 16×16 MCUs are 2×1 MCUs of 4 luma blocks.
    expect(jpegDecodeBytes(17, 9, [{ h: 2, v: 2 }])).toBe(17 * 9 * 4 + 2 * 2 * 1 * 2 * 256);
  });

  it('JPEG scans are counted while walking the segments', () => {
    expect(() => inspectUpload(progressiveJpegManyScans(101), 'image', limits)).toThrow(/more than 100 scans/);
    expect(inspectUpload(progressiveJpegManyScans(100), 'image', limits)).toEqual({ mime: 'image/jpeg', width: 4096, height: 4096 });
  });
});

describe('JSON depth', () => {
  it('counts objects and arrays, not brackets inside strings', () => {
    const depth = (text: string, limit?: number) => jsonDepth(Buffer.from(text), limit);
    expect(depth('{"a":[1,[2]]}')).toBe(3);
    expect(depth('"[[[[["')).toBe(0);
    expect(depth('{"a\\"[[[": "\\\\", "b": [{}]}')).toBe(3);
    expect(depth('[]')).toBe(1);
    expect(depth('[1, 2]')).toBe(1);
    expect(depth('['.repeat(100_000) + ']'.repeat(100_000), 64)).toBe(65);
  });
});
