/**
 * The main job in a real browser with RUN_QUEUE=redis: the web server only enqueues, and a separate worker
 * process (`server/worker-main.ts`, what `npm run worker` starts) executes the run. A designer saves and runs
 * a changed demo design and watches progress and previews arrive exactly as with the embedded pool; the
 * admin page's run queue card shows BullMQ's own counts.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { screenshot } from '../support/browser';
import { useDemoBrowser } from '../support/demo-browser';
import { startWorkerProcess, stopWorkerProcess, type WorkerProcess } from '../support/worker-process';

// No worker inside the server's process: every run must go through Redis to the worker process.
const demo = useDemoBrowser({ RUN_QUEUE: 'redis' }, { worker: false });
let worker: WorkerProcess;

beforeAll(() => {
  worker = startWorkerProcess(demo.server.ctx.config);
});
afterAll(async () => {
  if (worker) await stopWorkerProcess(worker);
}, 60_000);

describe('design → run → preview with runs on a worker process (Redis)', () => {
  it('a designer runs a changed design; a worker process takes it; progress and previews reach the page', async () => {
    const page = await demo.browser.context.newPage();
    await demo.signIn(page, 'tomas.reyes@harbourlight.example');
    await page.getByRole('table', { name: 'Projects' }).getByText('Bessel and charge-2 vortex pair').click();
    await page.getByRole('link', { name: 'Design' }).click();
    const charge = page.getByRole('list', { name: 'Channel B terms' }).getByLabel('Topological charge ℓ');
    await charge.waitFor();
    await charge.fill('1');
    await page.getByRole('button', { name: 'Save and run' }).click();
    await page.getByLabel('Message').fill('Charge 1 on the worker machines');
    await page.getByRole('button', { name: 'Save revision and start run' }).click();

    await page.waitForURL(/\/runs\/\d+$/);
    const runId = Number(/\/runs\/(\d+)$/.exec(page.url())![1]);
    const progress = page.getByRole('progressbar', { name: 'Run progress' });
    await progress.waitFor();
    await expect
      .poll(async () => Number(await progress.getAttribute('aria-valuenow')), { timeout: 170_000, interval: 1000 })
      .toBe(100);
    await page.getByText('Finished').first().waitFor();
    // The worker process, not the web server, executed it.
    expect(worker.taken).toContain(runId);

    await page.getByRole('region', { name: 'Metrics' }).waitFor();
    const pictures = page.locator('main img');
    await expect.poll(async () => pictures.count()).toBeGreaterThan(3);
    await expect
      .poll(async () => pictures.evaluateAll((imgs) => (imgs as { complete: boolean; naturalWidth: number }[]).filter((img) => !(img.complete && img.naturalWidth > 0)).length), { timeout: 30_000 })
      .toBe(0);
    await screenshot(page, 'redis-mode-01-run-finished');
    await page.close();
  });

  it("the admin's run queue card shows the Redis engine and BullMQ's counts", async () => {
    const page = await demo.browser.context.newPage();
    await demo.signIn(page, 'iris.calder@harbourlight.example');
    await page.goto(`${demo.server.url}/admin`);
    const card = page.getByText('Runs execute on worker processes taking them from Redis.');
    await card.waitFor();
    const text = await page.locator('main').innerText();
    expect(text).toMatch(/completed\s+[1-9]/);
    expect(text).not.toMatch(/Redis does not answer/);
    await screenshot(page, 'redis-mode-02-admin-queue');
    await page.close();
  });
});
