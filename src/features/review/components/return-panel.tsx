import { useState } from 'react';
import { Button } from '@/components/ui/button';
import { TextArea } from '@/components/ui/field';
import { Notice } from '@/components/ui/layout';
import { applyServerError, useZodForm } from '@/lib/form';
import { reasonInputSchema, type CaseDetail } from '@/schemas/case';
import { useReturnCase } from '../api/return-case';

/** Sends the case back to the technologists; the reason goes on the case and into its history. */
export function ReturnPanel({ caseDetail, onReturned }: { caseDetail: CaseDetail; onReturned: (c: CaseDetail) => void | Promise<void> }) {
  const [open, setOpen] = useState(false);
  const [formError, setFormError] = useState<string | null>(null);
  const form = useZodForm(reasonInputSchema, { defaultValues: { reason: '', version: caseDetail.version } });
  const returnCase = useReturnCase({ onDone: onReturned });
  if (!open) {
    return (
      <Button variant="secondary" className="self-start" onClick={() => setOpen(true)}>
        Return to the technologists…
      </Button>
    );
  }
  return (
    <form
      noValidate
      aria-label="Return the case"
      className="flex flex-col gap-3"
      onSubmit={form.handleSubmit((values) =>
        returnCase.mutate(
          { caseId: caseDetail.id, input: { ...values, version: caseDetail.version } },
          { onError: (err) => setFormError(applyServerError(form, err)) },
        ),
      )}
    >
      <TextArea
        label="What needs doing before you can sign"
        rows={3}
        error={form.formState.errors.reason?.message}
        registration={form.register('reason')}
        hint="The technologists see this on the case. The case goes back to “in assay” and leaves your queue."
      />
      {formError ? <Notice tone="error">{formError}</Notice> : null}
      <div className="flex gap-2">
        <Button type="submit" variant="danger" disabled={returnCase.isPending}>
          {returnCase.isPending ? 'Returning…' : 'Return the case'}
        </Button>
        <Button variant="quiet" onClick={() => setOpen(false)}>
          Keep it in review
        </Button>
      </div>
    </form>
  );
}
