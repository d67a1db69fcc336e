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
 * Picture convention (README "Picture convention"): x to the right and y up, seen facing the device from the
 * side the light goes to. Image rows run top to bottom, so image row 0 (the picture's top) is placed at the
 * largest y of the window (the largest v in the far field): the device projects the picture upright in that view.
 */
import { float64Array, type ArrayMemory } from './arrays';
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
  /** Where the amplitude plane is allocated (arrays.ts): 'shared' hands it to a retrieval thread without a copy. */
  memory?: ArrayMemory;
}

/**
 * Resamples a grayscale picture (bilinear, pixel centres aligned) into an integer pixel window.
 * Returns intensities normalized to the picture's `maxValue`, raised to `gamma`.
 * Example: a 1×1 white picture into a 3×2 window → six values of 1.
 */
export function resampleIntensity(image: GrayImage, width: number, height: number, gamma = 1): Float64Array {
  const sample = pictureSampler(image, gamma);
  const out = new Float64Array(width * height);
  for (let b = 0; b < height; b++) {
    for (let a = 0; a < width; a++) out[b * width + a] = sample(((a + 0.5) * image.width) / width - 0.5, ((b + 0.5) * image.height) / height - 0.5);
  }
  return out;
}

/**
 * Bilinear sampling of a picture at fractional pixel coordinates (pixel centres at integers, clamped at the
 * edges): intensity normalized to `maxValue`, raised to `gamma`. Validates the picture once.
 */
function pictureSampler(image: GrayImage, gamma: number): (sx: number, sy: number) => number {
  const { width: w, height: h, pixels } = image;
  if (!Number.isInteger(w) || !Number.isInteger(h) || w < 1 || h < 1) throw new RangeError(`Image size must be positive integers, got ${w}×${h}`);
  if (pixels.length !== w * h) throw new RangeError(`Image has ${pixels.length} values, expected ${w}×${h} = ${w * h}`);
  if (!(gamma > 0)) throw new RangeError(`Gamma must be positive, got ${gamma}`);
  const isBytes = pixels instanceof Uint8Array || pixels instanceof Uint8ClampedArray;
  const maxValue = image.maxValue ?? (isBytes ? 255 : 1);
  if (!(maxValue > 0)) throw new RangeError(`maxValue must be positive, got ${maxValue}`);
  return (sx, sy) => {
    const x = Math.min(Math.max(sx, 0), w - 1);
    const y = Math.min(Math.max(sy, 0), h - 1);
    const x0 = Math.floor(x);
    const y0 = Math.floor(y);
    const x1 = Math.min(x0 + 1, w - 1);
    const y1 = Math.min(y0 + 1, h - 1);
    const fx = x - x0;
    const fy = y - y0;
    const top = pixels[y0 * w + x0] * (1 - fx) + pixels[y0 * w + x1] * fx;
    const bottom = pixels[y1 * w + x0] * (1 - fx) + pixels[y1 * w + x1] * fx;
    return Math.min(Math.max((top * (1 - fy) + bottom * fy) / maxValue, 0), 1) ** gamma;
  };
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
  const amplitude = float64Array(n * n, options.memory);
  for (let b = 0; b < window.height; b++) {
    for (let a = 0; a < window.width; a++) {
      // Picture row b (from the top) goes to grid row y0 + height − 1 − b: the top at the largest y.
      amplitude[(window.y0 + window.height - 1 - b) * n + window.x0 + a] = Math.sqrt(intensity[b * window.width + a]);
    }
  }
  return { n, amplitude, window, geometry };
}

/**
 * Where a picture should appear on a flat screen facing the device (perpendicular to the axis, at any
 * distance L): angles from the zero order in radians, measured to the rectangle's edges — the picture fills
 * tanθx ∈ [tan(centerX − width/2), tan(centerX + width/2)] of the screen (in units of L), and likewise in y.
 */
export interface ScreenWindowSpec {
  centerX: number;
  centerY: number;
  width: number;
  /** Omitted: the picture keeps its aspect ratio on the screen. */
  height?: number;
}

/** The picture's rectangle on the screen, in units of L: tanθx from x0 to x1, tanθy from y0 to y1. */
export interface ScreenRect {
  x0: number;
  x1: number;
  y0: number;
  y1: number;
}

/** Screen point (X, Y) (units of L) of direction cosines (u, v): (u, v)/√(1 − u² − v²). */
export function screenPoint(u: number, v: number): [number, number] {
  const w = Math.sqrt(1 - u * u - v * v);
  return [u / w, v / w];
}

/** Direction cosines (u, v) of screen point (X, Y) (units of L): (X, Y)/√(1 + X² + Y²). */
export function screenDirection(x: number, y: number): [number, number] {
  const r = Math.sqrt(1 + x * x + y * y);
  return [x / r, y / r];
}

/**
 * The screen rectangle of a spec. Throws RangeError when an edge reaches ±90°.
 * Example: centre 0, width 2·atan(0.5) (≈ 53.13°), picture 2:1 → x from −0.5 to 0.5, y from −0.25 to 0.25.
 */
