/**
 * The tile pyramids of a succeeded run (server/cli/tiles.ts writes them, one `.tiles` file per picture, stored
 * as a run file like the others): the manifest of a picture's pyramid and single tiles, read by byte range from
 * the stored chunks — a tile costs one small read, never the whole file. A file's index is kept in memory after
 * its first read (files never change; deleting them deletes their rows first, so a stale index is never reached).
 */
import type { Response } from 'express';
import type { TilePyramid } from '../../../shared/schemas/tiles';
import { TILES_MAGIC, TILES_TRAILER_BYTES, tilesFileOf, type TileIndex } from '../../cli/tiles';
import { select } from '../../db/select';
import { AppError } from '../../lib/app-error';
import { ARTIFACT_CHUNK_BYTES } from './run-artifacts';

/** Indexes kept in memory at most (each a few kB). */
const INDEX_CACHE_ENTRIES = 256;
const indexes = new Map<number, TileIndex>();

/** Bytes `offset` … `offset + length` of a stored artifact, read chunk by chunk with SUBSTRING. */
async function readRange(artifactId: number, offset: number, length: number): Promise<Buffer> {
  const parts: Buffer[] = [];
  for (let at = offset, end = offset + length; at < end; ) {
    // Every chunk but the last holds exactly ARTIFACT_CHUNK_BYTES (storeArtifacts).
    const seq = Math.floor(at / ARTIFACT_CHUNK_BYTES);
    const within = at - seq * ARTIFACT_CHUNK_BYTES;
    const take = Math.min(end - at, ARTIFACT_CHUNK_BYTES - within);
    const [row] = await select<{ part: Buffer }>('SELECT SUBSTRING(bytes, ?, ?) AS part FROM run_artifact_chunks WHERE artifact_id = ? AND seq = ?', [within + 1, take, artifactId, seq]);
    if (!row || row.part.length !== take) throw new Error(`tile file ${artifactId}: bytes ${at}…${at + take} are not stored`);
    parts.push(row.part);
    at += take;
  }
  return parts.length === 1 ? parts[0] : Buffer.concat(parts);
}

async function readIndex(artifactId: number, size: number): Promise<TileIndex> {
  const cached = indexes.get(artifactId);
  if (cached) return cached;
  const trailer = await readRange(artifactId, size - TILES_TRAILER_BYTES, TILES_TRAILER_BYTES);
  if (trailer.toString('latin1', 4) !== TILES_MAGIC) throw new Error(`tile file ${artifactId} has no tile index`);
  const length = trailer.readUInt32LE(0);
  const index = JSON.parse((await readRange(artifactId, size - TILES_TRAILER_BYTES - length, length)).toString('utf8')) as TileIndex;
  if (indexes.size >= INDEX_CACHE_ENTRIES) indexes.delete(indexes.keys().next().value!);
  indexes.set(artifactId, index);
  return index;
}

const PICTURE_NAME = /^[a-z0-9_-]{1,80}\.png$/;

/** The pyramid of `picture` of a succeeded run of the project, with the stored file it is read from; 404 when there is none. */
async function pyramidOf(projectId: number, runId: number, picture: string): Promise<{ index: TileIndex; artifactId: number }> {
  if (!PICTURE_NAME.test(picture)) throw new AppError(400, `"${picture.slice(0, 100)}" is not a preview name: use a run's PNG preview such as farfield_a.png`);
  const [row] = await select<{ id: number; size: number | string; status: string }>(
    `SELECT a.id, a.size, r.status FROM runs r LEFT JOIN run_artifacts a ON a.run_id = r.id AND a.name = ? WHERE r.id = ? AND r.project_id = ?`,
    [tilesFileOf(picture), runId, projectId],
  );
  if (!row) throw new AppError(404, `This project has no run ${runId}`);
  // Like the run's other files: shown only once the run succeeded.
  if (row.id === null || row.status !== 'succeeded') {
    throw new AppError(404, `Run ${runId} has no tiles of "${picture}": only the far-field totals and maps of runs made since tile pyramids exist, larger than one tile, have them; use the PNG itself`);
  }
  return { index: await readIndex(row.id, Number(row.size)), artifactId: row.id };
}

/** The manifest of a picture's pyramid: its size, tile size and levels (level 0 = full resolution). */
export async function tileManifest(projectId: number, runId: number, picture: string): Promise<TilePyramid> {
  const { index } = await pyramidOf(projectId, runId, picture);
  return { picture: index.picture, width: index.width, height: index.height, tileSize: index.tileSize, levels: index.levels };
}

/** A level, column or row number from the address: a whole number 0 or more, else 400. */
function tileNumber(value: unknown, name: string): number {
  const text = String(value ?? '');
  if (!/^(0|[1-9][0-9]{0,5})$/.test(text)) throw new AppError(400, `${name} must be a whole number 0 or more, got "${text.slice(0, 20)}"`);
  return Number(text);
}

/** The PNG bytes of tile (x, y) of `level`; 400 for a number that is not one, 404 for a tile outside the pyramid. */
export async function readTile(projectId: number, runId: number, picture: string, params: Record<string, unknown>): Promise<Buffer> {
  const level = tileNumber(params.level, 'level');
  const x = tileNumber(params.x, 'x');
  const y = tileNumber(params.y, 'y');
  const { index, artifactId } = await pyramidOf(projectId, runId, picture);
  const last = index.levels.length - 1;
  if (level > last) throw new AppError(404, `"${picture}" has tile levels 0 (full resolution) to ${last}; there is no level ${level}`);
  const { columns, rows } = index.levels[level];
  if (x >= columns || y >= rows) {
    throw new AppError(404, `Level ${level} of "${picture}" has ${columns} × ${rows} tiles (x 0–${columns - 1}, y 0–${rows - 1}); there is no tile (${x}, ${y})`);
  }
  const [offset, length] = index.tiles[level][y * columns + x];
  return readRange(artifactId, offset, length);
}

/** Sends a tile as PNG; `cache` is the Cache-Control the route allows. */
export function sendTile(res: Response, png: Buffer, cache: string): void {
  res.set({ 'Content-Type': 'image/png', 'Content-Length': String(png.length), 'X-Content-Type-Options': 'nosniff', 'Cache-Control': cache });
  res.end(png);
}
