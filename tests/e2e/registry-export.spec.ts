import fs from 'node:fs';
import path from 'node:path';
import { parse } from 'csv-parse/sync';
import { describe, expect, it } from 'vitest';
import { ARTIFACTS, screenshot, signIn } from './support/browser';
import { useAppInBrowser } from './support/app';

/*
 * The research export from the Cohorts page, in Chromium against the real server: a director filters the cohort
 * and downloads the de-identified CSV; the file the browser saved is read back with csv-parse (RFC 4180) and
 * checked for the Safe Harbor basics (45 CFR 164.514(b)(2) [confirmed]: no lab IDs or accessions, years only).
 * A technologist sees no export button (issue 13: directors only). Full checks: tests/api/registry-export.api.test.ts.
 */

const app = useAppInBrowser();

describe('research export from the Cohorts page, in Chromium', () => {
  it('when a director filters by specimen type and downloads the research export, then the CSV has one de-identified row per selected specimen', async () => {
    const page = await app.browser.newPage();
    await signIn(page, app.server.origin, 'director@demo.test');
    await page.goto(`${app.server.origin}/cohorts?specimenType=skeletal_muscle`);
    const button = page.getByRole('link', { name: 'Research export (de-identified CSV)' });
    await button.waitFor();
    await screenshot(page, 'registry-export-1-cohorts');
    const cohort = (await (await page.request.get(`${app.server.origin}/api/registry/cohort?specimenType=skeletal_muscle`)).json()) as { total: number };

    const [download] = await Promise.all([page.waitForEvent('download'), button.click()]);
    expect(download.suggestedFilename()).toMatch(/^cristae-registry-deidentified-\d{4}-\d{2}-\d{2}\.csv$/);
    fs.mkdirSync(ARTIFACTS, { recursive: true });
    const file = path.join(ARTIFACTS, 'registry-export-deidentified.csv');
    await download.saveAs(file);
    const [header, ...rows] = parse(fs.readFileSync(file, 'utf8')) as string[][];
    expect(header![0]).toBe('study_id');
    expect(rows).toHaveLength(cohort.total);
    const type = header!.indexOf('specimen_type');
    for (const row of rows) {
      expect(row[type]).toBe('skeletal_muscle');
      expect(row.join(',')).not.toMatch(/DEMO-\d+|CR-\d{4}-\d+|\d{4}-\d{2}-\d{2}/);
    }
    await page.close();
  });

  it('when a technologist opens the Cohorts page, then there is no export button', async () => {
    const page = await app.browser.newPage();
    await signIn(page, app.server.origin, 'technologist@demo.test');
    await page.goto(`${app.server.origin}/cohorts`);
    await page.getByRole('heading', { name: 'Cohorts', level: 1 }).waitFor();
    await page.waitForLoadState('networkidle');
    await expect(page.getByRole('link', { name: /export/i }).count()).resolves.toBe(0);
    await page.close();
  });
});
