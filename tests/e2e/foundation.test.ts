/**
 * In a real browser: a demo designer signs in, creates a project, finds it in the table, adds a member, and
 * is told that only a site admin invites someone without an account;
 * a demo viewer sees the project but none of the owner's controls.
 */
import { describe, expect, it } from 'vitest';
import { expectAccessible } from '../support/axe';
import { screenshot } from '../support/browser';
import { useDemoBrowser } from '../support/demo-browser';

const demo = useDemoBrowser();

describe('foundation in the browser', () => {
  it('a designer signs in, creates a project, sees it in the table and adds a member', async () => {
    const page = await demo.browser.context.newPage();
    const consoleErrors: string[] = [];
    page.on('console', (m) => m.type() === 'error' && consoleErrors.push(m.text()));

    await page.goto(`${demo.server.url}/`);
    await page.waitForURL(/\/sign-in/);
    await screenshot(page, 'foundation-01-sign-in');
    await expectAccessible(page, 'foundation-01-sign-in');

    // A wrong password shows the server's message without leaving the page.
    const form = page.getByRole('form', { name: 'Sign in' });
    await form.getByLabel('E-mail').fill('tomas.reyes@harbourlight.example');
    await form.getByLabel('Password').fill('not the password');
    await form.getByRole('button', { name: 'Sign in' }).click();
    await page.getByText(/not correct/).waitFor();

    await demo.signIn(page, 'tomas.reyes@harbourlight.example');
    const table = page.getByRole('table', { name: 'Projects' });
    await table.getByText('Twin-image security tag').waitFor();
    await screenshot(page, 'foundation-02-dashboard');
    await expectAccessible(page, 'foundation-02-dashboard');

    await page.getByRole('button', { name: 'New project' }).click();
    await page.getByLabel('Project name').fill('Metalens for a fibre tip');
    await page.getByLabel('Description').fill('A 0.3 NA lens on x and a deflector on y, 780 nm.');
    await page.getByRole('button', { name: 'Create project' }).click();
    await page.getByRole('heading', { name: 'Metalens for a fibre tip' }).waitFor();

    await page.goto(`${demo.server.url}/?sort=name&dir=asc`);
    await table.getByText('Metalens for a fibre tip').waitFor();
    const names = await table.locator('tbody tr').allInnerTexts();
    expect(names.findIndex((r) => r.includes('Metalens'))).toBeLessThan(names.findIndex((r) => r.includes('Twin-image')));
    await page.getByLabel('Filter projects').fill('fibre');
    await expect.poll(async () => table.locator('tbody tr').count()).toBe(1);
    await screenshot(page, 'foundation-03-table-filtered');
    await expectAccessible(page, 'foundation-03-table-filtered');

    await table.getByText('Metalens for a fibre tip').click();
    await page.getByRole('link', { name: 'Members' }).click();
    const addForm = page.getByRole('form', { name: 'Add a member' });
    await addForm.getByLabel("Member's e-mail").fill('kai.brenner@harbourlight.example');
    await addForm.getByLabel('Role on this project').selectOption('reviewer');
    await addForm.getByRole('button', { name: 'Add member' }).click();
    await page.getByLabel('Role of Kai Brenner').waitFor();
    expect(await page.getByLabel('Role of Kai Brenner').inputValue()).toBe('reviewer');

    // Sign-up is closed: someone without an account is invited by a site admin, not by a designer.
    await addForm.getByText(/a site admin invites anyone new/).waitFor();
    await addForm.getByLabel("Member's e-mail").fill('visiting.scientist@partner-lab.example');
    await addForm.getByRole('button', { name: 'Add member' }).click();
    await page.getByText(/No active account can be added for this address/).first().waitFor();
    // A malformed address gets the field's own message.
    await addForm.getByLabel("Member's e-mail").fill('not-an-address');
    await addForm.getByRole('button', { name: 'Add member' }).click();
    await page.getByText(/valid e-mail/).first().waitFor();
    await screenshot(page, 'foundation-04-members');
    await expectAccessible(page, 'foundation-04-members');
    // The browser logs each refused request itself; the refusals this visit expects are 401 (before sign-in),
    // 403 (a designer may not invite an address without an account), 404 and 409. Any other failed load
    // (a 500, a missing asset) or script error is a bug.
    expect(consoleErrors.filter((e) => !/Failed to load resource: the server responded with a status of (401|403|404|409)\b/.test(e))).toEqual([]);
    await page.close();
  });

  it('a viewer sees the project but not the owner controls', async () => {
    const page = await demo.browser.context.newPage();
    await demo.signIn(page, 'kai.brenner@harbourlight.example');
    await page.getByRole('table', { name: 'Projects' }).getByText('Bessel and charge-2 vortex pair').click();
    await page.getByRole('heading', { name: 'Bessel and charge-2 vortex pair' }).waitFor();
    expect(await page.getByRole('button', { name: 'Edit details' }).count()).toBe(0);
    expect(await page.getByRole('button', { name: 'Archive project' }).count()).toBe(0);
    await page.getByRole('link', { name: 'Members' }).click();
    await page.getByText('Tomás Reyes').first().waitFor();
    expect(await page.getByRole('form', { name: 'Add a member' }).count()).toBe(0);
    await screenshot(page, 'foundation-05-viewer-members');
    await expectAccessible(page, 'foundation-05-viewer-members');
    await page.close();
  });
});
