import { useQueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import type { UseFormRegisterReturn } from 'react-hook-form';
import { Button } from '@/components/ui/button';
import { TextArea } from '@/components/ui/field';
import { ApiError } from '@/lib/api-client';
import { EXISTING_PATIENT_FIELD, type Patient } from '@/schemas/case';
import { patientQueries } from '../api/patient-queries';
import { PatientSummary } from './patient-summary';

/** A registered patient a save clashed with; only a name-and-birth-date clash may be a different person. */
export type PatientClash = { patient: Patient; mayBeDifferentPerson: boolean };

/**
 * Reads a duplicate-patient answer (409 naming the registered patient): loads that patient and says whether only
 * the name and date of birth clash (a lab-ID clash is always the same record).
 */
export function usePatientClash() {
  const qc = useQueryClient();
  const [clash, setClash] = useState<PatientClash | null>(null);
  async function read(err: unknown): Promise<boolean> {
    const id = err instanceof ApiError ? Number(err.fields[EXISTING_PATIENT_FIELD]) : NaN;
    if (!(err instanceof ApiError) || !Number.isInteger(id) || id <= 0) return false;
    try {
      const patient = await qc.fetchQuery(patientQueries.detail(id));
      setClash({ patient, mayBeDifferentPerson: !('labPatientId' in err.fields) });
      return true;
    } catch {
      return false;
    }
  }
  return { clash, read, clear: () => setClash(null) };
}

type DistinctFields = {
  setValue: (name: 'confirmDistinctFrom' | 'distinctReason', value: undefined | number) => void;
  register: (name: 'distinctReason', options: { setValueAs: (v: string | undefined) => string | undefined }) => UseFormRegisterReturn;
};

/**
 * The state of the same-name step of a patient form: the clash read from the last answer, whether the user is
 * confirming a different person, and the props SameNameCheck needs to set confirmDistinctFrom and the reason.
 */
export function useSameNameStep(form: DistinctFields) {
  const { clash, read, clear } = usePatientClash();
  const [confirming, setConfirming] = useState(false);
  const checkProps = clash
    ? {
        clash,
        confirming,
        onConfirming: (on: boolean) => {
          setConfirming(on);
          form.setValue('confirmDistinctFrom', on ? clash.patient.id : undefined);
          if (!on) form.setValue('distinctReason', undefined);
        },
        reason: form.register('distinctReason', { setValueAs: (v) => (v ? v : undefined) }),
      }
    : null;
  const reset = () => {
    clear();
    setConfirming(false);
  };
  /**
   * After a refused save: shows the clashing patient (kept while confirming) and returns the message for the form,
   * `text` being what applyServerError left unplaced.
   */
  async function messageAfter(err: unknown, confirmed: boolean, text: string | null, clashText: string): Promise<string | null> {
    if (!confirmed) clear();
    if (await read(err)) return confirmed ? text : clashText;
    return text;
  }
  return { confirming, reset, messageAfter, checkProps };
}

/**
 * The registered patient the form clashed with, and the way on: use that patient, or (same name and birth date
 * only) confirm this is a different person with a reason that goes into the audit trail.
 */
export function SameNameCheck({
  clash,
  confirming,
  onConfirming,
  reason,
  reasonError,
  confirmLabel,
  pending,
  onUseExisting,
}: {
  clash: PatientClash;
  confirming: boolean;
  onConfirming: (on: boolean) => void;
  reason: UseFormRegisterReturn;
  reasonError?: string;
  confirmLabel: string;
  pending: boolean;
  onUseExisting?: () => void;
}) {
  return (
    <div role="group" aria-label="Already registered" className="flex flex-col gap-3 rounded-md border border-matrix-200 bg-matrix-50 px-4 py-3">
      <p className="text-sm font-medium text-matrix-900">
        {clash.mayBeDifferentPerson
          ? 'A patient with this name and date of birth is already registered:'
          : 'This lab patient ID is already registered, to:'}
      </p>
      <div className="flex flex-wrap items-center justify-between gap-3">
        <PatientSummary patient={clash.patient} />
        <div className="flex flex-wrap gap-2">
          {onUseExisting ? <Button onClick={onUseExisting}>Use this patient</Button> : null}
          {clash.mayBeDifferentPerson && !confirming ? (
            <Button variant="secondary" onClick={() => onConfirming(true)}>
              This is a different person…
            </Button>
          ) : null}
        </div>
      </div>
      {confirming ? (
        <div className="flex flex-col gap-3 border-t border-matrix-200 pt-3">
          <TextArea
            label="How do you know this is a different person?"
            hint="Kept in the audit trail with your name, e.g. different parents, address or hospital number."
            registration={reason}
            error={reasonError}
          />
          <div className="flex flex-wrap gap-2">
            <Button type="submit" disabled={pending}>
              {confirmLabel}
            </Button>
            <Button variant="quiet" onClick={() => onConfirming(false)}>
              Not sure: go back
            </Button>
          </div>
        </div>
      ) : null}
    </div>
  );
}
