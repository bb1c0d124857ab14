import { describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { countNodes, describeFindings, seriousViolations } from './support/axe';
import { screenshot } from './support/browser';
import { useAppInBrowser } from './support/app';
import { demoCaseIn, pageAs, settle } from './support/pages';

const app = useAppInBrowser();

/*
 * Every main page of every role, scanned by axe-core with the WCAG 2.1 A and AA rules
 * [confirmed] WCAG 2.1 (W3C Recommendation) via axe-core's rule tags: no serious or critical violation.
 */


type Scanned = { label: string; path: string; title: string; nodes: number; text: string };
/** Every page's document title, by path, across the role tests: each route must name itself. */
const titles = new Map<string, string>();
/** Console lines of every page opened, for the warning checks. */
const consoleLines: string[] = [];

const listening = new WeakSet<Page>();

async function scan(page: Page, path: string, label: string): Promise<Scanned> {
  if (!listening.has(page)) {
    listening.add(page);
    page.on('console', (m) => consoleLines.push(`${m.type()}: ${m.text()}`));
  }
  await page.goto(`${app.server.origin}${path}`);
  await settle(page);
  const found = await seriousViolations(page);
  await screenshot(page, `a11y-${label}`);
  const title = await page.title();
  titles.set(path, title);
  // Written for the report: the count of serious or critical nodes per page.
  console.log(`axe ${label}: ${countNodes(found)}`);
  return { label, path, title, nodes: countNodes(found), text: describeFindings(found) };
}



function report(results: Scanned[]): string {
  return results.filter((r) => r.nodes > 0).map((r) => `## ${r.label} (${r.nodes})\n${r.text}`).join('\n');
}

describe('every main page passes axe-core (WCAG 2.1 A/AA, nothing serious or critical)', () => {
  it('when signed out, then the sign-in page passes', async () => {
    await app.browser.clearCookies();
    const page = await app.browser.newPage();
    const results = [await scan(page, '/sign-in', 'sign-in')];
    await page.close();
    expect(report(results)).toBe('');
  });

  it("when a technologist opens each page of the workup, then every page passes", async () => {
    const page = await pageAs(app, 'technologist@demo.test');
    const inAssay = await demoCaseIn(app, page, 'in_assay');
    const waiting = await demoCaseIn(app, page, 'awaiting_review');
    const results = [];
    for (const [path, label] of [
      ['/cases', 'tech-cases'],
      ['/cases/new', 'tech-register'],
      [`/cases/${waiting.id}`, 'tech-case'],
      [`/cases/${waiting.id}/history`, 'tech-history'],
      [`/cases/${inAssay.id}/assays`, 'tech-assays'],
      [`/cases/${waiting.id}/assays`, 'tech-assays-saved'],
      [`/cases/${waiting.id}/results`, 'tech-results'],
      ['/plate-maps', 'tech-plate-maps'],
      ['/rate-check', 'tech-rate-check'],
      ['/intervals', 'tech-intervals'],
      ['/account/password', 'tech-password'],
      ['/no-such-page', 'tech-404'],
    ] as const) {
      results.push(await scan(page, path, label));
    }
    await page.close();
    expect(report(results)).toBe('');
  });

  it('when a director opens the review and definition pages, then every page passes', async () => {
    const page = await pageAs(app, 'director@demo.test');
    const waiting = await demoCaseIn(app, page, 'awaiting_review');
    const results = [];
    for (const [path, label] of [
      ['/review', 'dir-review'],
      [`/review/${waiting.id}`, 'dir-review-case'],
      ['/assays', 'dir-assays'],
      ['/intervals', 'dir-intervals'],
      ['/intervals/new', 'dir-interval-new'],
      ['/intervals/derive', 'dir-derive'],
      ['/intervals/verify', 'dir-verify'],
    ] as const) {
      results.push(await scan(page, path, label));
    }
    await page.goto(`${app.server.origin}/intervals`);
    const href = await page.locator('main a[href^="/intervals/"]').filter({ hasText: /^v\d+/ }).first().getAttribute('href');
    results.push(await scan(page, href!, 'dir-interval-detail'));
    await page.close();
    expect(report(results)).toBe('');
  });

  it("when a clinician opens the reports page, then it passes", async () => {
    const page = await pageAs(app, 'clinician@demo.test');
    const results = [await scan(page, '/my-reports', 'clin-reports')];
    await page.close();
    expect(report(results)).toBe('');
  });

  it('when an administrator opens each admin page, then every page passes', async () => {
    const page = await pageAs(app, 'admin@demo.test');
    const results = [];
    for (const [path, label] of [
      ['/admin/accounts', 'admin-accounts'],
      ['/admin/laboratory', 'admin-lab'],
      ['/admin/outbox', 'admin-outbox'],
    ] as const) {
      results.push(await scan(page, path, label));
    }
    await page.close();
    expect(report(results)).toBe('');
  });
});

describe('titles, skipping the menu and a quiet console', () => {
  it('when every page above has been opened, then each has a title of its own ending in "· Cristae"', () => {
    expect(titles.size).toBeGreaterThan(20);
    const byTitle = new Map<string, string[]>();
    for (const [path, title] of titles) byTitle.set(title, [...(byTitle.get(title) ?? []), path]);
    const shared = [...byTitle].filter(([, paths]) => paths.length > 1);
    expect(shared).toEqual([]);
    for (const title of titles.values()) expect(title).toMatch(/^.+ · Cristae$/);
    expect(titles.get('/cases')).toBe('Cases · Cristae');
  });

  it('when a page loads, then React Router does not warn that a hydrate fallback is missing', () => {
    expect(consoleLines.length).toBeGreaterThan(0);
    expect(consoleLines.filter((l) => /HydrateFallback/i.test(l))).toEqual([]);
  });

  it('when a keyboard user presses Tab on a page, then the first stop skips to the content, and Enter puts focus there', async () => {
    const page = await pageAs(app, 'technologist@demo.test');
    await page.goto(`${app.server.origin}/cases`);
    await settle(page);
    await page.keyboard.press('Tab');
    const first = page.locator(':focus');
    expect(await first.textContent()).toBe('Skip to the page content');
    expect(await first.isVisible()).toBe(true);
    await screenshot(page, 'a11y-skip-link');
    await page.keyboard.press('Enter');
    expect(await page.evaluate(() => document.activeElement?.id)).toBe('main');
    await page.keyboard.press('Tab');
    // The next stop is inside the page, not the menu.
    expect(await page.evaluate(() => Boolean(document.activeElement?.closest('main')))).toBe(true);
    await page.close();
  });

  it('when the user follows a link in the menu, then focus moves to the new page content', async () => {
    const page = await pageAs(app, 'technologist@demo.test');
    await page.goto(`${app.server.origin}/cases`);
    await settle(page);
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Reference intervals' }).click();
    await page.waitForURL(/\/intervals$/);
    await settle(page);
    expect(await page.evaluate(() => document.activeElement?.id)).toBe('main');
    expect(await page.title()).toBe('Reference intervals · Cristae');
    await page.close();
  });
});
