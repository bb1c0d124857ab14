import { useState } from 'react';
import { Button } from '@/components/ui/button';
import { TextArea, TextField } from '@/components/ui/field';
import { Notice } from '@/components/ui/layout';
import { ApiError } from '@/lib/api-client';
import { applyServerError, useZodForm } from '@/lib/form';
import type { CaseDetail } from '@/schemas/case';
import { amendCaseInputSchema, type ReportDetail } from '@/schemas/report';
import { useAmendCase } from '../api/amend-case';

/**
 * Reopens a signed case when its numbers were wrong: the director says why and types the password again, as
 * for a signature. The signed versions stay as they are until the correction is signed.
 */
export function AmendPanel({ caseDetail, current, onAmended }: { caseDetail: CaseDetail; current: ReportDetail; onAmended: (c: CaseDetail) => void | Promise<void> }) {
  const [open, setOpen] = useState(false);
  const [formError, setFormError] = useState<string | null>(null);
  const form = useZodForm(amendCaseInputSchema, { defaultValues: { reason: '', password: '' } });
  const amend = useAmendCase({ onDone: onAmended });
  const { errors } = form.formState;
  if (!open) {
    return (
      <Button variant="secondary" className="self-start" onClick={() => setOpen(true)}>
        Amend: reopen to correct the results…
      </Button>
    );
  }
  return (
    <form
      noValidate
      role="dialog"
      aria-label="Reopen the signed case"
      className="flex flex-col gap-3 rounded-md border border-copper-300 bg-copper-50/60 p-4"
      onSubmit={form.handleSubmit((values) => {
        setFormError(null);
        amend.mutate(
          { caseId: caseDetail.id, input: { reason: values.reason, password: values.password, version: caseDetail.version } },
          {
            onError: (err) => {
              form.setValue('password', '');
              if (err instanceof ApiError && err.code === 'BAD_CREDENTIALS') form.setError('password', { type: 'server', message: err.message });
              else setFormError(applyServerError(form, err));
            },
          },
        );
      })}
    >
      <p className="text-sm text-ink">
        The case goes back to “in assay” so the technologists can put right what was wrong (protein, readings, plate layout), then
        submit it again. Version {current.version} stays exactly as signed and readable by {caseDetail.referringClinician.name}, who
        sees that a corrected version will follow. You then sign the correction, which carries the new numbers and lists what changed.
      </p>
      <TextArea
        label="What is wrong in the signed report"
        rows={3}
        error={errors.reason?.message}
        registration={form.register('reason')}
        hint="Kept in the case history and shown to the technologists."
      />
      <TextField
        label="Your password, to confirm"
        type="password"
        autoComplete="current-password"
        error={errors.password?.message}
        registration={form.register('password')}
      />
      {formError ? <Notice tone="error">{formError}</Notice> : null}
      <div className="flex gap-2">
        <Button type="submit" variant="danger" disabled={amend.isPending}>
          {amend.isPending ? 'Reopening…' : 'Reopen the case'}
        </Button>
        <Button variant="quiet" onClick={() => setOpen(false)}>
          Keep it signed
        </Button>
      </div>
    </form>
  );
}
