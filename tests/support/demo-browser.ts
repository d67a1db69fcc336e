/**
 * What every browser test starts from: the real app seeded with the demo scenario, Debian's Chromium, and a
 * sign-in as one of the demo people. Call once at the top of a test file.
 */
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, expect } from 'vitest';
import { DEMO_PASSWORD } from '../../server/db/seed-demo';
import { getJson, launchBrowser } from './browser';
import { startServerWithDemo, type RunningServer } from './running-server';

export interface DemoBrowser {
  readonly server: RunningServer;
  readonly browser: Awaited<ReturnType<typeof launchBrowser>>;
  /** Signs out whoever was signed in, opens the app (which sends the visitor to sign in) and signs in. */
  signIn(page: Page, email: string): Promise<void>;
}

/** `env` and `options` go to startServerWithDemo (e.g. `{ RUN_QUEUE: 'redis' }, { worker: false }`). */
export function useDemoBrowser(env: Record<string, string> = {}, options: { worker?: boolean } = {}): DemoBrowser {
  let server: RunningServer | undefined;
  let browser: Awaited<ReturnType<typeof launchBrowser>> | undefined;
  beforeAll(async () => {
    server = await startServerWithDemo(env, options);
    browser = await launchBrowser();
  });
  afterAll(async () => {
    await browser?.close();
    await server?.close();
  });
  const ready = () => {
    if (!server || !browser) throw new Error('useDemoBrowser(): the server and browser start in beforeAll');
    return { server, browser };
  };
  return {
    get server() {
      return ready().server;
    },
    get browser() {
      return ready().browser;
    },
    async signIn(page, email) {
      const { server, browser } = ready();
      await browser.context.clearCookies();
      await page.goto(`${server.url}/`);
      await page.waitForURL(/\/sign-in/);
      const form = page.getByRole('form', { name: 'Sign in' });
      await form.getByLabel('E-mail').fill(email);
      await form.getByLabel('Password').fill(DEMO_PASSWORD);
      await form.getByRole('button', { name: 'Sign in' }).click();
      await page.getByRole('heading', { name: 'Projects', exact: true }).waitFor();
    },
  };
}

/**
 * The demo's twin-image project (two picture holograms, 1024² cells) and its first succeeded run, waiting for
 * the queue to finish it.
 */
export async function twinImageDemoRun(page: Page, timeout = 240_000): Promise<{ projectId: number; runId: number; path: string }> {
  const { projects } = await getJson<{ projects: { id: number; name: string }[] }>(page, '/api/projects');
  const project = projects.find((p) => /twin/i.test(p.name)) ?? projects[0];
  let runId = 0;
  await expect
    .poll(
      async () => {
        const { runs } = await getJson<{ runs: { id: number; status: string }[] }>(page, `/api/projects/${project.id}/runs`);
        runId = runs.find((r) => r.status === 'succeeded')?.id ?? 0;
        return runId;
      },
      { timeout, interval: 1000 },
    )
    .toBeGreaterThan(0);
  return { projectId: project.id, runId, path: `/projects/${project.id}/runs/${runId}` };
}
