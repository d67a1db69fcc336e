/**
 * Tile pyramids of a run's large previews (README "Tile pyramids"): the picture at full resolution (level 0)
 * and halved level by level down to one tile, each level cut into square tiles of `tileSize` pixels, column
 * x from the left and row y from the top of the picture as it is shown (+v or +y up). Tiles at the right and
 * bottom edges are narrower or shorter when a level's side is not a multiple of the tile size.
 */

/** Side of a tile in pixels. */
export const TILE_SIZE = 256;

export interface TileLevel {
  /** The level's picture in pixels. */
  width: number;
  height: number;
  /** Tiles across and down. */
  columns: number;
  rows: number;
}

/** What the tile route serves for one picture: its full size and its levels, level 0 first (full resolution). */
export interface TilePyramid {
  /** The preview file the pyramid belongs to, e.g. farfield_a.png. */
  picture: string;
  width: number;
  height: number;
  tileSize: number;
  levels: TileLevel[];
}

/**
 * The levels of a pyramid over a width × height picture: each level halves the one before (rounding up),
 * down to the first that fits one tile. Example: tileLevels(1024, 1024) → 1024² (4×4 tiles), 512² (2×2), 256² (1).
 */
export function tileLevels(width: number, height: number, tileSize = TILE_SIZE): TileLevel[] {
  const levels: TileLevel[] = [];
  for (let w = width, h = height; ; w = Math.ceil(w / 2), h = Math.ceil(h / 2)) {
    levels.push({ width: w, height: h, columns: Math.ceil(w / tileSize), rows: Math.ceil(h / tileSize) });
    if (w <= tileSize && h <= tileSize) return levels;
  }
}
