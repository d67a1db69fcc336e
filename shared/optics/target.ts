/**
 * Target amplitude of an image hologram: a grayscale picture resampled into a rectangular window of the
 * image plane.
 *
 * Image-plane grid (N×N, row-major, centred layout):
 * - Fourier (far-field) geometry: pixel (ix, iy) is the direction (u, v) = ((ix − N/2)·Δu, (iy − N/2)·Δu)
 *   with direction-cosine step Δu = λ/(N·P), u = sinθx, v = sinθy; the zero order is pixel (N/2, N/2), as
 *   after `fftshift2d`. Only pixels with u² + v² ≤ 1 propagate.
 * - Fresnel geometry (image at finite distance z): pixel (ix, iy) is the point ((ix − N/2)·P, (iy − N/2)·P)
 *   of the image plane, sampled like the device.
 * Window size and centre are given either in direction cosines (Fourier geometry only) or in cells
 * (= image-plane pixels: steps of Δu in the far field, steps of P in the Fresnel plane).
 * Image rows run top to bottom; image row 0 is placed at the smallest y of the window.
 */
import type { CellGrid } from './types';

/** A grayscale picture: `pixels` row-major, `width × height` values. */
export interface GrayImage {
  width: number;
  height: number;
  /** 0…255 for Uint8 data, or 0…1 floats (set `maxValue` for other ranges). */
  pixels: ArrayLike<number>;
  /** Value of full white; default 255 for Uint8Array/Uint8ClampedArray, else 1. */
  maxValue?: number;
}

/** Where the picture goes in the image plane. */
export interface TargetWindowSpec {
  /** 'direction-cosine' (Fourier geometry only) or 'cells' (image-plane pixels). */
  units: 'direction-cosine' | 'cells';
  /** Window width in the chosen units. */
  width: number;
  /** Window height; default keeps the picture's aspect ratio. */
  height?: number;
  /** Window centre, relative to the zero order / optical axis, in the chosen units. */
  centerX: number;
  centerY: number;
}

/** An integer pixel rectangle of the centred image-plane grid: columns x0…x0+width−1, rows y0…y0+height−1. */
export interface PixelWindow {
  x0: number;
  y0: number;
  width: number;
  height: number;
}

export type TargetGeometry = 'fourier' | 'fresnel';

/** Target amplitude on the centred N×N image-plane grid. */
export interface TargetPlane {
  n: number;
  /** √(intensity), zero outside the window; max 1. */
  amplitude: Float64Array;
  window: PixelWindow;
  geometry: TargetGeometry;
}

export interface TargetOptions {
  geometry?: TargetGeometry;
  /** Display gamma applied to the normalized gray value: intensity = (value/max)^gamma. Default 1. */
  gamma?: number;
}

/**
 * Resamples a grayscale picture (bilinear, pixel centres aligned) into an integer pixel window.
 * Returns intensities normalized to the picture's `maxValue`, raised to `gamma`.
 * Example: a 1×1 white picture into a 3×2 window → six values of 1.
 */
export function resampleIntensity(image: GrayImage, width: number, height: number, gamma = 1): Float64Array {
  const { width: w, height: h, pixels } = image;
  if (!Number.isInteger(w) || !Number.isInteger(h) || w < 1 || h < 1) throw new RangeError(`Image size must be positive integers, got ${w}×${h}`);
  if (pixels.length !== w * h) throw new RangeError(`Image has ${pixels.length} values, expected ${w}×${h} = ${w * h}`);
  if (!(gamma > 0)) throw new RangeError(`Gamma must be positive, got ${gamma}`);
  const isBytes = pixels instanceof Uint8Array || pixels instanceof Uint8ClampedArray;
  const maxValue = image.maxValue ?? (isBytes ? 255 : 1);
  if (!(maxValue > 0)) throw new RangeError(`maxValue must be positive, got ${maxValue}`);
  const out = new Float64Array(width * height);
  for (let b = 0; b < height; b++) {
    const sy = Math.min(Math.max(((b + 0.5) * h) / height - 0.5, 0), h - 1);
    const y0 = Math.floor(sy);
    const y1 = Math.min(y0 + 1, h - 1);
    const fy = sy - y0;
    for (let a = 0; a < width; a++) {
      const sx = Math.min(Math.max(((a + 0.5) * w) / width - 0.5, 0), w - 1);
      const x0 = Math.floor(sx);
      const x1 = Math.min(x0 + 1, w - 1);
      const fx = sx - x0;
      const top = pixels[y0 * w + x0] * (1 - fx) + pixels[y0 * w + x1] * fx;
      const bottom = pixels[y1 * w + x0] * (1 - fx) + pixels[y1 * w + x1] * fx;
      const value = Math.min(Math.max((top * (1 - fy) + bottom * fy) / maxValue, 0), 1);
      out[b * width + a] = value ** gamma;
    }
  }
  return out;
}

