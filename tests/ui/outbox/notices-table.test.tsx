import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { fireEvent, render, screen, within } from '@testing-library/react';
import { afterEach, describe, expect, it, vi } from 'vitest';
import type { MailDelivery } from '@/schemas/report';
import { NoticesTable } from '@/features/outbox/components/notices-table';

/*
 * The Sent e-mail page says where each notice stands in words (colour only supports them, WCAG 2.1 SC 1.4.1
 * "Use of Color" [confirmed as the standard]), gives the reason of a failure, and offers "Send again" only for a
 * notice that was given up on. Fixture notices are invented.
 */

const base: MailDelivery = {
  id: 1,
  kind: 'report_ready',
  reportId: 1,
  accession: 'CR-2026-90001',
  recipient: 'clinician@demo.test',
  subject: 'Report ready: accession CR-2026-90001',
  status: 'sent',
  attempts: 1,
  maxAttempts: 10,
  lastError: null,
  messageId: '<x@fixture>',
  queuedAt: '2026-03-01T09:00:00.000Z',
  lastAttemptAt: '2026-03-01T09:00:01.000Z',
  nextAttemptAt: null,
  sentAt: '2026-03-01T09:00:02.000Z',
  canRetry: false,
};

const notices: MailDelivery[] = [
  { ...base, id: 4, accession: 'CR-2026-90004', status: 'failed', lastError: 'The mail server refused the message for good (550 No such mailbox)', sentAt: null, canRetry: true },
  { ...base, id: 3, accession: 'CR-2026-90003', status: 'pending', attempts: 2, lastError: 'The mail server asked Cristae to try later (451 Busy)', nextAttemptAt: '2026-03-01T09:02:00.000Z', sentAt: null },
  { ...base, id: 2, accession: 'CR-2026-90002', status: 'pending', attempts: 0, lastAttemptAt: null, nextAttemptAt: '2026-03-01T09:00:00.000Z', sentAt: null },
  base,
];

function renderTable() {
  const client = new QueryClient({ defaultOptions: { queries: { retry: false }, mutations: { retry: false } } });
  render(
    <QueryClientProvider client={client}>
      <NoticesTable deliveries={notices} />
    </QueryClientProvider>,
  );
}
const rowOf = (accession: string) => screen.getByRole('row', { name: new RegExp(accession) });

afterEach(() => vi.unstubAllGlobals());

describe('NoticesTable', () => {
  it('when notices are waiting, retrying, sent and given up, then each state is written in words with its reason and tries', () => {
    renderTable();
    expect(screen.getByLabelText('Notice counts')).toHaveTextContent('2 waiting · 1 sent · 1 not sent');
    expect(within(rowOf('CR-2026-90002')).getByText('Waiting to send')).toBeInTheDocument();
    const retrying = rowOf('CR-2026-90003');
    expect(within(retrying).getByText('Will try again')).toBeInTheDocument();
    expect(retrying).toHaveTextContent('2 of 10');
    expect(retrying).toHaveTextContent('451 Busy');
    expect(within(rowOf('CR-2026-90001')).getByText('Sent')).toBeInTheDocument();
    const failed = rowOf('CR-2026-90004');
    expect(within(failed).getByText('Not sent')).toBeInTheDocument();
    expect(failed).toHaveTextContent('550 No such mailbox');
    // Only the given-up notice can be sent again.
    expect(screen.getAllByRole('button', { name: /again/ })).toHaveLength(1);
  });

  it('when "Send again" is pressed, then the notice is asked for again with a POST to its own address', async () => {
    const fetchMock = vi.fn(async () =>
      new Response(JSON.stringify({ ...notices[0], status: 'pending', attempts: 0, canRetry: false }), {
        status: 200,
        headers: { 'content-type': 'application/json' },
      }),
    );
    vi.stubGlobal('fetch', fetchMock);
    renderTable();
    fireEvent.click(within(rowOf('CR-2026-90004')).getByRole('button', { name: 'Send the notice for CR-2026-90004 again' }));
    await vi.waitFor(() => expect(fetchMock).toHaveBeenCalled());
    const [url, init] = fetchMock.mock.calls[0] as unknown as [string, RequestInit];
    expect(url).toBe('/api/outbox/notices/4/retry');
    expect(init.method).toBe('POST');
  });
});
