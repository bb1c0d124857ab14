import { useEffect, useId, useState } from 'react';
import { specimenTypeLabels, specimenTypes } from '@/schemas/common';
import { caseStateLabels, caseStates, type CaseListQuery } from '@/schemas/case';
import { hasFilters } from '../utils/list-params';

/** The pattern filter's choices: a kind of finding, or an isolated defect of one complex. */
export const patternChoices: { value: string; label: string }[] = [
  { value: 'normal', label: 'All within reference' },
  { value: 'isolated', label: 'Isolated deficiency (any)' },
  { value: 'isolated:CI', label: 'Isolated complex I' },
  { value: 'isolated:CII', label: 'Isolated complex II' },
  { value: 'isolated:CIII', label: 'Isolated complex III' },
  { value: 'isolated:CIV', label: 'Isolated complex IV' },
  { value: 'combined', label: 'Combined deficiency' },
  { value: 'linked', label: 'Linked activity low' },
  { value: 'raised_cs', label: 'Raised citrate synthase' },
  { value: 'insufficient', label: 'Not enough data' },
];

type Change = Partial<Record<keyof CaseListQuery, string | null>>;

const control = 'rounded-md border border-paper-line bg-paper-raised px-2 py-1.5 text-sm text-ink';

/** Search and filters of the case list; every change goes to the address bar. */
export function CaseFilters({ query, onChange }: { query: CaseListQuery; onChange: (c: Change) => void }) {
  const id = useId();
  const [text, setText] = useState(query.q ?? '');
  // Follow the address bar when it changes under us (back button, a shared link).
  const [seen, setSeen] = useState(query.q ?? '');
  if ((query.q ?? '') !== seen) {
    setSeen(query.q ?? '');
    setText(query.q ?? '');
  }
  useEffect(() => {
    if (text.trim() === (query.q ?? '')) return;
    const t = setTimeout(() => onChange({ q: text.trim() || null }), 300);
    return () => clearTimeout(t);
  }, [text, query.q, onChange]);

  return (
    <div role="search" className="flex flex-wrap items-end gap-3">
      <div className="flex w-full flex-col gap-1 xl:w-auto xl:min-w-80 xl:flex-1">
        <label htmlFor={`${id}-q`} className="text-xs font-medium text-ink-soft">
          Search
        </label>
        <input
          id={`${id}-q`}
          type="search"
          className={`${control} w-full`}
          placeholder="Accession number, patient name or lab patient ID"
          value={text}
          onChange={(e) => setText(e.target.value)}
          onKeyDown={(e) => {
            if (e.key === 'Enter') onChange({ q: text.trim() || null });
          }}
        />
      </div>
      <div className="flex flex-col gap-1">
        <label htmlFor={`${id}-state`} className="text-xs font-medium text-ink-soft">
          State
        </label>
        <select id={`${id}-state`} className={control} value={query.state ?? ''} onChange={(e) => onChange({ state: e.target.value || null })}>
          <option value="">Any state</option>
          {caseStates.map((s) => (
            <option key={s} value={s}>
              {caseStateLabels[s]}
            </option>
          ))}
        </select>
      </div>
      <div className="flex flex-col gap-1">
        <label htmlFor={`${id}-type`} className="text-xs font-medium text-ink-soft">
          Specimen type
        </label>
        <select id={`${id}-type`} className={control} value={query.specimenType ?? ''} onChange={(e) => onChange({ specimenType: e.target.value || null })}>
          <option value="">Any type</option>
          {specimenTypes.map((s) => (
            <option key={s} value={s}>
              {specimenTypeLabels[s]}
            </option>
          ))}
        </select>
      </div>
      <div className="flex flex-col gap-1">
        <label htmlFor={`${id}-pattern`} className="text-xs font-medium text-ink-soft">
          Pattern
        </label>
        <select id={`${id}-pattern`} className={control} value={query.pattern ?? ''} onChange={(e) => onChange({ pattern: e.target.value || null })}>
          <option value="">Any pattern</option>
          {patternChoices.map((p) => (
            <option key={p.value} value={p.value}>
              {p.label}
            </option>
          ))}
          {query.pattern && !patternChoices.some((p) => p.value === query.pattern) ? <option value={query.pattern}>{query.pattern}</option> : null}
        </select>
      </div>
      <fieldset className="flex flex-col gap-1">
        <legend className="mb-1 text-xs font-medium text-ink-soft">Received between</legend>
        <div className="flex items-center gap-1.5">
          <label htmlFor={`${id}-from`} className="sr-only">
            Received from
          </label>
          <input id={`${id}-from`} type="date" className={control} value={query.from ?? ''} onChange={(e) => onChange({ from: e.target.value || null })} />
          <span className="text-xs text-ink-faint">and</span>
          <label htmlFor={`${id}-to`} className="sr-only">
            Received up to
          </label>
          <input id={`${id}-to`} type="date" className={control} value={query.to ?? ''} onChange={(e) => onChange({ to: e.target.value || null })} />
        </div>
      </fieldset>
      {hasFilters(query) ? (
        <button
          type="button"
          className="mb-1 text-sm text-matrix-700 underline hover:text-matrix-900"
          onClick={() => {
            setText('');
            onChange({ q: null, state: null, specimenType: null, pattern: null, from: null, to: null });
          }}
        >
          Clear all
        </button>
      ) : null}
    </div>
  );
}
