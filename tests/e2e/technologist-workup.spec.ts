import { describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { defaultAssayDefinitions } from '@/schemas/assay';
import type { AssayCode } from '@/schemas/common';
import { makePlateFile } from '../factories/plate-file';
import { screenshot, signIn } from './support/browser';
import { useAppInBrowser } from './support/app';

const app = useAppInBrowser();

/*
 * A plate for the demo layout "Seven assays in duplicate, one blank (demo)": rows A–G hold CS, CI, CII, CIII,
 * CIV, CI+III, CII+III; columns 1–2 and 3–4 the total and background wells of replicates 1 and 2; H1 a blank.
 * Invented activities shaped as an isolated complex I defect; the CS replicates differ enough to be flagged.
 * Slopes follow the activity formula of docs/domain.md §1 [derived] at the upload screen's defaults
 * (200 µL in 0.32 cm² → 0.625 cm; 200 µL reaction, 10 µL sample) and 4 mg/mL protein.
 */
const rows: [AssayCode, string, [number, number], number][] = [
  ['CS', 'A', [135, 175], 0.15],
  ['CI', 'B', [9, 9.6], 0.9],
  ['CII', 'C', [30, 31], 1.2],
  ['CIII', 'D', [120, 124], 0.3],
  ['CIV', 'E', [180, 176], 1.8],
  ['CI+III', 'F', [10, 11], 0.3],
  ['CII+III', 'G', [40, 42], 0.3],
];
const PROTEIN = 4;

function specificSlope(assay: AssayCode, activity: number): number {
  const d = defaultAssayDefinitions.find((x) => x.code === assay)!;
  const magnitude = (activity * d.epsilonPerMmPerCm * 0.625 * 10 * PROTEIN) / (200 * 1000);
  return d.direction === 'rises' ? magnitude : -magnitude;
}

function plateFile(): string {
  const slope = new Map<string, number>();
  const start = new Map<string, number>();
  for (const [assay, row, [a1, a2], a0] of rows) {
    const withBackground = defaultAssayDefinitions.find((x) => x.code === assay)!.background !== 'none';
    [a1, a2].forEach((activity, i) => {
      const s = specificSlope(assay, activity);
      const col = i === 0 ? 1 : 3;
      const bg = withBackground ? s * 0.1 : 0;
      slope.set(`${row}${col}`, s + bg);
      start.set(`${row}${col}`, a0);
      if (withBackground) {
        slope.set(`${row}${col + 1}`, bg);
        start.set(`${row}${col + 1}`, a0);
      }
    });
  }
  slope.set('H1', 0);
  start.set('H1', 0.05);
  return makePlateFile({
    wells: [...slope.keys()],
    slopeFor: (w) => slope.get(w)!,
    interceptFor: (w) => start.get(w)!,
    points: 14,
    intervalS: 15,
    decimals: 5,
  });
}

async function registerCase(page: Page): Promise<number> {
  await page.goto(`${app.server.origin}/cases/new`);
  await page.getByRole('button', { name: /Register a new patient/ }).click();
  const patient = page.getByRole('form', { name: 'New patient' });
  await patient.getByLabel('Lab patient ID').fill('E2E-WORKUP-1');
  await patient.getByLabel('Family name').fill('Brackenridge');
  await patient.getByLabel('Given name(s)').fill('Linnea');
  await patient.getByLabel('Date of birth').fill('2017-03-09');
  await patient.getByLabel('Sex').selectOption('female');
  await patient.getByRole('button', { name: 'Register the patient' }).click();

  const referral = page.getByRole('form', { name: 'Referral and first specimen' });
  await referral.getByLabel('Referring clinician').selectOption({ label: 'Dr Rafael Quenby' });
  await referral.getByLabel('Clinical indication').fill('Exercise intolerance and lactic acidosis (invented end-to-end case).');
  await referral.getByLabel('Specimen type').selectOption('skeletal_muscle');
  await referral.getByLabel('Source (site, procedure)').fill('Vastus lateralis, needle biopsy');
  const received = referral.getByLabel(/Received in the laboratory/);
  if ((await received.inputValue()) === '') {
    const d = new Date(Date.now() - 2 * 60 * 60_000);
    const local = new Date(d.getTime() - d.getTimezoneOffset() * 60_000).toISOString().slice(0, 16);
    await received.fill(local);
  }
  await screenshot(page, 'workup-01-register-case');
  await referral.getByRole('button', { name: 'Register the case' }).click();
  await page.waitForURL(/\/cases\/\d+$/);
  return Number(/\/cases\/(\d+)$/.exec(new URL(page.url()).pathname)![1]);
}

describe('a technologist works up a case in Chromium', () => {
  it('registers a case, records protein, uploads a plate, moves a window, reads the flagged results and submits for review', async () => {
    const page = await app.browser.newPage();
    await signIn(page, app.server.origin, 'technologist@demo.test');

    const caseId = await registerCase(page);
    await page.getByTestId('workup-summary').waitFor();
    await screenshot(page, 'workup-01b-case-page');
    await page.getByTestId('workup-summary').getByRole('link', { name: 'Assay bench' }).click();
    await page.waitForURL(`**/cases/${caseId}/assays`);

    // Protein, typed in.
    const protein = page.getByTestId('protein-A');
    await protein.getByRole('button', { name: 'Type a value' }).click();
    await protein.getByLabel('Protein (mg/mL)').fill(String(PROTEIN));
    await protein.getByLabel('How it was measured').fill('BCA on the plate reader (end-to-end test)');
    await protein.getByRole('button', { name: 'Save protein' }).click();
    await protein.getByText('4 mg/mL', { exact: false }).first().waitFor();

    // The plate, read with the demo layout.
    await page.getByLabel('Plate file (CSV or tab-separated text)').setInputFiles({ name: 'e2e-run.csv', mimeType: 'text/csv', buffer: Buffer.from(plateFile()) });
    await page.getByLabel('Plate layout').selectOption({ label: 'Seven assays in duplicate, one blank (demo) (25 wells)' });
    await page.getByRole('button', { name: 'Read the file' }).click();
    const ci1 = page.getByTestId('group-A|CI|1');
    await ci1.waitFor();
    expect(await page.locator('[data-testid^="group-"]').count()).toBe(14);
    await screenshot(page, 'workup-02-plate-preview');

    // Move one window: CI replicate 1 fitted on 30–150 s only.
    await ci1.getByLabel('From (s)').fill('30');
    await ci1.getByLabel('To (s)').fill('150');
    await ci1.getByRole('button', { name: 'Use this window' }).click();
    await ci1.getByText('30–150 s (set by hand)').waitFor();
    await screenshot(page, 'workup-03-window-moved');

    await page.getByRole('button', { name: 'Save 14 measurements' }).click();
    await page.getByText('Saved 14 measurements from e2e-run.csv').waitFor();
    await page.getByRole('link', { name: 'e2e-run.csv' }).waitFor();

    // Results: computed live, with the flags and the pattern.
    await page.goto(`${app.server.origin}/cases/${caseId}/results`);
    await page.getByTestId('pattern-summary').waitFor();
    await page.getByRole('complementary', { name: 'Caution' }).waitFor();
    await expect(page.getByTestId('pattern-summary').textContent()).resolves.toMatch(/Isolated low complex I activity/);
    // The CS replicates (135 and 175) are 18.3% apart as CV, over the 15% limit of the demo definitions.
    await expect(page.getByTestId('result-row-CS').textContent()).resolves.toMatch(/Replicates disagree/);
    await expect(page.getByTestId('result-row-CI').textContent()).resolves.toMatch(/Below/);
    await page.waitForLoadState('networkidle');
    await screenshot(page, 'workup-04-results-live');

    await page.getByRole('button', { name: 'Submit for review…' }).click();
    await page.getByRole('button', { name: 'Freeze and submit' }).click();
    await page.getByText('Submitted for review. The results above are frozen').waitFor();
    await expect(page.getByTestId('results-basis').textContent()).resolves.toMatch(/^Frozen when the case was submitted/);
    await screenshot(page, 'workup-05-submitted');

    // Back on the case page: the state has moved on and the kept file is listed.
    await page.goto(`${app.server.origin}/cases/${caseId}`);
    await page.getByTestId('case-files').getByRole('link', { name: 'e2e-run.csv' }).waitFor();
    await expect(page.getByTestId('workup-summary').textContent()).resolves.toMatch(/Results frozen at submission/);
    await screenshot(page, 'workup-06-case-page-after');
    await page.close();
  });
});
