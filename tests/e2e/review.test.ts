/**
 * Review in a real browser: a reviewer pins a comment on a far-field preview and mentions the owner; the
 * owner gets the mail, opens its link, lands on the pin with the thread open, replies and resolves; a viewer
 * sees the thread but no comment controls.
 */
import type { Page } from 'playwright-core';
import { describe, expect, it } from 'vitest';
import type { ReviewThread } from '../../shared/schemas/review';
import { expectAccessible } from '../support/axe';
import { getJson, screenshot } from '../support/browser';
import { useDemoBrowser } from '../support/demo-browser';
import { waitForMail } from '../support/mailbox';

const NOOR = 'noor.haddad@harbourlight.example';
const TOMAS = 'tomas.reyes@harbourlight.example';
const KAI = 'kai.brenner@harbourlight.example';

const demo = useDemoBrowser();


/** The first succeeded demo run, preferring the Bessel project; waits for the queue to finish one. */
async function finishedDemoRun(page: Page): Promise<{ projectId: number; projectName: string; runId: number }> {
  const { projects } = await getJson<{ projects: { id: number; name: string }[] }>(page, '/api/projects');
  const ordered = [...projects].sort((a, b) => Number(b.name.startsWith('Bessel')) - Number(a.name.startsWith('Bessel')));
  let found: { projectId: number; projectName: string; runId: number } | null = null;
  await expect
    .poll(
      async () => {
        for (const project of ordered) {
          const { runs } = await getJson<{ runs: { id: number; status: string }[] }>(page, `/api/projects/${project.id}/runs`);
          const done = runs.find((r) => r.status === 'succeeded');
          if (done) {
            found = { projectId: project.id, projectName: project.name, runId: done.id };
            return true;
          }
        }
        return false;
      },
      { timeout: 150_000, interval: 1000 },
    )
    .toBe(true);
  return found!;
}

