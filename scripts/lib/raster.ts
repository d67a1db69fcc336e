/**
 * A tiny anti-aliased rasterizer for drawing our own demo targets: shapes are point-membership tests in
 * unit coordinates (x, y ∈ [−1, 1], y up), sampled 4×4 per pixel.
 */
export type Shape = (x: number, y: number) => boolean;

export const circle = (cx: number, cy: number, r: number): Shape => (x, y) => (x - cx) ** 2 + (y - cy) ** 2 <= r * r;
export const ring = (cx: number, cy: number, r0: number, r1: number): Shape => (x, y) => {
  const d2 = (x - cx) ** 2 + (y - cy) ** 2;
  return d2 >= r0 * r0 && d2 <= r1 * r1;
};
export const rect = (x0: number, y0: number, x1: number, y1: number): Shape => (x, y) =>
  x >= x0 && x <= x1 && y >= y0 && y <= y1;

/** Even-odd polygon test. */
export const polygon = (points: [number, number][]): Shape => (x, y) => {
  let inside = false;
  for (let i = 0, j = points.length - 1; i < points.length; j = i++) {
    const [xi, yi] = points[i];
    const [xj, yj] = points[j];
    if (yi > y !== yj > y && x < ((xj - xi) * (y - yi)) / (yj - yi) + xi) inside = !inside;
  }
  return inside;
};
export const union = (...shapes: Shape[]): Shape => (x, y) => shapes.some((s) => s(x, y));
export const minus = (a: Shape, b: Shape): Shape => (x, y) => a(x, y) && !b(x, y);

/** Layers of (shape, grey level 0…255), painted in order; returns an 8-bit grayscale image. */
export function rasterize(size: number, layers: [Shape, number][]): Uint8Array {
  const out = new Uint8Array(size * size);
  const sub = 4;
  for (let py = 0; py < size; py++) {
    for (let px = 0; px < size; px++) {
      let sum = 0;
      for (let sy = 0; sy < sub; sy++) {
        for (let sx = 0; sx < sub; sx++) {
          const x = ((px + (sx + 0.5) / sub) / size) * 2 - 1;
          const y = 1 - ((py + (sy + 0.5) / sub) / size) * 2;
          let value = 0;
          for (const [shape, level] of layers) if (shape(x, y)) value = level;
          sum += value;
        }
      }
      out[py * size + px] = Math.round(sum / (sub * sub));
    }
  }
  return out;
}