export function screenRect(spec: ScreenWindowSpec, aspect: number): ScreenRect {
  const edge = (angle: number) => {
    if (!(Math.abs(angle) < Math.PI / 2)) throw new RangeError(`A flat-screen window edge at ${((angle * 180) / Math.PI).toFixed(2)}° does not reach the screen; keep every edge within ±90°`);
    return Math.tan(angle);
  };
  if (!(spec.width > 0)) throw new RangeError(`Window width must be positive, got ${spec.width}`);
  const x0 = edge(spec.centerX - spec.width / 2);
  const x1 = edge(spec.centerX + spec.width / 2);
  if (spec.height !== undefined) {
    if (!(spec.height > 0)) throw new RangeError(`Window height must be positive, got ${spec.height}`);
    return { x0, x1, y0: edge(spec.centerY - spec.height / 2), y1: edge(spec.centerY + spec.height / 2) };
  }
  const middle = edge(spec.centerY);
  const half = (x1 - x0) / aspect / 2;
  return { x0, x1, y0: middle - half, y1: middle + half };
}

/** Bounding box of the directions (u, v) that land on a screen rectangle (direction cosines). */
export interface DirectionBox {
  uMin: number;
  uMax: number;
  vMin: number;
  vMax: number;
}

/**
 * The directions that land on a screen rectangle, as a box in direction cosines. u grows with X and shrinks
 * with |Y| (v likewise), so the extremes lie on the rectangle's edges: they are sampled densely, with the
 * crossings of the axes when inside. Example: the rectangle X ∈ [1, 2], Y ∈ [0, 0] → u from 1/√2 to 2/√5.
 */
export function screenFootprint(rect: ScreenRect): DirectionBox {
  const box: DirectionBox = { uMin: Infinity, uMax: -Infinity, vMin: Infinity, vMax: -Infinity };
  const visit = (x: number, y: number) => {
    const [u, v] = screenDirection(x, y);
    box.uMin = Math.min(box.uMin, u);
    box.uMax = Math.max(box.uMax, u);
    box.vMin = Math.min(box.vMin, v);
    box.vMax = Math.max(box.vMax, v);
  };
  const steps = 1024;
  const along = (from: number, to: number, k: number) => from + ((to - from) * k) / steps;
  for (let k = 0; k <= steps; k++) {
    visit(along(rect.x0, rect.x1, k), rect.y0);
    visit(along(rect.x0, rect.x1, k), rect.y1);
    visit(rect.x0, along(rect.y0, rect.y1, k));
    visit(rect.x1, along(rect.y0, rect.y1, k));
  }
  const zeroX = Math.min(Math.max(0, rect.x0), rect.x1);
  const zeroY = Math.min(Math.max(0, rect.y0), rect.y1);
  visit(rect.x0, zeroY);
  visit(rect.x1, zeroY);
  visit(zeroX, rect.y0);
  visit(zeroX, rect.y1);
  return box;
}

/**
 * The far-field pixel window (centred N×N grid) that holds every direction landing on a screen rectangle.
 * Throws RangeError when it covers less than 2×2 pixels or leaves the grid.
 */
export function placeScreenWindow(grid: CellGrid, rect: ScreenRect): PixelWindow {
  const { n } = grid;
  const deltaU = grid.lambda / (n * grid.period);
  const { uMin, uMax, vMin, vMax } = screenFootprint(rect);
  const x0 = Math.floor(n / 2 + uMin / deltaU);
  const y0 = Math.floor(n / 2 + vMin / deltaU);
  const window: PixelWindow = { x0, y0, width: Math.ceil(n / 2 + uMax / deltaU) - x0 + 1, height: Math.ceil(n / 2 + vMax / deltaU) - y0 + 1 };
  if (window.width < 2 || window.height < 2) throw new RangeError(`The flat-screen window covers less than two far-field pixels (${window.width}×${window.height}); make it larger`);
  if (x0 < 0 || y0 < 0 || x0 + window.width > n || y0 + window.height > n) {
    throw new RangeError(`The flat-screen window needs far-field columns ${x0}…${x0 + window.width - 1} and rows ${y0}…${y0 + window.height - 1}, outside the ${n}×${n} grid; make it smaller or move it towards the zero order`);
  }
  return window;
}

/**
 * Target amplitude pre-distorted for a flat screen (Fourier geometry): a direction (u, v) lands on the screen
 * at (X, Y) = (u, v)/√(1 − u² − v²) (units of the distance L), so a picture laid out evenly in direction
 * cosines looks stretched towards the edges there. Each far-field pixel inside the picture's screen rectangle
 * takes the picture's value at its screen point, and since a far-field pixel of area du·dv covers the screen
 * area |∂(X, Y)/∂(u, v)|·du·dv = du·dv/w⁴ (w = √(1 − u² − v²)), the target intensity is picture/w⁴: then the
 * irradiance on the screen follows the picture. The window is the footprint's bounding box; pixels of the box
 * outside the footprint are dark. Amplitude normalized to a maximum of 1. Example: a white picture on a
 * rectangle centred on the axis gives amplitude 1/w², largest at the footprint's corners.
 */
