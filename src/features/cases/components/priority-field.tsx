import type { UseFormRegisterReturn } from 'react-hook-form';

/** Routine or urgent, as two radio buttons under one legend. */
export function PriorityField({ registration, error }: { registration: UseFormRegisterReturn; error?: string }) {
  return (
    <fieldset className="flex flex-col gap-1">
      <legend className="mb-1 text-sm font-medium text-ink-soft">Priority</legend>
      <div className="flex gap-4 pt-1 text-sm">
        <label className="inline-flex items-center gap-1.5">
          <input type="radio" value="routine" {...registration} /> Routine
        </label>
        <label className="inline-flex items-center gap-1.5">
          <input type="radio" value="urgent" {...registration} /> Urgent
        </label>
      </div>
      {error ? <p className="text-xs font-medium text-below">{error}</p> : null}
    </fieldset>
  );
}
