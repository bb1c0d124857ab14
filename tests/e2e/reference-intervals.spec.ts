import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { BrowserContext, Page } from 'playwright-core';
import { launchBrowser, screenshot, signIn } from './support/browser';
import { startServer, type RunningServer } from './support/server';

let server: RunningServer;
let browser: BrowserContext;
/** A second browser profile for the demo's second director (separation of duties: they approve). */
let browser2: BrowserContext;
beforeAll(async () => {
  server = await startServer();
  browser = await launchBrowser();
  browser2 = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  await browser2?.close();
  await server?.stop();
});

describe('reference intervals, in Chromium', () => {
  it('when a director derives CIV by two methods from the demo control file and a second director approves one, then v2 is listed and v1 stays readable', async () => {
    const page = await browser.newPage();
    await signIn(page, server.origin, 'director@demo.test');
    await page.goto(`${server.origin}/intervals`);
    await page.getByRole('link', { name: 'Derive from control data' }).click();

    // The seeded, invented control file: 130 fictitious muscle controls.
    await page.getByLabel(/fernhollow-muscle-controls/).check();
    await page.getByText('130 control subjects').waitFor();
    await page.getByLabel('Assay').selectOption('CIV');
    await page.getByLabel('Method A').selectOption('nonparametric');
    await page.getByLabel('Method B').selectOption('mean2sd');
    await page.getByLabel('Outlier screening (both methods)').selectOption('none');
    const a = page.getByRole('region', { name: 'A: Nonparametric (EP28)' });
    const b = page.getByRole('region', { name: 'B: Mean ± 2 SD' });
    await a.getByTestId('lower-limit').waitFor();
    await b.getByTestId('lower-limit').waitFor();
    // Two methods on the same 130 values give different limits; the nonparametric one has CIs.
    expect(await a.getByTestId('lower-limit').textContent()).not.toBe(await b.getByTestId('lower-limit').textContent());
    await expect(a.getByText(/90% CI \d/).count()).resolves.toBe(2);
    await screenshot(page, 'reference-intervals-two-methods');

    await a.getByRole('button', { name: 'Save A as a draft…' }).click();
    await page.getByLabel('Effective from').fill('2026-01-01');
    await page.getByRole('button', { name: 'Save draft' }).click();
    await page.waitForURL(/\/intervals\/\d+$/);
    // The drafter cannot approve their own draft: the page says who must, and offers editing instead.
    await page.getByText(/Waiting for a second director: another director must approve it/).waitFor();
    await expect(page.getByRole('button', { name: /Approve/ }).count()).resolves.toBe(0);
    await page.getByRole('button', { name: 'Edit draft…' }).waitFor();
    await screenshot(page, 'reference-intervals-awaiting-second-director');
    const draftUrl = page.url();
    await page.close();

    const page2 = await browser2.newPage();
    await signIn(page2, server.origin, 'director2@demo.test');
    await page2.goto(draftUrl);
    await page2.getByText(/Drafted by Dr Ilse Marchetti on .*Nothing uses it until a second director approves it/).waitFor();
    await page2.getByRole('button', { name: 'Approve as second director…' }).click();
    await page2.getByText(/Drafted by Dr Ilse Marchetti; your name and the time are recorded/).waitFor();
    await screenshot(page2, 'reference-intervals-second-director-confirms');
    await page2.getByRole('button', { name: 'Confirm approval of v2' }).click();
    await page2.getByRole('heading', { name: /CIV activity · Skeletal muscle · All ages · v2/ }).waitFor();
    // The approver beside "Approved" (the history table below names them too once it has refetched).
    await page2.getByRole('definition').filter({ hasText: /^Dr Octavian Brisk-Ferro, / }).waitFor();
    await screenshot(page2, 'reference-intervals-approved-by-second-director');
    return checkHistory(page2);
  });

  it('when a director drafts a new ε for CIV, then the definition in use stays v1 until the second director approves the draft', async () => {
    const page = await browser.newPage();
    await signIn(page, server.origin, 'director@demo.test');
    await page.goto(`${server.origin}/assays`);
    const civ = page.locator('section', { has: page.getByRole('heading', { name: /^CIV · / }) });
    await civ.getByRole('button', { name: 'New version' }).click();
    await civ.getByLabel('ε (mM⁻¹·cm⁻¹)').fill('21.5');
    await civ.getByLabel('What changed and why').fill('Local re-check of ε (invented for the demo test)');
    await civ.getByRole('button', { name: 'Save as a draft for a second director' }).click();
    await civ.getByRole('group', { name: 'Draft version 2' }).waitFor();
    await civ.getByText(/Waiting for a second director/).waitFor();
    await expect(civ.getByRole('button', { name: /Approve version/ }).count()).resolves.toBe(0);
    await screenshot(page, 'assay-definition-draft-awaiting');
    await page.close();

    const page2 = await browser2.newPage();
    await page2.goto(`${server.origin}/assays`);
    const civ2 = page2.locator('section', { has: page2.getByRole('heading', { name: /^CIV · / }) });
    await civ2.getByText(/Drafted by Dr Ilse Marchetti/).waitFor();
    await civ2.getByText(/ε \(mM⁻¹·cm⁻¹\) 18\.5 → 21\.5/).waitFor();
    await civ2.getByRole('button', { name: 'Approve version 2' }).click();
    await civ2.getByRole('group', { name: 'Draft version 2' }).waitFor({ state: 'detached' });
    await civ2.getByText('21.5 mM⁻¹·cm⁻¹').waitFor();
    await civ2.getByRole('button', { name: 'Versions' }).click();
    await civ2.getByText(/v2 · approved .*approved by Dr Octavian Brisk-Ferro/).waitFor();
    await screenshot(page2, 'assay-definition-approved-by-second-director');
    await page2.close();
  });

  // Last: it lets directors approve their own drafts from here on.
  it('when the administrator marks the laboratory as single-director, then a director is offered to approve their own draft', async () => {
    const page = await browser.newPage();
    await signIn(page, server.origin, 'admin@demo.test');
    await page.goto(`${server.origin}/admin/laboratory`);
    const box = page.getByLabel(/This laboratory has a single director/);
    expect(await box.isChecked()).toBe(false);
    await box.check();
    await page.getByRole('button', { name: 'Save profile' }).click();
    await page.getByText('Laboratory profile saved.', { exact: false }).waitFor();
    await page.reload();
    expect(await page.getByLabel(/This laboratory has a single director/).isChecked()).toBe(true);
    await screenshot(page, 'lab-profile-single-director');

    await signIn(page, server.origin, 'director@demo.test');
    await page.goto(`${server.origin}/assays`);
    const cs = page.locator('section', { has: page.getByRole('heading', { name: /^CS · / }) });
    await cs.getByRole('button', { name: 'New version' }).click();
    await cs.getByLabel('What changed and why').fill('Same values, re-issued (invented for the demo test)');
    await cs.getByRole('button', { name: 'Save as a draft for a second director' }).click();
    await cs.getByText(/This laboratory has a single director, so you may approve it yourself/).waitFor();
    // The versions list, opened before the approval, stays open and shows the approval once it has landed
    // (the card used to be keyed by the row in force, so approving v2 remounted it and closed the list).
    await cs.getByRole('button', { name: 'Versions' }).click();
    await cs.getByText(/v2 · draft, awaiting a second director/).waitFor();
    await cs.getByRole('button', { name: 'Approve version 2' }).click();
    await cs.getByRole('group', { name: 'Draft version 2' }).waitFor({ state: 'detached' });
    await cs.getByText(/v2 · approved .*approved by Dr Ilse Marchetti \(its own author\)/).waitFor();
    await screenshot(page, 'assay-definition-self-approved');
    await page.close();
  });
});

/** After the approval: v1 stays readable with its period closed on v2's start. */
async function checkHistory(page: Page): Promise<void> {
  const history = page.getByRole('table').last();
  await history.getByRole('link', { name: 'v1' }).waitFor();
  // The history refetches after the approval: wait for v1's closed period rather than reading it at once.
  await history.getByText('2025-01-01 until 2026-01-01').waitFor();
  await expect(history.getByText('2025-01-01 until 2026-01-01').count()).resolves.toBe(1);
  await history.getByRole('link', { name: 'v1' }).click();
  await page.getByRole('heading', { name: /All ages · v1/ }).waitFor();
  await expect(page.getByText(/Invented demo values/).count()).resolves.toBe(1);
  await screenshot(page, 'reference-intervals-old-version');
  await page.close();
}
