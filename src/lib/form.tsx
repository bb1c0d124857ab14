import { zodResolver } from '@hookform/resolvers/zod';
import { useEffect } from 'react';
import { useForm, type FieldValues, type Path, type Resolver, type UseFormProps, type UseFormReturn } from 'react-hook-form';
import { useBlocker } from 'react-router-dom';
import type { z } from 'zod';
import { ApiError } from './api-client';

/**
 * A message for beside its field, whose label already names it. The shared schemas and the API start a message with
 * the field's name ("proteinMgPerMl must be at least 0.001 mg/mL"), so that an API caller knows which field; under a
 * field labelled "Protein (mg/mL)" that name reads as code. It is dropped: "Must be at least 0.001 mg/mL".
 */
export function besideField(path: string, message: string): string {
  const name = [path, path.split('.').at(-1) ?? path].find((n) => message.startsWith(`${n} `));
  if (!name) return message;
  const rest = message.slice(name.length + 1);
  return rest.charAt(0).toUpperCase() + rest.slice(1);
}

/** besideField on every message of react-hook-form's nested errors (`ref` holds the field's element: left alone). */
function relabel(errors: Record<string, unknown>, prefix: string): void {
  for (const [key, value] of Object.entries(errors)) {
    if (key === 'ref' || key === 'types' || !value || typeof value !== 'object') continue;
    const path = prefix ? `${prefix}.${key}` : key;
    const error = value as { message?: unknown };
    if (typeof error.message === 'string') error.message = besideField(path, error.message);
    relabel(value as Record<string, unknown>, path);
  }
}

/** react-hook-form bound to a shared zod schema; the same schema validates on the server. */
export function useZodForm<S extends z.ZodType<FieldValues, FieldValues>>(
  schema: S,
  props: Omit<UseFormProps<z.input<S>, unknown, z.output<S>>, 'resolver'> & { defaultValues: UseFormProps<z.input<S>>['defaultValues'] },
): UseFormReturn<z.input<S>, unknown, z.output<S>> {
  const resolve = zodResolver(schema as never) as unknown as Resolver<z.input<S>, unknown, z.output<S>>;
  const resolver: Resolver<z.input<S>, unknown, z.output<S>> = async (values, context, options) => {
    const result = await resolve(values, context, options);
    relabel(result.errors as Record<string, unknown>, '');
    return result;
  };
  return useForm<z.input<S>, unknown, z.output<S>>({ ...props, resolver });
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
    if (names.includes(root)) form.setError(field as Path<T>, { type: 'server', message: besideField(field, message) });
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
