import { useQuery } from '@tanstack/react-query';
import { Loading, Notice } from '@/components/ui/layout';
import type { CaseHistoryEvent } from '@/schemas/case';
import { caseQueries } from '../api/case-queries';
import { formatLabDateTime } from '../utils/lab-time';

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
        <dl className="mt-2 grid max-w-3xl grid-cols-[11rem_1fr] gap-x-3 text-sm">
          {e.changes.map((c) => (
            <div key={c.field} className="contents">
              <dt className="border-t border-paper-line/60 py-1 text-ink-faint">{c.field}</dt>
              <dd className="border-t border-paper-line/60 py-1 text-ink">{c.after}</dd>
            </div>
          ))}
        </dl>
      ) : e.changes.length > 0 ? (
        <table className="mt-2 w-full max-w-3xl table-fixed text-sm">
          <colgroup>
            <col className="w-44" />
            <col />
            <col />
          </colgroup>
          <thead>
            <tr className="text-left text-xs uppercase tracking-wide text-ink-faint">
              <th scope="col" className="pb-1 font-medium">
                Field
              </th>
              <th scope="col" className="pb-1 font-medium">
                Before
              </th>
              <th scope="col" className="pb-1 font-medium">
                After
              </th>
            </tr>
          </thead>
          <tbody>
            {e.changes.map((c) => (
              <tr key={c.field} className="border-t border-paper-line/60 align-top">
                <th scope="row" className="py-1 pr-3 text-left font-normal text-ink-faint">
                  {c.field}
                </th>
                <td className="py-1 pr-3 text-ink-soft">
                  {c.before === null ? <span className="text-ink-faint">—</span> : <del className="decoration-below/60">{c.before}</del>}
                </td>
                <td className="py-1 text-ink">
                  <span aria-hidden="true" className="mr-2 text-ink-faint">
                    →
                  </span>
                  {c.after === null ? <span className="text-ink-faint">(removed)</span> : <ins className="no-underline">{c.after}</ins>}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      ) : null}
    </li>
  );
}

/** Everything recorded about a case, newest first: who, when, and each changed field before → after. */
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
