/**
 * Tile pyramids (server/cli/tiles.ts): a 2048² twin-image design (few iterations) is run and its files written
 * with tiles; for every pyramid — far-field totals under the three inputs, the two phase maps, atom index and
 * rotation — numpy (tests/support/tile_reference.py) decodes each tile with its own PNG decoder, stitches
 * every level and compares it pixel by pixel with the level painted by numpy from the run's .npy arrays; the
 * level of the preview's size must equal the single preview PNG.
 */
import { execFileSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { encodeNpy } from '../../shared/optics/npy';
import { CHANNEL_IDS, runDesign, type DesignRun } from '../../shared/optics/pipeline';
import { designSchema } from '../../shared/schemas/design';
import { loadDesignResources } from '../../server/cli/design-files';
import { writeRunOutputs, type WrittenFile } from '../../server/cli/outputs';
import { farFieldTiledPictures, TILES_TRAILER_BYTES, writeTilePyramids, type TileIndex } from '../../server/cli/tiles';
import { TILE_SIZE } from '../../shared/schemas/tiles';
import { twinImageDesign } from '../support/designs';
import { PYTHON } from '../support/python';

const N = 2048;
const dir = mkdtempSync(join(tmpdir(), 'phasewright-tiles-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

interface LevelCheck {
  side: number;
  tiles: number;
  columns: number;
  rows: number;
  badTiles: number;
  mismatched: number;
}
type Checked = Record<string, { levels: LevelCheck[]; width: number; tileSize: number; previewSide: number; previewMismatched?: number }>;

let run: DesignRun;
let files: WrittenFile[];
let checked: Checked;

beforeAll(async () => {
  const design = designSchema.parse({ format: 'phasewright-design/1', ...twinImageDesign({ cells: N, iterations: 2 }) });
  const { resources } = await loadDesignResources(design, join(dir, 'design.json'));
  run = await runDesign(design, resources);
  files = await writeRunOutputs(run, dir, {}, { maxSide: 4096 });
  // The extra input's far field has no .npy of its own: written here for numpy to read.
  writeFileSync(join(dir, 'farfield_extra.npy'), encodeNpy(run.farFields.extra.total, [N, N]));
  const colours = { a: [90, 225, 255], b: [255, 96, 208] };
  const windows = (ids: ('a' | 'b')[]) =>
    ids.flatMap((c) => {
      const w = run.channels[c].window;
      return w && run.channels[c].plan.hologram?.geometry === 'fourier' ? [{ ...w, color: colours[c] }] : [];
    });
  const farField = (input: 'a' | 'b' | 'extra') => ({
    kind: 'farfield',
    picture: `farfield_${input}.png`,
    tiles: `farfield_${input}.tiles`,
    npy: `farfield_${input}.npy`,
    // The previews pool designs above 1024² (previews.ts PREVIEW_MAX_SIDE).
    previewFactor: N / 1024,
    windows: windows(input === 'extra' ? ['a', 'b'] : [input]),
  });
  const job = {
    folder: dir,
    pictures: [
      farField('a'),
      farField('b'),
      farField('extra'),
      ...CHANNEL_IDS.map((c) => ({ kind: 'phase', picture: `phase_${c}.png`, tiles: `phase_${c}.tiles`, npy: `phase_${c}.npy` })),
      { kind: 'index', picture: 'atom_index.png', tiles: 'atom_index.tiles', npy: 'atom_index.npy', count: run.library.atoms.length },
      { kind: 'rotation', picture: 'rotation.png', tiles: 'rotation.tiles', npy: 'theta.npy' },
    ],
  };
  writeFileSync(join(dir, 'job.json'), JSON.stringify(job));
  const script = join(import.meta.dirname, '..', 'support', 'tile_reference.py');
  checked = JSON.parse(execFileSync(PYTHON, [script, join(dir, 'job.json')], { maxBuffer: 16 << 20, timeout: 300_000 }).toString()) as Checked;
}, 600_000);

describe('tile pyramids of a 2048² run', () => {
  it('writes one pyramid per far-field total and map, with levels from full resolution down to one tile', () => {
    const names = files.map((f) => f.name).filter((name) => name.endsWith('.tiles'));
    expect(names.sort()).toEqual(['atom_index', 'farfield_a', 'farfield_b', 'farfield_extra', 'phase_a', 'phase_b', 'rotation'].map((s) => `${s}.tiles`));
    for (const [picture, result] of Object.entries(checked)) {
      expect(result.width, picture).toBe(N);
      expect(result.tileSize, picture).toBe(TILE_SIZE);
      // 2048, 1024, 512, 256: each level half the one before, the last a single tile.
      expect(result.levels.map((l) => [l.side, l.columns, l.rows, l.tiles]), picture).toEqual([
        [2048, 8, 8, 64],
        [1024, 4, 4, 16],
        [512, 2, 2, 4],
        [256, 1, 1, 1],
      ]);
    }
  });

  it("stitches every level's tiles back into the level's picture painted by numpy from the .npy, pixel for pixel", () => {
    for (const [picture, result] of Object.entries(checked)) {
      for (const level of result.levels) {
        expect({ picture, side: level.side, badTiles: level.badTiles, mismatched: level.mismatched }).toEqual({ picture, side: level.side, badTiles: 0, mismatched: 0 });
      }
    }
  });

  it('gives the level of the preview size exactly the single preview PNG (one brightness scale for all levels)', () => {
    for (const [picture, result] of Object.entries(checked)) {
      expect(result.previewSide, picture).toBe(1024);
      expect(result.previewMismatched, picture).toBe(0);
    }
  });

  it('halves larger designs to PREVIEW_TILES_MAX_SIDE: level 0 is then the full pyramid\'s level 1, tile for tile', async () => {
    const capped = join(dir, 'capped');
    mkdirSync(capped);
    const windows = { a: run.channels.a.window!, b: run.channels.b.window! };
    const [farFieldA] = farFieldTiledPictures({ grid: run.grid, farFields: run.farFields, analyser: run.analyser, windows }, { maxSide: 1024 });
    await writeTilePyramids(capped, [farFieldA], N);
    const read = (path: string) => {
      const bytes = readFileSync(path);
      const length = bytes.readUInt32LE(bytes.length - TILES_TRAILER_BYTES);
      const index = JSON.parse(bytes.subarray(bytes.length - TILES_TRAILER_BYTES - length, bytes.length - TILES_TRAILER_BYTES).toString()) as TileIndex;
      return { index, tile: (level: number, k: number) => bytes.subarray(index.tiles[level][k][0], index.tiles[level][k][0] + index.tiles[level][k][1]) };
    };
    const full = read(join(dir, 'farfield_a.tiles'));
    const small = read(join(capped, 'farfield_a.tiles'));
    expect(small.index.levels.map((l) => l.width)).toEqual([1024, 512, 256]);
    for (let level = 0; level < 3; level++) {
      for (let k = 0; k < small.index.tiles[level].length; k++) expect(small.tile(level, k).equals(full.tile(level + 1, k)), `level ${level} tile ${k}`).toBe(true);
    }
  });
});
