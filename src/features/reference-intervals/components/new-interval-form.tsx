import { useState } from 'react';
import { useNavigate } from 'react-router-dom';
import { Button } from '@/components/ui/button';
import { SelectField, TextArea, TextField } from '@/components/ui/field';
import { Notice } from '@/components/ui/layout';
import { paths } from '@/config/paths';
import { applyServerError, useUnsavedChangesPrompt, useZodForm } from '@/lib/form';
import { assayCodes, measures, specimenTypeLabels, specimenTypes } from '@/schemas/common';
import { intervalMethods } from '@/schemas/reference-interval';
import { newIntervalFormSchema } from '@/schemas/reference-interval-api';
import { useCreateInterval } from '../api/create-interval';
import { assayNames, measureNames, methodNames, todayIso } from './interval-text';

export const optionalNumber = (v: unknown) => (v === '' || v === null || v === undefined ? null : Number(v));
export const optionalText = (v: unknown) => (v === '' || v === null || v === undefined ? null : String(v));

/** A draft typed in by hand, e.g. an interval adopted from a publication after local verification. */
export function NewIntervalForm() {
  const navigate = useNavigate();
  const create = useCreateInterval();
  const [message, setMessage] = useState<string | null>(null);
  const form = useZodForm(newIntervalFormSchema, {
    defaultValues: {
      setName: '',
      assay: 'CI',
      measure: 'activity',
      specimenType: 'skeletal_muscle',
      ageBand: { label: 'All ages', minYears: 0, maxYears: null },
      method: 'mean2sd',
      sourceNote: '',
      effectiveFrom: todayIso(),
      effectiveTo: null,
      sd: null,
    },
  });
  const { errors, isDirty, isSubmitSuccessful } = form.formState;
  useUnsavedChangesPrompt(isDirty && !isSubmitSuccessful);
  const num = { valueAsNumber: true } as const;

  return (
    <form
      noValidate
      className="flex flex-col gap-5"
      onSubmit={form.handleSubmit((values) => {
        setMessage(null);
        create.mutate(values, {
          onSuccess: (created) => navigate(paths.intervalDetail.href(created.id)),
          onError: (err) => setMessage(applyServerError(form, err)),
        });
      })}
    >
      <fieldset className="grid gap-3 sm:grid-cols-4">
        <legend className="mb-2 text-sm font-semibold text-matrix-900">What it applies to</legend>
        <SelectField label="Specimen type" registration={form.register('specimenType')} error={errors.specimenType?.message}
          options={specimenTypes.map((t) => ({ value: t, label: specimenTypeLabels[t] }))} />
        <SelectField label="Assay" registration={form.register('assay')} error={errors.assay?.message}
          options={assayCodes.map((a) => ({ value: a, label: `${a} · ${assayNames[a]}` }))} />
        <SelectField label="Measure" registration={form.register('measure')} error={errors.measure?.message}
          options={measures.map((m) => ({ value: m, label: measureNames[m] }))} />
        <TextField label="Age band name" registration={form.register('ageBand.label')} error={errors.ageBand?.label?.message} />
        <TextField label="From age (years, included)" type="number" step="any" registration={form.register('ageBand.minYears', num)}
          error={errors.ageBand?.minYears?.message} />
        <TextField label="To age (years, not included)" type="number" step="any" hint="Leave empty for no upper age."
          registration={form.register('ageBand.maxYears', { setValueAs: optionalNumber })} error={errors.ageBand?.maxYears?.message} />
      </fieldset>

      <fieldset className="grid gap-3 sm:grid-cols-4">
        <legend className="mb-2 text-sm font-semibold text-matrix-900">Limits</legend>
        <TextField label="Lower limit" type="number" step="any" registration={form.register('lower', num)} error={errors.lower?.message} />
        <TextField label="Upper limit" type="number" step="any" registration={form.register('upper', num)} error={errors.upper?.message} />
        <TextField label="Mean" type="number" step="any" registration={form.register('mean', num)} error={errors.mean?.message} />
        <TextField label="SD (optional)" type="number" step="any" registration={form.register('sd', { setValueAs: optionalNumber })}
          error={errors.sd?.message} />
        <TextField label="n (reference individuals)" type="number" step="1" registration={form.register('n', num)} error={errors.n?.message} />
        <SelectField label="Method" registration={form.register('method')} error={errors.method?.message}
          options={intervalMethods.map((m) => ({ value: m, label: methodNames[m] }))} />
      </fieldset>

      <fieldset className="grid gap-3 sm:grid-cols-4">
        <legend className="mb-2 text-sm font-semibold text-matrix-900">Source and dates</legend>
        <div className="sm:col-span-2">
          <TextField label="Interval set" hint='e.g. "Liver 2026 (adopted, verified with 20 local samples)"'
            registration={form.register('setName')} error={errors.setName?.message} />
        </div>
        <TextField label="Effective from" type="date" registration={form.register('effectiveFrom')} error={errors.effectiveFrom?.message} />
        <TextField label="Effective until (optional)" type="date" hint="The first day it no longer applies."
          registration={form.register('effectiveTo', { setValueAs: optionalText })} error={errors.effectiveTo?.message} />
        <div className="sm:col-span-4">
          <TextArea label="Source" hint="Publication or laboratory, population, and how it was verified here."
            registration={form.register('sourceNote')} error={errors.sourceNote?.message} />
        </div>
      </fieldset>

      {message ? <Notice tone="error">{message}</Notice> : null}
      <div>
        <Button type="submit" disabled={create.isPending}>
          {create.isPending ? 'Saving…' : 'Save as draft'}
        </Button>
        <p className="mt-2 text-xs text-ink-faint">
          A draft is used for nothing until a second director approves it. Until then you can still edit it.
        </p>
      </div>
    </form>
  );
}
