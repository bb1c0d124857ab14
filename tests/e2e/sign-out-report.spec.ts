import { execFileSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { request, type APIRequestContext, type Page } from 'playwright-core';
import { describe, expect, it } from 'vitest';
import { ARTIFACTS, screenshot, signIn } from './support/browser';
import { useAppInBrowser } from './support/app';

/*
 * The sign-out flow as its people live it, in Chromium against the real server and its local SMTP stand-in:
 * the director signs a demo case referred by Dr Quenby, a signed report's notice reaches the outbox, Dr Quenby
 * signs in and downloads the PDF, and Dr Halvorsen (clinician2) cannot reach it. The downloaded file is hashed
 * with node:crypto and compared with the ETag the server sends; its first page is rendered with poppler's
 * pdftoppm and kept in test-artifacts/. Each test makes or finds its own signed report through the API, so
 * they pass in any order and alone.
 */

const app = useAppInBrowser();

const sha256 = (b: Buffer) => createHash('sha256').update(b).digest('hex');

/** An API session of its own (not the browser's cookies) as that demo account, sending the app's Origin. */
async function apiAs(email: string): Promise<APIRequestContext> {
  const api = await request.newContext({ baseURL: app.server.origin, extraHTTPHeaders: { Origin: app.server.origin } });
  const res = await api.post('/api/auth/login', { data: { email, password: 'cristae-demo' } });
  expect(res.status(), `sign-in as ${email}`).toBe(200);
  return api;
}

type ReportItem = { id: number; caseId: number; accession: string; status: string };
type CaseItem = { id: number; accession: string; state: string; referringClinicianName: string };

/** A current (not superseded) signed report of Dr Quenby's, as Dr Quenby's own list gives it. */
async function reportOfQuenby(): Promise<ReportItem> {
  const quenby = await apiAs('clinician@demo.test');
  const reports = (await (await quenby.get('/api/reports')).json()) as ReportItem[];
  await quenby.dispose();
  const current = reports.find((r) => r.status !== 'superseded');
  expect(current, 'the demo seed holds signed reports of Dr Quenby').toBeDefined();
  return current!;
}

async function signOut(page: Page): Promise<void> {
  await page.getByRole('button', { name: 'Sign out' }).click();
  await page.waitForURL('**/sign-in**');
}

describe('signing out a report, in Chromium', () => {
  it('when the director signs a case from the queue, then it is stored as version 1 and leaves the queue', async () => {
    const page = await app.browser.newPage();
    await signIn(page, app.server.origin, 'director@demo.test');
    await page.waitForURL('**/review');
    const row = page.getByRole('row').filter({ hasText: 'Dr Rafael Quenby' }).first();
    const link = row.getByRole('link').first();
    const accession = (await link.textContent())!.trim();
    expect(accession).toMatch(/^CR-\d{4}-\d+$/);
    await screenshot(page, 'sign-out-1-queue');
    await link.click();
    await page.waitForURL('**/review/*');

    const text = page.getByLabel('Interpretation (this text is signed and printed on the report)');
    await expect(text.inputValue()).resolves.toMatch(/of the reference mean/);
    await text.fill(`${await text.inputValue()}\n\nReviewed in the browser test; wording confirmed by the director (demo).`);
    await page.getByLabel('Your password, to sign').fill('wrong-password');
    await page.getByRole('button', { name: 'Sign and release the report' }).click();
    // A mistyped password is refused in place and nothing is signed.
    await page.getByText('The password is not correct').waitFor();
    const refused = (await (await page.request.get(`${app.server.origin}/api/reports`)).json()) as ReportItem[];
    expect(refused.filter((r) => r.accession === accession)).toEqual([]);

    await page.getByLabel('Your password, to sign').fill('cristae-demo');
    await page.getByRole('button', { name: 'Sign and release the report' }).click();
    await page.getByText(/Version 1 is signed and stored/).waitFor();
    await screenshot(page, 'sign-out-2-signed');

    const reports = (await (await page.request.get(`${app.server.origin}/api/reports`)).json()) as { id: number; accession: string; status: string }[];
    const mine = reports.find((r) => r.accession === accession) as { id: number; caseId: number; status: string } | undefined;
    expect(mine?.status).toBe('final');

    await page.goto(`${app.server.origin}/review`);
    // Once the signed list shows the new version, the queue (loaded alongside) no longer holds the case.
    await page.getByRole('table', { name: 'Signed reports' }).getByRole('link', { name: accession }).first().waitFor();
    await page.waitForLoadState('networkidle');
    const queue = page.getByRole('table', { name: 'Cases awaiting review' });
    if ((await queue.count()) > 0) await expect(queue.getByText(accession).count()).resolves.toBe(0);
    else await page.getByText('Nothing is waiting for your signature.').waitFor();
    await signOut(page);
    await page.close();
  });

  it('when the director signs a case through the API and the administrator opens "Sent e-mail", then the notice to its clinician is there, with the accession and no patient name', async () => {
    // This test's own signed report: Dr Halvorsen's case awaiting review (test 1 signs Dr Quenby's).
    const director = await apiAs('director@demo.test');
    const cases = ((await (await director.get('/api/cases?pageSize=100')).json()) as { items: CaseItem[] }).items;
    const waiting = cases.find((c) => c.state === 'awaiting_review' && c.referringClinicianName === 'Dr Noor Halvorsen');
    expect(waiting, 'the demo seed has a case of Dr Halvorsen awaiting review').toBeDefined();
    const accession = waiting!.accession;
    const detail = (await (await director.get(`/api/cases/${waiting!.id}`)).json()) as {
      version: number;
      patient: { familyName: string; givenName: string; labPatientId: string; dateOfBirth: string };
    };
    const signed = await director.post(`/api/cases/${waiting!.id}/sign`, { data: { password: 'cristae-demo', version: detail.version } });
    expect(signed.status()).toBe(201);
    await director.dispose();
    const patientIdentifiers = [detail.patient.familyName, detail.patient.givenName, detail.patient.labPatientId, detail.patient.dateOfBirth];

    const page = await app.browser.newPage();
    await signIn(page, app.server.origin, 'admin@demo.test');
    await page.goto(`${app.server.origin}/admin/outbox`);
    const message = page.getByRole('list', { name: 'Received messages' }).getByRole('listitem').filter({ hasText: accession });
    await message.first().waitFor({ timeout: 30_000 });
    await expect(message.first().textContent()).resolves.toContain('clinician2@demo.test');
    await message.first().locator('summary').click();
    const body = (await message.first().textContent()) ?? '';
    expect(body).toContain('/my-reports');
    const review = (await (await page.request.get(`${app.server.origin}/api/outbox`)).json()) as { messages: { subject: string; text: string }[] };
    const mail = review.messages.find((m) => m.subject.includes(accession))!;
    // None of the patient's identifiers may travel by e-mail (HIPAA Safe Harbor's identifier kinds, 45 CFR
    // 164.514(b)(2) [confirmed]; the notice carries the accession only).
    for (const id of patientIdentifiers) {
      expect(id.length).toBeGreaterThan(0);
      expect(`${mail.subject}\n${mail.text}`).not.toContain(id);
    }
    await screenshot(page, 'sign-out-3-outbox');
    await signOut(page);
    await page.close();
  });

  it('when Dr Quenby signs in, then a signed report of theirs is on their page and the PDF downloads with the bytes the server signed', async () => {
    const { id: reportId, accession } = await reportOfQuenby();
    const page = await app.browser.newPage();
    await signIn(page, app.server.origin, 'clinician@demo.test');
    await page.waitForURL('**/my-reports');
    const card = page.getByRole('article', { name: `Accession ${accession}` });
    await card.waitFor();
    await screenshot(page, 'sign-out-4-my-reports');
    const [download] = await Promise.all([page.waitForEvent('download'), card.getByRole('link', { name: 'Download report (PDF)' }).click()]);
    fs.mkdirSync(ARTIFACTS, { recursive: true });
    const pdfPath = path.join(ARTIFACTS, 'sign-out-report.pdf');
    await download.saveAs(pdfPath);
    const bytes = fs.readFileSync(pdfPath);
    expect(bytes.subarray(0, 5).toString('latin1')).toBe('%PDF-');
    const head = await page.request.get(`${app.server.origin}/api/reports/${reportId}/pdf`);
    expect(head.headers().etag).toBe(`"${sha256(bytes)}"`);

    execFileSync('pdftoppm', ['-png', '-r', '80', '-f', '1', '-l', '1', '-singlefile', pdfPath, path.join(ARTIFACTS, 'sign-out-report-page-1')]);
    expect(fs.statSync(path.join(ARTIFACTS, 'sign-out-report-page-1.png')).size).toBeGreaterThan(10_000);
    await signOut(page);
    await page.close();
  });

  it('when Dr Halvorsen (clinician2) tries a report of Dr Quenby, then it is neither listed nor reachable', async () => {
    const { id: reportId, accession } = await reportOfQuenby();
    const page = await app.browser.newPage();
    await signIn(page, app.server.origin, 'clinician2@demo.test');
    await page.waitForURL('**/my-reports');
    // Wait until the page has its answer (their own reports, or none) before looking for the other one.
    await page.getByRole('article').first().or(page.getByText('No signed reports yet')).waitFor();
    await expect(page.getByRole('article', { name: `Accession ${accession}` }).count()).resolves.toBe(0);
    for (const url of [`/api/reports/${reportId}`, `/api/reports/${reportId}/pdf`]) {
      const res = await page.request.get(`${app.server.origin}${url}`);
      expect(res.status()).toBe(404);
    }
    await screenshot(page, 'sign-out-5-other-clinician');
    await page.close();
  });
});
