import { fireEvent, screen, within } from '@testing-library/react';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import IntervalDetailPage from '@/app/routes/intervals/interval-detail';
import type { StoredInterval } from '@/schemas/reference-interval-api';
import { buildIntervalDraft } from '../../factories/intervals';
import { startRealApp, type RealApp } from '../../setup/real-app-fetch';
import { renderPage } from './render-page';
import { expectPrintedAs, numbersIn } from './shown-numbers';

/*
 * The reference-interval page of a draft, rendered with Testing Library and fed by the real app in-process. The
 * drafts are typed through the API with invented numbers (a fictitious test set). Separation of duties: a draft
 * is approved by a second director, never by its drafter unless the laboratory allows it (product brief, second
 * release: "Versions of intervals … are approved by a second director" [common practice]). Every change is a
 * new version and the earlier one stays readable (CLSI EP28-A3c: record the method with every interval
 * [confirmed], docs/domain.md §3).
 */

let app: RealApp;
let v1: StoredInterval;
let v2: StoredInterval;

async function send(path: string, body: unknown): Promise<StoredInterval> {
  const res = await app.call(path, { method: 'POST', headers: { 'Content-Type': 'application/json' }, body: JSON.stringify(body) });
  const json = (await res.json()) as StoredInterval;
  expect(res.status, JSON.stringify(json)).toBeLessThan(300);
  return json;
}

// The shared draft body (tests/factories/intervals.ts): CIII activity in liver, all ages, invented numbers.
const draftBody = (over: Record<string, unknown>) => buildIntervalDraft({ setName: 'Component test set (fictitious)', ...over });

beforeAll(async () => {
  app = await startRealApp();
  // Version 1, drafted by Dr Marchetti and approved by Dr Brisk-Ferro; version 2 drafted by Dr Marchetti.
  await app.signInAs('director@demo.test');
  const draft1 = await send('/api/reference-intervals', draftBody({}));
  await app.signInAs('director2@demo.test');
  v1 = await send(`/api/reference-intervals/${draft1.id}/approve`, { revision: draft1.revision });
  await app.signInAs('director@demo.test');
  v2 = await send('/api/reference-intervals', draftBody({ lower: 55.5, upper: 162, mean: 108, sd: 26.5, effectiveFrom: '2026-06-01' }));
}, 180_000);
afterAll(() => app.close());

async function openInterval(id: number) {
  renderPage('/intervals/:id', `/intervals/${id}`, IntervalDetailPage);
  await screen.findByText('Lower limit');
  // The versions table loads on its own query.
  return screen.findByRole('table');
}

/** The text of a labelled item of the summary (its <dt> label, then the <dd> value). */
const item = (label: string) => screen.getByText(label, { selector: 'dt' }).nextElementSibling!.textContent!;

describe('the reference-interval page against the real app', { timeout: 180_000 }, () => {
  it('when the drafter opens their draft, then its limits and unit are shown, approval is refused in words and the versions list both', async () => {
    await openInterval(v2.id);
    expect(v2.status).toBe('draft');
    expect(v2.version).toBe(2);
    // The typed limits, with the unit the API stored.
    const lower = item('Lower limit');
    expectPrintedAs(numbersIn(lower)[0]!, 55.5);
    expect(lower).toContain(v2.unit);
    const upper = item('Upper limit');
    expectPrintedAs(numbersIn(upper)[0]!, 162);
    expect(upper).toContain(v2.unit);
    expect(numbersIn(item('Mean ± SD')).map(Number)).toEqual([108, 26.5]);
    expect(item('n')).toBe('40');
    expect(item('Approved')).toBe('Not yet');

    // The drafter may not approve their own draft in this laboratory.
    expect(screen.getByText(/Waiting for a second director: another director must approve it/)).toBeInTheDocument();
    expect(screen.queryByRole('button', { name: /Approve/ })).not.toBeInTheDocument();
    expect(screen.getByRole('button', { name: 'Edit draft…' })).toBeInTheDocument();

    // Versions, newest first: v2 (this draft) and v1 with its approver and limits.
    const rows = within(screen.getByRole('table')).getAllByRole('row').slice(1);
    expect(rows).toHaveLength(2);
    expect(rows[0]).toHaveTextContent('v2 (shown)');
    expect(numbersIn(within(rows[1]!).getAllByRole('cell')[2]!.textContent!).map(Number)).toEqual([50, 150]);
    expect(within(rows[1]!).getByRole('link', { name: 'v1' })).toHaveAttribute('href', `/intervals/${v1.id}`);
    expect(rows[1]).toHaveTextContent(v1.approvedByName!);
    expect(v1.approvedByName).toBe('Dr Octavian Brisk-Ferro');
  });

  it('when a second director opens the draft and confirms, then it is approved, v1 ends where v2 starts, and the API says so', async () => {
    await app.signInAs('director2@demo.test');
    await openInterval(v2.id);
    expect(screen.getByText(/Nothing uses it until a second director approves it, and that can be you/)).toBeInTheDocument();
    fireEvent.click(screen.getByRole('button', { name: 'Approve as second director…' }));
    const confirm = screen.getByRole('group', { name: 'Confirm approval' });
    expect(await within(confirm).findByText(`Version 1 stays readable and ends on 2026-06-01; results already compared with it keep it.`)).toBeInTheDocument();
    fireEvent.click(within(confirm).getByRole('button', { name: 'Confirm approval of v2' }));

    await screen.findByText(/^Dr Octavian Brisk-Ferro, /, { selector: 'dd' });
    const after = await app.json<StoredInterval>(`/api/reference-intervals/${v2.id}`);
    expect(after.status).toBe('approved');
    expect(after.approvedByName).toBe('Dr Octavian Brisk-Ferro');
    const { items: history } = await app.json<{ items: StoredInterval[] }>(`/api/reference-intervals/${v2.id}/history`);
    expect(history.find((h) => h.id === v1.id)?.effectiveTo).toBe('2026-06-01');
  });

  it('when the laboratory allows a single director, then the drafter is offered to approve their own draft and told reports will say so', async () => {
    await app.signInAs('admin@demo.test');
    const profile = await app.json<{ allowSelfApproval: boolean; version: number }>('/api/lab-profile');
    const put = await app.call('/api/lab-profile', {
      method: 'PUT',
      headers: { 'Content-Type': 'application/json' },
      body: JSON.stringify({ ...profile, allowSelfApproval: true }),
    });
    expect(put.status).toBe(200);
    await app.signInAs('director@demo.test');
    const own = await send('/api/reference-intervals', draftBody({ assay: 'CIV', lower: 40, upper: 120, mean: 80, sd: 20 }));

    await openInterval(own.id);
    expect(screen.getByText(/This laboratory has a single director, so you may approve it yourself/)).toBeInTheDocument();
    expect(screen.getByRole('button', { name: 'Approve my own draft…' })).toBeInTheDocument();
    expect(screen.queryByRole('button', { name: 'Approve as second director…' })).not.toBeInTheDocument();
  });
});
