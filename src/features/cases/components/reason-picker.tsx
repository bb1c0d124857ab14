import { useId, useState } from 'react';
import type { RejectionReason } from '@/schemas/case';

const OTHER = '__other__';

/**
 * The rejection reason: one of the laboratory's list, or typed when none fits. Typed reasons are kept on the
 * specimen only; a director adds a reason to the list when it keeps coming up.
 */
export function ReasonPicker({
  label = 'Reason for rejection',
  reasons,
  value,
  onChange,
  error,
}: {
  label?: string;
  reasons: RejectionReason[];
  value: string | null;
  onChange: (v: string | null) => void;
  error?: string;
}) {
  const id = useId();
  const listed = value !== null && reasons.some((r) => r.text === value);
  const [typing, setTyping] = useState(value !== null && value !== '' && !listed);
  const selectValue = typing ? OTHER : listed ? value! : '';
  const control =
    'w-full rounded-md border border-paper-line bg-paper-raised px-2.5 py-1.5 text-sm text-ink shadow-inner aria-[invalid=true]:border-below';
  return (
    <div className="flex flex-col gap-1">
      <label htmlFor={id} className="text-sm font-medium text-ink-soft">
        {label}
      </label>
      <select
        id={id}
        className={control}
        value={selectValue}
        aria-invalid={error && !typing ? true : undefined}
        aria-describedby={error ? `${id}-error` : undefined}
        onChange={(e) => {
          if (e.target.value === OTHER) {
            setTyping(true);
            onChange('');
          } else {
            setTyping(false);
            onChange(e.target.value || null);
          }
        }}
      >
        <option value="">Choose a reason…</option>
        {reasons.map((r) => (
          <option key={r.id} value={r.text}>
            {r.text}
          </option>
        ))}
        <option value={OTHER}>Another reason (type it)</option>
      </select>
      {typing ? (
        <>
          <label htmlFor={`${id}-typed`} className="sr-only">
            Type the reason
          </label>
          <input
            id={`${id}-typed`}
            className={control}
            placeholder="Type the reason"
            value={value ?? ''}
            aria-invalid={error ? true : undefined}
            aria-describedby={error ? `${id}-error` : undefined}
            onChange={(e) => onChange(e.target.value)}
          />
        </>
      ) : null}
      {error ? (
        <p id={`${id}-error`} role="alert" className="text-xs font-medium text-below">
          {error}
        </p>
      ) : null}
    </div>
  );
}
