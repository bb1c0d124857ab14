import { TextArea } from '@/components/ui/field';
import { useUnsavedChangesPrompt, useZodForm } from '@/lib/form';
import { reasonInputSchema, type CaseDetail } from '@/schemas/case';
import { useCancelCase } from '../api/cancel-case';
import { VersionedCaseForm } from './versioned-case-form';

/** Stops work on a case that is not yet final; the reason is required and kept. */
export function CancelCaseForm({ detail, onDone, onReload }: { detail: CaseDetail; onDone: () => void; onReload: () => void }) {
  const cancel = useCancelCase(detail.id);
  const form = useZodForm(reasonInputSchema, { defaultValues: { reason: '', version: detail.version } });
  const { errors, isDirty } = form.formState;
  useUnsavedChangesPrompt(isDirty && !cancel.isSuccess);

  return (
    <VersionedCaseForm
      form={form}
      mutation={cancel}
      label="Cancel the case"
      className="flex flex-col gap-3 rounded-md border border-below/30 bg-below-bg/60 p-4"
      submitLabel="Cancel this case"
      pendingLabel="Cancelling…"
      submitVariant="danger"
      discardLabel="Keep the case"
      onDone={onDone}
      onReload={onReload}
    >
      <p className="text-sm text-ink">
        Cancelling stops all work on <strong className="font-mono">{detail.accession}</strong>. It cannot be undone; the reason is kept on
        the case and in its history.
      </p>
      <TextArea label="Reason for cancelling" registration={form.register('reason')} error={errors.reason?.message} />
    </VersionedCaseForm>
  );
}
