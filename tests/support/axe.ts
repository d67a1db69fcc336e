/**
 * Accessibility check of the page a browser test is on: axe-core (Deque's rule engine, run inside Chromium)
 * against the WCAG 2.0 / 2.1 level A and AA rules. A test fails on any violation axe rates serious or critical,
 * with each rule, its help text and the elements it found in the message.
 */
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import type { Page } from 'playwright-core';

const require = createRequire(import.meta.url);
let axeSource: string | null = null;

/** The WCAG 2.1 AA rule tags (A and AA of WCAG 2.0 and 2.1). */
export const WCAG_21_AA = ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa'] as const;

export interface AxeFinding {
  id: string;
  impact: string | null;
  help: string;
  nodes: { target: string; summary: string; text: string }[];
}

/** Runs axe-core in the page (evaluated through the DevTools protocol, so the app's CSP does not block it). */
export async function axeFindings(page: Page): Promise<AxeFinding[]> {
  axeSource ??= readFileSync(require.resolve('axe-core/axe.min.js'), 'utf8');
  const loaded = await page.evaluate(() => typeof (globalThis as unknown as { axe?: unknown }).axe === 'object');
  if (!loaded) await page.evaluate(axeSource);
  return page.evaluate(async (tags) => {
    type AxeNode = { target: unknown[]; failureSummary?: string; html: string };
    type AxeResult = { id: string; impact: string | null; help: string; nodes: AxeNode[] };
    const { axe, document } = globalThis as unknown as { axe: { run(context: unknown, options: object): Promise<{ violations: AxeResult[] }> }; document: unknown };
    const result = await axe.run(document, { runOnly: { type: 'tag', values: tags }, resultTypes: ['violations'] });
    return result.violations.map((v) => ({
      id: v.id,
      impact: v.impact,
      help: v.help,
      nodes: v.nodes.map((n) => ({
        target: n.target.map(String).join(' '),
        summary: (n.failureSummary ?? '').replace(/\s+/g, ' ').trim(),
        text: n.html.slice(0, 160),
      })),
    }));
  }, [...WCAG_21_AA]);
}

/** Fails when axe finds a serious or critical WCAG 2.1 AA violation on the page; `where` names it in the message. */
export async function expectAccessible(page: Page, where: string): Promise<void> {
  const findings = (await axeFindings(page)).filter((f) => f.impact === 'serious' || f.impact === 'critical');
  if (findings.length === 0) return;
  const lines = findings.flatMap((f) => [
    `${f.id} (${f.impact}): ${f.help}`,
    ...f.nodes.slice(0, 6).map((n) => `  ${n.target} — ${n.summary} — ${n.text}`),
    ...(f.nodes.length > 6 ? [`  … and ${f.nodes.length - 6} more`] : []),
  ]);
  throw new Error(`Accessibility (axe-core, WCAG 2.1 AA) on ${where}:\n${lines.join('\n')}`);
}
