import { useState } from 'react';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/layout';
import { ApiError } from '@/lib/api-client';
import { applyServerError, useUnsavedChangesPrompt, useZodForm } from '@/lib/form';
import { updatePatientInputSchema, type Patient } from '@/schemas/case';
import { useCorrectPatient } from '../api/correct-patient';
import { PatientFields } from './patient-fields';
import { SameNameCheck, useSameNameStep } from './same-name-check';

const fieldsOf = (p: Patient) => ({
  labPatientId: p.labPatientId,
  familyName: p.familyName,
  givenName: p.givenName,
  dateOfBirth: p.dateOfBirth,
  sex: p.sex,
  version: p.version,
  confirmDistinctFrom: undefined,
  distinctReason: undefined,
});

/**
 * Corrects a registered patient's details (PATCH with the version read). Reports already signed keep the details
 * they were signed with; reports signed from now on print the corrected ones.
 */
export function CorrectPatientForm({ patient }: { patient: Patient }) {
  const correct = useCorrectPatient(patient.id);
  const [message, setMessage] = useState<{ tone: 'error' | 'success'; text: string } | null>(null);
  const form = useZodForm(updatePatientInputSchema, { defaultValues: fieldsOf(patient) });
  const { errors, isDirty } = form.formState;
  const { confirming, messageAfter, reset: resetClash, checkProps } = useSameNameStep(form);
  useUnsavedChangesPrompt(isDirty && !correct.isSuccess);

  return (
    <form
      noValidate
      aria-label="Correct patient details"
      className="flex flex-col gap-4"
      onSubmit={form.handleSubmit((values) => {
        setMessage(null);
        correct.mutate(values, {
          onSuccess: (saved) => {
            form.reset(fieldsOf(saved));
            resetClash();
            setMessage({ tone: 'success', text: 'Patient details corrected. Reports signed from now on print them; signed reports stay as they were signed.' });
          },
          onError: async (err) => {
            const stale = err instanceof ApiError && err.code === 'STALE_VERSION';
            const text = stale
              ? 'Someone else changed this patient while you were editing. Reload the page to see their change, then correct again.'
              : await messageAfter(err, !!values.confirmDistinctFrom, applyServerError(form, err), 'Not saved: these details match another registered patient.');
            setMessage(text ? { tone: 'error', text } : null);
          },
        });
      })}
    >
      <PatientFields className="grid gap-4 sm:grid-cols-2 lg:grid-cols-3" register={(n) => form.register(n)} errors={errors} />
      {message ? <Notice tone={message.tone}>{message.text}</Notice> : null}
      {checkProps ? (
        <SameNameCheck
          {...checkProps}
          reasonError={errors.distinctReason?.message ?? errors.confirmDistinctFrom?.message}
          confirmLabel={correct.isPending ? 'Saving…' : 'Save: a different person'}
          pending={correct.isPending}
        />
      ) : null}
      {confirming ? null : (
        <div>
          <Button type="submit" disabled={correct.isPending || !isDirty}>
            {correct.isPending ? 'Saving…' : 'Save the correction'}
          </Button>
        </div>
      )}
    </form>
  );
}
