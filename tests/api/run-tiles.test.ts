/**
 * The tile routes of a run's previews (README "Tile pyramids"): a 512² twin-image run, its previews painted on
 * the run's helper thread, stores pyramids for the far-field totals and the maps; the manifest and the tiles
 * are read like the run's other files (project members, share links), tiles cut from the same picture as the
 * single PNG (decoded with pngjs and compared pixel by pixel), 400 for a level or tile number that is not one,
 * 404 outside the pyramid and for previews without one.
 */
import { PNG } from 'pngjs';
import { Op } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { RunArtifactModel } from '../../server/components/runs/run.model';
import type { RunDetail } from '../../shared/schemas/runs';
import type { TilePyramid } from '../../shared/schemas/tiles';
import { download, twinImageDesign, waitForRun } from '../support/designs';
import { ApiClient, createTestApp, makeUser, signedInClient, type TestApp } from '../support/test-app';

let t: TestApp;
let owner: ApiClient;
let outsider: ApiClient;
let anonymous: ApiClient;
let projectId: number;
let run: RunDetail;
let base: string;

beforeAll(async () => {
  t = await createTestApp({ RUN_HELPER_THREADS: 'true' });
  owner = await signedInClient(t.app, await makeUser({ name: 'Tile Owner' }));
  outsider = await signedInClient(t.app, await makeUser({ name: 'Tile Outsider' }));
  anonymous = await new ApiClient(t.app).start();
  projectId = (await owner.post('/api/projects', { name: 'Tiles' })).body.project.id;
  const number = (await owner.post(`/api/projects/${projectId}/revisions`, { design: twinImageDesign({ cells: 512, iterations: 2 }) })).body.revision.number;
  const started = await owner.post(`/api/projects/${projectId}/revisions/${number}/runs`);
  run = await waitForRun(owner, projectId, started.body.run.id, undefined, 240_000);
  base = `/api/projects/${projectId}/runs/${run.id}`;
}, 300_000);
afterAll(async () => {
  await t?.close();
});

const decode = (bytes: Buffer) => PNG.sync.read(bytes);

