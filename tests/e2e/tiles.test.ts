/**
 * Previews that zoom by tiles (README "Tile pyramids"), in a real browser on the demo twin-image run (1024²
 * cells: its far field is a pyramid of 1024², 512² and 256² levels): the page loads the coarsest tile and the
 * level the frame needs, never the whole PNG; zoomed, it asks only for the tiles in view (counted from the
 * requests the page makes, against the tiles that overlap the frame as the zoom places them); a review pin
 * stays on its picture point at every level and when the view is mirrored.
 */
import { join } from 'node:path';
import type { Page, Request } from 'playwright-core';
import { describe, expect, it } from 'vitest';
import { Op } from 'sequelize';
import { RunArtifactModel } from '../../server/components/runs/run.model';
import type { ReviewThread } from '../../shared/schemas/review';
import type { TilePyramid } from '../../shared/schemas/tiles';
import { expectAccessible } from '../support/axe';
import { getJson, SCREENSHOT_DIR, screenshot } from '../support/browser';
import { twinImageDemoRun, useDemoBrowser } from '../support/demo-browser';

const TOMAS = 'tomas.reyes@harbourlight.example';
const demo = useDemoBrowser();
let runPath = '';
/** Where the review pin goes: 58 % across and 43 % down the far field under input A. */
const PIN = { x: 0.58, y: 0.43 };

async function post<T>(page: Page, path: string, body: unknown): Promise<T> {
  return page.evaluate(
    async ({ path, body }) => {
      const csrf = (await (await fetch('/api/auth/csrf')).json()) as { csrfToken: string };
      const res = await fetch(path, { method: 'POST', headers: { 'Content-Type': 'application/json', 'x-csrf-token': csrf.csrfToken }, body: JSON.stringify(body) });
      if (!res.ok) throw new Error(`POST ${path} answered ${res.status}: ${await res.text()}`);
      return res.json();
    },
    { path, body },
  ) as Promise<T>;
}

/** Tiles of `level` overlapping the picture fractions [from, to) across and down (picture drawn unmirrored). */
function overlapping(pyramid: TilePyramid, level: number, across: [number, number], down: [number, number]): string[] {
  const { width, height, columns, rows } = pyramid.levels[level];
  const size = pyramid.tileSize;
  const names: string[] = [];
  for (let y = 0; y < rows; y++) {
    for (let x = 0; x < columns; x++) {
      const inX = x * size < across[1] * width && (x + 1) * size > across[0] * width;
      const inY = y * size < down[1] * height && (y + 1) * size > down[0] * height;
      if (inX && inY) names.push(`${level}/${x}/${y}`);
    }
  }
  return names.sort();
}

/** The coarsest level with at least one pixel per device pixel of the picture as shown (level 0 if none). */
function neededLevel(pyramid: TilePyramid, devicePixels: number): number {
  for (let level = pyramid.levels.length - 1; level >= 0; level--) if (pyramid.levels[level].width >= devicePixels) return level;
  return 0;
}

