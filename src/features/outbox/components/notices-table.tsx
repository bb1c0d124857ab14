import type { MailDelivery } from '@/schemas/report';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/layout';
import { useRetryNotice } from '../api/retry-notice';
import { when } from './when';
import { TableBox } from '@/components/ui/table-box';

const COLUMNS = ['Queued', 'Notice', 'Accession', 'To', 'State', 'Tries', 'Details'];

const kindLabels: Record<string, string> = { report_ready: 'Report ready', report_corrected: 'Corrected report' };

/** A notice's state in words; colour only supports them. */
function stateOf(d: MailDelivery): { label: string; tone: string } {
  switch (d.status) {
    case 'pending':
      return d.attempts === 0
        ? { label: 'Waiting to send', tone: 'bg-caution-bg text-caution border-caution-line' }
        : { label: 'Will try again', tone: 'bg-caution-bg text-caution border-caution-line' };
    case 'sending':
      return { label: 'Sending now', tone: 'bg-matrix-50 text-matrix-800 border-matrix-200' };
    case 'sent':
      return { label: 'Sent', tone: 'bg-within-bg text-within border-within/30' };
    case 'failed':
      return { label: 'Not sent', tone: 'bg-below-bg text-below border-below/30' };
  }
}

/** Seconds as the plainest unit that fits: 30 s, 2 min, 1 h. */
export function spell(seconds: number): string {
  if (seconds < 60) return `${seconds} s`;
  if (seconds < 3600) return `${Math.round(seconds / 60)} min`;
  return `${Math.round((seconds / 3600) * 10) / 10} h`;
}

function Details({ d }: { d: MailDelivery }) {
  const retry = useRetryNotice();
  const lastFailure = d.lastError ? <p className="text-ink-soft">Last try: {d.lastError}</p> : null;
  switch (d.status) {
    case 'pending':
      return (
        <>
          <p>{d.nextAttemptAt ? `Next try ${when(d.nextAttemptAt)}` : 'Next try as soon as possible'}</p>
          {lastFailure}
        </>
      );
    case 'sending':
      return <p>Handed to the mail server {d.lastAttemptAt ? when(d.lastAttemptAt) : ''}</p>;
    case 'sent':
      return (
        <p>
          Accepted by the mail server {d.sentAt ? when(d.sentAt) : ''}
          {d.attempts > 1 ? ` (on try ${d.attempts})` : ''}
        </p>
      );
    case 'failed':
      return (
        <div className="flex flex-col items-start gap-1.5">
          <p className="text-below">{d.lastError ?? 'No reason was recorded.'}</p>
          {d.canRetry ? (
            <Button
              variant="secondary"
              className="px-2.5 py-1 text-xs"
              disabled={retry.isPending}
              onClick={() => retry.mutate(d.id)}
              aria-label={`Send the notice for ${d.accession ?? `notice ${d.id}`} again`}
            >
              {retry.isPending ? 'Asking…' : 'Send again'}
            </Button>
          ) : null}
          {retry.error ? <Notice tone="error">{retry.error.message}</Notice> : null}
        </div>
      );
  }
}

/** Every notice in the outbox: waiting, being sent, sent, or not sent with the reason. */
export function NoticesTable({ deliveries }: { deliveries: MailDelivery[] }) {
  if (deliveries.length === 0) return <p className="text-sm text-ink-faint">No notice has been queued yet.</p>;
  const count = (s: MailDelivery['status'][]) => deliveries.filter((d) => s.includes(d.status)).length;
  return (
    <>
      <p className="mb-3 text-sm text-ink-soft" aria-label="Notice counts">
        {count(['pending', 'sending'])} waiting · {count(['sent'])} sent · {count(['failed'])} not sent
      </p>
      <TableBox label="Notices">
        <table className="w-full text-left text-sm" aria-label="Notices">
          <thead className="border-b border-paper-line text-ink-soft">
            <tr>
              {COLUMNS.map((c) => (
                <th key={c} className="py-2 pr-3 font-medium">
                  {c}
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {deliveries.map((d) => {
              const state = stateOf(d);
              return (
                <tr key={d.id} className="border-b border-paper-line/70 align-top">
                  <td className="py-2 pr-3 whitespace-nowrap">{when(d.queuedAt)}</td>
                  <td className="py-2 pr-3 whitespace-nowrap">{kindLabels[d.kind] ?? d.kind}</td>
                  <td className="py-2 pr-3 whitespace-nowrap font-mono">{d.accession ?? '—'}</td>
                  <td className="py-2 pr-3">{d.recipient}</td>
                  <td className="py-2 pr-3">
                    <span className={`inline-block whitespace-nowrap rounded-full border px-2 py-0.5 text-xs font-medium ${state.tone}`}>
                      {state.label}
                    </span>
                  </td>
                  <td className="py-2 pr-3 whitespace-nowrap">
                    {d.attempts} of {d.maxAttempts}
                  </td>
                  <td className="py-2 pr-3">
                    <Details d={d} />
                  </td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </TableBox>
    </>
  );
}