describe('tile pyramids of a run', () => {
  it('are stored with the run (counted like its other files) and marked on the previews they belong to', async () => {
    expect(run.status, run.error ?? '').toBe('succeeded');
    const tiled = run.artifacts.filter((a) => a.tiled).map((a) => a.name);
    expect(tiled.sort()).toEqual(['atom_index.png', 'farfield_a.png', 'farfield_b.png', 'farfield_extra.png', 'phase_a.png', 'phase_b.png', 'rotation.png']);
    // The component pictures keep their single PNG; the .tiles files are not in the list of downloads.
    expect(run.artifacts.find((a) => a.name === 'farfield_a_out-a.png')?.tiled).toBeUndefined();
    expect(run.artifacts.some((a) => a.name.endsWith('.tiles'))).toBe(false);
    const stored = await RunArtifactModel.findAll({ where: { runId: run.id, name: { [Op.like]: '%.tiles' } } });
    expect(stored).toHaveLength(7);
    for (const file of stored) expect(file.size).toBeGreaterThan(1000);
  });

  it('serves the manifest: image size, tile size and the levels down to one tile', async () => {
    const res = await owner.get(`${base}/tiles/farfield_a.png`);
    expect(res.status).toBe(200);
    expect(res.headers['cache-control']).toBe('private, max-age=86400, immutable');
    const tiles = res.body.tiles as TilePyramid;
    expect(tiles).toEqual({
      picture: 'farfield_a.png',
      width: 512,
      height: 512,
      tileSize: 256,
      levels: [
        { width: 512, height: 512, columns: 2, rows: 2 },
        { width: 256, height: 256, columns: 1, rows: 1 },
      ],
    });
  });

  it('serves tiles cut from the same picture as the single preview PNG (level 0 of a 512² run is that PNG)', async () => {
    const whole = decode((await download(owner, `${base}/artifacts/farfield_a.png`)).body);
    expect([whole.width, whole.height]).toEqual([512, 512]);
    for (const [x, y] of [
      [0, 0],
      [1, 0],
      [0, 1],
      [1, 1],
    ]) {
      const res = await download(owner, `${base}/tiles/farfield_a.png/0/${x}/${y}`);
      expect(res.status).toBe(200);
      expect(res.headers['content-type']).toBe('image/png');
      expect(res.headers['cache-control']).toBe('private, max-age=86400, immutable');
      const tile = decode(res.body);
      expect([tile.width, tile.height]).toEqual([256, 256]);
      let differing = 0;
      for (let row = 0; row < 256; row++) {
        for (let col = 0; col < 256; col++) {
          const i = 4 * (row * 256 + col);
          const j = 4 * ((y * 256 + row) * 512 + x * 256 + col);
          for (let k = 0; k < 4; k++) if (tile.data[i + k] !== whole.data[j + k]) differing++;
        }
      }
      expect(differing, `tile (${x}, ${y})`).toBe(0);
    }
    const top = decode((await download(owner, `${base}/tiles/phase_b.png/1/0/0`)).body);
    expect([top.width, top.height]).toEqual([256, 256]);
  });

  it('answers 404 for a tile outside the pyramid and for previews without one, 400 for numbers that are not', async () => {
    const outside = await owner.get(`${base}/tiles/farfield_a.png/0/2/0`);
    expect(outside.status).toBe(404);
    expect(outside.body.error).toBe('Level 0 of "farfield_a.png" has 2 × 2 tiles (x 0–1, y 0–1); there is no tile (2, 0)');
    expect((await owner.get(`${base}/tiles/farfield_a.png/1/0/1`)).status).toBe(404);
    const level = await owner.get(`${base}/tiles/farfield_a.png/2/0/0`);
    expect(level.status).toBe(404);
    expect(level.body.error).toBe('"farfield_a.png" has tile levels 0 (full resolution) to 1; there is no level 2');
    const untiled = await owner.get(`${base}/tiles/farfield_a_out-a.png/0/0/0`);
    expect(untiled.status).toBe(404);
    expect(untiled.body.error).toMatch(/^Run \d+ has no tiles of "farfield_a_out-a.png"/);
    expect((await owner.get(`${base}/tiles/nothing.png`)).status).toBe(404);
    expect((await owner.get(`/api/projects/${projectId}/runs/999999/tiles/farfield_a.png/0/0/0`)).status).toBe(404);
    for (const [bad, name] of [
      ['x/0/0', 'level'],
      ['-1/0/0', 'level'],
      ['0/1.5/0', 'x'],
      ['0/0/01', 'y'],
      ['0/0/1e3', 'y'],
    ]) {
      const res = await owner.get(`${base}/tiles/farfield_a.png/${bad}`);
      expect(res.status, bad).toBe(400);
      expect(res.body.error).toMatch(new RegExp(`^${name} must be a whole number 0 or more`));
    }
    const picture = await owner.get(`${base}/tiles/${encodeURIComponent('../farfield_a.png')}/0/0/0`);
    expect(picture.status).toBe(400);
    expect(picture.body.error).toMatch(/is not a preview name/);
  });

  it('are read only by the project members, and by a share link of the run', async () => {
    expect((await anonymous.get(`${base}/tiles/farfield_a.png/0/0/0`)).status).toBe(401);
    expect((await outsider.get(`${base}/tiles/farfield_a.png/0/0/0`)).status).toBe(404);
    expect((await outsider.get(`${base}/tiles/farfield_a.png`)).status).toBe(404);
    const link = await owner.post(`${base}/share-links`, {});
    expect(link.status).toBe(201);
    const token = link.body.token as string;
    const shared = await download(anonymous, `/api/shared/${token}/tiles/farfield_a.png/1/0/0`);
    expect(shared.status).toBe(200);
    expect(shared.headers['cache-control']).toBe('no-store');
    expect(decode(shared.body).width).toBe(256);
    expect((await anonymous.get(`/api/shared/${token}/tiles/farfield_a.png`)).body.tiles.levels).toHaveLength(2);
    expect((await owner.delete(`/api/projects/${projectId}/share-links/${link.body.shareLink.id}`)).status).toBe(200);
    expect((await anonymous.get(`/api/shared/${token}/tiles/farfield_a.png/1/0/0`)).status).toBe(410);
  });

  it('go with the run’s files when they are deleted', async () => {
    expect((await owner.delete(`${base}/files`)).status).toBe(200);
    expect((await owner.get(`${base}/tiles/farfield_a.png/0/0/0`)).status).toBe(404);
    expect(await RunArtifactModel.count({ where: { runId: run.id } })).toBe(0);
  });
});
