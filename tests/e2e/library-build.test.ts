/**
 * Computing an atom library in a real browser: the demo designer fills "Compute a library" with a small sweep
 * (7 × 7 pillars at 5 × 5 harmonics: about the fewest that the stored library's check accepts, which wants
 * phase steps of at most 2π/8 on each axis), sees the server's field message for a bad step, the cost estimate
 * and the lattice-diffraction warning of the demo period, starts the build, follows its progress to the maps
 * over (w, l), and opens the composer with the stored library chosen. A viewer of the project then sees the
 * build but no way to start or cancel one (the second test uses the first one's build).
 */
import type { Page } from 'playwright-core';
import { describe, expect, it } from 'vitest';
import { expectAccessible } from '../support/axe';
import { getJson, screenshot } from '../support/browser';
import { useDemoBrowser } from '../support/demo-browser';

const demo = useDemoBrowser();
const PROJECT = 'Twin-image security tag';
const NAME = 'Tiny Si₃N₄ sweep';

async function openAtomLibraries(page: Page): Promise<number> {
  await page.getByRole('table', { name: 'Projects' }).getByText(PROJECT).click();
  await page.waitForURL(/\/projects\/\d+/);
  const projectId = Number(/projects\/(\d+)/.exec(page.url())![1]);
  await page.goto(`${demo.server.url}/projects/${projectId}/atom-libraries`);
  await page.getByRole('heading', { name: 'Library builds' }).waitFor();
  return projectId;
}

