import { describe, expect, it } from 'vitest';
import { screenshot, signIn } from './support/browser';
import { useAppInBrowser } from './support/app';

/*
 * The Cohorts page in Chromium against the real server and the demo laboratory. The demo signs five cases whose
 * invented activities were written to show one pattern each (server/db/seed/demo-measurements.ts): normal,
 * isolated CIV (CIV about 30 against about 180 nmol/min/mg in the normal muscle, CS alike), combined (CI, CIII
 * and CIV low), raised CS, and a corrected case with CI at about half the normal muscle's. Worked by hand from
 * those numbers: two members show an isolated deficiency (the CIV case and the corrected CI case), and of these
 * only the CIV case has CIV/CS at or below 50% of the reference mean (about 30/150 against 180/145: some 16%).
 */

const app = useAppInBrowser();

describe('cohort search, in Chromium', () => {
  it('a technologist narrows the cohort, reads the plots, saves the search, runs it again and deletes it', async () => {
    const page = await app.browser.newPage();
    await signIn(page, app.server.origin, 'technologist@demo.test');
    await page.getByRole('link', { name: 'Cohorts' }).click();
    await page.waitForURL('**/cohorts');
    await page.getByRole('heading', { name: 'Cohorts', level: 1 }).waitFor();
    await page.getByText('Members 1–5 of 5').waitFor();
    await page.getByText('Ratio to citrate synthase across the cohort').waitFor();
    expect(await page.getByRole('figure', { name: /ratio to CS: 5 values/ }).count()).toBe(6);

    await page.getByLabel('Pattern').selectOption('isolated');
    await page.getByRole('button', { name: 'Find cases' }).click();
    await page.waitForURL('**/cohorts?pattern=isolated');
    await page.getByText('Members 1–2 of 2').waitFor();

    // A range whose bounds are the wrong way round is refused beside its row, and the cohort stays as it was.
    await page.getByRole('button', { name: 'Add a range' }).click();
    await page.getByLabel('Range 1 assay').selectOption('CIV');
    await page.getByLabel('Range 1 lowest').fill('60');
    await page.getByLabel('Range 1 highest').fill('40');
    await page.getByRole('button', { name: 'Find cases' }).click();
    await page.getByText('Range 1: Highest value is below the lowest').waitFor();
    expect(new URL(page.url()).search).toBe('?pattern=isolated');

    await page.getByLabel('Range 1 lowest').fill('');
    await page.getByLabel('Range 1 highest').fill('50');
    await page.getByRole('button', { name: 'Find cases' }).click();
    await page.getByText('Members 1–1 of 1').waitFor();
    expect(new URL(page.url()).searchParams.getAll('range')).toEqual(['CIV:ratio_cs:pct::50']);
    expect(await page.getByRole('row').filter({ hasText: 'Isolated CIV' }).count()).toBe(1);

    await page.getByLabel('Save the criteria now applied as').fill('Isolated, CIV at most half');
    await page.getByRole('button', { name: 'Save', exact: true }).click();
    await page.getByRole('list', { name: 'My saved searches' }).getByText('Isolated, CIV at most half').waitFor();
    await screenshot(page, 'registry-cohort-1-narrowed');

    await page.getByRole('button', { name: 'Clear all criteria' }).click();
    await page.getByText('Members 1–5 of 5').waitFor();
    await page.getByRole('button', { name: 'Run Isolated, CIV at most half' }).click();
    await page.getByText('Members 1–1 of 1').waitFor();
    expect(await page.getByLabel('Pattern').inputValue()).toBe('isolated');
    expect(await page.getByLabel('Range 1 highest').inputValue()).toBe('50');

    page.once('dialog', (d) => void d.accept());
    await page.getByRole('button', { name: 'Delete Isolated, CIV at most half' }).click();
    await page.getByText('You have no saved searches yet.').waitFor();

    await page.getByRole('button', { name: 'Clear all criteria' }).click();
    await page.getByText('Members 1–5 of 5').waitFor();
    await screenshot(page, 'registry-cohort-2-whole');
    await page.close();
  });

  it('a clinician has no Cohorts entry and is turned away from the page', async () => {
    const page = await app.browser.newPage();
    await signIn(page, app.server.origin, 'clinician@demo.test');
    expect(await page.getByRole('link', { name: 'Cohorts' }).count()).toBe(0);
    await page.goto(`${app.server.origin}/cohorts`);
    await page.getByRole('heading', { name: 'This page is not part of your role' }).waitFor();
    await page.close();
  });
});
