import { useCallback, useState } from 'react';
import { useNavigate } from 'react-router-dom';
import { Button } from '@/components/ui/button';
import { Loading, PageHeader } from '@/components/ui/layout';
import { paths } from '@/config/paths';
import { RegisterCaseForm } from '@/features/cases/components/register-case-form';
import { PatientPicker } from '@/features/patients/components/patient-picker';
import { PatientSummary } from '@/features/patients/components/patient-summary';
import type { CaseDetail, Patient } from '@/schemas/case';
import { useLabTimeZone } from './use-lab-time-zone';

function Step({ n, title, done, children }: { n: number; title: string; done?: boolean; children: React.ReactNode }) {
  return (
    <section aria-labelledby={`step-${n}`} className="rounded-card border border-paper-line bg-paper-raised p-5 shadow-card">
      <h2 id={`step-${n}`} className="mb-4 flex items-center gap-3 text-lg font-semibold text-matrix-900">
        <span
          aria-hidden="true"
          className={`inline-flex h-7 w-7 items-center justify-center rounded-full text-sm ${done ? 'bg-matrix-700 text-white' : 'border-2 border-matrix-300 text-matrix-700'}`}
        >
          {done ? '✓' : n}
        </span>
        {title}
      </h2>
      {children}
    </section>
  );
}

/** Patient, referral and first specimen in one flow, keyboard first. */
export default function RegisterCasePage() {
  const { timeZone } = useLabTimeZone();
  const navigate = useNavigate();
  const [patient, setPatient] = useState<Patient | null>(null);
  const onRegistered = useCallback((c: CaseDetail) => navigate(paths.caseDetail.href(c.id)), [navigate]);
  if (!timeZone) return <Loading />;
  return (
    <>
      <PageHeader
        title="Register a case"
        lead="Find the patient or register them, then record the referral and the specimen as it arrived. Times are the laboratory's local time."
      />
      <div className="flex max-w-5xl flex-col gap-5">
        <Step n={1} title="Patient" done={patient !== null}>
          {patient ? (
            <div className="flex flex-wrap items-center justify-between gap-3">
              <PatientSummary patient={patient} />
              <Button variant="quiet" onClick={() => setPatient(null)}>
                Choose another patient
              </Button>
            </div>
          ) : (
            <PatientPicker onChosen={setPatient} />
          )}
        </Step>
        <Step n={2} title="Referral and first specimen">
          {patient ? null : <p className="mb-4 text-sm text-ink-faint">Choose the patient first; what you enter here is kept.</p>}
          <div className={patient ? '' : 'pointer-events-none opacity-50'} inert={patient ? undefined : true}>
            <RegisterCaseForm patientId={patient?.id ?? null} timeZone={timeZone} onRegistered={onRegistered} />
          </div>
        </Step>
      </div>
    </>
  );
}
