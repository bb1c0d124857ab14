import { describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { screenshot } from './support/browser';
import { useAppInBrowser } from './support/app';
import { demoCaseIn, pageAs, settle } from './support/pages';

const app = useAppInBrowser();

/*
 * Phone (390 × 844 CSS px, a common current phone [common practice]) and bench tablet (768 × 1024, a portrait
 * tablet [common practice]): nothing scrolls the page sideways; the menu collapses behind a button; wide
 * tables scroll inside their own box.
 */
const PHONE = { width: 390, height: 844 };
const TABLET = { width: 768, height: 1024 };



async function widths(page: Page): Promise<{ scroll: number; viewport: number }> {
  return page.evaluate(() => ({ scroll: document.documentElement.scrollWidth, viewport: window.innerWidth }));
}

/** Opens the page and returns how wide the document is against the window. */
async function open(page: Page, path: string, label: string): Promise<{ label: string; scroll: number; viewport: number }> {
  await page.goto(`${app.server.origin}${path}`);
  await settle(page);
  await screenshot(page, `responsive-${label}`);
  return { label, ...(await widths(page)) };
}

function tooWide(rows: { label: string; scroll: number; viewport: number }[]): string[] {
  return rows.filter((r) => r.scroll > r.viewport).map((r) => `${r.label}: ${r.scroll} px in a ${r.viewport} px window`);
}


describe('on a 390 px phone', () => {
  it('when the technologist opens the lab pages, then none is wider than the screen', async () => {
    const page = await pageAs(app, 'technologist@demo.test', PHONE);
    const waiting = await demoCaseIn(app, page, 'awaiting_review');
    const inAssay = await demoCaseIn(app, page, 'in_assay');
    const rows = [];
    for (const [path, label] of [
      ['/cases', 'phone-cases'],
      ['/cases/new', 'phone-register'],
      [`/cases/${waiting.id}`, 'phone-case'],
      [`/cases/${waiting.id}/history`, 'phone-history'],
      [`/cases/${waiting.id}/results`, 'phone-results'],
      [`/cases/${inAssay.id}/assays`, 'phone-assays'],
      ['/intervals', 'phone-intervals'],
      ['/plate-maps', 'phone-plate-maps'],
      ['/runs', 'phone-runs'],
      // The demo's nineteenth run: rejected, then released by a director (a long file checksum and reason).
      ['/runs/19', 'phone-run'],
      ['/qc', 'phone-qc'],
      ['/cohorts', 'phone-cohorts'],
    ] as const) {
      rows.push(await open(page, path, label));
    }
    expect(tooWide(rows)).toEqual([]);
    await page.close();
  });

  it('when the director opens the review queue and a case, then neither is wider than the screen', async () => {
    const page = await pageAs(app, 'director@demo.test', PHONE);
    const waiting = await demoCaseIn(app, page, 'awaiting_review');
    const rows = [await open(page, '/review', 'phone-review'), await open(page, `/review/${waiting.id}`, 'phone-review-case'), await open(page, '/assays', 'phone-assay-definitions')];
    expect(tooWide(rows)).toEqual([]);
    await page.close();
  });

  it('when the administrator opens the accounts and the sent e-mail, then neither is wider than the screen', async () => {
    const page = await pageAs(app, 'admin@demo.test', PHONE);
    const rows = [await open(page, '/admin/accounts', 'phone-accounts'), await open(page, '/admin/outbox', 'phone-outbox')];
    expect(tooWide(rows)).toEqual([]);
    await page.close();
  });

  it("when a clinician reads the reports between patients, then the list fits, the text runs in full lines and the PDF button is easy to tap", async () => {
    const page = await pageAs(app, 'clinician@demo.test', PHONE);
    const row = await open(page, '/my-reports', 'phone-my-reports');
    expect(tooWide([row])).toEqual([]);
    // Text runs across the card, not one or two words a line: the card's heading is nearly the screen's width.
    const card = page.getByRole('article').first();
    const box = (await card.boundingBox())!;
    expect(box.width).toBeGreaterThan(PHONE.width - 60);
    // A touch target of at least 44 × 44 CSS px [confirmed] WCAG 2.1 SC 2.5.5 (AAA; a comfortable floor for a phone).
    const pdf = (await card.getByRole('link', { name: /Download report/ }).boundingBox())!;
    expect(pdf.height).toBeGreaterThanOrEqual(44);
    await page.close();
  });

  it('when the menu button is pressed, then the menu opens, a link in it works and the menu closes again', async () => {
    const page = await pageAs(app, 'technologist@demo.test', PHONE);
    await page.goto(`${app.server.origin}/cases`);
    await settle(page);
    const nav = page.getByRole('navigation', { name: 'Main' });
    const casesLink = nav.getByRole('link', { name: 'Reference intervals' });
    expect(await casesLink.isVisible()).toBe(false);
    const menu = nav.getByRole('button', { name: 'Menu' });
    expect(await menu.getAttribute('aria-expanded')).toBe('false');
    await menu.click();
    expect(await nav.getByRole('button', { name: 'Close menu' }).getAttribute('aria-expanded')).toBe('true');
    expect(await casesLink.isVisible()).toBe(true);
    await screenshot(page, 'responsive-phone-menu-open');
    await casesLink.click();
    await page.waitForURL(/\/intervals$/);
    await settle(page);
    expect(await casesLink.isVisible()).toBe(false);
    expect(await page.title()).toBe('Reference intervals · Cristae');
    await page.close();
  });

  it('when the case list is wider than the phone, then the table scrolls in its own box, not the page', async () => {
    const page = await pageAs(app, 'technologist@demo.test', PHONE);
    await page.goto(`${app.server.origin}/cases`);
    await settle(page);
    const box = page.getByRole('region', { name: 'Cases' });
    const sizes = await box.evaluate((el) => ({ scroll: el.scrollWidth, client: el.clientWidth }));
    expect(sizes.scroll).toBeGreaterThan(sizes.client);
    expect((await widths(page)).scroll).toBeLessThanOrEqual(PHONE.width);
    await page.close();
  });
});

describe('on a 768 px bench tablet', () => {
  it('when the technologist works at the assay bench, then the page fits and the entry form has the full width', async () => {
    const page = await pageAs(app, 'technologist@demo.test', TABLET);
    const inAssay = await demoCaseIn(app, page, 'in_assay');
    const rows = [await open(page, `/cases/${inAssay.id}/assays`, 'tablet-assays'), await open(page, '/cases', 'tablet-cases')];
    const waiting = await demoCaseIn(app, page, 'awaiting_review');
    rows.push(await open(page, `/cases/${waiting.id}/results`, 'tablet-results'));
    expect(tooWide(rows)).toEqual([]);
    await page.goto(`${app.server.origin}/cases/${inAssay.id}/assays`);
    await settle(page);
    // The menu is behind its button, so the bench gets the whole width of the tablet.
    const main = (await page.locator('main').boundingBox())!;
    expect(main.width).toBeGreaterThanOrEqual(TABLET.width - 1);
    await page.close();
  });
});