describe('previews that zoom by tiles', () => {
  it('loads the coarsest tile and then only the tiles in view at the level the zoom needs; a review pin stays on its point', async () => {
    const page = await demo.browser.context.newPage();
    // A frame under 512 px wide, so the whole view needs the 512² level and a zoom the full 1024² one.
    await page.setViewportSize({ width: 620, height: 1000 });
    await demo.signIn(page, TOMAS);
    const { projectId, runId, path } = await twinImageDemoRun(page, 300_000);
    runPath = path;
    const base = `/api/projects/${projectId}/runs/${runId}`;
    const { tiles: pyramid } = await getJson<{ tiles: TilePyramid }>(page, `${base}/tiles/farfield_a.png`);
    expect(pyramid.levels.map((l) => l.width)).toEqual([1024, 512, 256]);
    const coarsest = pyramid.levels.length - 1;

    const pin = PIN;
    await post(page, `${base}/threads`, { artifact: 'farfield_a.png', ...pin, body: 'Is this speckle or a real side lobe?' });

    const requested: string[] = [];
    const wholePictures: string[] = [];
    page.on('request', (request: Request) => {
      const url = new URL(request.url());
      const tile = /\/tiles\/farfield_a\.png\/(\d+\/\d+\/\d+)$/.exec(url.pathname);
      if (tile) requested.push(tile[1]);
      if (url.pathname.endsWith('/artifacts/farfield_a.png')) wholePictures.push(url.pathname);
    });
    await page.goto(`${demo.server.url}/projects/${projectId}/runs/${runId}`);

    const figure = page.locator('figure', { has: page.locator('[data-tile-level]') }).first();
    const frame = figure.locator('[aria-roledescription="zoomable picture"]');
    await frame.waitFor();
    await frame.scrollIntoViewIfNeeded();
    const dpr = await page.evaluate(() => (globalThis as unknown as { devicePixelRatio: number }).devicePixelRatio);
    const fit = (await frame.boundingBox())!;
    expect(fit.width, 'the frame must be narrower than 512 px for this test').toBeLessThan(512 / dpr);
    const fitLevel = neededLevel(pyramid, fit.width * dpr);
    expect(fitLevel).toBe(1);
    const loaded = (names: string[]) =>
      expect
        .poll(() => frame.locator('img[data-tile]').evaluateAll((imgs, want) => want.every((name) => imgs.some((img) => img.getAttribute('data-tile') === name && (img as unknown as { complete: boolean; naturalWidth: number }).complete && (img as unknown as { naturalWidth: number }).naturalWidth > 0)), names), { timeout: 30_000 })
        .toBe(true);
    const atFit = [`${coarsest}/0/0`, ...overlapping(pyramid, fitLevel, [0, 1], [0, 1])].sort();
    await loaded(atFit);
    await page.waitForLoadState('networkidle');
    // The coarsest tile and the 2 × 2 tiles of level 1, each once; never the whole PNG.
    expect([...requested].sort()).toEqual(atFit);
    expect(wholePictures).toEqual([]);

    const pinButton = figure.getByRole('button', { name: /^Thread \d+ at u = / });
    await pinButton.waitFor();
    /** The picture point the pin marks, on screen: 6 px left of and below the pin's corner (pin-layer.tsx). */
    const pinPoint = async () => {
      const b = (await pinButton.boundingBox())!;
      return { x: b.x - 6, y: b.y + b.height + 6 };
    };
    /** Where the pin's point is on screen according to the tile of `level` that holds it. */
    const onTile = async (level: number, mirrored = false) => {
      const { width, height } = pyramid.levels[level];
      const px = pin.x * width;
      const py = pin.y * height;
      const tx = Math.floor(px / pyramid.tileSize);
      const ty = Math.floor(py / pyramid.tileSize);
      const box = (await frame.locator(`img[data-tile="${level}/${tx}/${ty}"]`).boundingBox())!;
      const fx = (px - tx * pyramid.tileSize) / pyramid.tileSize;
      return { x: mirrored ? box.x + box.width * (1 - fx) : box.x + box.width * fx, y: box.y + box.height * ((py - ty * pyramid.tileSize) / pyramid.tileSize) };
    };
    const near = (a: { x: number; y: number }, b: { x: number; y: number }) => expect(Math.hypot(a.x - b.x, a.y - b.y)).toBeLessThan(1.5);
    near(await pinPoint(), { x: fit.x + fit.width * pin.x, y: fit.y + fit.height * pin.y });
    near(await pinPoint(), await onTile(fitLevel));
    near(await pinPoint(), await onTile(coarsest));
    await screenshot(page, 'tiles-01-fit');
    await figure.screenshot({ path: join(SCREENSHOT_DIR, 'tiles-01-fit-figure.png') });
    await expectAccessible(page, 'tiles-01-fit');

    // One wheel step of −480 px over the centre zooms by e^(480 · 0.0025) = e^1.2 about it (zoom-pan-image.tsx):
    // the view then spans 0.5 ± 0.5 / e^1.2 of the picture each way.
    requested.length = 0;
    await page.mouse.move(fit.x + fit.width / 2, fit.y + fit.height / 2);
    await page.mouse.wheel(0, -480);
    const scale = Math.exp(1.2);
    await expect.poll(() => figure.getByRole('button', { name: /: fit .* to the frame$/ }).getAttribute('aria-label')).toMatch(/^332 %/);
    const zoomLevel = neededLevel(pyramid, fit.width * scale * dpr);
    expect(zoomLevel).toBe(0);
    const span: [number, number] = [0.5 - 0.5 / scale, 0.5 + 0.5 / scale];
    const inView = overlapping(pyramid, zoomLevel, span, span);
    await loaded(inView);
    await page.waitForLoadState('networkidle');
    expect([...new Set(requested)].sort()).toEqual(inView);
    expect(inView.length).toBeLessThan(pyramid.levels[0].columns * pyramid.levels[0].rows);
    // The pin's point is where the full-resolution tile holding it shows that picture point.
    near(await pinPoint(), await onTile(0));
    await screenshot(page, 'tiles-02-zoomed');
    await figure.screenshot({ path: join(SCREENSHOT_DIR, 'tiles-02-zoomed-figure.png') });

    // Move right by five steps of a tenth of the frame: the tiles asked for are the ones come into view.
    requested.length = 0;
    await frame.focus();
    for (let i = 0; i < 5; i++) await page.keyboard.press('ArrowRight');
    const shift = 0.5 / scale;
    const moved = overlapping(pyramid, 0, [span[0] + shift, span[1] + shift], span);
    await loaded(moved);
    await page.waitForLoadState('networkidle');
    expect(moved.filter((name) => !inView.includes(name)).length).toBeGreaterThan(0);
    for (const name of requested) expect([...inView, ...moved]).toContain(name);
    near(await pinPoint(), await onTile(0));

    // Mirrored, back at the whole view and then zoomed over the pin: the tiles turn with the picture and the pin
    // stays on its point at every level.
    await page.keyboard.press('0');
    await page.getByLabel('Mirror previews left–right').check();
    await figure.getByRole('img', { name: 'u grows to the left, v grows upwards' }).waitFor();
    expect(await frame.locator('[data-tile-level]').getAttribute('style')).toContain('scaleX(-1)');
    await loaded(atFit);
    await frame.scrollIntoViewIfNeeded();
    const whole = (await frame.boundingBox())!;
    near(await pinPoint(), { x: whole.x + whole.width * (1 - pin.x), y: whole.y + whole.height * pin.y });
    near(await pinPoint(), await onTile(fitLevel, true));
    near(await pinPoint(), await onTile(coarsest, true));
    const point = await pinPoint();
    await page.mouse.move(point.x, point.y);
    await page.mouse.wheel(0, -480);
    await loaded([`0/${Math.floor(pin.x * 4)}/${Math.floor(pin.y * 4)}`]);
    near(await pinPoint(), await onTile(0, true));
    await screenshot(page, 'tiles-03-zoomed-mirrored');
    await figure.screenshot({ path: join(SCREENSHOT_DIR, 'tiles-03-zoomed-mirrored-figure.png') });
    await page.getByLabel('Mirror previews left–right').uncheck();
    await figure.getByRole('img', { name: 'u grows to the right, v grows upwards' }).waitFor();

    const { threads } = await getJson<{ threads: ReviewThread[] }>(page, `${base}/threads`);
    expect(threads.find((t) => t.artifact === 'farfield_a.png')).toMatchObject(pin);
    await page.close();
  });

  it('a run without tile pyramids (made before them) shows its single PNG, its pin in place', async () => {
    const runId = Number(/runs\/(\d+)$/.exec(runPath)![1]);
    await RunArtifactModel.destroy({ where: { runId, name: { [Op.like]: '%.tiles' } } });
    const page = await demo.browser.context.newPage();
    await page.setViewportSize({ width: 620, height: 1000 });
    await demo.signIn(page, TOMAS);
    const tileRequests: string[] = [];
    page.on('request', (request: Request) => {
      if (request.url().includes('/tiles/')) tileRequests.push(request.url());
    });
    await page.goto(`${demo.server.url}${runPath}`);
    const figure = page.locator('figure', { has: page.locator('img[src$="/artifacts/farfield_a.png"]') }).first();
    const image = figure.locator('img[src$="/artifacts/farfield_a.png"]');
    await expect.poll(() => image.evaluate((img) => (img as unknown as { naturalWidth: number }).naturalWidth), { timeout: 30_000 }).toBe(1024);
    const frame = figure.locator('[aria-roledescription="zoomable picture"]');
    await frame.scrollIntoViewIfNeeded();
    const box = (await frame.boundingBox())!;
    const pin = figure.getByRole('button', { name: /^Thread \d+ at u = / });
    const b = (await pin.boundingBox())!;
    expect(Math.hypot(b.x - 6 - (box.x + box.width * PIN.x), b.y + b.height + 6 - (box.y + box.height * PIN.y))).toBeLessThan(1.5);
    expect(await frame.locator('[data-tile]').count()).toBe(0);
    expect(tileRequests).toEqual([]);
    await screenshot(page, 'tiles-04-single-png');
    await page.close();
  });
});
