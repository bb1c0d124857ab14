import { zodResolver } from '@hookform/resolvers/zod';
import { useEffect } from 'react';
import { useForm, type FieldValues, type Path, type UseFormProps, type UseFormReturn } from 'react-hook-form';
import { useBlocker } from 'react-router-dom';
import type { z } from 'zod';
import { ApiError } from './api-client';

/** react-hook-form bound to a shared zod schema; the same schema validates on the server. */
export function useZodForm<S extends z.ZodType<FieldValues, FieldValues>>(
  schema: S,
  props: Omit<UseFormProps<z.input<S>, unknown, z.output<S>>, 'resolver'> & { defaultValues: UseFormProps<z.input<S>>['defaultValues'] },
): UseFormReturn<z.input<S>, unknown, z.output<S>> {
  return useForm<z.input<S>, unknown, z.output<S>>({ ...props, resolver: zodResolver(schema as never) as never });
}

/**
 * Copies a server error onto the form: per-field messages go beside their fields, the rest to the form root.
 * Returns the form-level message (or null when every message found its field).
 */
export function applyServerError<T extends FieldValues>(form: UseFormReturn<T, unknown, FieldValues>, err: unknown): string | null {
  if (!(err instanceof ApiError)) return 'Something went wrong. Please try again.';
  const names = Object.keys(form.getValues());
  let unplaced = false;
  for (const [field, message] of Object.entries(err.fields)) {
    const root = field.split('.')[0] ?? field;
    if (names.includes(root)) form.setError(field as Path<T>, { type: 'server', message });
    else unplaced = true;
  }
  return Object.keys(err.fields).length === 0 || unplaced ? err.message : null;
}

/** Asks before leaving a page whose form has unsaved changes (in-app navigation and tab close). */
export function useUnsavedChangesPrompt(dirty: boolean): void {
  const blocker = useBlocker(({ currentLocation, nextLocation }) => dirty && currentLocation.pathname !== nextLocation.pathname);
  useEffect(() => {
    if (blocker.state !== 'blocked') return;
    if (window.confirm('You have unsaved changes. Leave this page and lose them?')) blocker.proceed();
    else blocker.reset();
  }, [blocker]);
  useEffect(() => {
    if (!dirty) return;
    const onBeforeUnload = (e: BeforeUnloadEvent) => e.preventDefault();
    window.addEventListener('beforeunload', onBeforeUnload);
    return () => window.removeEventListener('beforeunload', onBeforeUnload);
  }, [dirty]);
}