describe('pinned review comments in the browser', () => {
  let target: { projectId: number; projectName: string; runId: number };
  let runPath = '';
  let mailLink = '';
  let threadId = 0;

  it('a reviewer pins a comment on a far-field preview and mentions the owner', async () => {
    const page = await demo.browser.context.newPage();
    await demo.signIn(page, NOOR);
    target = await finishedDemoRun(page);
    runPath = `/projects/${target.projectId}/runs/${target.runId}`;
    await page.goto(`${demo.server.url}${runPath}`);

    const tabs = page.getByRole('tablist', { name: 'Input polarization' }).getByRole('tab');
    await tabs.first().waitFor();
    // The second input's tab, so that following the link later has to switch tabs to reach the pin.
    if ((await tabs.count()) > 1) await tabs.nth(1).click();
    await page.getByRole('heading', { name: 'Review threads' }).waitFor();
    await page.getByText('No comments yet.').first().waitFor();
    // Every chart tick is rounded: no 0.08333333333333333 under a histogram bar.
    const ticks = page.locator('.recharts-cartesian-axis-tick-value');
    await expect.poll(() => ticks.count()).toBeGreaterThan(10);
    const tickTexts = await ticks.allTextContents();
    expect(tickTexts.join(' ')).toMatch(/\d/);
    expect(tickTexts.filter((text) => /\d\.\d{5,}|\d{8,}/.test(text))).toEqual([]);

    const figure = page.locator('figure:visible').filter({ has: page.getByRole('button', { name: 'Comment on this picture' }) }).first();
    const toggle = figure.getByRole('button', { name: 'Comment on this picture' });
    await toggle.click();
    expect(await toggle.getAttribute('aria-pressed')).toBe('true');
    const frame = figure.locator('[aria-roledescription="zoomable picture"]');
    await frame.scrollIntoViewIfNeeded();
    const box = (await frame.boundingBox())!;
    await frame.click({ position: { x: box.width * 0.3, y: box.height * 0.4 } });

    const comment = figure.getByLabel('Comment', { exact: true });
    await comment.waitFor();
    await comment.pressSequentially('The side lobe here looks brighter than the target.\nCould you check, @Tom');
    const picker = page.getByRole('listbox', { name: 'Project members to mention' });
    await picker.getByRole('option', { name: 'Tomás Reyes' }).waitFor();
    await comment.press('Enter');
    await expect.poll(() => picker.count()).toBe(0);
    await comment.pressSequentially('<b>not bold</b>');
    expect(await comment.inputValue()).toBe(
      'The side lobe here looks brighter than the target.\nCould you check, @Tomás Reyes <b>not bold</b>',
    );
    await screenshot(page, 'review-01-new-comment');
    await expectAccessible(page, 'review-01-new-comment');
    await figure.getByRole('button', { name: 'Post comment' }).click();

    const pin = figure.getByRole('button', { name: /^Thread 1 at (u|x) = / });
    await pin.waitFor();
    await figure.getByRole('heading', { name: /Thread 1/ }).waitFor();
    // Plain text: the markup shows as typed, the line break is kept, and nothing became an element.
    await figure.getByText('<b>not bold</b>', { exact: false }).first().waitFor();
    expect(await figure.locator('li b').count()).toBe(0);

    const { threads } = await getJson<{ threads: ReviewThread[] }>(page, `/api${runPath}/threads`);
    expect(threads).toHaveLength(1);
    const [thread] = threads;
    threadId = thread.id;
    expect(thread.x).toBeCloseTo(0.3, 1);
    expect(thread.y).toBeCloseTo(0.4, 1);
    expect(thread.comments[0].mentions).toHaveLength(1);

    // The pin names its place in the picture's own coordinates (a far field: direction and angles; a map: µm).
    expect(await pin.getAttribute('aria-label')).toMatch(/^Thread 1 at (u = −?\d\.\d{3}, v = −?\d\.\d{3} \(θx = −?[\d.]+°, θy = −?[\d.]+°\)|x = −?[\d.]+ µm, y = −?[\d.]+ µm)$/);
    await figure.getByText(/^Pinned at (u|x) = /).waitFor();
    // The pin sits 6 px up and right of its point, so it does not cover it; that offset corner stays on the same
    // picture point when zoomed about the centre by 1.5.
    const tip = async () => {
      const b = (await pin.boundingBox())!;
      return { x: b.x - 6, y: b.y + b.height + 6 };
    };
    const before = await tip();
    const frameBefore = (await frame.boundingBox())!;
    expect(Math.abs(before.x - (frameBefore.x + frameBefore.width * thread.x))).toBeLessThan(2);
    expect(Math.abs(before.y - (frameBefore.y + frameBefore.height * thread.y))).toBeLessThan(2);
    await figure.getByRole('button', { name: /^Zoom into/ }).click();
    const after = await tip();
    const frameNow = (await frame.boundingBox())!;
    // Zoom about the centre by 1.5: a point at fraction f moves to w/2 + (f − 0.5)·w·1.5.
    expect(Math.abs(after.x - (frameNow.x + frameNow.width * (0.5 + (thread.x - 0.5) * 1.5)))).toBeLessThan(2);
    expect(Math.abs(after.y - (frameNow.y + frameNow.height * (0.5 + (thread.y - 0.5) * 1.5)))).toBeLessThan(2);
    await screenshot(page, 'review-02-pinned-zoomed');
    await expectAccessible(page, 'review-02-pinned-zoomed');
    await page.close();
  });

  it('the owner gets a mail naming the project with a link to the pin', async () => {
    const mail = await waitForMail(TOMAS, 'mentioned you', 15_000);
    console.log(`\n--- mail to ${TOMAS} ---\nSubject: ${mail.subject}\n\n${mail.text}\n--- end of mail ---`);
    expect(mail.subject).toContain(target.projectName);
    expect(mail.subject).toContain('Noor Haddad mentioned you');
    expect(mail.text).toContain(`"${target.projectName}"`);
    const link = /https?:\/\/\S+\?thread=\d+/.exec(mail.text)?.[0];
    expect(link).toBe(`${demo.server.url}${runPath}?thread=${threadId}`);
    mailLink = link!;
  });

  it('the owner opens the link, lands on the pin with the thread open, replies and resolves', async () => {
    const page = await demo.browser.context.newPage();
    await demo.signIn(page, TOMAS);
    await page.goto(mailLink);

    const heading = page.getByRole('heading', { name: /Thread 1/ });
    await heading.waitFor();
    await expect.poll(() => heading.evaluate((el) => el === el.ownerDocument.activeElement)).toBe(true);
    const figure = page.locator('figure').filter({ has: heading });
    const pin = figure.getByRole('button', { name: /^Thread 1 at (u|x) = / });
    expect(await pin.getAttribute('aria-expanded')).toBe('true');
    await expect.poll(() => pin.isVisible()).toBe(true);
    await expect
      .poll(() => pin.evaluate((el) => { const r = el.getBoundingClientRect(); return r.top >= 0 && r.bottom <= el.ownerDocument.documentElement.clientHeight; }))
      .toBe(true);
    await figure.getByText('@Tomás Reyes').first().waitFor();
    await screenshot(page, 'review-03-owner-lands-on-pin');
    await expectAccessible(page, 'review-03-owner-lands-on-pin');

    await figure.getByLabel('Reply', { exact: true }).fill('Yes — the lobe sits at 1.2°, inside the window.\nLeaving it as is.');
    await figure.getByRole('button', { name: 'Post reply' }).click();
    await figure.getByText('inside the window.', { exact: false }).first().waitFor();
    await figure.getByRole('button', { name: 'Resolve thread' }).click();
    await figure.getByRole('button', { name: 'Reopen thread' }).waitFor();
    await page.getByRole('radiogroup', { name: 'Thread status' }).getByText('Resolved', { exact: true }).click();
    expect(await page.getByRole('radio', { name: 'Resolved' }).isChecked()).toBe(true);
    await page.getByRole('button', { name: /Go to thread 1 · resolved/ }).waitFor();
    await screenshot(page, 'review-04-resolved');
    await expectAccessible(page, 'review-04-resolved');

    const { threads } = await getJson<{ threads: ReviewThread[] }>(page, `/api${runPath}/threads`);
    expect(threads[0].resolvedAt).not.toBeNull();
    expect(threads[0].resolvedBy?.name).toBe('Tomás Reyes');
    expect(threads[0].comments.map((c) => c.author?.name)).toEqual(['Noor Haddad', 'Tomás Reyes']);
    await page.close();

    const reply = await waitForMail(NOOR, 'replied', 15_000);
    console.log(`\n--- mail to ${NOOR} ---\nSubject: ${reply.subject}\n\n${reply.text}\n--- end of mail ---`);
    expect(reply.text).toContain(`?thread=${threadId}`);
  });

  it('a viewer sees the thread read-only', async () => {
    const page = await demo.browser.context.newPage();
    await demo.signIn(page, KAI);
    await page.goto(`${demo.server.url}${runPath}`);
    await page.getByRole('heading', { name: 'Review threads' }).waitFor();
    await page.getByRole('radiogroup', { name: 'Thread status' }).getByText('All', { exact: true }).click();
    await page.getByRole('button', { name: /Go to thread 1/ }).click();
    const heading = page.getByRole('heading', { name: /Thread 1/ });
    await heading.waitFor();
    const figure = page.locator('figure').filter({ has: heading });
    await figure.getByText('inside the window.', { exact: false }).first().waitFor();
    expect(await page.getByRole('button', { name: 'Comment on this picture' }).count()).toBe(0);
    expect(await page.getByLabel('Reply', { exact: true }).count()).toBe(0);
    expect(await page.getByRole('button', { name: /Resolve thread|Reopen thread|Edit|Delete/ }).count()).toBe(0);
    await screenshot(page, 'review-05-viewer');
    await expectAccessible(page, 'review-05-viewer');
    await page.close();
  });
});