/**
 * Converts a window spec to an integer pixel rectangle of the centred grid and checks that it fits:
 * inside the N×N grid, and in Fourier geometry inside the propagating region u² + v² ≤ 1 (every pixel
 * centre; the farthest one is a corner). Throws RangeError with the offending extent otherwise.
 * Example: N = 512, P = λ/2 (Δu = 1/256), width 0.25 (direction cosine) centred at (0.3, 0) → 64 px wide, x0 = 301.
 */
export function placeWindow(grid: CellGrid, spec: TargetWindowSpec, aspect: number, geometry: TargetGeometry = 'fourier'): PixelWindow {
  const { n, period, lambda } = grid;
  if (spec.units === 'direction-cosine' && geometry !== 'fourier') {
    throw new RangeError('Window units "direction-cosine" apply to the far field only; use "cells" in the Fresnel geometry');
  }
  const deltaU = lambda / (n * period);
  const perUnit = spec.units === 'direction-cosine' ? 1 / deltaU : 1;
  if (!(spec.width > 0)) throw new RangeError(`Window width must be positive, got ${spec.width}`);
  const width = Math.round(spec.width * perUnit);
  const height = Math.round((spec.height ?? spec.width / aspect) * perUnit);
  if (width < 1 || height < 1) throw new RangeError(`Window is smaller than one pixel (${width}×${height} px; one pixel = ${spec.units === 'direction-cosine' ? deltaU.toPrecision(4) + ' in direction cosine' : '1 cell'})`);
  const x0 = Math.round(n / 2 + spec.centerX * perUnit - width / 2);
  const y0 = Math.round(n / 2 + spec.centerY * perUnit - height / 2);
  if (x0 < 0 || y0 < 0 || x0 + width > n || y0 + height > n) {
    throw new RangeError(`Target window (columns ${x0}…${x0 + width - 1}, rows ${y0}…${y0 + height - 1}) does not fit in the ${n}×${n} image-plane grid`);
  }
  if (geometry === 'fourier') {
    for (const ix of [x0, x0 + width - 1]) {
      for (const iy of [y0, y0 + height - 1]) {
        const u = (ix - n / 2) * deltaU;
        const v = (iy - n / 2) * deltaU;
        if (u * u + v * v > 1) {
          throw new RangeError(
            `Target window leaves the propagating region: corner pixel at direction cosines (${u.toFixed(4)}, ${v.toFixed(4)}) has sin²θx + sin²θy = ${(u * u + v * v).toFixed(4)} > 1; make the window smaller or move it towards the zero order`,
          );
        }
      }
    }
  }
  return { x0, y0, width, height };
}

/**
 * Builds the target amplitude: gamma-corrected intensity of the picture, amplitude = √intensity, in the
 * placed window of the centred N×N grid, zero elsewhere. Throws RangeError if the window does not fit.
 * Example: a white 8×8 picture in a 16×16-cell window → 256 pixels of amplitude 1.
 */
export function buildTargetPlane(grid: CellGrid, image: GrayImage, spec: TargetWindowSpec, options: TargetOptions = {}): TargetPlane {
  const geometry = options.geometry ?? 'fourier';
  const window = placeWindow(grid, spec, image.width / image.height, geometry);
  const intensity = resampleIntensity(image, window.width, window.height, options.gamma ?? 1);
  const n = grid.n;
  const amplitude = new Float64Array(n * n);
  for (let b = 0; b < window.height; b++) {
    for (let a = 0; a < window.width; a++) {
      amplitude[(window.y0 + b) * n + window.x0 + a] = Math.sqrt(intensity[b * window.width + a]);
    }
  }
  return { n, amplitude, window, geometry };
}
