import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { readPdf } from '../factories/pdf-text';
import { ARTIFACTS, screenshot, signIn } from './support/browser';
import { useAppInBrowser } from './support/app';

/*
 * The results of the demo cases (invented values, fictitious Fernhollow laboratory), in
 * Chromium against the real server: criterion bands stand on the ratio to citrate synthase only (the default
 * rule set, docs/domain.md), in plain words, and the page says what the bands are applied to and where that
 * rule comes from. Bands: Bernier FP et al., Neurology 2002 [from memory]; applying them to the ratio to CS
 * [common practice].
 */

const app = useAppInBrowser();

describe('criterion bands on the results page, in Chromium', () => {
  it('when the director opens a demo case with a band, then it stands on the ratio to CS in words, with the rule it follows', async () => {
    const page = await app.browser.newPage();
    await signIn(page, app.server.origin, 'director@demo.test');
    const body = (await (await page.request.get(`${app.server.origin}/api/cases?pageSize=100`)).json()) as
      | { items: { id: number; patternCode: string | null }[] }
      | { id: number; patternCode: string | null }[];
    const cases = Array.isArray(body) ? body : body.items;
    // Every demo case with results: under the default rule a band stands only on a ratio to CS.
    type Cmp = { measure: string; band: string | null } | null;
    const banded: { id: number; assay: string; band: string }[] = [];
    for (const c of cases.filter((x) => x.patternCode !== null)) {
      const r = (await (await page.request.get(`${app.server.origin}/api/cases/${c.id}/results`)).json()) as {
        specimens: { assays: { assay: string; activity: Cmp; ratioCs: Cmp; ratioCii: Cmp }[] }[];
      };
      for (const a of r.specimens.flatMap((s) => s.assays)) {
        for (const x of [a.activity, a.ratioCs, a.ratioCii]) {
          if (x?.band !== 'major' && x?.band !== 'minor') continue;
          expect(x.measure).toBe('ratio_cs');
          banded.push({ id: c.id, assay: a.assay, band: x.band });
        }
      }
    }
    expect(banded.length).toBeGreaterThan(0);
    // The first banded case of the deterministic demo seed is a signed one (a report exists).
    const shown = banded[0]!;
    await page.goto(`${app.server.origin}/cases/${shown.id}/results`);
    await page.getByTestId('pattern-summary').waitFor();
    await screenshot(page, 'result-bands');

    const row = page.getByTestId(`result-row-${shown.assay}`);
    const band = (await page.getByTestId(`band-${shown.assay}`).textContent())!;
    expect(band).toMatch(new RegExp(`^${shown.band === 'major' ? 'Major' : 'Minor'} criterion \\(ratio to CS\\)`));
    await expect(row.textContent()).resolves.toMatch(new RegExp(`${shown.band}-criterion band`));
    // No band on the activity or the ratio to CII under the default rule.
    await expect(row.locator('td').nth(0).textContent()).resolves.not.toMatch(/criterion band/);
    await expect(row.locator('td').nth(2).textContent()).resolves.not.toMatch(/criterion band/);
    const summary = (await page.getByTestId('pattern-summary').textContent())!;
    expect(summary).toMatch(/applied to the ratio to CS, as % of its reference mean/);
    expect(summary).toMatch(/\[common practice/);
    // Under the default rule no band is ever given for an activity or a ratio to CII.
    for (const text of await page.locator('[data-testid^="band-"]').allTextContents()) {
      expect(text).not.toMatch(/\((activity|ratio to CII)\)/);
    }

    // The demo case's signed report prints the same % of mean for that ratio as the screen (read back with
    // pdfjs-dist; first page rendered with poppler's pdftoppm to look at).
    const screenPct = /([\d.]+%) of mean/.exec((await row.locator('td').nth(1).textContent())!)![1]!;
    const { items } = (await (await page.request.get(`${app.server.origin}/api/cases/${shown.id}/reports`)).json()) as { items: { id: number; version: number }[] };
    expect(items.length).toBeGreaterThan(0);
    const latest = items.reduce((a, b) => (b.version > a.version ? b : a));
    const bytes = Buffer.from(await (await page.request.get(`${app.server.origin}/api/reports/${latest.id}/pdf`)).body());
    const file = path.join(ARTIFACTS, 'result-bands-report.pdf');
    fs.writeFileSync(file, bytes);
    execFileSync('pdftoppm', ['-png', '-r', '80', '-f', '1', '-l', '1', file, path.join(ARTIFACTS, 'result-bands-report')]);
    const pdf = await readPdf(bytes);
    const line = pdf.pages.flatMap((p) => p.lines).find((l) => l.startsWith('Ratio to CS') && l.includes(`${screenPct} Below interval`));
    expect(line, `a "Ratio to CS … ${screenPct} Below interval" row in the report`).toBeDefined();
    await page.close();
  });
});
