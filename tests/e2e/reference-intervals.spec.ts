import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { BrowserContext } from 'playwright-core';
import { launchBrowser, screenshot, signIn } from './support/browser';
import { startServer, type RunningServer } from './support/server';

let server: RunningServer;
let browser: BrowserContext;
beforeAll(async () => {
  server = await startServer();
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  await server?.stop();
});

describe('reference intervals, in Chromium', () => {
  it('when a director derives CIV by two methods from the demo control file and approves one, then v2 is listed and v1 stays readable', async () => {
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
    await page.getByRole('button', { name: 'Approve…' }).click();
    await page.getByRole('button', { name: 'Confirm approval of v2' }).click();
    await page.getByRole('heading', { name: /CIV activity · Skeletal muscle · All ages · v2/ }).waitFor();
    await page.getByText('Dr Ilse Marchetti', { exact: false }).first().waitFor();

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
  });
});
