import path from 'node:path';
import { Sequelize } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { BrowserContext } from 'playwright-core';
import { useAppInBrowser } from './support/app';
import { describeFindings, seriousViolations } from './support/axe';
import { launchBrowser, screenshot, signIn } from './support/browser';

const app = useAppInBrowser();
/** A second browser profile for the demo's second director, who approves what the first one drafts. */
let browser2: BrowserContext;
beforeAll(async () => {
  browser2 = await launchBrowser();
});
afterAll(() => browser2?.close());

describe('quality control materials, in Chromium', () => {
  it('when a director adds two levels and enters CI targets, and a second director approves them, then each level shows its Levey–Jennings chart', async () => {
    const page = await app.browser.newPage();
    await signIn(page, app.server.origin, 'director@demo.test');
    await page.getByRole('link', { name: 'Quality control' }).click();
    await page.getByRole('heading', { name: 'Control materials' }).waitFor();

    const materialUrls: string[] = [];
    // Invented material and lot (a fictitious in-house pool).
    for (const [level, mean, sd] of [
      ['Low', '42.5', '3.1'],
      ['High', '118', '7.4'],
    ] as const) {
      await page.goto(`${app.server.origin}/qc`);
      await page.getByRole('button', { name: 'New control material' }).click();
      const form = page.getByRole('form', { name: 'New control material' });
      await form.getByLabel('Material').fill('Fernhollow pooled muscle homogenate');
      await form.getByLabel('Lot').fill('FH-2607');
      await form.getByLabel('Level').fill(level);
      await form.getByLabel('Expires on').fill('2027-03-31');
      await form.getByRole('button', { name: 'Add the material' }).click();
      const link = page.getByRole('row', { name: new RegExp(`FH-2607 ${level}`) }).getByRole('link');
      await link.click();
      await page.waitForURL(/\/qc\/materials\/\d+$/);
      materialUrls.push(page.url());

      const target = page.getByRole('form', { name: 'Enter a target' });
      await target.getByLabel('Assay').selectOption('CI');
      await target.getByLabel('Target mean').fill(mean);
      await target.getByLabel('Target SD').fill(sd);
      await target.getByLabel('Source (optional)').fill('Value sheet of the invented lot');
      await target.getByRole('button', { name: 'Save as draft' }).click();
      await page.getByText('Draft, not in use').waitFor();
      // The drafter cannot approve their own target: no approve button, and the page says why.
      await page.getByText(/Waiting for a second director/).waitFor();
      await expect(page.getByRole('button', { name: /^Approve/ }).count()).resolves.toBe(0);
    }
    // Establishing needs 20 results; a fresh material has none, and the page says how many exist.
    await page.getByRole('button', { name: 'Compute from the first 20' }).click();
    await page.getByText(/^0 control results of this material for CI exist; 20 are needed/).waitFor();
    await screenshot(page, 'qc-material-draft-target');

    const page2 = await browser2.newPage();
    await signIn(page2, app.server.origin, 'director2@demo.test');
    for (const url of materialUrls) {
      await page2.goto(url);
      await page2.getByRole('button', { name: 'Approve v1' }).click();
      await page2.getByText('In force').waitFor();
    }

    await page.goto(materialUrls[1]!);
    await page.getByText('In force').waitFor();
    const chart = page.getByRole('figure', { name: /Levey–Jennings chart of Fernhollow pooled muscle homogenate High, CI/ });
    await chart.waitFor();
    await chart.getByText(/target mean; dotted ±1 SD, dashed ±2 SD, long dashes ±3 SD/).waitFor();
    // Seven lines of the target: mean and ±1, ±2, ±3 SD, labelled on the right.
    for (const label of ['mean', '+1 SD', '−1 SD', '+2 SD', '−2 SD', '+3 SD', '−3 SD']) {
      await expect(chart.locator('text', { hasText: label }).count(), label).resolves.toBeGreaterThan(0);
    }
    await screenshot(page, 'qc-material-chart');

    await page.goto(`${app.server.origin}/qc`);
    await page.getByRole('row', { name: /FH-2607 High .* CI/ }).waitFor();
    // The laboratory switches 10x off; the choice survives a reload.
    await page.getByLabel(/^10x/).uncheck();
    await page.getByRole('button', { name: 'Save the rules' }).click();
    await page.getByText('Saved. The next run evaluated uses these rules.').waitFor();
    await page.reload();
    await page.getByLabel(/^4-1s/).waitFor();
    expect(await page.getByLabel(/^10x/).isChecked()).toBe(false);
    expect(await page.getByLabel(/^4-1s/).isChecked()).toBe(true);
    await screenshot(page, 'qc-overview');
    expect(describeFindings(await seriousViolations(page))).toBe('');
    await page2.close();

    // Runs as the runs module stores them (written straight into the server's database file): an accepted run,
    // a 1-2s warning, a rejection and a rejection released by override. Values invented around mean 118, SD 7.4.
    const materialId = Number(materialUrls[1]!.split('/').pop());
    const runIds = await storeRuns(materialId, [
      ['2026-11-02T09:00:00Z', 119.1, 'accept', false],
      ['2026-11-03T09:00:00Z', 134.0, 'warn', false],
      ['2026-11-04T09:00:00Z', 145.5, 'reject', false],
      ['2026-11-05T09:00:00Z', 96.0, 'reject', true],
      ['2026-11-06T09:00:00Z', 116.2, 'accept', false],
    ]);
    await page.goto(materialUrls[1]!);
    const withPoints = page.getByRole('figure', { name: /Levey–Jennings chart of .* High, CI/ });
    for (const words of ['run accepted (2)', 'run accepted with a 1-2s warning (1)', 'run rejected (1)', 'run rejected, released by a director’s override (1)']) {
      await withPoints.getByText(words).waitFor();
    }
    await screenshot(page, 'qc-material-chart-with-runs');
    // [confirmed] WCAG 2.1 A/AA via axe-core's rule tags: nothing serious or critical on the material page.
    expect(describeFindings(await seriousViolations(page))).toBe('');
    // A point opens its run's page.
    await withPoints.locator('.recharts-scatter-symbol').first().click();
    await page.waitForURL(new RegExp(`/runs/${runIds[0]}$`));
    await page.close();
  });
});

