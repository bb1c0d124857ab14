import { useQuery } from '@tanstack/react-query';
import { Loading, Notice } from '@/components/ui/layout';
import { specimenTypeLabels } from '@/schemas/common';
import { inProgressStates, inProgressStateWords, type InProgressCase } from '@/schemas/report';
import { formatWhen } from '@/utils/format';
import { reportQueries } from '../api/report-queries';

/** The steps before a report, as the clinician reads them; the last one is the signed report itself. */
const STEPS = ['Received', 'Testing', 'Director’s check', 'Report'] as const;

function Steps({ state }: { state: InProgressCase['state'] }) {
  const reached = inProgressStates.indexOf(state);
  return (
    <ol className="mt-3 grid grid-cols-4 gap-1 text-[11px] leading-tight sm:text-xs" aria-label="Progress">
      {STEPS.map((step, i) => {
        const done = i < reached;
        const current = i === reached;
        return (
          <li key={step} aria-current={current ? 'step' : undefined} className="flex flex-col gap-1">
            <span
              aria-hidden="true"
              className={`h-1.5 rounded-full ${done ? 'bg-matrix-600' : current ? 'bg-copper-500' : 'bg-paper-line'}`}
            />
            <span className={current ? 'font-semibold text-ink' : done ? 'text-ink-soft' : 'text-ink-faint'}>
              {step}
              <span className="sr-only">{done ? ' (done)' : current ? ' (now)' : ' (not yet)'}</span>
            </span>
          </li>
        );
      })}
    </ol>
  );
}

function InProgressCard({ item }: { item: InProgressCase }) {
  const types = item.specimenTypes.map((t) => specimenTypeLabels[t]).join(', ');
  return (
    <li className="rounded-card border border-paper-line bg-paper-raised p-4 shadow-card" aria-label={`Accession ${item.accession}, in progress`}>
      <div className="flex flex-wrap items-baseline justify-between gap-x-3 gap-y-1">
        <h3 className="text-base font-semibold text-matrix-900">{item.patientName}</h3>
        <span className="font-mono text-sm text-ink-soft">{item.accession}</span>
      </div>
      <p className="mt-1 text-sm text-ink-soft">
        {types || 'Specimen type not recorded'}
        {item.receivedAt ? ` · received ${formatWhen(item.receivedAt)}` : ''}
      </p>
      <p className="mt-2 text-sm font-medium text-ink">{inProgressStateWords[item.state]}</p>
      <Steps state={item.state} />
    </li>
  );
}

/**
 * The clinician's referred cases still being worked on: who, which specimen, when it arrived and how far the work
 * has gone. No results are shown before the director signs the report.
 */
export function InProgressCases() {
  const { data, isPending, error } = useQuery(reportQueries.inProgress());
  if (isPending) return <Loading what="Loading your cases in progress" />;
  if (error) return <Notice tone="error">{error.message}</Notice>;
  return (
    <section aria-labelledby="in-progress-title" className="flex flex-col gap-3">
      <div>
        <h2 id="in-progress-title" className="text-lg font-semibold text-matrix-900">
          Being worked on
        </h2>
        <p className="text-sm text-ink-soft">
          Your patients’ specimens the laboratory has received but not reported yet. Results appear here only once the director has
          signed the report; you will get an e-mail then.
        </p>
      </div>
      {data.length === 0 ? (
        <p className="text-sm text-ink-faint">Nothing in progress: every case you referred has a signed report.</p>
      ) : (
        <ul className="grid gap-3 md:grid-cols-2">
          {data.map((item) => (
            <InProgressCard key={item.caseId} item={item} />
          ))}
        </ul>
      )}
    </section>
  );
}
