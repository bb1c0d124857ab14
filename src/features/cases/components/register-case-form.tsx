import { useQuery } from '@tanstack/react-query';
import { useEffect, useState } from 'react';
import { Button } from '@/components/ui/button';
import { SelectField, TextArea } from '@/components/ui/field';
import { Notice } from '@/components/ui/layout';
import { applyServerError, useUnsavedChangesPrompt, useZodForm } from '@/lib/form';
import { registerCaseInputSchema, type CaseDetail } from '@/schemas/case';
import { caseQueries } from '../api/case-queries';
import { useRegisterCase } from '../api/register-case';
import { PriorityField } from './priority-field';
import { arrivingSpecimenDefaults, SpecimenFields } from './specimen-fields';

const toId = (v: unknown) => (v === '' || v === undefined || v === null ? undefined : Number(v));

/**
 * The referral and its first specimen, for a patient already chosen. One submit registers the case, takes
 * the accession number and receives specimen A together.
 */
export function RegisterCaseForm({
  patientId,
  timeZone,
  onRegistered,
}: {
  patientId: number | null;
  timeZone: string;
  onRegistered: (c: CaseDetail) => void;
}) {
  const clinicians = useQuery(caseQueries.clinicians());
  const register = useRegisterCase();
  const [message, setMessage] = useState<string | null>(null);
  const [registered, setRegistered] = useState<CaseDetail | null>(null);
  const form = useZodForm(registerCaseInputSchema, {
    defaultValues: {
      patientId: patientId ?? undefined,
      referringClinicianId: undefined,
      clinicalIndication: '',
      priority: 'routine',
      specimen: arrivingSpecimenDefaults(timeZone),
    },
  });
  const { errors, isDirty } = form.formState;
  useUnsavedChangesPrompt(isDirty && !registered);
  useEffect(() => {
    form.setValue('patientId', patientId ?? (undefined as unknown as number), { shouldValidate: form.formState.isSubmitted });
  }, [form, patientId]);
  // Leave only after the render that cleared the unsaved-changes guard.
  useEffect(() => {
    if (registered) onRegistered(registered);
  }, [registered, onRegistered]);

  return (
    <form
      noValidate
      aria-label="Referral and first specimen"
      className="flex flex-col gap-6"
      onSubmit={form.handleSubmit((values) => {
        setMessage(null);
        register.mutate(values, {
          onSuccess: (detail) => setRegistered(detail),
          onError: (err) => setMessage(applyServerError(form, err)),
        });
      })}
    >
      {errors.patientId ? <Notice tone="error">{errors.patientId.message}</Notice> : null}
      <fieldset className="grid gap-4 sm:grid-cols-2">
        <legend className="mb-2 text-sm font-semibold uppercase tracking-wide text-matrix-700">Referral</legend>
        <SelectField
          label="Referring clinician"
          registration={form.register('referringClinicianId', { setValueAs: toId })}
          error={errors.referringClinicianId?.message}
          options={[
            { value: '', label: clinicians.isPending ? 'Loading clinicians…' : 'Choose the referring clinician…' },
            ...(clinicians.data ?? []).map((c) => ({ value: String(c.id), label: c.name })),
          ]}
        />
        <PriorityField registration={form.register('priority')} error={errors.priority?.message} />
        <div className="sm:col-span-2">
          <TextArea
            label="Clinical indication"
            placeholder="The question the clinician asks, and the findings behind it"
            registration={form.register('clinicalIndication')}
            error={errors.clinicalIndication?.message}
          />
        </div>
      </fieldset>
      <fieldset>
        <legend className="mb-2 text-sm font-semibold uppercase tracking-wide text-matrix-700">Specimen A, as received</legend>
        <SpecimenFields form={form} prefix="specimen." timeZone={timeZone} />
      </fieldset>
      {message ? <Notice tone="error">{message}</Notice> : null}
      <div className="flex items-center gap-3">
        <Button type="submit" disabled={register.isPending || registered !== null}>
          {register.isPending ? 'Registering…' : 'Register the case'}
        </Button>
        <span className="text-xs text-ink-faint">The accession number is given when you register.</span>
      </div>
    </form>
  );
}
