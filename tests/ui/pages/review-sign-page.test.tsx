import { fireEvent, screen, waitFor, within } from '@testing-library/react';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import ReviewCasePage from '@/app/routes/review/review-case';
import type { ReportListItem, ReviewCase } from '@/schemas/report';
import { startRealApp, type RealApp } from '../../setup/real-app-fetch';
import { renderPage } from './render-page';

/*
 * The director's review page of a demo case awaiting review, rendered with Testing Library and fed by the real app
 * in-process. Signing needs the password typed again (21 CFR Part 11: two identity components and the meaning of
 * the signature [from memory]; OWASP ASVS 4.0 V2, re-authentication before high-value actions [confirmed as the
 * standard]). What was or was not signed is checked through the API afterwards, never from the page alone.
 */

let app: RealApp;
type CaseRow = { id: number; accession: string; state: string; referringClinicianName: string };

beforeAll(async () => {
  app = await startRealApp();
  await app.signInAs('director@demo.test');
  // jsdom has no scrolling; the page scrolls to its top after signing.
  window.scrollTo = () => {};
}, 180_000);
afterAll(() => app.close());

async function awaitingReview(clinician: string): Promise<CaseRow> {
  const { items } = await app.json<{ items: CaseRow[] }>('/api/cases');
  const row = items.find((c) => c.state === 'awaiting_review' && c.referringClinicianName === clinician);
  expect(row, `the demo seed has a case of ${clinician} awaiting review`).toBeDefined();
  return row!;
}

async function openReview(row: CaseRow) {
  renderPage('/review/:id', `/review/${row.id}`, ReviewCasePage);
  await screen.findByRole('heading', { name: new RegExp(`^${row.accession} · `) });
  return screen.findByRole('form', { name: 'Sign the report' });
}

const passwordField = () => screen.getByLabelText('Your password, to sign');
const signButton = () => screen.getByRole('button', { name: 'Sign and release the report' });

async function reportsOf(accession: string): Promise<ReportListItem[]> {
  const all = await app.json<ReportListItem[]>('/api/reports');
  return all.filter((r) => r.accession === accession);
}

describe('the review and sign page against the real app', { timeout: 180_000 }, () => {
  it('when the password is left empty or mistyped, then the page says so beside the field and nothing is signed', async () => {
    const row = await awaitingReview('Dr Noor Halvorsen');
    const form = await openReview(row);
    // The caution sits on the review page too (product brief, "Cautions" [common practice]).
    expect(screen.getByRole('complementary', { name: 'Caution' })).toHaveTextContent(/never replace, a diagnosis by a licensed clinician/);

    fireEvent.click(signButton());
    expect(await within(form).findByText('Enter your password to sign')).toBeInTheDocument();

    fireEvent.change(passwordField(), { target: { value: 'not-the-password' } });
    fireEvent.click(signButton());
    expect(await within(form).findByText(/^The password is not correct/)).toBeInTheDocument();
    // The typed password is not kept for another try.
    expect(passwordField()).toHaveValue('');

    const after = await app.json<ReviewCase>(`/api/review/${row.id}`);
    expect(after.case.state).toBe('awaiting_review');
    expect(after.reports).toHaveLength(0);
    await expect(reportsOf(row.accession)).resolves.toHaveLength(0);
  });

  it('when the director signs with the right password, then the page says version 1 is stored and the API holds it as final with the signed text', async () => {
    const row = await awaitingReview('Dr Rafael Quenby');
    await openReview(row);
    const text = screen.getByLabelText('Interpretation (this text is signed and printed on the report)');
    const wording = 'Component test wording: complex activities read against the demo intervals (invented values).';
    fireEvent.change(text, { target: { value: wording } });
    fireEvent.change(passwordField(), { target: { value: 'cristae-demo' } });
    fireEvent.click(signButton());

    // Signing renders and stores the PDF: on a busy shared machine this is the slowest answer of the page.
    expect(await screen.findByText(/Version 1 is signed and stored \(final report\)/, undefined, { timeout: 120_000 })).toBeInTheDocument();
    expect(screen.getByText(/Dr Rafael Quenby is being e-mailed/)).toBeInTheDocument();
    // The sign form is gone: the case no longer awaits review.
    await waitFor(() => expect(screen.queryByRole('form', { name: 'Sign the report' })).not.toBeInTheDocument());

    const after = await app.json<ReviewCase>(`/api/review/${row.id}`);
    expect(after.case.state).toBe('final');
    expect(after.reports).toHaveLength(1);
    expect(after.reports[0]).toMatchObject({ version: 1, status: 'final', interpretation: wording });
    const listed = await reportsOf(row.accession);
    expect(listed.map((r) => r.status)).toEqual(['final']);
  });
});
