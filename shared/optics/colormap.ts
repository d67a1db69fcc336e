/**
 * Colour maps of Phasewright's previews, our own, and painting of N×N maps into RGBA pixel buffers.
 * - Cyclic (phases): three cosines 120° apart around a mid grey, so −π and π get the same colour and
 *   equal phase steps give equal colour steps: rgb = 0.55 + 0.4·cos(φ − 2πj/3), j = 0, 1, 2.
 * - Sequential (intensities): a ramp through night blue, sea teal, lamp amber to warm white, linear in sRGB
 *   between the stops; the luminance rises monotonically so a grayscale print keeps the order.
 * Pure: typed arrays in, RGBA bytes (row-major, 4 per pixel) out.
 */

export type Rgb = [number, number, number];

const SEQUENTIAL_STOPS: readonly Rgb[] = [
  [8, 10, 32],
  [18, 62, 98],
  [24, 122, 128],
  [214, 150, 44],
  [255, 246, 224],
];

/**
 * Cyclic colour of a phase (radians, any range). Example: cyclicColor(0) → [242, 89, 89]; cyclicColor(2π) is the same.
 */
export function cyclicColor(phase: number): Rgb {
  const channel = (j: number) => Math.round(255 * (0.55 + 0.4 * Math.cos(phase - (2 * Math.PI * j) / 3)));
  return [channel(0), channel(1), channel(2)];
}

/** Sequential colour of t in 0…1 (clamped). Example: sequentialColor(0) → [8, 10, 32], sequentialColor(1) → [255, 246, 224]. */
export function sequentialColor(t: number): Rgb {
  const x = Math.min(1, Math.max(0, Number.isFinite(t) ? t : 0)) * (SEQUENTIAL_STOPS.length - 1);
  const i = Math.min(SEQUENTIAL_STOPS.length - 2, Math.floor(x));
  const f = x - i;
  const a = SEQUENTIAL_STOPS[i];
  const b = SEQUENTIAL_STOPS[i + 1];
  return [Math.round(a[0] + (b[0] - a[0]) * f), Math.round(a[1] + (b[1] - a[1]) * f), Math.round(a[2] + (b[2] - a[2]) * f)];
}

/** A painted picture: RGBA bytes, row-major, row 0 first. */
export interface RgbaImage {
  width: number;
  height: number;
  data: Uint8ClampedArray;
}

/**
 * The picture turned so that the map's last row is at the top (README "Picture convention"): maps are
 * row-major [iy, ix] with iy growing with y (or v), pictures are drawn from the top row down, y up.
 * Example: a 1×2 picture with rows [red, blue] becomes [blue, red].
 */
export function upright(image: RgbaImage): RgbaImage {
  const stride = image.width * 4;
  const data = new Uint8ClampedArray(image.data.length);
  for (let row = 0; row < image.height; row++) data.set(image.data.subarray(row * stride, (row + 1) * stride), (image.height - 1 - row) * stride);
  return { width: image.width, height: image.height, data };
}

function newImage(width: number, height: number): RgbaImage {
  return { width, height, data: new Uint8ClampedArray(width * height * 4) };
}

/** Lookup table of 256 colours of a colour function on 0…1. */
function table(color: (t: number) => Rgb): Uint8Array {
  const lut = new Uint8Array(256 * 3);
  for (let i = 0; i < 256; i++) lut.set(color(i / 255), 3 * i);
  return lut;
}

const SEQUENTIAL_LUT = table(sequentialColor);
const CYCLIC_LUT = table((t) => cyclicColor(2 * Math.PI * t - Math.PI));

function paint(values: ArrayLike<number>, width: number, height: number, lut: Uint8Array, level: (v: number) => number): RgbaImage {
  if (values.length !== width * height) throw new RangeError(`Map has ${values.length} values, expected ${width}×${height}`);
  const image = newImage(width, height);
  const d = image.data;
  for (let i = 0; i < values.length; i++) {
    const k = 3 * Math.min(255, Math.max(0, Math.round(255 * level(values[i]))));
    d[4 * i] = lut[k];
    d[4 * i + 1] = lut[k + 1];
    d[4 * i + 2] = lut[k + 2];
    d[4 * i + 3] = 255;
  }
  return image;
}

/**
 * Phase map (radians) in the cyclic colours, −π at the start of the table. Example: a map of zeros is painted in (nearly) cyclicColor(0) = [242, 89, 89].
 */
export function paintPhase(phase: ArrayLike<number>, width: number, height: number): RgbaImage {
  const twoPi = 2 * Math.PI;
  return paint(phase, width, height, CYCLIC_LUT, (v) => {
    const wrapped = v - twoPi * Math.floor((v + Math.PI) / twoPi);
    return (wrapped + Math.PI) / twoPi;
  });
}

