/**
 * A new design in a real browser, as a new user meets it: a choice of demo template or blank start, the P ≥ λ/2
 * note saying what it means for this design's windows, a label filled in automatically that goes with its term,
 * unsaved edits that survive a reload until discarded, and the same picture uploaded twice making one card.
 */
import { Jimp } from 'jimp';
import { describe, expect, it } from 'vitest';
import { expectAccessible } from '../support/axe';
import { screenshot } from '../support/browser';
import { useDemoBrowser } from '../support/demo-browser';

const demo = useDemoBrowser();

/** Our own bold "F", white on black, as PNG bytes. */
async function letterF(): Promise<Buffer> {
  const image = new Jimp({ width: 32, height: 32, color: 0x000000ff });
  for (let y = 4; y < 28; y++) for (let x = 8; x < 26; x++) if (x < 13 || y < 9 || (y >= 14 && y < 18 && x < 22)) image.setPixelColor(0xffffffff, x, y);
  return image.getBuffer('image/png');
}

describe('a new design', () => {
  it('starts from the template or blank, keeps unsaved edits over a reload, and lets labels and uploads behave', async () => {
    const page = await demo.browser.context.newPage();
    await demo.signIn(page, 'tomas.reyes@harbourlight.example');
    await page.getByRole('button', { name: 'New project' }).click();
    await page.getByLabel('Project name').fill('Bold F beside a lens');
    await page.getByRole('button', { name: 'Create project' }).click();
    await page.getByRole('heading', { name: 'Bold F beside a lens' }).waitFor();
    await page.getByRole('link', { name: 'Design', exact: true }).click();

    const start = page.getByRole('group', { name: 'Start from' });
    await start.waitFor();
    // The demo setup has P = 450 nm ≥ λ/2 = 316.5 nm: the note says what that does to these windows.
    const notes = page.getByTestId('window-copy-notes');
    await notes.waitFor();
    expect(await notes.innerText()).toMatch(/Channel A’s window: its copies are evanescent \(the nearest at u = −1\.\d\d…−\d\.\d\d\): no effect here/);

    // Light through the substrate (the default): the fused silica (Malitson 1965, n = 1.4570 at 633 nm) diffracts, the air does not.
    const lattice = page.getByTestId('lattice-diffraction-notes');
    await lattice.waitFor();
    expect(await lattice.innerText()).toMatch(/^Period 450\.0 nm ≥ λ\/n = 633\.0 nm\/1\.4570 = 434\.5 nm in the incident medium \(the substrate\)/);
    expect(await lattice.locator('li').count()).toBe(1);
    // Onto the pillars: the substrate becomes the exit medium, and the demo library (light through the substrate) no longer fits the side.
    await page.getByLabel('Light enters').selectOption('superstrate');
    await expect.poll(() => lattice.innerText()).toMatch(/434\.5 nm in the exit medium \(the substrate\)/);
    const side = page.getByRole('status').filter({ hasText: 'The library was computed for light from the other side' });
    expect(await side.innerText()).toMatch(/light entering onto the pillars \(from the superstrate\), the library was computed for light entering through the substrate/);
    await screenshot(page, 'new-design-00-light-side');
    await expectAccessible(page, 'composer with the light-side and lattice notes');
    await page.getByLabel('Light enters').selectOption('substrate');
    await expect.poll(() => side.count()).toBe(0);

    // The label came with the demo picture; removing the picture's term takes it along.
    const labelA = page.getByLabel('Channel A label');
    expect(await labelA.inputValue()).toBe('Lighthouse');
    await page.getByRole('list', { name: 'Channel A terms' }).getByRole('button', { name: /^Remove/ }).click();
    await expect.poll(() => labelA.inputValue()).toBe('');

    // An unsaved edit survives a reload, says so, and goes when discarded.
    await page.getByLabel('Design name').fill('F and lens, first try');
    await page.waitForTimeout(300);
    await page.reload();
    await page.getByText('Your unsaved changes were restored').waitFor();
    expect(await page.getByLabel('Design name').inputValue()).toBe('F and lens, first try');
    expect(await page.getByRole('list', { name: 'Channel A terms' }).locator('li').count()).toBe(0);
    await screenshot(page, 'new-design-01-restored');
    await page.getByRole('button', { name: 'Discard them' }).click();
    await expect.poll(() => page.getByLabel('Design name').inputValue()).toBe('Bold F beside a lens');
    await page.reload();
    await start.waitFor();
    expect(await page.getByText('Your unsaved changes were restored').count()).toBe(0);

    // The same picture twice: one card, the second time chosen instead of stored again.
    const picker = page.locator('[data-field="channels.a.terms.0.image"]');
    const bytes = await letterF();
    const input = picker.locator('input[type="file"]');
    await input.setInputFiles({ name: 'bold-F.png', mimeType: 'image/png', buffer: bytes });
    await picker.getByText('bold-F.png').waitFor();
    await input.setInputFiles({ name: 'bold-F.png', mimeType: 'image/png', buffer: bytes });
    await picker.getByText(/“bold-F\.png” is already uploaded/).waitFor();
    expect(await picker.getByText('bold-F.png', { exact: true }).count()).toBe(1);
    await screenshot(page, 'new-design-02-one-card');

    // A blank start: no demo pictures, no terms, a linear pair.
    await start.getByRole('button', { name: 'Blank design' }).click();
    await expect.poll(() => page.getByRole('list', { name: 'Channel A terms' }).locator('li').count()).toBe(0);
    expect(await page.getByRole('list', { name: 'Channel B terms' }).locator('li').count()).toBe(0);
    expect(await page.getByLabel('Channel B label').inputValue()).toBe('');
    await screenshot(page, 'new-design-03-blank');
    await page.close();
  });

  it('revision compare shows an angle change as a difference in degrees, the uploaded picture by file name and words for values', async () => {
    const page = await demo.browser.context.newPage();
    await demo.signIn(page, 'tomas.reyes@harbourlight.example');
    await page.getByRole('table', { name: 'Projects' }).getByText('Bold F beside a lens').click();
    await page.getByRole('link', { name: 'Design', exact: true }).click();
    const start = page.getByRole('group', { name: 'Start from' });
    await start.waitFor();
    await start.getByRole('button', { name: /^Demo template/ }).click();
    const save = async (message: string) => {
      await page.getByRole('button', { name: 'Save', exact: true }).click();
      await page.getByLabel('Message').fill(message);
      await page.getByRole('button', { name: 'Save revision', exact: true }).click();
      await page.getByText(/^Saved as revision \d+\.$/).waitFor();
    };
    await save('template');
    const projectId = /projects\/(\d+)/.exec(page.url())![1];

    // Channel A: the uploaded "F" instead of the lighthouse, 5° further out, plain Gerchberg–Saxton.
    const picker = page.locator('[data-field="channels.a.terms.0.image"]');
    await picker.getByText('bold-F.png').click();
    const centreX = page.locator('[data-field="channels.a.terms.0.window.centerX"] input, input[data-field="channels.a.terms.0.window.centerX"]').first();
    await centreX.fill('20');
    await page.locator('[data-field="channels.a.terms.0.algorithm"] select, select[data-field="channels.a.terms.0.algorithm"]').first().selectOption('gs');
    await save('F at 20°');

    await page.goto(`${demo.server.url}/projects/${projectId}/revisions/compare?a=1&b=2`);
    const changes = page.getByRole('list').filter({ hasText: 'changed from' }).first();
    await changes.waitFor();
    const text = await changes.innerText();
    expect(text).toMatch(/window centre x changed from 15° to 20° \(\+5°\)/);
    expect(text).not.toMatch(/up \d+ ?%/);
    expect(text).toMatch(/“bold-F\.png” \(upload \d+\)/);
    expect(text).toContain('weighted Gerchberg–Saxton');
    expect(text).not.toMatch(/weighted-gs|seenOn/);
    await screenshot(page, 'new-design-04-compare');
    await page.close();
  });

  it('a lens run shows the focal spot first zero among its key figures, next to λf/D', async () => {
    const page = await demo.browser.context.newPage();
    await demo.signIn(page, 'tomas.reyes@harbourlight.example');
    await page.getByRole('table', { name: 'Projects' }).getByText('Bold F beside a lens').click();
    await page.getByRole('link', { name: 'Design', exact: true }).click();
    await page.getByRole('heading', { name: /^Revision \d+/ }).waitFor();
    // The run's memory estimate follows the size as it is chosen, against this server's budget (RUN_MEMORY_BUDGET_MB).
    const estimate = page.getByTestId('memory-estimate');
    await page.getByLabel('Array size N × N').selectOption('4096');
    await estimate.filter({ hasText: /^\d+\.\d GiB$/ }).waitFor();
    await page.getByText('This server allows 8.0 GiB per run.').waitFor();
    await screenshot(page, 'new-design-05-memory-estimate');
    await expectAccessible(page, 'design composer with a 4096² memory estimate');
    // From the latest revision: a lens in channel A and a tilt in channel B instead of the two pictures, 128² cells.
    await page.getByLabel('Array size N × N').selectOption('128');
    await estimate.filter({ hasText: /^\d+ MiB$/ }).waitFor();
    for (const [channel, kind] of [['A', 'Lens'], ['B', 'Tilt']] as const) {
      await page.getByRole('list', { name: `Channel ${channel} terms` }).getByRole('button', { name: /^Remove/ }).first().click();
      await page.getByRole('button', { name: `Add term to Channel ${channel}` }).click();
      await page.getByRole('menu', { name: `Kinds of term for Channel ${channel}` }).getByRole('menuitem', { name: new RegExp(`^${kind}`) }).click();
    }
    await page.locator('[data-field="channels.a.terms.0.focalLengthUm"] input').fill('150');
    await page.getByRole('button', { name: 'Save and run' }).click();
    await page.getByLabel('Message').fill('lens of 150 µm');
    await page.getByRole('button', { name: 'Save revision and start run' }).click();
    await page.waitForURL(/\/runs\/\d+$/);
    await page.getByText('Finished').first().waitFor({ timeout: 150_000 });
    const figures = page.locator('dl').filter({ hasText: 'Focal spot first zero, simulated' }).first();
    await figures.waitFor();
    const text = await figures.innerText();
    // λf/D = 0.633 µm · 150 µm / 57.6 µm = 1.648 µm (Goodman §4.4.1); the simulated zero lies within a few percent.
    expect(text).toMatch(/Focal spot first zero, expected λf\/D \(square aperture\)\s+1\.648 µm/);
    const simulated = Number(/Focal spot first zero, simulated\s+([\d.]+) µm/.exec(text)![1]);
    expect(Math.abs(simulated / 1.648 - 1)).toBeLessThan(0.05);
    expect(text).not.toMatch(/Focal spot zero/);
    await screenshot(page, 'new-design-05-lens-run');
    await page.close();
  });
});
