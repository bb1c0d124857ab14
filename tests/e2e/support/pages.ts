import type { BrowserContext, Page } from 'playwright-core';
import type { CaseList, CaseSummary } from '@/schemas/case';
import { signIn } from './browser';

type App = { readonly server: { origin: string }; readonly browser: BrowserContext };

/** A fresh tab signed in as that demo account (the cookies of any earlier account cleared first), optionally sized. */
export async function pageAs(app: App, email: string, size?: { width: number; height: number }): Promise<Page> {
  await app.browser.clearCookies();
  const page = await app.browser.newPage();
  if (size) await page.setViewportSize(size);
  await signIn(page, app.server.origin, email);
  return page;
}

/** Waits until the page has its heading and no "Loading…" is left in the content. */
export async function settle(page: Page): Promise<void> {
  await page.waitForLoadState('networkidle');
  await page.locator('h1').first().waitFor();
  await page.waitForFunction(() => !/Loading/.test(document.querySelector('main')?.textContent ?? document.body.textContent ?? ''));
}

/** The first demo case in that state, read through the API with the page's session. */
export async function demoCaseIn(app: App, page: Page, state: CaseSummary['state']): Promise<CaseSummary> {
  const res = await page.request.get(`${app.server.origin}/api/cases?pageSize=100`);
  const found = ((await res.json()) as CaseList).items.find((c) => c.state === state);
  if (!found) throw new Error(`no demo case in state ${state}`);
  return found;
}
