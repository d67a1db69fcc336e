/**
 * The main pages of the app, walked through as the demo designer and the demo admin, each checked with axe-core
 * (WCAG 2.1 AA, no serious or critical violation): projects, a project's overview, design, revisions, runs,
 * a finished run of each demo project (hologram pair; Bessel and vortex beams), its layout and report, atom
 * libraries, members, settings, and the admin pages. Plus the keyboard: the status history scrolls by keys.
 */
import { describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { expectAccessible } from '../support/axe';
import { screenshot } from '../support/browser';
import { useDemoBrowser } from '../support/demo-browser';

const demo = useDemoBrowser();

async function finishedRunOf(page: Page, projectName: string): Promise<{ projectId: number; runId: number }> {
  return page.evaluate(async (name) => {
    const get = async (path: string) => (await (await fetch(`/api${path}`)).json()) as Record<string, any>;
    const projects = (await get('/projects')).projects as { id: number; name: string }[];
    const project = projects.find((p) => p.name === name)!;
    for (let i = 0; i < 300; i++) {
      const runs = (await get(`/projects/${project.id}/runs?status=succeeded`)).runs as { id: number }[];
      if (runs.length > 0) return { projectId: project.id, runId: runs[0].id };
      await new Promise((r) => setTimeout(r, 1000));
    }
    throw new Error(`no finished run in ${name}`);
  }, projectName);
}

async function visit(page: Page, url: string, ready: () => Promise<unknown>, name: string) {
  await page.goto(url);
  await ready();
  await screenshot(page, `accessibility-${name}`);
  await expectAccessible(page, name);
}

describe('accessibility of the main pages', () => {
  it('a designer walks through projects, design, runs and run pages with no serious or critical axe finding', async () => {
    const page = await demo.browser.context.newPage();
    await page.goto(`${demo.server.url}/sign-in`);
    await page.getByRole('form', { name: 'Sign in' }).waitFor();
    await expectAccessible(page, 'sign-in');
    await demo.signIn(page, 'tomas.reyes@harbourlight.example');
    await expectAccessible(page, 'projects');
    const base = demo.server.url;

    for (const [projectName, slug] of [
      ['Twin-image security tag', 'holograms'],
      ['Bessel and charge-2 vortex pair', 'beams'],
    ] as const) {
      const { projectId, runId } = await finishedRunOf(page, projectName);
      const p = `${base}/projects/${projectId}`;
      await visit(page, p, () => page.getByRole('heading', { name: projectName }).waitFor(), `${slug}-overview`);
      await visit(page, `${p}/design`, () => page.getByRole('list', { name: 'Channel A terms' }).waitFor(), `${slug}-design`);
      await visit(page, `${p}/revisions`, () => page.getByRole('table').first().waitFor(), `${slug}-revisions`);
      await visit(page, `${p}/runs`, () => page.getByRole('table').first().waitFor(), `${slug}-runs`);
      await visit(
        page,
        `${p}/runs/${runId}`,
        async () => {
          await page.getByRole('region', { name: 'Metrics' }).waitFor();
          await page.getByRole('tablist', { name: 'Input polarization' }).waitFor();
        },
        `${slug}-run`,
      );
      await visit(page, `${p}/runs/${runId}/report`, () => page.getByRole('heading', { name: /Design report/ }).first().waitFor(), `${slug}-report`);
      await visit(page, `${p}/members`, () => page.getByRole('heading', { name: 'Members' }).first().waitFor(), `${slug}-members`);
      await visit(page, `${p}/atom-libraries`, () => page.getByRole('heading', { name: /Atom librar/ }).first().waitFor(), `${slug}-atom-libraries`);
    }
    await visit(page, `${base}/settings`, () => page.getByRole('heading', { name: /Settings/ }).first().waitFor(), 'settings');
    await page.close();
  });

  it('the status history of a run scrolls from the keyboard', async () => {
    const page = await demo.browser.context.newPage();
    await demo.signIn(page, 'tomas.reyes@harbourlight.example');
    const { projectId, runId } = await finishedRunOf(page, 'Twin-image security tag');
    await page.goto(`${demo.server.url}/projects/${projectId}/runs/${runId}`);
    const history = page.getByRole('region', { name: 'Status history' });
    await history.waitFor();
    expect(await history.getAttribute('tabindex')).toBe('0');
    await history.focus();
    expect(await page.evaluate(() => (globalThis as unknown as { document: { activeElement: { getAttribute(n: string): string | null } | null } }).document.activeElement?.getAttribute('aria-label'))).toBe('Status history');
    await page.close();
  });

  it('an admin sees the admin pages with no serious or critical axe finding', async () => {
    const page = await demo.browser.context.newPage();
    await demo.signIn(page, 'iris.calder@harbourlight.example');
    await visit(page, `${demo.server.url}/admin`, () => page.getByRole('heading', { name: /People|Users|Admin/ }).first().waitFor(), 'admin');
    await visit(page, `${demo.server.url}/admin/audit`, () => page.getByRole('heading', { name: 'Security log' }).waitFor(), 'audit');
    await page.close();
  });
});
