/**
 * The picture convention on the run page (README "Picture convention"): every far-field preview of a
 * finished demo run carries labelled axes (u = sin θx, v = sin θy), an orientation mark and a brightness
 * key; maps carry x and y in µm; the mirror switch flips the previews left to right on screen only; a run
 * made before the convention says so instead of drawing axes it does not have.
 */
import { describe, expect, it } from 'vitest';
import { RunModel } from '../../server/components/runs/run.model';
import { screenshot } from '../support/browser';
import { twinImageDemoRun, useDemoBrowser } from '../support/demo-browser';

const TOMAS = 'tomas.reyes@harbourlight.example';
const demo = useDemoBrowser();

describe('pictures on the run page', () => {
  let runPath = '';

  it('far fields and maps carry labelled axes, an orientation mark and a brightness key; the mirror switch flips the view only', async () => {
    const page = await demo.browser.context.newPage();
    await page.setViewportSize({ width: 1400, height: 1000 });
    await demo.signIn(page, TOMAS);
    runPath = (await twinImageDemoRun(page)).path;
    await page.goto(`${demo.server.url}${runPath}`);

    const farFields = page.locator('section', { has: page.getByRole('heading', { name: 'Far-field previews' }) });
    await farFields.waitFor();
    const first = farFields.locator('[data-picture-axes]').first();
    await first.waitFor();
    const text = await first.innerText();
    expect(text).toContain('u = sin θx');
    expect(text).toContain('v = sin θy');
    expect(text).toMatch(/Brightness: √\(I \/ I₀\)/);
    // Ticks of direction cosines around 0 (the grid reaches ±1 for P = λ/2; the demo's P > λ/2 reaches less).
    expect(text).toMatch(/\b0\.0\b|\b0\b/);
    await first.getByRole('img', { name: 'u grows to the right, v grows upwards' }).waitFor();
    await first.scrollIntoViewIfNeeded();
    await screenshot(page, 'pictures-01-far-field-axes');

    // Maps: x and y in µm.
    const phase = page.locator('[data-picture-axes]', { hasText: 'x (µm)' }).first();
    await phase.waitFor();
    expect(await phase.innerText()).toContain('y (µm)');

    // The mirror switch: the picture turns on screen, the x axis runs the other way, the file is untouched.
    // The element carrying the picture's zoom, pan and mirror: the picture itself, or the layer of its tiles.
    const image = first.locator('[style*="translate("]').first();
    const before = await image.getAttribute('style');
    expect(before).not.toContain('scaleX(-1)');
    await page.getByLabel('Mirror previews left–right').check();
    await first.getByRole('img', { name: 'u grows to the left, v grows upwards' }).waitFor();
    expect(await image.getAttribute('style')).toContain('scaleX(-1)');
    expect(await first.innerText()).toContain('mirrored: increasing to the left');
    await first.scrollIntoViewIfNeeded();
    await screenshot(page, 'pictures-02-mirrored');
    await page.getByLabel('Mirror previews left–right').uncheck();
    await first.getByRole('img', { name: 'u grows to the right, v grows upwards' }).waitFor();

    // The printable design report draws the previews with the same axes.
    await page.goto(`${demo.server.url}${runPath}/report`);
    const printed = page.locator('#report-previews ~ div [data-picture-axes]', { hasText: 'u = sin θx' }).first();
    await printed.waitFor();
    expect(await printed.innerText()).toContain('v = sin θy');
    await screenshot(page, 'pictures-05-report');

    // The composer's far-field sketch uses the same frame: u to the right, v up, labelled.
    await page.goto(`${demo.server.url}${runPath.replace(/\/runs\/\d+$/, '/design')}`);
    const sketch = page.locator('[data-picture-axes]', { hasText: 'v = sin θy' }).first();
    await sketch.waitFor();
    expect(await sketch.innerText()).toContain('u = sin θx');
    await sketch.getByRole('img', { name: 'u grows to the right, v grows upwards' }).waitFor();
    await sketch.scrollIntoViewIfNeeded();
    await screenshot(page, 'pictures-04-composer-sketch');
    await page.close();
  });

  it('a run made before the picture convention says so and draws no axes', async () => {
    const runId = Number(/runs\/(\d+)$/.exec(runPath)![1]);
    const row = await RunModel.findByPk(runId);
    const { pictures: _dropped, ...older } = (row!.plots ?? {}) as Record<string, unknown>;
    await RunModel.update({ plots: older }, { where: { id: runId } });

    const page = await demo.browser.context.newPage();
    await demo.signIn(page, TOMAS);
    await page.goto(`${demo.server.url}${runPath}`);
    await page.getByText('Previews in the earlier picture frame').waitFor();
    await page.locator('section', { has: page.getByRole('heading', { name: 'Far-field previews' }) }).locator('img').first().waitFor();
    expect(await page.locator('[data-picture-axes]').count()).toBe(0);
    expect(await page.getByLabel('Mirror previews left–right').count()).toBe(0);
    await screenshot(page, 'pictures-03-earlier-frame');
    await page.close();
  });
});
