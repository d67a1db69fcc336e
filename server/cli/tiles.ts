/**
 * Tile pyramids of a run's large previews (README "Tile pyramids"): the far-field totals under the three inputs
 * and the maps (channel phases, atom index, rotation), at full resolution and halved level by level down to one
 * tile, each level painted exactly as the preview is — same colours, +v / +y up, far fields on the preview's own
 * brightness scale for every level and tile — and cut into 256-px PNG tiles (shared/schemas/tiles.ts).
 *
 * One file per picture, `<picture without .png>.tiles`, so a run stores a handful of files instead of
 * thousands: the PNG tiles one after the other, then the index as JSON (TileIndex: the pyramid and, per level,
 * the [offset, length] of each tile in row-major order from the top-left), then a 12-byte trailer — the index's
 * length in bytes (uint32, little-endian) and the 8 bytes "PWTILES1". The server reads the trailer, the index
 * and then single tiles by their byte ranges (run-tiles.ts).
 */
import { open } from 'node:fs/promises';
import { join } from 'node:path';
import { poolMap, type RgbaImage } from '../../shared/optics/colormap';
import { INPUT_IDS, type RunFarFields } from '../../shared/optics/pipeline';
import { TILE_SIZE, tileLevels, type TilePyramid } from '../../shared/schemas/tiles';
import { encodePng } from './png';
import { farFieldFullScale, mapPainters, outlinedWindows, paintFarField, previewFactor, type MapPreviewData, type WrittenFile } from './previews';

/** Whether a run writes tile pyramids, and the largest side of their level 0 (larger designs are halved to it). */
export interface TileOptions {
  maxSide: number;
}

/** The index at the end of a `.tiles` file: the pyramid and where each tile's PNG bytes are. */
export interface TileIndex extends TilePyramid {
  format: 'phasewright-tiles/1';
  /** Per level, per tile (row-major from the top-left): [byte offset, byte length]. */
  tiles: [number, number][][];
}

export const TILES_MAGIC = 'PWTILES1';
/** Index length (uint32 LE) and the magic. */
export const TILES_TRAILER_BYTES = 12;

/** The `.tiles` file of a preview. Example: tilesFileOf('farfield_a.png') → 'farfield_a.tiles'. */
export function tilesFileOf(picture: string): string {
  return picture.replace(/\.png$/, '') + '.tiles';
}

/** A picture to cut into a pyramid: its name, its full side and how to paint it `factor` times smaller. */
export interface TiledPicture {
  picture: string;
  side: number;
  paint: (factor: number) => RgbaImage;
}

/** Power-of-two factor from an N×N design to the pyramid's level 0 (1 up to `maxSide`). */
function topFactor(n: number, options: TileOptions): number {
  return previewFactor(n, Math.max(TILE_SIZE, options.maxSide));
}

/**
 * The far-field totals under each input, every level on the brightness scale of the preview (its full scale
 * from the preview-size map, previews.ts), so brightness does not change with the level shown. None for
 * designs that fit one tile.
 */
export function farFieldTiledPictures(result: RunFarFields, options: TileOptions): TiledPicture[] {
  const { n } = result.grid;
  if (n <= TILE_SIZE) return [];
  const previewF = previewFactor(n);
  return INPUT_IDS.map((input) => {
    const total = result.farFields[input].total;
    const windows = outlinedWindows(result.windows, input);
    let scale: { max: number | undefined } | undefined;
    const fullScale = () => (scale ??= { max: farFieldFullScale(previewF > 1 ? poolMap(total, n, previewF) : total, n / previewF) }).max;
    return {
      picture: `farfield_${input}.png`,
      side: n / topFactor(n, options),
      paint: (factor: number) => paintFarField(factor > 1 ? poolMap(total, n, factor) : total, n / factor, factor, windows, fullScale()),
    };
  });
}

/** The maps (phase_a, phase_b, atom_index, rotation) at every level, sampled like their previews. */
export function mapTiledPictures(data: MapPreviewData, options: TileOptions): TiledPicture[] {
  const { n } = data;
  if (n <= TILE_SIZE) return [];
  return mapPainters(data, 1).map(([picture], index) => ({
    picture,
    side: n / topFactor(n, options),
    paint: (factor: number) => mapPainters(data, factor)[index][1](),
  }));
}

/** Rows y0… and columns x0… of `image`, `width` × `height` pixels, as a picture of their own. */
function cut(image: RgbaImage, x0: number, y0: number, width: number, height: number): RgbaImage {
  const data = new Uint8ClampedArray(width * height * 4);
  for (let row = 0; row < height; row++) {
    const start = ((y0 + row) * image.width + x0) * 4;
    data.set(image.data.subarray(start, start + width * 4), row * width * 4);
  }
  return { width, height, data };
}

/** Paints every level of `picture`, cuts it into tiles and writes them with their index into `dir/<name>.tiles`. */
async function writePyramid(dir: string, { picture, side, paint }: TiledPicture, n: number): Promise<WrittenFile> {
  const name = tilesFileOf(picture);
  const levels = tileLevels(side, side);
  const index: TileIndex = { format: 'phasewright-tiles/1', picture, width: side, height: side, tileSize: TILE_SIZE, levels, tiles: [] };
  const file = await open(join(dir, name), 'w');
  let offset = 0;
  try {
    for (const level of levels) {
      // Design sides are powers of two, so every level is the N×N map pooled or sampled by a whole factor.
      const image = paint(n / level.width);
      const tiles: [number, number][] = [];
      for (let y = 0; y < level.rows; y++) {
        for (let x = 0; x < level.columns; x++) {
          const x0 = x * TILE_SIZE;
          const y0 = y * TILE_SIZE;
          const png = await encodePng(cut(image, x0, y0, Math.min(TILE_SIZE, level.width - x0), Math.min(TILE_SIZE, level.height - y0)));
          await file.write(png);
          tiles.push([offset, png.length]);
          offset += png.length;
        }
      }
      index.tiles.push(tiles);
    }
    const json = Buffer.from(JSON.stringify(index));
    const trailer = Buffer.alloc(TILES_TRAILER_BYTES);
    trailer.writeUInt32LE(json.length, 0);
    trailer.write(TILES_MAGIC, 4, 'latin1');
    await file.write(json);
    await file.write(trailer);
    return { name, bytes: offset + json.length + TILES_TRAILER_BYTES };
  } finally {
    await file.close();
  }
}

/** Writes the pyramids of `pictures` (of an N×N design) into `dir`, one after the other. */
export async function writeTilePyramids(dir: string, pictures: TiledPicture[], n: number): Promise<WrittenFile[]> {
  const files: WrittenFile[] = [];
  for (const picture of pictures) files.push(await writePyramid(dir, picture, n));
  return files;
}