export interface IntensityScale {
  /** 'log': decibels below the peak down to `floorDb`; 'gamma': (I/max)^gamma. */
  kind: 'log' | 'gamma';
  /** Default −40 dB. */
  floorDb?: number;
  /** Default 0.5. */
  gamma?: number;
  /** Reference for full scale; default the map's largest value. */
  max?: number;
}

/**
 * Intensity map in the sequential colours, log- or gamma-scaled to its peak. Example: log scale, floor
 * −40 dB: the peak maps to the top colour, peak/100 to the middle one, below peak/10⁴ to the bottom one.
 */
export function paintIntensity(values: ArrayLike<number>, width: number, height: number, scale: IntensityScale = { kind: 'log' }): RgbaImage {
  let max = scale.max ?? 0;
  if (scale.max === undefined) for (let i = 0; i < values.length; i++) if (values[i] > max) max = values[i];
  const inv = max > 0 ? 1 / max : 0;
  if (scale.kind === 'log') {
    const floor = scale.floorDb ?? -40;
    if (!(floor < 0)) throw new RangeError(`floorDb must be negative, got ${floor}`);
    return paint(values, width, height, SEQUENTIAL_LUT, (v) => (v > 0 ? 1 - (10 * Math.log10(v * inv)) / floor : 0));
  }
  const gamma = scale.gamma ?? 0.5;
  return paint(values, width, height, SEQUENTIAL_LUT, (v) => (v > 0 ? (v * inv) ** gamma : 0));
}

/** Index map (e.g. atom index 0…count−1) in the sequential colours. */
export function paintIndex(values: ArrayLike<number>, width: number, height: number, count: number): RgbaImage {
  const scale = count > 1 ? 1 / (count - 1) : 0;
  return paint(values, width, height, SEQUENTIAL_LUT, (v) => v * scale);
}

/**
 * Draws a one-pixel rectangle outline (columns x0…x0+w−1, rows y0…y0+h−1) in place; parts outside are clipped.
 * Example: outlineRect(img, { x0: 1, y0: 1, width: 3, height: 3 }, [0, 255, 255]) colours 8 pixels.
 */
export function outlineRect(image: RgbaImage, rect: { x0: number; y0: number; width: number; height: number }, color: Rgb): void {
  const { width, height, data } = image;
  const set = (x: number, y: number) => {
    if (x < 0 || y < 0 || x >= width || y >= height) return;
    const i = 4 * (y * width + x);
    data[i] = color[0];
    data[i + 1] = color[1];
    data[i + 2] = color[2];
    data[i + 3] = 255;
  };
  const x1 = rect.x0 + rect.width - 1;
  const y1 = rect.y0 + rect.height - 1;
  for (let x = rect.x0; x <= x1; x++) {
    set(x, rect.y0);
    set(x, y1);
  }
  for (let y = rect.y0; y <= y1; y++) {
    set(rect.x0, y);
    set(x1, y);
  }
}

/**
 * Mean-pools an N×N map by an integer factor (N divisible by it) into a new Float32Array, keeping
 * previews of large designs small. Example: a 4×4 map of ones pooled by 2 → 2×2 map of ones.
 */
export function poolMap(values: ArrayLike<number>, n: number, factor: number): Float32Array {
  if (!Number.isInteger(factor) || factor < 1 || n % factor !== 0) throw new RangeError(`Cannot pool ${n}×${n} by ${factor}`);
  const m = n / factor;
  const out = new Float32Array(m * m);
  const norm = 1 / (factor * factor);
  for (let y = 0; y < n; y++) {
    const row = Math.floor(y / factor) * m;
    for (let x = 0; x < n; x++) out[row + Math.floor(x / factor)] += values[y * n + x] * norm;
  }
  return out;
}

/**
 * Keeps every `factor`-th sample of an N×N map (for phases and indices, which must not be averaged).
 * Example: subsampleMap([0, 1, 2, 3], 2, 2) → [0].
 */
export function subsampleMap<T extends Float32Array | Float64Array | Int32Array>(values: T, n: number, factor: number): T {
  if (!Number.isInteger(factor) || factor < 1 || n % factor !== 0) throw new RangeError(`Cannot subsample ${n}×${n} by ${factor}`);
  const m = n / factor;
  const out = new (values.constructor as new (length: number) => T)(m * m);
  for (let y = 0; y < m; y++) for (let x = 0; x < m; x++) out[y * m + x] = values[y * factor * n + x * factor];
  return out;
}
