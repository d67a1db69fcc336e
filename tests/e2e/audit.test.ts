/**
 * In a real browser: a site admin opens the security log from the navigation, sees a refused sign-in and a
 * role change, and narrows the log by person and by kind; a member has no Audit link and is turned away.
 */
import { describe, expect, it } from 'vitest';
import { DEMO_PASSWORD } from '../../server/db/seed-demo';
import { expectAccessible } from '../support/axe';
import { screenshot } from '../support/browser';
import { useDemoBrowser } from '../support/demo-browser';
import { ApiClient, signedInClient } from '../support/test-app';

const demo = useDemoBrowser();
const ADMIN = 'iris.calder@harbourlight.example';
const DESIGNER = 'tomas.reyes@harbourlight.example';
const VIEWER = 'kai.brenner@harbourlight.example';

describe('security log in the browser', () => {
  it('an admin reads the log and filters it by person and by kind', async () => {
    // Events to find: a refused sign-in for the viewer and a project role change by the designer.
    const stranger = await new ApiClient(demo.server.url).start();
    expect((await stranger.post('/api/auth/sign-in', { email: VIEWER, password: 'a wrong guess' })).status).toBe(401);
    const designer = await signedInClient(demo.server.url, { email: DESIGNER, password: DEMO_PASSWORD });
    const project = (await designer.post('/api/projects', { name: 'Audit walk-through' })).body.project;
    await designer.post(`/api/projects/${project.id}/members`, { email: VIEWER, role: 'reviewer' }).expect(201);

    const page = await demo.browser.context.newPage();
    const consoleErrors: string[] = [];
    page.on('console', (m) => m.type() === 'error' && consoleErrors.push(m.text()));
    await demo.signIn(page, ADMIN);
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Audit' }).click();
    await page.getByRole('heading', { name: 'Security log' }).waitFor();
    const table = page.getByRole('table', { name: 'Security events, newest first' });
    await table.getByText('Sign-in refused').first().waitFor();
    await table.getByText('Added as Reviewer').waitFor();
    await screenshot(page, 'audit-01-log');
    await expectAccessible(page, 'audit-01-log');

    await page.getByLabel('Person').selectOption({ label: `Kai Brenner · ${VIEWER}` });
    await page.waitForURL(/person=\d+/);
    await expect.poll(() => table.getByText('Signed in', { exact: true }).count()).toBe(0);
    const rows = await table.locator('tbody tr').allInnerTexts();
    expect(rows.some((r) => r.includes('Sign-in refused') && r.includes(`Tried as ${VIEWER}`))).toBe(true);
    expect(rows.some((r) => r.includes('Project role changed') && r.includes('Tomás Reyes') && r.includes('Audit walk-through'))).toBe(true);

    await page.getByLabel('Event').selectOption({ label: 'Project role changed' });
    await page.waitForURL(/kind=project-role-changed/);
    await expect.poll(() => table.locator('tbody tr').count()).toBe(1);
    await screenshot(page, 'audit-02-filtered');
    await expectAccessible(page, 'audit-02-filtered');
    await page.reload();
    expect(await page.getByLabel('Event').inputValue()).toBe('project-role-changed');
    await expect.poll(() => table.locator('tbody tr').count()).toBe(1);
    expect(consoleErrors.filter((e) => !/Failed to load resource/.test(e))).toEqual([]);
    await page.close();
  });

  it('a member sees no Audit link and is turned away from the page', async () => {
    const page = await demo.browser.context.newPage();
    await demo.signIn(page, DESIGNER);
    expect(await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Audit' }).count()).toBe(0);
    await page.goto(`${demo.server.url}/admin/audit`);
    await page.getByRole('heading', { name: 'This page is for site admins' }).waitFor();
    await page.close();
  });
});
