import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import type { Download } from 'playwright-core';
import { describe, expect, it } from 'vitest';
import { ARTIFACTS, screenshot, signIn } from './support/browser';
import { useAppInBrowser } from './support/app';

/*
 * The "FHIR (JSON)" download as its people use it, in Chromium against the real server: the referring clinician
 * downloads a report's bundle and its PDF from their reports page, and a director downloads a version's bundle
 * from the case page. The files saved by the browser are read back here: the bundle is an HL7 FHIR R4 Bundle
 * of type collection [confirmed as the standard, hl7.org/fhir/R4/bundle.html] whose DiagnosticReport carries the
 * very PDF bytes the PDF link gives (SHA-256 from node:crypto). Full R4 validation is in tests/api/fhir.api.test.ts.
 */

const app = useAppInBrowser();

const sha256 = (b: Buffer) => createHash('sha256').update(b).digest('hex');

type Bundle = { resourceType: string; type: string; entry: Array<{ fullUrl: string; resource: Record<string, unknown> }> };

async function saved(download: Download, name: string): Promise<Buffer> {
  fs.mkdirSync(ARTIFACTS, { recursive: true });
  const file = path.join(ARTIFACTS, name);
  await download.saveAs(file);
  return fs.readFileSync(file);
}

function diagnosticReport(bundle: Bundle): { status: string; presentedForm: Array<{ contentType: string; data: string }> } {
  const found = bundle.entry.map((e) => e.resource).filter((r) => r.resourceType === 'DiagnosticReport');
  expect(found).toHaveLength(1);
  return found[0] as unknown as { status: string; presentedForm: Array<{ contentType: string; data: string }> };
}

describe('FHIR (JSON) download, in Chromium', () => {
  it('when the referring clinician downloads a report as FHIR (JSON) and as PDF, then the bundle holds that same PDF', async () => {
    const page = await app.browser.newPage();
    await signIn(page, app.server.origin, 'clinician@demo.test');
    await page.goto(`${app.server.origin}/my-reports`);
    const card = page.getByRole('article').first();
    await card.getByRole('link', { name: 'FHIR (JSON)', exact: true }).waitFor();
    await screenshot(page, 'fhir-1-clinician-reports');

    const [fhirDownload] = await Promise.all([page.waitForEvent('download'), card.getByRole('link', { name: 'FHIR (JSON)', exact: true }).click()]);
    expect(fhirDownload.suggestedFilename()).toMatch(/^report-CR-\d{4}-\d+-v\d+\.fhir\.json$/);
    const bundle = JSON.parse((await saved(fhirDownload, 'fhir-clinician.fhir.json')).toString('utf8')) as Bundle;
    expect(bundle.resourceType).toBe('Bundle');
    expect(bundle.type).toBe('collection');
    for (const e of bundle.entry) expect(e.fullUrl).toMatch(/^urn:uuid:/);
    const report = diagnosticReport(bundle);
    expect(['final', 'corrected']).toContain(report.status);
    expect(bundle.entry.filter((e) => e.resource.resourceType === 'Observation').length).toBeGreaterThan(5);

    const [pdfDownload] = await Promise.all([page.waitForEvent('download'), card.getByRole('link', { name: 'Download report (PDF)' }).click()]);
    const pdf = await saved(pdfDownload, 'fhir-clinician.pdf');
    expect(report.presentedForm[0]!.contentType).toBe('application/pdf');
    expect(sha256(Buffer.from(report.presentedForm[0]!.data, 'base64'))).toBe(sha256(pdf));
    await page.close();
  });

  it('when a director downloads a corrected version\'s bundle from the case page, then its status is corrected', async () => {
    const page = await app.browser.newPage();
    await signIn(page, app.server.origin, 'director@demo.test');
    const reports = (await (await page.request.get(`${app.server.origin}/api/reports`)).json()) as { caseId: number; status: string; version: number }[];
    const corrected = reports.find((r) => r.status === 'corrected')!;
    await page.goto(`${app.server.origin}/cases/${corrected.caseId}`);
    const link = page.getByRole('link', { name: `FHIR (JSON), version ${corrected.version}` });
    await link.waitFor();
    await link.scrollIntoViewIfNeeded();
    await screenshot(page, 'fhir-2-case-reports');
    const [download] = await Promise.all([page.waitForEvent('download'), link.click()]);
    const bundle = JSON.parse((await saved(download, 'fhir-corrected.fhir.json')).toString('utf8')) as Bundle;
    expect(diagnosticReport(bundle).status).toBe('corrected');
    await page.close();
  });
});
