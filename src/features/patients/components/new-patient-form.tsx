import { useState } from 'react';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/layout';
import { applyServerError, useUnsavedChangesPrompt, useZodForm } from '@/lib/form';
import { createPatientInputSchema, type CreatePatientInput, type Patient } from '@/schemas/case';
import { useRegisterPatient } from '../api/register-patient';
import { PatientFields } from './patient-fields';
import { SameNameCheck, useSameNameStep } from './same-name-check';

/**
 * Registers a patient. When the server finds the same person already registered (same lab ID, or same name
 * and date of birth), it names the clashing fields and offers that patient instead; for a name and birth date
 * only, the user may confirm, with a reason, that this is a different person.
 */
export function NewPatientForm({
  initial,
  onChosen,
  onCancel,
}: {
  initial: Partial<CreatePatientInput>;
  onChosen: (p: Patient) => void;
  onCancel: () => void;
}) {
  const registerPatient = useRegisterPatient();
  const [message, setMessage] = useState<string | null>(null);
  const form = useZodForm(createPatientInputSchema, {
    defaultValues: { labPatientId: '', familyName: '', givenName: '', dateOfBirth: '', sex: 'unknown', ...initial },
  });
  const { errors, isDirty } = form.formState;
  const { confirming, messageAfter, checkProps } = useSameNameStep(form);
  useUnsavedChangesPrompt(isDirty && !registerPatient.isSuccess);

  return (
    <form
      noValidate
      aria-label="New patient"
      className="flex flex-col gap-4"
      onSubmit={form.handleSubmit((values) => {
        setMessage(null);
        registerPatient.mutate(values, {
          onSuccess: (p) => {
            form.reset(values);
            onChosen(p);
          },
          onError: async (err) => {
            setMessage(await messageAfter(err, !!values.confirmDistinctFrom, applyServerError(form, err), 'This person may already be registered.'));
          },
        });
      })}
    >
      <PatientFields className="grid gap-4 sm:grid-cols-2 lg:grid-cols-5" register={(n) => form.register(n)} errors={errors} />
      {message ? <Notice tone="error">{message}</Notice> : null}
      {checkProps ? (
        <SameNameCheck
          {...checkProps}
          reasonError={errors.distinctReason?.message ?? errors.confirmDistinctFrom?.message}
          confirmLabel={registerPatient.isPending ? 'Registering…' : 'Register as a different person'}
          pending={registerPatient.isPending}
          onUseExisting={() => {
            form.reset();
            onChosen(checkProps.clash.patient);
          }}
        />
      ) : null}
      <div className="flex gap-2">
        {confirming ? null : (
          <Button type="submit" disabled={registerPatient.isPending}>
            {registerPatient.isPending ? 'Registering…' : 'Register the patient'}
          </Button>
        )}
        <Button variant="quiet" onClick={onCancel}>
          Back to the search
        </Button>
      </div>
    </form>
  );
}
