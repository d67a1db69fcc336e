/**
 * The design–run–compare loop in a real browser: two runs of the demo Bessel project (the seeded one and one
 * of a second revision with a tilt and a smaller grid) compared from the runs table, the comparison's far
 * fields on one scale with their difference, metric changes and design changes; the run page's section index
 * and its deep links; the run page's way to a comparison; the overview's latest run; the design page's
 * preview column on a wide screen. Screenshots go to .artifacts/screenshots/workbench-*.png.
 */
import type { Page } from 'playwright-core';
import { describe, expect, it } from 'vitest';
import { SCREENSHOT_DIR, screenshot } from '../support/browser';
import { useDemoBrowser } from '../support/demo-browser';

const TOMAS = 'tomas.reyes@harbourlight.example';

const demo = useDemoBrowser();

async function api<T>(page: Page, method: string, path: string, body?: unknown): Promise<T> {
  return page.evaluate(
    async ({ method, path, body }) => {
      const headers: Record<string, string> = { Accept: 'application/json' };
      if (method !== 'GET') {
        const csrf = (await (await fetch('/api/auth/csrf')).json()) as { csrfToken: string };
        headers['x-csrf-token'] = csrf.csrfToken;
        headers['Content-Type'] = 'application/json';
      }
      const res = await fetch(path, { method, headers, body: body === undefined ? undefined : JSON.stringify(body) });
      if (!res.ok) throw new Error(`${method} ${path} answered ${res.status}: ${await res.text()}`);
      return res.json();
    },
    { method, path, body },
  ) as Promise<T>;
}

async function waitForSucceeded(page: Page, projectId: number, runId: number) {
  await expect
    .poll(async () => (await api<{ run: { status: string } }>(page, 'GET', `/api/projects/${projectId}/runs/${runId}`)).run.status, { timeout: 240_000, interval: 1000 })
    .toBe('succeeded');
}

/** What the tests read of an <img> (the test code is compiled without the DOM's types). */
type Picture = { complete: boolean; naturalWidth: number };

/** Every picture in `scope` has loaded (a broken or pending one has naturalWidth 0). */
async function picturesLoaded(page: Page, selector: string) {
  await expect
    .poll(() => page.$$eval(`${selector} img`, (images) => images.length > 0 && images.every((img) => (img as unknown as Picture).complete && (img as unknown as Picture).naturalWidth > 0)), {
      timeout: 30_000,
    })
    .toBe(true);
}

