import { useState } from 'react';
import { Link } from 'react-router-dom';
import { Button } from '@/components/ui/button';
import { paths } from '@/config/paths';
import { usePageTitle } from '@/hooks/use-page-title';
import type { CaseDetail, Patient } from '@/schemas/case';
import { formatLabDateTime } from '../utils/lab-time';
import { CancelCaseForm } from './cancel-case-form';
import { EditCaseForm } from './edit-case-form';
import { stateExplanations, StatePill } from './state-pill';

const sexWords: Record<Patient['sex'], string> = { female: 'female', male: 'male', other: 'other', unknown: 'sex not known' };
const editable = new Set(['received', 'in_assay', 'awaiting_review']);

/** Age when the first specimen arrived: reference intervals are chosen by it. */
function ageAt(dateOfBirth: string, iso: string | null): string {
  const on = iso ? new Date(iso) : new Date();
  const [y, m, d] = dateOfBirth.split('-').map(Number) as [number, number, number];
  let months = (on.getUTCFullYear() - y) * 12 + (on.getUTCMonth() + 1 - m);
  if (on.getUTCDate() < d) months -= 1;
  if (months < 0) return '';
  return months < 24 ? `${months} months` : `${Math.floor(months / 12)} years`;
}

function Fact({ label, children, wide = false }: { label: string; children: React.ReactNode; wide?: boolean }) {
  return (
    <div className={wide ? 'sm:col-span-2 lg:col-span-3' : ''}>
      <dt className="text-xs font-medium uppercase tracking-wide text-ink-faint">{label}</dt>
      <dd className="mt-0.5 text-sm text-ink">{children}</dd>
    </div>
  );
}

/** The case at a glance: accession, state in words, patient, referral; and the edits allowed in this state. */
export function CaseHeader({ detail, timeZone, onReload }: { detail: CaseDetail; timeZone: string; onReload: () => void }) {
  usePageTitle(`${detail.accession} case`);
  const [panel, setPanel] = useState<'none' | 'edit' | 'cancel'>('none');
  const p = detail.patient;
  const canChange = editable.has(detail.state);
  const age = ageAt(p.dateOfBirth, detail.receivedAt);
  // After a reload the forms remount (keyed by version) with the other person's change in place.
  const reload = onReload;

  return (
    <section aria-labelledby="case-title" className="rounded-card border border-paper-line bg-paper-raised shadow-card">
      <div className="flex flex-wrap items-start justify-between gap-4 border-b border-paper-line px-5 py-4">
        <div>
          <p className="text-xs font-medium uppercase tracking-wide text-copper-600">Accession number</p>
          <h1 id="case-title" className="font-mono text-2xl font-semibold tracking-tight text-matrix-900">
            {detail.accession}
          </h1>
          <div className="mt-2 flex flex-wrap items-center gap-2">
            <StatePill state={detail.state} />
            {detail.priority === 'urgent' ? (
              <span className="rounded border border-copper-500 px-1.5 text-xs font-semibold uppercase tracking-wide text-copper-600">Urgent</span>
            ) : null}
            {detail.amendReason ? (
              <span className="rounded border border-copper-300 bg-copper-50 px-1.5 text-xs font-medium text-copper-700">Reopened after signing</span>
            ) : null}
          </div>
        </div>
        <div className="flex flex-wrap gap-2">
          <Link to={paths.caseHistory.href(detail.id)} className="inline-flex items-center rounded-md px-3.5 py-1.5 text-sm font-medium text-matrix-700 hover:bg-matrix-50">
            History
          </Link>
          {canChange ? (
            <>
              <Button variant="secondary" onClick={() => setPanel(panel === 'edit' ? 'none' : 'edit')} aria-expanded={panel === 'edit'}>
                Change details
              </Button>
              {/* A reopened case has a signed report: it is corrected, never cancelled. */}
              {detail.amendReason === null ? (
                <Button variant="quiet" className="text-below hover:bg-below-bg" onClick={() => setPanel(panel === 'cancel' ? 'none' : 'cancel')} aria-expanded={panel === 'cancel'}>
                  Cancel case…
                </Button>
              ) : null}
            </>
          ) : null}
        </div>
      </div>

      <div className="grid gap-5 px-5 py-4 lg:grid-cols-[2fr_1fr]">
        <dl className="grid gap-4 sm:grid-cols-2 lg:grid-cols-3">
          <Fact label="Patient">
            <span className="font-semibold">
              {p.familyName}, {p.givenName}
            </span>
            <br />
            <span className="font-mono text-xs">{p.labPatientId}</span>
            <br />
            <Link to={paths.patientCorrect.href(p.id, detail.id)} className="text-xs font-medium text-matrix-700 underline">
              Correct patient details
            </Link>
          </Fact>
          <Fact label="Born">
            <span className="num">{p.dateOfBirth}</span>, {sexWords[p.sex]}
            {age ? (
              <>
                <br />
                <span className="text-xs text-ink-soft">{age} at first receipt</span>
              </>
            ) : null}
          </Fact>
          <Fact label="Referring clinician">
            {detail.referringClinician.name}
            <br />
            <span className="text-xs text-ink-soft">{detail.referringClinician.email}</span>
          </Fact>
          <Fact label="Clinical indication" wide>
            {detail.clinicalIndication}
          </Fact>
          <Fact label="Registered">{formatLabDateTime(detail.createdAt, timeZone)}</Fact>
          <Fact label="First specimen received">{formatLabDateTime(detail.receivedAt, timeZone)}</Fact>
        </dl>
        <aside aria-label="What this state means" className="rounded-md border-l-4 border-matrix-300 bg-paper px-4 py-3 text-sm text-ink-soft">
          <p className="mb-1 font-medium text-matrix-900">Where this case stands</p>
          <p>{stateExplanations[detail.state]}</p>
          {detail.state === 'cancelled' && detail.cancelReason ? (
            <p className="mt-2">
              <span className="font-medium text-ink">Reason: </span>
              {detail.cancelReason}
            </p>
          ) : null}
          {(detail.state === 'received' || detail.state === 'in_assay') && detail.specimens.length > 0 && detail.specimens.every((s) => !s.accepted) ? (
            <p className="mt-2 font-medium text-below">
              Every specimen of this case was rejected on receipt. Ask the clinician for a new specimen, or cancel the case with the reason.
            </p>
          ) : null}
          {detail.amendReason ? (
            <p className="mt-2">
              <span className="font-medium text-ink">Reopened after signing to correct the results: </span>
              {detail.amendReason} The signed report stays as it is, with a note that a corrected version will follow, until the director signs
              the correction.
            </p>
          ) : null}
          {detail.state === 'in_assay' && detail.returnReason && detail.returnReason !== detail.amendReason ? (
            <p className="mt-2">
              <span className="font-medium text-ink">Sent back by the director: </span>
              {detail.returnReason}
            </p>
          ) : null}
        </aside>
      </div>

      {panel === 'edit' ? (
        <div className="px-5 pb-5">
          <EditCaseForm key={detail.version} detail={detail} onDone={() => setPanel('none')} onReload={reload} />
        </div>
      ) : null}
      {panel === 'cancel' ? (
        <div className="px-5 pb-5">
          <CancelCaseForm key={detail.version} detail={detail} onDone={() => setPanel('none')} onReload={reload} />
        </div>
      ) : null}
    </section>
  );
}
