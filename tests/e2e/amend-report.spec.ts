import { execFileSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import type { Page } from 'playwright-core';
import { describe, expect, it } from 'vitest';
import { ARTIFACTS, screenshot, signIn } from './support/browser';
import { useAppInBrowser } from './support/app';

/*
 * Correcting the numbers of a signed report, in Chromium against the real server: the director reopens a demo
 * case signed for Dr Quenby (reason and password typed again), the technologist records the right protein and
 * submits again, Dr Quenby sees the signed report with the note that a corrected version will follow, and the
 * director signs the correction. Rule followed: CLIA 42 CFR 493.1291(k) [confirmed] (correct, send, keep the
 * original). Doubling the protein halves every specific activity (Beer–Lambert, docs/domain.md §1 [derived]).
 * The corrected PDF's text is read with poppler's pdftotext and its first page rendered with pdftoppm.
 */

const app = useAppInBrowser();

const NOTE = 'This report is being amended by the laboratory; a corrected version will follow.';
const sha256 = (b: Buffer) => createHash('sha256').update(b).digest('hex');

async function signOut(page: Page): Promise<void> {
  await page.getByRole('button', { name: 'Sign out' }).click();
  await page.waitForURL('**/sign-in**');
}

type Item = { id: number; caseId: number; accession: string; status: string; version: number };
type Detail = {
  id: number;
  version: number;
  state: string;
  referringClinician: { email: string };
  specimens: { id: number; version: number; proteinMgPerMl: number | null }[];
};

describe('amending a signed report, in Chromium', () => {
  let caseId = 0;
  let accession = '';
  let firstReport: Item;
  let firstPdfHash = '';

  it('when the director reopens a signed case, then a wrong password is refused in place and the right one reopens it with the note on screen', async () => {
    const page = await app.browser.newPage();
    await signIn(page, app.server.origin, 'director@demo.test');
    await page.waitForURL('**/review');
    const reports = (await (await page.request.get(`${app.server.origin}/api/reports`)).json()) as Item[];
    for (const r of reports.filter((x) => x.status === 'final')) {
      const d = (await (await page.request.get(`${app.server.origin}/api/cases/${r.caseId}`)).json()) as Detail;
      if (d.referringClinician.email === 'clinician@demo.test' && d.state === 'final' && d.specimens[0]?.proteinMgPerMl) {
        firstReport = r;
        break;
      }
    }
    expect(firstReport).toBeDefined();
    caseId = firstReport.caseId;
    accession = firstReport.accession;
    firstPdfHash = sha256(Buffer.from(await (await page.request.get(`${app.server.origin}/api/reports/${firstReport.id}/pdf`)).body()));

    await page.goto(`${app.server.origin}/review/${caseId}`);
    await page.getByRole('button', { name: 'Amend: reopen to correct the results…' }).click();
    const dialog = page.getByRole('dialog', { name: 'Reopen the signed case' });
    await dialog.getByRole('button', { name: 'Reopen the case' }).click();
    await dialog.getByText('Say why the signed report must be amended').waitFor();
    await dialog.getByLabel('What is wrong in the signed report').fill('Protein was entered at half its value; the BCA worksheet shows twice as much (demo).');
    await dialog.getByLabel('Your password, to confirm').fill('wrong-password');
    await dialog.getByRole('button', { name: 'Reopen the case' }).click();
    await dialog.getByText('The password is not correct').waitFor();
    await screenshot(page, 'amend-1-dialog-refused');
    expect(((await (await page.request.get(`${app.server.origin}/api/cases/${caseId}`)).json()) as Detail).state).toBe('final');

    await dialog.getByLabel('Your password, to confirm').fill('cristae-demo');
    await dialog.getByRole('button', { name: 'Reopen the case' }).click();
    await page.getByText('Reopened after signing.').waitFor();
    await page.getByRole('note').filter({ hasText: NOTE }).waitFor();
    await screenshot(page, 'amend-2-reopened');
    expect(((await (await page.request.get(`${app.server.origin}/api/cases/${caseId}`)).json()) as Detail).state).toBe('in_assay');
    await signOut(page);
    await page.close();
  });

  it('when the technologist records the right protein and submits again, then the case page shows why it was reopened', async () => {
    const page = await app.browser.newPage();
    await signIn(page, app.server.origin, 'technologist@demo.test');
    const d = (await (await page.request.get(`${app.server.origin}/api/cases/${caseId}`)).json()) as Detail;
    const s = d.specimens[0]!;
    const put = await page.request.put(`${app.server.origin}/api/specimens/${s.id}/protein`, {
      data: { kind: 'direct', proteinMgPerMl: 2 * s.proteinMgPerMl!, proteinSource: 'BCA worksheet, re-read (demo)', version: s.version },
      headers: { Origin: app.server.origin },
    });
    expect(put.status()).toBe(200);
    const fresh = (await (await page.request.get(`${app.server.origin}/api/cases/${caseId}`)).json()) as Detail;
    expect((await page.request.post(`${app.server.origin}/api/cases/${caseId}/submit`, { data: { version: fresh.version }, headers: { Origin: app.server.origin } })).status()).toBe(200);
    await page.goto(`${app.server.origin}/cases/${caseId}`);
    await page.getByText('Reopened after signing to correct the results:').waitFor();
    await page.getByRole('note').filter({ hasText: NOTE }).waitFor();
    await screenshot(page, 'amend-3-case-page');
    await signOut(page);
    await page.close();
  });

  it('when Dr Quenby looks meanwhile, then the signed report is still there, unchanged, with the note', async () => {
    const page = await app.browser.newPage();
    await signIn(page, app.server.origin, 'clinician@demo.test');
    await page.waitForURL('**/my-reports');
    const card = page.getByRole('article', { name: `Accession ${accession}` });
    await card.getByRole('note').filter({ hasText: NOTE }).waitFor();
    await screenshot(page, 'amend-4-clinician-note');
    const bytes = Buffer.from(await (await page.request.get(`${app.server.origin}/api/reports/${firstReport.id}/pdf`)).body());
    expect(sha256(bytes)).toBe(firstPdfHash);
    await signOut(page);
    await page.close();
  });

  it('when the director signs the correction, then the new version lists the changed values and its PDF carries the new numbers', async () => {
    const page = await app.browser.newPage();
    await signIn(page, app.server.origin, 'director@demo.test');
    await page.goto(`${app.server.origin}/review/${caseId}`);
    await page.getByRole('button', { name: 'Sign the corrected report…' }).click();
    const form = page.getByRole('form', { name: 'Issue a corrected report' });
    await form.getByLabel('Why the report is corrected').fill('Protein was entered at half its value (demo).');
    await form.getByLabel('What changed').fill('Every activity recalculated with the right protein; ratios unchanged (demo).');
    await form.getByLabel('Your password, to sign the correction').fill('cristae-demo');
    await form.getByRole('button', { name: /Sign and release version/ }).click();
    await page.getByText(/is signed and stored \(corrected report\)/).waitFor();
    const table = page.getByRole('table', { name: /Values changed in version/ });
    await table.waitFor();
    await expect(table.getByRole('cell', { name: 'CS activity', exact: true }).count()).resolves.toBe(1);
    await expect(page.getByRole('note').filter({ hasText: NOTE }).count()).resolves.toBe(0);
    await screenshot(page, 'amend-5-corrected');

    const reports = (await (await page.request.get(`${app.server.origin}/api/cases/${caseId}/reports`)).json()) as {
      items: (Item & { changedValues: { item: string; before: string; after: string }[] })[];
    };
    const [newest, previous] = reports.items;
    expect(newest).toMatchObject({ status: 'corrected', version: firstReport.version + 1 });
    expect(previous).toMatchObject({ id: firstReport.id, status: 'superseded' });
    const cs = newest!.changedValues.find((v) => v.item === 'CS activity')!;
    // Halved by the doubled protein [derived]. Both are printed to three significant figures, so each is within
    // 0.5% of its value and the printed half within 1% [derived].
    const half = parseFloat(cs.before) / 2;
    expect(Math.abs(parseFloat(cs.after) - half) / half).toBeLessThan(0.01);

    fs.mkdirSync(ARTIFACTS, { recursive: true });
    const pdfPath = path.join(ARTIFACTS, 'amend-corrected-report.pdf');
    fs.writeFileSync(pdfPath, Buffer.from(await (await page.request.get(`${app.server.origin}/api/reports/${newest!.id}/pdf`)).body()));
    const text = execFileSync('pdftotext', ['-layout', pdfPath, '-']).toString('utf8').replace(/\s+/g, ' ');
    expect(text).toContain(`Values changed since version ${firstReport.version}`);
    expect(text).toContain(`CS activity ${cs.before} ${cs.after}`);
    expect(text).not.toContain('being amended');
    execFileSync('pdftoppm', ['-png', '-r', '80', '-f', '1', '-l', '1', '-singlefile', pdfPath, path.join(ARTIFACTS, 'amend-corrected-report-page-1')]);
    expect(fs.statSync(path.join(ARTIFACTS, 'amend-corrected-report-page-1.png')).size).toBeGreaterThan(10_000);
    await page.close();
  });
});
