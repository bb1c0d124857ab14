import { caseStateLabels, transportConditionLabels } from '@/schemas/case';
import { specimenTypeLabels } from '@/schemas/common';
import type { ReviewCase } from '@/schemas/report';
import { formatWhen } from '@/utils/format';

const when = (iso: string | null) =>
  iso ? formatWhen(iso) : '—';

/** Who, what and how the specimens arrived: the facts the director checks before reading the numbers. */
export function CaseOverview({ review }: { review: ReviewCase }) {
  const c = review.case;
  return (
    <div className="grid gap-5 lg:grid-cols-[1fr_1.3fr]">
      <dl className="grid grid-cols-[9.5rem_1fr] gap-x-3 gap-y-1.5 text-sm">
        <dt className="text-ink-faint">Patient</dt>
        <dd className="font-medium">
          {c.patient.familyName}, {c.patient.givenName}
        </dd>
        <dt className="text-ink-faint">Lab patient ID</dt>
        <dd className="font-mono">{c.patient.labPatientId}</dd>
        <dt className="text-ink-faint">Date of birth</dt>
        <dd>{c.patient.dateOfBirth}</dd>
        <dt className="text-ink-faint">Referred by</dt>
        <dd>{c.referringClinician.name}</dd>
        <dt className="text-ink-faint">Priority</dt>
        <dd className={c.priority === 'urgent' ? 'font-semibold text-below' : undefined}>{c.priority === 'urgent' ? 'Urgent' : 'Routine'}</dd>
        <dt className="text-ink-faint">State</dt>
        <dd>{caseStateLabels[c.state]}</dd>
        <dt className="text-ink-faint">Submitted</dt>
        <dd>
          {when(review.submittedAt)}
          {review.submittedByName ? ` by ${review.submittedByName}` : ''}
        </dd>
        <dt className="text-ink-faint">Clinical indication</dt>
        <dd>{c.clinicalIndication}</dd>
      </dl>
      <div>
        <h3 className="mb-1 text-sm font-medium text-ink-soft">Specimens</h3>
        <ul className="flex flex-col gap-2 text-sm">
          {c.specimens.map((s) => (
            <li key={s.id} className={`rounded-md border px-3 py-2 ${s.accepted ? 'border-paper-line' : 'border-below/40 bg-below-bg'}`}>
              <p>
                <span className="font-medium">
                  {s.label} · {specimenTypeLabels[s.type]}
                </span>
              </p>
              <p className="text-ink-soft">
                {s.source || 'Source not stated'}
                {s.wetWeightMg !== null ? `, ${s.wetWeightMg} mg` : ''} · {transportConditionLabels[s.transportCondition]} · received{' '}
                {when(s.receivedAt)}
              </p>
              {!s.accepted ? <p className="font-medium text-below">Rejected on receipt: {s.rejectionReason}</p> : null}
            </li>
          ))}
        </ul>
        {review.notes.length > 0 ? (
          <ul className="mt-3 flex flex-col gap-1 text-sm text-caution">
            {review.notes.map((n) => (
              <li key={n} className="rounded-md border border-caution-line bg-caution-bg px-3 py-1.5">
                {n}
              </li>
            ))}
          </ul>
        ) : null}
      </div>
    </div>
  );
}
