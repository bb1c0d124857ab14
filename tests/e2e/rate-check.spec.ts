import { describe, expect, it } from 'vitest';
import { screenshot, signIn } from './support/browser';
import { useAppInBrowser } from './support/app';

const app = useAppInBrowser();

// The CI worked example [derived] (docs/domain.md §1): specific ΔA/min 0.0248 with 40 µg protein in 1 mL, 1 cm
// -> 100.0 nmol/min/mg. Total falls 0.0348 A/min, the rotenone trace 0.0100 A/min.
const lines = (a0: number, perMin: number) => Array.from({ length: 13 }, (_, i) => `${i * 10}\t${(a0 + (perMin / 60) * i * 10).toFixed(6)}`).join('\n');

/** A technologist's rate check showing the CI worked example's result (100 nmol/min/mg). */
async function workedExample() {
  const page = await app.browser.newPage();
  await signIn(page, app.server.origin, 'technologist@demo.test');
  await page.getByRole('link', { name: 'Rate check' }).click();
  await page.getByLabel(/Total trace/).fill(lines(1.2, -0.0348));
  await page.getByLabel(/Background trace/).fill(lines(1.1, -0.01));
  await page.getByRole('button', { name: 'Calculate' }).click();
  await expect(page.getByTestId('activity').textContent()).resolves.toBe('100');
  return page;
}

describe('rate check, in Chromium', () => {
  it('when a technologist pastes two traces, then the activity, the fitted lines and the window are shown, and moving the window recomputes', async () => {
    const page = await workedExample();
    await page.getByText('No flags.').waitFor();
    expect(await page.locator('figure .recharts-line').count()).toBe(2); // a fitted line per trace
    // A slow server: the recomputation started by ticking the box is still on its way when the end is typed;
    // the typed end must still be computed (it was dropped while no result was on screen).
    await page.route('**/api/calculations/activity', async (route) => {
      await new Promise((r) => setTimeout(r, 1500));
      await route.continue();
    });
    await page.getByLabel('Set the window by hand').check();
    await page.getByLabel('To (s)').fill('40');
    await page.getByText('0–40 s (set by hand)').waitFor();
    await page.unroute('**/api/calculations/activity');
    await screenshot(page, 'rate-check');

    // Swap the traces: the specific slope now rises for a falling assay -> a named flag, no activity.
    await page.getByLabel('Set the window by hand').uncheck();
    await page.getByLabel(/Total trace/).fill(lines(1.1, -0.01));
    await page.getByLabel(/Background trace/).fill(lines(1.2, -0.0348));
    await page.getByRole('button', { name: 'Calculate' }).click();
    await page.getByTestId('activity').filter({ hasText: 'No activity' }).waitFor();
    await expect(page.getByRole('list', { name: 'Flags' }).textContent()).resolves.toContain('Rate runs the wrong way');
    await page.close();
  });

  it('when the readings or conditions change after a result, then the old figures leave the screen until Calculate is pressed again', async () => {
    // The CI worked example above (100.0 nmol/min/mg with 4 mg/mL protein [derived]); doubling the protein halves it.
    const page = await workedExample();
    await page.getByLabel('Protein (mg/mL)').fill('8');
    await page.getByText('The readings or conditions have changed since this result was calculated').waitFor();
    expect(await page.getByTestId('activity').count()).toBe(0);
    await page.getByRole('button', { name: 'Calculate' }).click();
    await expect(page.getByTestId('activity').textContent()).resolves.toBe('50');
    // A reading that is not a number: the field says so and no result stays beside it.
    await page.getByLabel(/Total trace/).fill('0\t1.2\n10\tOVER\n20\t1.1');
    await page.getByRole('button', { name: 'Calculate' }).click();
    await page.getByText('Total trace, line 2, absorbance: "OVER" is not a number').waitFor();
    expect(await page.getByTestId('activity').count()).toBe(0);
    await page.close();
  });

  it('when a curved complex IV trace is pasted, then no activity is read off the curve; a window set by hand gives one, flagged as curved', async () => {
    // A = 0.6 + 0.7·e^(−0.5·t/min) every 10 s for 300 s: initial rate 0.35 A/min [analytic]; every 5-reading
    // window already loses about 15% of it, so no straight stretch exists.
    const decay = Array.from({ length: 31 }, (_, i) => `${i * 10}\t${(0.6 + 0.7 * Math.exp((-0.5 * i * 10) / 60)).toFixed(6)}`).join('\n');
    const page = await app.browser.newPage();
    await signIn(page, app.server.origin, 'technologist@demo.test');
    await page.getByRole('link', { name: 'Rate check' }).click();
    await page.getByLabel('Assay').selectOption('CIV');
    await page.getByLabel(/Total trace/).fill(decay);
    await page.getByRole('button', { name: 'Calculate' }).click();
    await page.getByTestId('activity').filter({ hasText: 'No activity' }).waitFor();
    const flags = page.getByRole('list', { name: 'Flags' });
    await expect(flags.textContent()).resolves.toMatch(/No straight stretch: no rate given\..*falls by 1\d(\.\d+)?%/);
    await screenshot(page, 'rate-check-curved-refused');

    await page.getByLabel('Set the window by hand').check();
    await page.getByLabel('From (s)').fill('0');
    await page.getByLabel('To (s)').fill('80');
    await page.getByText('Window is curved').waitFor();
    await expect(page.getByTestId('activity').textContent()).resolves.toMatch(/^\d+(\.\d+)?$/);
    await screenshot(page, 'rate-check-curved-by-hand');
    await page.close();
  });
});
