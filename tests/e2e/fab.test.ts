/**
 * From a good preview to a fab package in a real browser: a designer uploads an atom library, runs the
 * Bessel demo design with it under a tightened project gap rule, sees the violations on the layout overlay and
 * the export refused, overrides as owner with a reason, and downloads the fab package, whose contents are then
 * listed by Python's zipfile (an independent zip reader).
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { atomLibraryToCsv } from '../../shared/optics/atoms';
import { demoAtomLibrary } from '../../shared/optics/demo-library';
import { expectAccessible } from '../support/axe';
import { screenshot } from '../support/browser';
import { useDemoBrowser } from '../support/demo-browser';
import { PYTHON } from '../support/python';

const demo = useDemoBrowser();
const work = mkdtempSync(path.join(tmpdir(), 'pw-fab-e2e-'));

describe('atom library → run → layout → fab package', () => {
  it('a designer uploads a library, runs with it, inspects the DRC overlay and downloads the package', async () => {
    const page = await demo.browser.context.newPage();
    await demo.signIn(page, 'tomas.reyes@harbourlight.example');
    await page.getByRole('table', { name: 'Projects' }).getByText('Bessel and charge-2 vortex pair').click();

    // The owner tightens the project's minimum gap so the layout breaks the rule somewhere.
    await page.getByRole('button', { name: 'Edit rules' }).click();
    await page.getByLabel('Smallest gap between pillars').fill('200');
    await page.getByRole('button', { name: 'Save design rules' }).click();
    await page.getByTestId('design-rules').getByText('200').first().waitFor();

    await page.getByRole('link', { name: 'Atom libraries' }).click();

    const csvPath = path.join(work, 'bench-library.csv');
    writeFileSync(csvPath, atomLibraryToCsv({ ...demoAtomLibrary(), name: 'Bench library 633' }));
    const upload = page.getByRole('form', { name: 'Upload a library' });
    await upload.getByLabel('Library CSV file').setInputFiles(csvPath);
    await upload.getByLabel('Library name').fill('Bench library 633');
    await upload.getByRole('button', { name: 'Upload library' }).click();
    await page.getByText('Bench library 633').first().waitFor();
    await screenshot(page, 'fab-01-library');
    await expectAccessible(page, 'fab-01-library');

    await page.getByRole('link', { name: 'Design' }).click();
    const picker = page.getByLabel('Library to map atoms from');
    await picker.waitFor();
    const option = picker.locator('option', { hasText: 'Bench library 633' });
    await picker.selectOption((await option.getAttribute('value'))!);
    await page.getByRole('button', { name: 'Save and run' }).click();
    await page.getByLabel('Message').fill('Mapped with the bench library');
    await page.getByRole('button', { name: 'Save revision and start run' }).click();
    await page.waitForURL(/\/runs\/\d+$/);
    const runUrl = page.url();
    const progress = page.getByRole('progressbar', { name: 'Run progress' });
    await expect
      .poll(async () => Number(await progress.getAttribute('aria-valuenow')), { timeout: 150_000, interval: 1000 })
      .toBe(100);
    const verdict = page.getByTestId('drc-verdict');
    await verdict.getByText(/design-rule violation/).waitFor();
    // Export stays refused while the violations stand.
    expect(await page.getByRole('link', { name: 'Download fab package' }).count()).toBe(0);

    await page.getByRole('link', { name: 'Layout', exact: true }).click();
    await page.getByTestId('layout-svg').waitFor();
    await page.getByLabel('Show DRC violations').check();
    await page.getByRole('button', { name: 'Centre' }).click();
    await expect.poll(async () => page.locator('[data-cell]').count()).toBeGreaterThan(10);
    await expect.poll(async () => page.locator('[data-violation]').count()).toBeGreaterThan(0);
    await screenshot(page, 'fab-02-layout-violations');
    await expectAccessible(page, 'fab-02-layout-violations');

    // The owner overrides with a recorded reason; then the package downloads.
    await page.goto(runUrl);
    await page.getByLabel('Reason for exporting despite the violations').fill('Test write on a scrap wafer to calibrate the etch bias.');
    await page.getByRole('button', { name: 'Override and allow export' }).click();
    await verdict.getByText(/calibrate the etch bias/).waitFor();
    const link = page.getByRole('link', { name: 'Download fab package' });
    await link.waitFor();
    const [download] = await Promise.all([page.waitForEvent('download'), link.click()]);
    const zipPath = path.join(work, download.suggestedFilename());
    await download.saveAs(zipPath);
    expect(statSync(zipPath).size).toBeGreaterThan(100_000);
    const listing = JSON.parse(
      execFileSync(PYTHON, [
        '-c',
        'import json, sys, zipfile; z = zipfile.ZipFile(sys.argv[1]); print(json.dumps({i.filename: i.file_size for i in z.infolist()}))',
        zipPath,
      ]).toString(),
    ) as Record<string, number>;
    // Everything sits in one folder named after the project, revision and run.
    const folder = /^(.+-r2-run\d+)\//.exec(Object.keys(listing)[0])?.[1];
    expect(folder).toMatch(/^bessel-and-charge-2-vortex-pair-r2-run\d+$/);
    const names = Object.keys(listing).map((n) => n.slice(folder!.length + 1));
    expect(names).toEqual(
      expect.arrayContaining(['layout.gds', 'design.json', 'metrics.json', 'drc.json', 'atoms.csv', 'report.html', 'arrays/atom_index.npy']),
    );
    expect(names.some((n) => n.startsWith('previews/') && n.endsWith('.png'))).toBe(true);
    expect(listing[`${folder}/layout.gds`]).toBeGreaterThan(1000);
    // The package was made with the uploaded library.
    const atomsCsv = execFileSync(PYTHON, [
      '-c',
      'import sys, zipfile; sys.stdout.write(zipfile.ZipFile(sys.argv[1]).read(sys.argv[2]).decode())',
      zipPath,
      `${folder}/atoms.csv`,
    ]).toString();
    expect(atomsCsv).toContain('Bench library 633');
    const report = execFileSync(PYTHON, [
      '-c',
      'import sys, zipfile; sys.stdout.write(zipfile.ZipFile(sys.argv[1]).read(sys.argv[2]).decode())',
      zipPath,
      `${folder}/report.html`,
    ]).toString();
    expect(report).toContain('calibrate the etch bias');
    expect(report).toMatch(/laser safety officer/i);
    await screenshot(page, 'fab-03-run-with-library');
    await expectAccessible(page, 'fab-03-run-with-library');
    await page.close();
  });
});
