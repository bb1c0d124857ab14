import { FormFooter } from '@/components/ui/form-footer';
import { useState } from 'react';
import { TextArea, TextField } from '@/components/ui/field';
import { applyServerError, useZodForm } from '@/lib/form';
import { editDraftBodySchema, type StoredInterval } from '@/schemas/reference-interval-api';
import { useEditDraft } from '../api/change-interval-status';
import { optionalNumber, optionalText } from './new-interval-form';

/**
 * The drafter's corrections to a draft before a second director approves it: limits, mean, SD, n, dates and
 * source. The series (assay, measure, specimen type, ages) stays; another series is a new draft.
 */
export function EditDraftForm({ interval, onClose }: { interval: StoredInterval; onClose: () => void }) {
  const edit = useEditDraft();
  const [message, setMessage] = useState<string | null>(null);
  const form = useZodForm(editDraftBodySchema, {
    defaultValues: {
      revision: interval.revision,
      lower: interval.lower,
      upper: interval.upper,
      mean: interval.mean,
      sd: interval.sd,
      n: interval.n,
      effectiveFrom: interval.effectiveFrom,
      effectiveTo: interval.effectiveTo,
      sourceNote: interval.sourceNote,
    },
  });
  const { errors } = form.formState;
  const num = { valueAsNumber: true } as const;
  return (
    <form
      noValidate
      aria-label="Edit draft"
      className="mt-4 grid gap-3 rounded-md border border-copper-300 bg-copper-50 p-4 sm:grid-cols-4"
      onSubmit={form.handleSubmit((values) => {
        setMessage(null);
        edit.mutate({ id: interval.id, body: values }, { onSuccess: onClose, onError: (err) => setMessage(applyServerError(form, err)) });
      })}
    >
      <p className="font-semibold text-copper-700 sm:col-span-4">Edit draft v{interval.version}</p>
      <TextField label="Lower limit" type="number" step="any" registration={form.register('lower', num)} error={errors.lower?.message} />
      <TextField label="Upper limit" type="number" step="any" registration={form.register('upper', num)} error={errors.upper?.message} />
      <TextField label="Mean" type="number" step="any" registration={form.register('mean', num)} error={errors.mean?.message} />
      <TextField label="SD (optional)" type="number" step="any" registration={form.register('sd', { setValueAs: optionalNumber })} error={errors.sd?.message} />
      <TextField label="n (reference individuals)" type="number" step="1" registration={form.register('n', num)} error={errors.n?.message} />
      <TextField label="Effective from" type="date" registration={form.register('effectiveFrom')} error={errors.effectiveFrom?.message} />
      <TextField label="Effective until (optional)" type="date" registration={form.register('effectiveTo', { setValueAs: optionalText })} error={errors.effectiveTo?.message} />
      <div className="sm:col-span-4">
        <TextArea label="Source" registration={form.register('sourceNote')} error={errors.sourceNote?.message} />
      </div>
      <FormFooter error={message} saving={edit.isPending} saveLabel="Save the draft" onCancel={onClose} columns={4} />
    </form>
  );
}
