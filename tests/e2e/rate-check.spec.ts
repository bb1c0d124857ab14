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

// The CI worked example [derived] (docs/domain.md §1): specific ΔA/min 0.0248 with 40 µg protein in 1 mL, 1 cm
// -> 100.0 nmol/min/mg. Total falls 0.0348 A/min, the rotenone trace 0.0100 A/min.
const lines = (a0: number, perMin: number) => Array.from({ length: 13 }, (_, i) => `${i * 10}\t${(a0 + (perMin / 60) * i * 10).toFixed(6)}`).join('\n');

describe('rate check, in Chromium', () => {
  it('when a technologist pastes two traces, then the activity, the fitted lines and the window are shown, and moving the window recomputes', async () => {
    const page = await browser.newPage();
    await signIn(page, server.origin, 'technologist@demo.test');
    await page.getByRole('link', { name: 'Rate check' }).click();
    await page.getByLabel(/Total trace/).fill(lines(1.2, -0.0348));
    await page.getByLabel(/Background trace/).fill(lines(1.1, -0.01));
    await page.getByRole('button', { name: 'Calculate' }).click();
    await expect(page.getByTestId('activity').textContent()).resolves.toBe('100');
    await expect(page.getByText('No flags.').isVisible()).resolves.toBe(true);
    expect(await page.locator('figure .recharts-line').count()).toBe(2); // a fitted line per trace
    await page.getByLabel('Set the window by hand').check();
    await page.getByLabel('To (s)').fill('40');
    await expect(page.getByText('0–40 s (set by hand)').waitFor().then(() => true)).resolves.toBe(true);
    await screenshot(page, 'rate-check');

    // Swap the traces: the specific slope now rises for a falling assay -> a named flag, no activity.
    await page.getByLabel('Set the window by hand').uncheck();
    await page.getByLabel(/Total trace/).fill(lines(1.1, -0.01));
    await page.getByLabel(/Background trace/).fill(lines(1.2, -0.0348));
    await page.getByRole('button', { name: 'Calculate' }).click();
    await expect(page.getByTestId('activity').filter({ hasText: 'No activity' }).waitFor().then(() => true)).resolves.toBe(true);
    await expect(page.getByRole('list', { name: 'Flags' }).textContent()).resolves.toContain('WRONG_SIGN');
    await page.close();
  });
});
