import { useState, type ComponentProps, type ReactNode } from 'react';
import type { FieldValues, UseFormReturn } from 'react-hook-form';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/layout';
import { applyServerError } from '@/lib/form';
import { isStale, StaleNotice } from './stale-notice';

/** The part of a TanStack mutation this form drives (its callbacks take no notice of the returned data). */
type SaveMutation<T> = {
  mutate: (values: T, callbacks: { onSuccess: () => void; onError: (err: unknown) => void }) => void;
  isPending: boolean;
};

/**
 * A form that changes a versioned case record from an open panel: submit saves and closes the panel, a
 * stale version (someone else saved first) shows the reload notice and blocks another try, any other
 * failure goes beside its field or above the buttons, and the second button discards and closes.
 */
export function VersionedCaseForm<T extends FieldValues>({
  form,
  mutation,
  label,
  className,
  submitLabel,
  pendingLabel,
  submitVariant,
  discardLabel,
  onDone,
  onReload,
  children,
}: {
  form: UseFormReturn<T, unknown, T>;
  mutation: SaveMutation<T>;
  /** The form's accessible name. */
  label: string;
  className: string;
  submitLabel: string;
  pendingLabel: string;
  submitVariant?: ComponentProps<typeof Button>['variant'];
  discardLabel: string;
  onDone: () => void;
  onReload: () => void;
  children: ReactNode;
}) {
  const [message, setMessage] = useState<string | null>(null);
  const [stale, setStale] = useState<string | null>(null);

  return (
    <form
      noValidate
      aria-label={label}
      className={className}
      onSubmit={form.handleSubmit((values) => {
        setMessage(null);
        mutation.mutate(values, {
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
      {children}
      {stale ? <StaleNotice message={stale} onReload={onReload} /> : null}
      {message ? <Notice tone="error">{message}</Notice> : null}
      <div className="flex gap-2">
        <Button type="submit" variant={submitVariant} disabled={mutation.isPending || stale !== null}>
          {mutation.isPending ? pendingLabel : submitLabel}
        </Button>
        <Button
          variant="quiet"
          onClick={() => {
            form.reset();
            onDone();
          }}
        >
          {discardLabel}
        </Button>
      </div>
    </form>
  );
}