describe('computing an atom library', () => {
  it('a designer estimates, starts and follows a build, then uses the library in a design', async () => {
    const page = await demo.browser.context.newPage();
    await demo.signIn(page, 'tomas.reyes@harbourlight.example');
    const projectId = await openAtomLibraries(page);
    const form = page.getByRole('form', { name: 'Compute a library' });

    await form.getByLabel('Library name').fill(NAME);
    await form.getByLabel('Pillar material').selectOption('silicon-nitride');
    await form.getByLabel('Substrate', { exact: true }).selectOption('fused-silica');
    await form.getByLabel('Illumination side').selectOption('substrate');
    await form.getByLabel('Wavelength λ').fill('633');
    await form.getByLabel('Period P').fill('450');
    await form.getByLabel('Pillar height').fill('1200');
    await form.getByLabel('Smallest feature').fill('60');
    await form.getByLabel('Smallest gap').fill('50');
    await form.getByLabel('Harmonics').selectOption('5');
    await form.getByLabel('Proposed subset size N').fill('4');

    // A tabulated substrate from a CSV: read in the browser by the shared parser, checked by the server against λ.
    const substrate = form.getByLabel('Substrate', { exact: true });
    await substrate.selectOption('table');
    const tableFile = form.getByLabel('Substrate: n, k table (CSV)');
    const csv = (rows: string) => ({ name: 'film.csv', mimeType: 'text/csv', buffer: Buffer.from(`# name: Test oxide film\n# source: made up for this test\nwavelength_nm,n,k\n${rows}`) });
    await tableFile.setInputFiles(csv('400,1.47,0\n600,1.46,0\n'));
    await page.getByText('film.csv: 2 rows, 400–600 nm, n 1.46–1.47, k 0; source: made up for this test.').waitFor();
    expect(await form.getByLabel('Substrate: name').inputValue()).toBe('Test oxide film');
    // 633 nm lies outside 400–600 nm: the server's message stands under the file box.
    await expect.poll(async () => tableFile.getAttribute('aria-invalid'), { timeout: 15_000 }).toBe('true');
    expect(await page.getByText(/633 nm is outside the table's range 400–600 nm/).count()).toBe(1);
    await tableFile.setInputFiles(csv('wavelength 500,1.46,0\n'));
    await page.getByText(/film\.csv: line 4: .*wavelength/).waitFor();
    await tableFile.setInputFiles(csv('500,1.462,0\n700,1.455,0\n'));
    await expect.poll(async () => tableFile.getAttribute('aria-invalid'), { timeout: 15_000 }).toBeNull();
    await screenshot(page, 'library-build-00-table');
    await substrate.selectOption('fused-silica');

    // A step of 0 is refused by the server's spec check, with the message under the Step box.
    await form.getByLabel('Step', { exact: false }).fill('0');
    const stepBox = form.getByLabel('Step', { exact: false });
    await expect.poll(async () => stepBox.getAttribute('aria-invalid'), { timeout: 15_000 }).toBe('true');
    const stepMessage = await page.locator(`#${await stepBox.getAttribute('aria-describedby')}`).last().innerText();
    expect(stepMessage).toMatch(/must be|step/i);

    // 60, 110, …, 360 nm: 7 × 7 atoms. P = 450 nm ≥ 633 nm / n(fused silica) ≈ 434 nm: the lattice diffracts in the substrate.
    await stepBox.fill('50');
    const estimate = page.getByTestId('build-estimate');
    await expect.poll(async () => (await estimate.count()) && (await estimate.innerText()), { timeout: 15_000 }).toMatch(/^49 atoms ×/);
    expect(await stepBox.getAttribute('aria-invalid')).toBeNull();
    const warning = page.getByRole('status').filter({ hasText: 'The lattice itself diffracts' });
    await warning.waitFor();
    expect(await warning.innerText()).toMatch(/450(\.0)? nm ≥ λ\/n = 633(\.0)? nm\/1\.45\d* = 43\d\.\d nm/);
    await screenshot(page, 'library-build-01-form');
    await expectAccessible(page, 'library-build-01-form');

    await form.getByRole('button', { name: 'Start computing' }).click();
    await page.waitForURL(/\/atom-libraries\/builds\/\d+$/);
    const buildId = Number(/builds\/(\d+)$/.exec(page.url())![1]);
    await page.getByRole('heading', { name: NAME }).waitFor();
    await page.getByRole('progressbar', { name: 'Atoms computed' }).waitFor();
    expect(await page.getByTestId('build-progress').innerText()).toMatch(/waiting for a worker|starting|atom \d+ of 49|All 49 atoms computed/);
    await screenshot(page, 'library-build-02-progress');

    await page.getByText('All 49 atoms computed').waitFor({ timeout: 480_000 });
    for (const title of ['|t| for x-polarized input', 'Phase for x-polarized input', '|t| for y-polarized input', 'Phase for y-polarized input', 'Zeroth-order transmittance, x input', 'Transmitted into other orders, y input', 'Reflected, all orders, x input']) {
      await page.getByRole('img', { name: new RegExp(`^${title.replace(/[|()]/g, '\\$&')}: 7 × 7 atoms`) }).waitFor();
    }
    await page.getByRole('heading', { name: 'Phase coverage' }).first().waitFor();
    await page.getByRole('heading', { name: 'Convergence against harmonics' }).waitFor();
    await page.getByRole('heading', { name: 'Proposed subset of 4 atoms' }).waitFor();
    const { build } = await getJson<{ build: { status: string; libraryId: number | null } }>(page, `/api/projects/${projectId}/library-builds/${buildId}`);
    expect(build.status).toBe('succeeded');
    expect(build.libraryId).not.toBeNull();
    await screenshot(page, 'library-build-03-done');
    await expectAccessible(page, 'library-build-03-done');

    await page.getByRole('link', { name: 'Use in a design' }).click();
    await page.waitForURL(new RegExp(`/projects/${projectId}/design`));
    const picker = page.getByLabel('Library to map atoms from');
    await expect.poll(async () => picker.inputValue(), { timeout: 20_000 }).toBe(String(build.libraryId));
    expect(await picker.locator('option:checked').innerText()).toContain(NAME);
    // The library was computed at P = 450 nm and 633 nm, the design takes them: no mismatch.
    expect(await page.getByText('This library does not fit the design').count()).toBe(0);
    expect(page.url()).not.toContain('library=');
    await screenshot(page, 'library-build-04-composer');
    await page.close();
  }, 600_000);

  it('a designer cancels a build before it ends, after confirming', async () => {
    const page = await demo.browser.context.newPage();
    await demo.signIn(page, 'tomas.reyes@harbourlight.example');
    await openAtomLibraries(page);
    const form = page.getByRole('form', { name: 'Compute a library' });
    // The form's own start: Si₃N₄ on fused silica, P = 400 nm, 14 × 14 atoms; at 21 × 21 harmonics it takes a while.
    await form.getByLabel('Library name').fill('Long sweep to cancel');
    await form.getByLabel('Harmonics').selectOption('21');
    await expect.poll(async () => (await page.getByTestId('build-estimate').count()) && page.getByTestId('build-estimate').innerText(), { timeout: 15_000 }).toMatch(/^196 atoms ×.*21 × 21/);
    expect(await page.getByRole('status').filter({ hasText: 'The lattice itself diffracts' }).count()).toBe(0);
    await form.getByRole('button', { name: 'Start computing' }).click();
    await page.waitForURL(/\/atom-libraries\/builds\/\d+$/);

    await page.getByRole('button', { name: 'Cancel build' }).click();
    const dialog = page.getByRole('dialog');
    await dialog.getByText('Cancel “Long sweep to cancel”?').waitFor();
    await screenshot(page, 'library-build-06-cancel');
    await expectAccessible(page, 'library-build-06-cancel');
    await dialog.getByRole('button', { name: 'Cancel build' }).click();
    await page.getByText(/^Cancelled.*nothing was stored\.$/).waitFor({ timeout: 30_000 });
    expect(await page.getByRole('button', { name: 'Cancel build' }).count()).toBe(0);
    expect(await page.getByRole('link', { name: 'Use in a design' }).count()).toBe(0);
    await page.close();
  });

  it('a viewer sees the project’s builds but cannot start or cancel one', async () => {
    const page = await demo.browser.context.newPage();
    await demo.signIn(page, 'kai.brenner@harbourlight.example');
    await openAtomLibraries(page);
    await page.getByRole('table', { name: 'Library builds of this project' }).getByRole('link', { name: NAME }).waitFor();
    expect(await page.getByRole('heading', { name: 'Compute a library' }).count()).toBe(0);
    expect(await page.getByRole('button', { name: 'Start computing' }).count()).toBe(0);
    await page.getByRole('table', { name: 'Library builds of this project' }).getByRole('link', { name: NAME }).click();
    await page.getByRole('heading', { name: NAME }).waitFor();
    expect(await page.getByRole('button', { name: 'Cancel build' }).count()).toBe(0);
    await screenshot(page, 'library-build-05-viewer');
    await page.close();
  });
});
