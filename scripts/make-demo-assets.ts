/**
 * Draws the demo far-field targets of the Harbourlight scenario with our own code and writes them as PNG into
 * demo-assets/images: a lighthouse (channel A of the twin-image demo) and a compass rose (channel B).
 * Run: npx tsx scripts/make-demo-assets.ts
 */
import { mkdirSync } from 'node:fs';
import { Jimp } from 'jimp';
import { circle, minus, polygon, rasterize, rect, ring, union, type Shape } from './lib/raster';

const SIZE = 128;

function lighthouse(): Uint8Array {
  const tower = polygon([[-0.22, -0.8], [0.22, -0.8], [0.13, 0.25], [-0.13, 0.25]]);
  const bands = union(rect(-1, -0.45, 1, -0.3), rect(-1, -0.05, 1, 0.1));
  const lampRoom = rect(-0.12, 0.28, 0.12, 0.45);
  const roof = polygon([[-0.18, 0.45], [0.18, 0.45], [0, 0.62]]);
  const gallery = rect(-0.2, 0.25, 0.2, 0.29);
  const beamLeft = polygon([[-0.1, 0.38], [-0.95, 0.62], [-0.95, 0.2]]);
  const beamRight = polygon([[0.1, 0.38], [0.95, 0.62], [0.95, 0.2]]);
  const ground = polygon([[-0.9, -0.8], [0.9, -0.8], [0.75, -0.9], [-0.75, -0.9]]);
  const layers: [Shape, number][] = [
    [union(beamLeft, beamRight), 110],
    [ground, 150],
    [tower, 255],
    [(x, y) => tower(x, y) && bands(x, y), 90],
    [gallery, 200],
    [lampRoom, 255],
    [roof, 200],
  ];
  return rasterize(SIZE, layers);
}

function compassRose(): Uint8Array {
  const star = (r1: number, r2: number, rotation: number): Shape => {
    const pts: [number, number][] = [];
    for (let i = 0; i < 8; i++) {
      const a = rotation + (i * Math.PI) / 4;
      const r = i % 2 === 0 ? r1 : r2;
      pts.push([r * Math.sin(a), r * Math.cos(a)]);
    }
    return polygon(pts);
  };
  const mainStar = star(0.85, 0.2, 0);
  const diagonalStar = star(0.55, 0.15, Math.PI / 4);
  const northMark = polygon([[-0.1, 0.88], [0.1, 0.88], [0, 1]]);
  const layers: [Shape, number][] = [
    [ring(0, 0, 0.62, 0.68), 170],
    [diagonalStar, 140],
    [mainStar, 255],
    [minus(circle(0, 0, 0.09), circle(0, 0, 0.04)), 60],
    [northMark, 255],
  ];
  return rasterize(SIZE, layers);
}

async function writePng(path: string, gray: Uint8Array) {
  const image = new Jimp({ width: SIZE, height: SIZE, color: 0x000000ff });
  for (let i = 0; i < gray.length; i++) {
    const v = gray[i];
    image.bitmap.data[4 * i] = v;
    image.bitmap.data[4 * i + 1] = v;
    image.bitmap.data[4 * i + 2] = v;
    image.bitmap.data[4 * i + 3] = 255;
  }
  await image.write(path as `${string}.png`);
}

mkdirSync('demo-assets/images', { recursive: true });
await writePng('demo-assets/images/lighthouse.png', lighthouse());
await writePng('demo-assets/images/compass-rose.png', compassRose());
console.log('Wrote demo-assets/images/lighthouse.png and compass-rose.png');
