import { createRequire } from 'node:module';
import type { Page } from 'playwright-core';

const require = createRequire(import.meta.url);
// The axe-core bundle, evaluated in the page through the DevTools protocol (the app's CSP refuses injected <script>).
const axeSource: string = (require('axe-core') as { source: string }).source;

/** WCAG 2.0 and 2.1, levels A and AA: the tags axe-core gives its rules for those success criteria [confirmed] axe-core docs. */
export const WCAG21_AA_TAGS = ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa'];

export type AxeFinding = { id: string; impact: string; help: string; nodes: { target: string; summary: string }[] };

/** Runs axe-core on the page as it is now and returns the serious and critical WCAG 2.1 A/AA violations. */
export async function seriousViolations(page: Page): Promise<AxeFinding[]> {
  const loaded = await page.evaluate(() => typeof (window as unknown as { axe?: unknown }).axe !== 'undefined');
  if (!loaded) await page.evaluate(axeSource);
  const found = await page.evaluate(async (tags) => {
    type AxeResult = {
      violations: { id: string; impact: string | null; help: string; nodes: { target: string[]; failureSummary?: string }[] }[];
    };
    const axe = (window as unknown as { axe: { run: (ctx: Document, opts: object) => Promise<AxeResult> } }).axe;
    const r = await axe.run(document, { runOnly: { type: 'tag', values: tags }, resultTypes: ['violations'] });
    return r.violations.map((v) => ({
      id: v.id,
      impact: v.impact ?? 'unknown',
      help: v.help,
      nodes: v.nodes.map((n) => ({ target: n.target.join(' '), summary: (n.failureSummary ?? '').split('\n').slice(0, 2).join(' ') })),
    }));
  }, WCAG21_AA_TAGS);
  return found.filter((v) => v.impact === 'serious' || v.impact === 'critical');
}

/** One line per rule and element, for a readable failure message. */
export function describeFindings(findings: AxeFinding[]): string {
  return findings.flatMap((f) => f.nodes.map((n) => `${f.impact} ${f.id}: ${n.target} — ${n.summary}`)).join('\n');
}

export function countNodes(findings: AxeFinding[]): number {
  return findings.reduce((s, f) => s + f.nodes.length, 0);
}