export function buildScreenTarget(grid: CellGrid, image: GrayImage, spec: ScreenWindowSpec, options: Pick<TargetOptions, 'gamma' | 'memory'> = {}): TargetPlane {
  const rect = screenRect(spec, image.width / image.height);
  const { n } = grid;
  const deltaU = grid.lambda / (n * grid.period);
  const sample = pictureSampler(image, options.gamma ?? 1);
  const window = placeScreenWindow(grid, rect);
  const { x0, y0 } = window;
  const amplitude = float64Array(n * n, options.memory);
  let peak = 0;
  for (let iy = y0; iy < y0 + window.height; iy++) {
    for (let ix = x0; ix < x0 + window.width; ix++) {
      const u = (ix - n / 2) * deltaU;
      const v = (iy - n / 2) * deltaU;
      const w2 = 1 - u * u - v * v;
      if (!(w2 > 0)) continue;
      const [x, y] = screenPoint(u, v);
      if (x < rect.x0 || x > rect.x1 || y < rect.y0 || y > rect.y1) continue;
      const sx = ((x - rect.x0) / (rect.x1 - rect.x0)) * image.width - 0.5;
      // The picture's top row sits at the rectangle's top edge, the largest screen Y.
      const sy = ((rect.y1 - y) / (rect.y1 - rect.y0)) * image.height - 0.5;
      const value = Math.sqrt(sample(sx, sy)) / w2;
      amplitude[iy * n + ix] = value;
      peak = Math.max(peak, value);
    }
  }
  if (peak > 0) for (let i = 0; i < amplitude.length; i++) amplitude[i] /= peak;
  return { n, amplitude, window, geometry: 'fourier' };
}

/** A far field as seen on the flat screen: irradiance on a grid of screen pixels, row 0 at the top (Y = shown.y1), Y decreasing downwards. */
export interface ScreenView {
  width: number;
  height: number;
  /** Irradiance (far-field intensity × w⁴), row-major, `width × height`. */
  irradiance: Float32Array;
  /** The screen area shown (units of L): the picture's rectangle with a margin. */
  shown: ScreenRect;
  /** The picture's rectangle. */
  picture: ScreenRect;
}

/**
 * Resamples a centred far-field intensity map (zero order at (N/2, N/2)) onto the flat screen around a
 * picture's rectangle: screen point (X, Y) looks in the direction (u, v) = (X, Y)/√(1 + X² + Y²), bilinear
 * between far-field pixels, and its irradiance is the intensity × w⁴ (the inverse of the Jacobian used by
 * `buildScreenTarget`). `margin`: share of the picture's size shown around it (default 0.15); the larger
 * side gets `side` pixels (default 512). Example: a uniform far field seen around the axis is brightest in
 * the middle of the screen, falling off as w⁴ = 1/(1 + X² + Y²)² towards the edges.
 */
export function screenView(farField: Float32Array, grid: CellGrid, picture: ScreenRect, options: { margin?: number; side?: number } = {}): ScreenView {
  const { n } = grid;
  if (farField.length !== n * n) throw new RangeError(`Far field must hold ${n}×${n} values`);
  const margin = options.margin ?? 0.15;
  const side = options.side ?? 512;
  const spanX = picture.x1 - picture.x0;
  const spanY = picture.y1 - picture.y0;
  const shown: ScreenRect = { x0: picture.x0 - margin * spanX, x1: picture.x1 + margin * spanX, y0: picture.y0 - margin * spanY, y1: picture.y1 + margin * spanY };
  const aspect = (shown.x1 - shown.x0) / (shown.y1 - shown.y0);
  const width = Math.max(1, Math.round(aspect >= 1 ? side : side * aspect));
  const height = Math.max(1, Math.round(aspect >= 1 ? side / aspect : side));
  const deltaU = grid.lambda / (n * grid.period);
  const irradiance = new Float32Array(width * height);
  for (let row = 0; row < height; row++) {
    const y = shown.y1 - ((row + 0.5) / height) * (shown.y1 - shown.y0);
    for (let col = 0; col < width; col++) {
      const x = shown.x0 + ((col + 0.5) / width) * (shown.x1 - shown.x0);
      const [u, v] = screenDirection(x, y);
      const fx = n / 2 + u / deltaU;
      const fy = n / 2 + v / deltaU;
      const ix = Math.floor(fx);
      const iy = Math.floor(fy);
      if (ix < 0 || iy < 0 || ix + 1 >= n || iy + 1 >= n) continue;
      const ax = fx - ix;
      const ay = fy - iy;
      const at = (jx: number, jy: number) => farField[jy * n + jx];
      const intensity = (at(ix, iy) * (1 - ax) + at(ix + 1, iy) * ax) * (1 - ay) + (at(ix, iy + 1) * (1 - ax) + at(ix + 1, iy + 1) * ax) * ay;
      const w2 = 1 - u * u - v * v;
      irradiance[row * width + col] = intensity * w2 * w2;
    }
  }
  return { width, height, irradiance, shown, picture };
}