/** Inserts runs with one control result each for the material (CI), judged against its approved target. */
async function storeRuns(materialId: number, runs: [string, number, 'accept' | 'warn' | 'reject', boolean][]): Promise<number[]> {
  const db = new Sequelize({ dialect: 'sqlite', storage: path.join(app.server.dataDir, 'cristae.sqlite'), logging: false });
  try {
    const [[target]] = (await db.query(
      `SELECT id, mean, sd FROM control_targets WHERE "controlMaterialId" = ? AND "assayCode" = 'CI' AND status = 'approved'`,
      { replacements: [materialId] },
    )) as [{ id: number; mean: number; sd: number }[], unknown];
    const ids: number[] = [];
    for (const [i, [at, value, status, overridden]] of runs.entries()) {
      const when = at.replace('T', ' ').replace('Z', '.000 +00:00');
      const [, meta] = await db.query(
        `INSERT INTO analytical_runs ("runNumber", instrument, "startedAt", "plateFormat", layout, "definitionVersions", "qcStatus",
           "qcViolations", "overrideReason", "overrideAt", version, "createdAt", "updatedAt")
         VALUES (?, 'Plate reader (fictitious)', ?, 96, '[]', '{}', ?, '[]', ?, ?, 0, ?, ?)`,
        { replacements: [`RUN-E2E-${i + 1}`, when, status, overridden ? 'Invented reason' : null, overridden ? when : null, when, when] },
      );
      const runId = (meta as { lastID: number }).lastID;
      ids.push(runId);
      await db.query(
        `INSERT INTO control_results ("runId", "controlMaterialId", "assayCode", value, wells, "controlTargetId", z, "measuredAt", "createdAt")
         VALUES (?, ?, 'CI', ?, '[]', ?, ?, ?, ?)`,
        { replacements: [runId, materialId, value, target!.id, (value - target!.mean) / target!.sd, when, when] },
      );
    }
    return ids;
  } finally {
    await db.close();
  }
}
