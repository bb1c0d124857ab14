import { useQuery } from '@tanstack/react-query';
import type { Outbox } from '@/schemas/report';
import { Card, Loading, Notice } from '@/components/ui/layout';
import { outboxQueries } from '../api/outbox-queries';
import { NoticesTable, spell } from './notices-table';
import { when } from './when';

/** What the local stand-in received; with the laboratory's own SMTP server nothing is kept here. */
function ReceivedMessages({ data }: { data: Outbox }) {
  return (
    <Card title="Messages received by the local mail server">
      <p className="mb-3 text-sm text-ink-soft">
        {data.localServer
          ? 'In this installation mail goes to Cristae’s built-in stand-in server, which keeps every message here instead of delivering it.'
          : 'Mail now goes to the laboratory’s SMTP server, so new messages are not kept here; the notices above show where each one stands.'}
      </p>
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
  );
}

/** Every notice Cristae has queued with its state, and what the local mail server received. */
export function OutboxView() {
  const { data, isPending, error } = useQuery(outboxQueries.list());
  if (isPending) return <Loading what="Loading sent e-mail" />;
  if (error) return <Notice tone="error">{error.message}</Notice>;
  return (
    <div className="flex flex-col gap-6">
      <Card title="Notices to referring clinicians">
        <p className="mb-3 text-sm text-ink-soft">
          A notice is stored together with the signature, then handed to the mail server. If the mail server cannot take it,
          Cristae tries again after {data.retryDelaysSeconds.map(spell).join(', ')} ({data.retryDelaysSeconds.length + 1} tries in
          all), and then marks it as not sent so that you can send it again. A refusal the mail server gives as final is not
          retried.
        </p>
        <NoticesTable deliveries={data.deliveries} />
      </Card>
      {data.localServer || data.messages.length > 0 ? <ReceivedMessages data={data} /> : null}
    </div>
  );
}
