import { useQuery } from '@tanstack/react-query';
import { Loading, Notice } from '@/components/ui/layout';
import type { CaseHistoryEvent } from '@/schemas/case';
import { caseQueries } from '../api/case-queries';
import { formatLabDateTime } from '../utils/lab-time';
import { changeSentence } from '../utils/change-sentence';

const entityWords: Record<string, string> = { case: 'Case', specimen: 'Specimen', patient: 'Patient' };

function Event({ e, timeZone }: { e: CaseHistoryEvent; timeZone: string }) {
  const entity = entityWords[e.entity] ?? e.entity.replace(/[-_]/g, ' ');
  return (
    <li className="relative pb-6 pl-8 last:pb-0">
      <span aria-hidden="true" className="absolute left-[7px] top-2 h-full w-px bg-paper-line" />
      <span aria-hidden="true" className="absolute left-0 top-1.5 h-[15px] w-[15px] rounded-full border-2 border-matrix-400 bg-paper-raised" />
      <div className="flex flex-wrap items-baseline gap-x-3 gap-y-1">
        <h3 className="font-semibold text-matrix-900">{e.summary}</h3>
        <span className="rounded bg-paper-sunk px-1.5 text-xs text-ink-soft">{entity}</span>
      </div>
      <p className="mt-0.5 text-sm text-ink-soft">
        <time dateTime={e.at} className="num">
          {formatLabDateTime(e.at, timeZone)}
        </time>
        <span aria-hidden="true"> · </span>
        {e.actorName ?? e.actorEmail ?? 'the system'}
      </p>
      {e.note ? <p className="mt-1 text-sm italic text-ink">“{e.note}”</p> : null}
      {e.changes.length > 0 && e.changes.every((c) => c.before === null) ? (
        // What a new record held, field after field in running text, so a phone shows it in a few lines.
        <dl className="mt-2 flex max-w-3xl flex-wrap gap-x-4 gap-y-0.5 text-sm">
          {e.changes.map((c) => (
            <div key={c.field} className="flex min-w-0 gap-1">
              <dt className="shrink-0 text-ink-soft">{c.field}:</dt>
              <dd className="break-words text-ink">{c.unit ? `${c.after} ${c.unit}` : c.after}</dd>
            </div>
          ))}
        </dl>
      ) : e.changes.length > 0 ? (
        <ul className="mt-2 flex max-w-3xl flex-col gap-1 text-sm text-ink" aria-label="What changed">
          {e.changes.map((c) => (
            <li key={c.field} className="break-words">
              {changeSentence(c)}
            </li>
          ))}
        </ul>
      ) : null}
    </li>
  );
}

/** Everything recorded about a case, newest first: who, when, and each change as a sentence. */
export function CaseHistoryList({ caseId, timeZone }: { caseId: number; timeZone: string }) {
  const { data, isPending, error } = useQuery(caseQueries.history(caseId));
  if (isPending) return <Loading what="Loading the history" />;
  if (error) return <Notice tone="error">{error.message}</Notice>;
  if (data.length === 0) return <p className="text-sm text-ink-soft">Nothing recorded yet.</p>;
  return (
    <ol aria-label="Events, newest first" className="flex flex-col">
      {data.map((e) => (
        <Event key={e.id} e={e} timeZone={timeZone} />
      ))}
    </ol>
  );
}
