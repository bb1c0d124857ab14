import { useQuery } from '@tanstack/react-query';
import { Card, Loading, Notice } from '@/components/ui/layout';
import { outboxQueries } from '../api/outbox-queries';

const when = (iso: string) =>
  new Date(iso).toLocaleString('en-GB', { day: 'numeric', month: 'short', year: 'numeric', hour: '2-digit', minute: '2-digit', second: '2-digit' });

const kindLabels: Record<string, string> = { report_ready: 'Report ready', report_corrected: 'Corrected report' };

/** What the mail server received, and every attempt Cristae made to send a notice. */
export function OutboxView() {
  const { data, isPending, error } = useQuery(outboxQueries.list());
  if (isPending) return <Loading what="Loading sent e-mail" />;
  if (error) return <Notice tone="error">{error.message}</Notice>;
  return (
    <div className="flex flex-col gap-6">
      <Card title="Messages received by the local mail server">
        {data.localServer ? (
          <p className="mb-3 text-sm text-ink-soft">
            In this installation mail goes to Cristae’s built-in stand-in server, which keeps every message here instead of
            delivering it.
          </p>
        ) : (
          <p className="mb-3 text-sm text-ink-soft">
            Mail goes to the laboratory’s SMTP server, so messages are not kept here; the delivery log below shows each attempt.
          </p>
        )}
        {data.messages.length === 0 ? (
          <p className="text-sm text-ink-faint">No messages yet.</p>
        ) : (
          <ul className="flex flex-col gap-2" aria-label="Received messages">
            {data.messages.map((m) => (
              <li key={m.id} className="rounded-md border border-paper-line">
                <details>
                  <summary className="flex cursor-pointer flex-wrap items-baseline gap-x-4 gap-y-1 px-3 py-2 text-sm">
                    <span className="font-medium text-matrix-900">{m.subject || '(no subject)'}</span>
                    <span className="text-ink-soft">to {m.to}</span>
                    <span className="ml-auto text-xs text-ink-faint">{when(m.receivedAt)}</span>
                  </summary>
                  <div className="border-t border-paper-line px-3 py-2">
                    <p className="text-xs text-ink-faint">
                      From {m.from ?? '—'} · Message-ID {m.messageId ?? '—'}
                    </p>
                    <pre className="mt-2 whitespace-pre-wrap font-sans text-sm text-ink">{m.text}</pre>
                  </div>
                </details>
              </li>
            ))}
          </ul>
        )}
      </Card>
      <Card title="Delivery log">
        {data.deliveries.length === 0 ? (
          <p className="text-sm text-ink-faint">No notice has been sent yet.</p>
        ) : (
          <table className="w-full text-left text-sm">
            <thead className="border-b border-paper-line text-ink-soft">
              <tr>
                <th className="py-2 pr-3 font-medium">When</th>
                <th className="py-2 pr-3 font-medium">Notice</th>
                <th className="py-2 pr-3 font-medium">Accession</th>
                <th className="py-2 pr-3 font-medium">To</th>
                <th className="py-2 pr-3 font-medium">Outcome</th>
              </tr>
            </thead>
            <tbody>
              {data.deliveries.map((d) => (
                <tr key={d.id} className="border-b border-paper-line/70 align-top">
                  <td className="py-2 pr-3 whitespace-nowrap">{when(d.attemptedAt)}</td>
                  <td className="py-2 pr-3">{kindLabels[d.kind] ?? d.kind}</td>
                  <td className="py-2 pr-3 font-mono">{d.accession ?? '—'}</td>
                  <td className="py-2 pr-3">{d.recipient}</td>
                  <td className="py-2 pr-3">
                    {d.status === 'sent' ? (
                      <span className="text-within">Sent</span>
                    ) : (
                      <span className="text-below">
                        Not sent: <span className="text-ink">{d.error}</span>
                      </span>
                    )}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </Card>
    </div>
  );
}
