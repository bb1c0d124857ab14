import { useState } from 'react';
import { Button } from '@/components/ui/button';
import { TextArea } from '@/components/ui/field';
import { Notice } from '@/components/ui/layout';
import { applyServerError, useUnsavedChangesPrompt, useZodForm } from '@/lib/form';
import { reasonInputSchema, type CaseDetail } from '@/schemas/case';
import { useCancelCase } from '../api/cancel-case';
import { isStale, StaleNotice } from './stale-notice';

/** Stops work on a case that is not yet final; the reason is required and kept. */
export function CancelCaseForm({ detail, onDone, onReload }: { detail: CaseDetail; onDone: () => void; onReload: () => void }) {
  const cancel = useCancelCase(detail.id);
  const [message, setMessage] = useState<string | null>(null);
  const [stale, setStale] = useState<string | null>(null);
  const form = useZodForm(reasonInputSchema, { defaultValues: { reason: '', version: detail.version } });
  const { errors, isDirty } = form.formState;
  useUnsavedChangesPrompt(isDirty && !cancel.isSuccess);

  return (
    <form
      noValidate
      aria-label="Cancel the case"
      className="flex flex-col gap-3 rounded-md border border-below/30 bg-below-bg/60 p-4"
      onSubmit={form.handleSubmit((values) => {
        setMessage(null);
        cancel.mutate(values, {
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
      <p className="text-sm text-ink">
        Cancelling stops all work on <strong className="font-mono">{detail.accession}</strong>. It cannot be undone; the reason is kept on
        the case and in its history.
      </p>
      <TextArea label="Reason for cancelling" registration={form.register('reason')} error={errors.reason?.message} />
      {stale ? <StaleNotice message={stale} onReload={onReload} /> : null}
      {message ? <Notice tone="error">{message}</Notice> : null}
      <div className="flex gap-2">
        <Button type="submit" variant="danger" disabled={cancel.isPending || stale !== null}>
          {cancel.isPending ? 'Cancelling…' : 'Cancel this case'}
        </Button>
        <Button
          variant="quiet"
          onClick={() => {
            form.reset();
            onDone();
          }}
        >
          Keep the case
        </Button>
      </div>
    </form>
  );
}
