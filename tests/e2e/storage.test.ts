/**
 * Freeing a project's storage in a real browser: the demo owner uploads a target picture and deletes it again
 * from the picker, then deletes the files of the finished demo run from its page — each only after
 * confirming — and the run page then says its files were deleted and offers no export or downloads. A
 * viewer sees neither delete button.
 */
import type { Page } from 'playwright-core';
import { describe, expect, it } from 'vitest';
import { expectAccessible } from '../support/axe';
import { screenshot } from '../support/browser';
import { useDemoBrowser } from '../support/demo-browser';

const demo = useDemoBrowser();

/** The id of the project's first succeeded run, once there is one (the demo runs compute after the start). */
async function succeededRun(page: Page, projectId: number): Promise<number> {
  const deadline = Date.now() + 240_000;
  for (;;) {
    const id = await page.evaluate(async (project) => {
      const { runs } = (await (await fetch(`/api/projects/${project}/runs`)).json()) as { runs: { id: number; status: string }[] };
      return runs.find((r) => r.status === 'succeeded')?.id ?? 0;
    }, projectId);
    if (id) return id;
    if (Date.now() > deadline) throw new Error(`project ${projectId} has no succeeded run after 240 s`);
    await page.waitForTimeout(2000);
  }
}

describe('freeing storage', () => {
  it('a designer deletes an upload and a run’s files, each after confirming', async () => {
    const page = await demo.browser.context.newPage();
    await demo.signIn(page, 'tomas.reyes@harbourlight.example');
    await page.getByRole('table', { name: 'Projects' }).getByText('Twin-image security tag').click();
    await page.waitForURL(/\/projects\/\d+/);
    const projectId = Number(/projects\/(\d+)/.exec(page.url())![1]);
    await page.getByRole('link', { name: 'Design' }).click();

    const pictures = page.getByRole('radiogroup', { name: 'Target picture' }).first();
    await pictures.waitFor();
    await page.locator('input[type="file"][accept^="image/png"]').first().setInputFiles('demo-assets/images/compass-rose.png');
    await pictures.getByText('compass-rose.png').waitFor();

    // The first click only asks; keeping leaves the upload in place.
    await pictures.getByRole('button', { name: 'Delete compass-rose.png' }).click();
    const dialog = page.getByRole('dialog');
    await dialog.getByText('Delete “compass-rose.png”?').waitFor();
    await screenshot(page, 'storage-01-delete-upload');
    await expectAccessible(page, 'storage-01-delete-upload');
    await dialog.getByRole('button', { name: 'Keep as is' }).click();
    await expect.poll(async () => page.getByRole('dialog').count()).toBe(0);
    expect(await pictures.getByText('compass-rose.png').count()).toBeGreaterThan(0);

    await pictures.getByRole('button', { name: 'Delete compass-rose.png' }).click();
    await page.getByRole('dialog').getByRole('button', { name: 'Delete upload' }).click();
    await expect.poll(async () => pictures.getByText('compass-rose.png').count(), { timeout: 20_000 }).toBe(0);
    const uploads = await page.evaluate(async (id) => ((await (await fetch(`/api/projects/${id}/uploads`)).json()) as { uploads: unknown[] }).uploads, projectId);
    expect(uploads).toEqual([]);

    // The demo run computed at start; wait for it, then free its files.
    const runId = await succeededRun(page, projectId);
    await page.goto(`${demo.server.url}/projects/${projectId}/runs/${runId}`);
    await page.getByRole('link', { name: 'Download fab package' }).or(page.getByTestId('drc-verdict')).first().waitFor();
    await page.getByRole('button', { name: 'Delete files' }).click();
    await page.getByRole('dialog').getByText(`Delete the files of run ${runId}?`).waitFor();
    await screenshot(page, 'storage-02-delete-run-files');
    await expectAccessible(page, 'storage-02-delete-run-files');
    await page.getByRole('dialog').getByRole('button', { name: 'Delete files' }).click();

    await page.getByText('This run’s files were deleted').waitFor({ timeout: 20_000 });
    await page.getByText(/The files of this run were deleted on/).waitFor();
    expect(await page.getByRole('link', { name: 'Download fab package' }).count()).toBe(0);
    expect(await page.getByTestId('drc-verdict').count()).toBe(0);
    expect(await page.getByRole('button', { name: 'Delete files' }).count()).toBe(0);
    // The metrics stay.
    await page.getByRole('region', { name: 'Metrics' }).waitFor();
    await screenshot(page, 'storage-03-files-deleted');
    await expectAccessible(page, 'storage-03-files-deleted');
    const run = await page.evaluate(async (url) => ((await (await fetch(url)).json()) as { run: { artifacts: unknown[]; filesDeletedAt: string | null } }).run, `/api/projects/${projectId}/runs/${runId}`);
    expect(run.artifacts).toEqual([]);
    expect(run.filesDeletedAt).not.toBeNull();
    await page.close();
  });

  it('a viewer sees a run’s files but no button to delete them', async () => {
    const page = await demo.browser.context.newPage();
    await demo.signIn(page, 'kai.brenner@harbourlight.example');
    await page.getByRole('table', { name: 'Projects' }).getByText('Bessel and charge-2 vortex pair').click();
    await page.waitForURL(/\/projects\/\d+/);
    const projectId = Number(/projects\/(\d+)/.exec(page.url())![1]);
    const runId = await succeededRun(page, projectId);
    await page.goto(`${demo.server.url}/projects/${projectId}/runs/${runId}`);
    await page.getByRole('heading', { name: 'Files of this run' }).waitFor();
    await page.getByRole('link', { name: /layout\.gds/ }).first().waitFor();
    expect(await page.getByRole('button', { name: 'Delete files' }).count()).toBe(0);
    await page.close();
  });
});
