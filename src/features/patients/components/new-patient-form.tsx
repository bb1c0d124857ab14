import { useQueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import { Button } from '@/components/ui/button';
import { SelectField, TextField } from '@/components/ui/field';
import { Notice } from '@/components/ui/layout';
import { ApiError } from '@/lib/api-client';
import { applyServerError, useUnsavedChangesPrompt, useZodForm } from '@/lib/form';
import { createPatientInputSchema, EXISTING_PATIENT_FIELD, sexes, type CreatePatientInput, type Patient } from '@/schemas/case';
import { patientQueries } from '../api/patient-queries';
import { useRegisterPatient } from '../api/register-patient';
import { sexLabels } from '../utils/patient-text';
import { PatientSummary } from './patient-summary';

/**
 * Registers a patient. When the server finds the same person already registered (same lab ID, or same name
 * and date of birth), it names the clashing fields and offers that patient instead.
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
  const qc = useQueryClient();
  const registerPatient = useRegisterPatient();
  const [message, setMessage] = useState<string | null>(null);
  const [existing, setExisting] = useState<Patient | null>(null);
  const form = useZodForm(createPatientInputSchema, {
    defaultValues: { labPatientId: '', familyName: '', givenName: '', dateOfBirth: '', sex: 'unknown', ...initial },
  });
  const { errors, isDirty } = form.formState;
  useUnsavedChangesPrompt(isDirty && !registerPatient.isSuccess);

  return (
    <form
      noValidate
      aria-label="New patient"
      className="flex flex-col gap-4"
      onSubmit={form.handleSubmit((values) => {
        setMessage(null);
        setExisting(null);
        registerPatient.mutate(values, {
          onSuccess: (p) => {
            form.reset(values);
            onChosen(p);
          },
          onError: async (err) => {
            const text = applyServerError(form, err);
            const id = err instanceof ApiError ? Number(err.fields[EXISTING_PATIENT_FIELD]) : NaN;
            if (Number.isInteger(id) && id > 0) {
              setMessage('This person is already registered.');
              try {
                setExisting(await qc.fetchQuery(patientQueries.detail(id)));
              } catch {
                setMessage(text);
              }
            } else setMessage(text);
          },
        });
      })}
    >
      <div className="grid gap-4 sm:grid-cols-2 lg:grid-cols-5">
        <TextField label="Lab patient ID" autoComplete="off" registration={form.register('labPatientId')} error={errors.labPatientId?.message} />
        <TextField label="Family name" autoComplete="off" registration={form.register('familyName')} error={errors.familyName?.message} />
        <TextField label="Given name(s)" autoComplete="off" registration={form.register('givenName')} error={errors.givenName?.message} />
        <TextField label="Date of birth" type="date" registration={form.register('dateOfBirth')} error={errors.dateOfBirth?.message} />
        <SelectField
          label="Sex"
          registration={form.register('sex')}
          error={errors.sex?.message}
          options={sexes.map((s) => ({ value: s, label: sexLabels[s] }))}
        />
      </div>
      {message ? <Notice tone="error">{message}</Notice> : null}
      {existing ? (
        <div className="flex flex-wrap items-center justify-between gap-3 rounded-md border border-matrix-200 bg-matrix-50 px-4 py-3">
          <PatientSummary patient={existing} />
          <Button
            onClick={() => {
              form.reset();
              onChosen(existing);
            }}
          >
            Use this patient
          </Button>
        </div>
      ) : null}
      <div className="flex gap-2">
        <Button type="submit" disabled={registerPatient.isPending}>
          {registerPatient.isPending ? 'Registering…' : 'Register the patient'}
        </Button>
        <Button variant="quiet" onClick={onCancel}>
          Back to the search
        </Button>
      </div>
    </form>
  );
}