describe('the design–run–compare workbench', () => {
  let projectId = 0;
  let first = 0;
  let second = 0;

  it('compares two runs of different revisions, chosen in the runs table', async () => {
    const page = await demo.browser.context.newPage();
    await demo.signIn(page, TOMAS);
    const { projects } = await api<{ projects: { id: number; name: string }[] }>(page, 'GET', '/api/projects');
    projectId = projects.find((p) => p.name.startsWith('Bessel'))!.id;
    const { runs } = await api<{ runs: { id: number }[] }>(page, 'GET', `/api/projects/${projectId}/runs`);
    first = runs.at(-1)!.id;
    await waitForSucceeded(page, projectId, first);

    // A second revision: channel A gets a 5° tilt in x, on a 256² grid (the comparison pools 512² down to it).
    const { revision } = await api<{ revision: { design: { setup: { cells: number }; channels: { a: { terms: object[] } } } } }>(page, 'GET', `/api/projects/${projectId}/revisions/1`);
    const design = structuredClone(revision.design);
    design.setup.cells = 256;
    design.channels.a.terms.push({ kind: 'tilt', thetaXDeg: 5, thetaYDeg: 0 });
    const saved = await api<{ revision: { number: number } }>(page, 'POST', `/api/projects/${projectId}/revisions`, { design, message: 'Tilt channel A by 5° on a smaller grid' });
    second = (await api<{ run: { id: number } }>(page, 'POST', `/api/projects/${projectId}/revisions/${saved.revision.number}/runs`)).run.id;
    await waitForSucceeded(page, projectId, second);

    await page.goto(`${demo.server.url}/projects/${projectId}/runs`);
    await page.getByRole('checkbox', { name: `Compare run ${first}` }).check();
    await page.getByRole('checkbox', { name: `Compare run ${second}` }).check();
    await page.screenshot({ path: `${SCREENSHOT_DIR}/workbench-runs-ticked.png` });
    await page.getByRole('link', { name: `Compare run ${first} with run ${second}` }).click();
    await page.waitForURL(new RegExp(`/runs/compare\\?a=${first}&b=${second}$`));
    await page.getByRole('heading', { name: `Run ${first} beside run ${second}` }).waitFor();

    // Far fields: runs a and b and their difference under each input, all painted by the server.
    const farFields = page.locator('section', { has: page.getByRole('heading', { name: 'Far fields', exact: true }) });
    await farFields.waitFor();
    for (const channel of ['a', 'b']) {
      const row = page.locator(`[data-compare-channel="${channel}"]`);
      await expect.poll(() => row.locator('img').count()).toBe(3);
    }
    await picturesLoaded(page, '[data-compare-channel]');
    const difference = page.getByRole('img', { name: `Under input A: difference Run ${second} − run ${first}` });
    expect(await difference.evaluate((img) => (img as unknown as Picture).naturalWidth)).toBe(256);
    await page.getByText('Difference run ' + second + ' − run ' + first).first().waitFor();

    // Metrics with their change, and the design change between the revisions in words.
    const metrics = page.getByRole('region', { name: 'Metrics' });
    await metrics.waitFor();
    expect(await metrics.getByRole('columnheader', { name: 'Δ' }).count()).toBeGreaterThan(1);
    const cellsRow = metrics.getByRole('row').filter({ hasText: /cells/i }).first();
    await expect.poll(() => cellsRow.textContent()).toMatch(/−256/);
    await page.getByRole('heading', { name: /Design changes \(revision 1 → revision 2\)/ }).waitFor();
    await page.getByText(/changes?$/).first().waitFor();
    await screenshot(page, 'workbench-compare');

    // Swapping sides keeps the address deep-linkable.
    await page.getByRole('button', { name: 'Swap a and b' }).click();
    await page.waitForURL(new RegExp(`/runs/compare\\?a=${second}&b=${first}$`));
    await page.getByRole('heading', { name: `Run ${second} beside run ${first}` }).waitFor();
    await picturesLoaded(page, '[data-compare-channel]');
    await page.close();
  });

  it('indexes the run page’s sections, follows deep links on load, and leads to a comparison', async () => {
    const page = await demo.browser.context.newPage();
    await demo.signIn(page, TOMAS);
    await page.goto(`${demo.server.url}/projects/${projectId}/runs/${second}#metrics`);
    const index = page.getByRole('navigation', { name: 'Sections of this run' });
    await index.waitFor();
    for (const name of ['Summary', 'Far fields', 'Maps', 'Beams', 'Mapping', 'Design rules', 'Fabrication sweep', 'Metrics', 'Files', 'Review']) {
      await index.getByRole('link', { name, exact: true }).waitFor();
    }
    // The deep link scrolled the metrics to just below the sticky index, and the index marks them.
    const metricsTop = async () => (await page.locator('#metrics').boundingBox())!.y;
    await expect.poll(metricsTop, { timeout: 10_000 }).toBeLessThan(120);
    expect(await metricsTop()).toBeGreaterThanOrEqual(0);
    await expect.poll(() => index.getByRole('link', { name: 'Metrics', exact: true }).getAttribute('aria-current')).toBe('location');
    await page.screenshot({ path: `${SCREENSHOT_DIR}/workbench-run-index-metrics.png` });

    await index.getByRole('link', { name: 'Far fields', exact: true }).click();
    await expect.poll(() => new URL(page.url()).hash).toBe('#far-fields');
    await expect.poll(async () => (await page.locator('#far-fields').boundingBox())!.y, { timeout: 10_000 }).toBeLessThan(120);
    await expect.poll(() => index.getByRole('link', { name: 'Far fields', exact: true }).getAttribute('aria-current')).toBe('location');
    await page.screenshot({ path: `${SCREENSHOT_DIR}/workbench-run-index-far-fields.png` });

    // Let the link's smooth scroll end before scrolling back up by hand (it would otherwise carry on after the wheel).
    let settled = -1;
    await expect
      .poll(async () => {
        const y = await page.evaluate(() => (globalThis as unknown as { scrollY: number }).scrollY);
        const still = y === settled;
        settled = y;
        return still;
      }, { interval: 250 })
      .toBe(true);
    await page.mouse.wheel(0, -50_000);
    await expect.poll(() => index.getByRole('link', { name: 'Summary', exact: true }).getAttribute('aria-current')).toBe('location');
    await page.screenshot({ path: `${SCREENSHOT_DIR}/workbench-run-top.png` });

    await index.getByRole('link', { name: 'Compare with another run' }).click();
    await page.waitForURL(new RegExp(`/runs/compare\\?a=${second}$`));
    await page.getByText('Choose two runs').waitFor();
    await page.getByLabel('Run b (after)').selectOption(String(first));
    await page.waitForURL(new RegExp(`/runs/compare\\?a=${second}&b=${first}$`));
    await page.getByRole('heading', { name: `Run ${second} beside run ${first}` }).waitFor();
    await picturesLoaded(page, '[data-compare-channel]');
    await page.close();
  });

  it('shows the latest finished run on the overview and live previews beside the design form on a wide screen', async () => {
    const page = await demo.browser.context.newPage();
    await demo.signIn(page, TOMAS);
    await page.goto(`${demo.server.url}/projects/${projectId}`);
    const latest = page.locator('section', { has: page.getByRole('heading', { name: `Latest finished run: run ${second}` }) });
    await latest.waitFor();
    await picturesLoaded(page, `section:has(h2:text("Latest finished run: run ${second}"))`);
    await latest.getByRole('link', { name: `Compare with run ${first}` }).waitFor();
    await screenshot(page, 'workbench-overview');

    await page.setViewportSize({ width: 1680, height: 1000 });
    await page.goto(`${demo.server.url}/projects/${projectId}/design?from=2`);
    const column = page.getByRole('complementary', { name: 'Live previews' });
    await column.waitFor();
    expect(await column.isVisible()).toBe(true);
    await column.getByRole('img', { name: /Channel A phase/ }).waitFor();
    await column.getByRole('img', { name: /Far field of both channels/ }).waitFor();
    // The tilted channel A points 5° to the right: u = sin 5° (tilt φ = k x sin θx).
    expect(await column.getByRole('img', { name: /Far field of both channels/ }).getAttribute('aria-label')).toContain('Channel A: beam towards u = 0.087, v = 0.000');
    const form = await page.locator('fieldset').first().boundingBox();
    const side = await column.boundingBox();
    expect(side!.x).toBeGreaterThan(form!.x + form!.width - 1);
    // Sticky: after scrolling far down the form the column is still in view.
    await page.mouse.wheel(0, 2500);
    await expect.poll(async () => (await column.boundingBox())!.y).toBeLessThan(200);
    await page.screenshot({ path: `${SCREENSHOT_DIR}/workbench-design-wide.png` });
    await page.close();
  });
});
