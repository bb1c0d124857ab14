import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { Button } from '@/components/ui/button';
import { SelectField, TextArea } from '@/components/ui/field';
import { Notice } from '@/components/ui/layout';
import { applyServerError, useUnsavedChangesPrompt, useZodForm } from '@/lib/form';
import { updateCaseInputSchema, type CaseDetail } from '@/schemas/case';
import { caseQueries } from '../api/case-queries';
import { useUpdateCase } from '../api/update-case';
import { isStale, StaleNotice } from './stale-notice';

/** Corrects the referral facts. Mount it with key={detail.version} so a reload starts from the latest. */
export function EditCaseForm({ detail, onDone, onReload }: { detail: CaseDetail; onDone: () => void; onReload: () => void }) {
  const clinicians = useQuery(caseQueries.clinicians());
  const update = useUpdateCase(detail.id);
  const [message, setMessage] = useState<string | null>(null);
  const [stale, setStale] = useState<string | null>(null);
  const form = useZodForm(updateCaseInputSchema, {
    defaultValues: {
      referringClinicianId: detail.referringClinician.id,
      clinicalIndication: detail.clinicalIndication,
      priority: detail.priority,
      version: detail.version,
    },
  });
  const { errors, isDirty } = form.formState;
  useUnsavedChangesPrompt(isDirty && !update.isSuccess);
  const options = (clinicians.data ?? []).map((c) => ({ value: String(c.id), label: c.name }));
  if (!options.some((o) => o.value === String(detail.referringClinician.id))) {
    options.unshift({ value: String(detail.referringClinician.id), label: `${detail.referringClinician.name} (no longer active)` });
  }

  return (
    <form
      noValidate
      aria-label="Change case details"
      className="flex flex-col gap-4 rounded-md border border-matrix-200 bg-matrix-50/50 p-4"
      onSubmit={form.handleSubmit((values) => {
        setMessage(null);
        update.mutate(values, {
          onSuccess: () => {
            form.reset(values);
            onDone();
          },
          onError: (err) => {
            if (isStale(err)) setStale((err as Error).message);
            else setMessage(applyServerError(form, err));
          },
        });
      })}
    >
      <div className="grid gap-4 sm:grid-cols-2">
        <SelectField
          label="Referring clinician"
          registration={form.register('referringClinicianId', { setValueAs: (v: string) => (v === '' ? undefined : Number(v)) })}
          error={errors.referringClinicianId?.message}
          options={options}
        />
        <fieldset className="flex flex-col gap-1">
          <legend className="mb-1 text-sm font-medium text-ink-soft">Priority</legend>
          <div className="flex gap-4 pt-1 text-sm">
            <label className="inline-flex items-center gap-1.5">
              <input type="radio" value="routine" {...form.register('priority')} /> Routine
            </label>
            <label className="inline-flex items-center gap-1.5">
              <input type="radio" value="urgent" {...form.register('priority')} /> Urgent
            </label>
          </div>
        </fieldset>
        <div className="sm:col-span-2">
          <TextArea label="Clinical indication" registration={form.register('clinicalIndication')} error={errors.clinicalIndication?.message} />
        </div>
      </div>
      {stale ? <StaleNotice message={stale} onReload={onReload} /> : null}
      {message ? <Notice tone="error">{message}</Notice> : null}
      <div className="flex gap-2">
        <Button type="submit" disabled={update.isPending || stale !== null}>
          {update.isPending ? 'Saving…' : 'Save changes'}
        </Button>
        <Button
          variant="quiet"
          onClick={() => {
            form.reset();
            onDone();
          }}
        >
          Discard
        </Button>
      </div>
    </form>
  );
}
