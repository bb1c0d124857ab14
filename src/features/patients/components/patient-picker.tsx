import { useQuery } from '@tanstack/react-query';
import { useEffect, useId, useRef, useState } from 'react';
import { Button } from '@/components/ui/button';
import type { Patient } from '@/schemas/case';
import { patientQueries } from '../api/patient-queries';
import { guessFromQuery } from '../utils/patient-text';
import { NewPatientForm } from './new-patient-form';
import { PatientSummary } from './patient-summary';

function useDebounced<T>(value: T, ms: number): T {
  const [v, setV] = useState(value);
  useEffect(() => {
    const t = setTimeout(() => setV(value), ms);
    return () => clearTimeout(t);
  }, [value, ms]);
  return v;
}

/**
 * Finds the patient as you type (name in either order, lab ID or date of birth), with the arrow keys and
 * Enter to choose; or registers a new one, starting from what was typed.
 */
export function PatientPicker({ onChosen }: { onChosen: (p: Patient) => void }) {
  const [mode, setMode] = useState<'find' | 'new'>('find');
  const [q, setQ] = useState('');
  const [active, setActive] = useState(0);
  const debounced = useDebounced(q.trim(), 180);
  const results = useQuery(patientQueries.search(debounced));
  const items = debounced.length >= 2 ? (results.data ?? []) : [];
  const listId = useId();
  const inputRef = useRef<HTMLInputElement>(null);

  if (mode === 'new') {
    return <NewPatientForm initial={guessFromQuery(q)} onChosen={onChosen} onCancel={() => setMode('find')} />;
  }

  const choose = (p: Patient | undefined) => p && onChosen(p);
  return (
    <div className="flex flex-col gap-3">
      <label htmlFor={`${listId}-q`} className="text-sm font-medium text-ink-soft">
        Find the patient
      </label>
      <input
        id={`${listId}-q`}
        ref={inputRef}
        // The first thing a technologist does on this page.
        // eslint-disable-next-line jsx-a11y/no-autofocus
        autoFocus
        role="combobox"
        aria-expanded={items.length > 0}
        aria-controls={listId}
        aria-activedescendant={items[active] ? `${listId}-${items[active].id}` : undefined}
        aria-autocomplete="list"
        autoComplete="off"
        placeholder="Family or given name, lab patient ID, or date of birth (YYYY-MM-DD)"
        className="w-full max-w-2xl rounded-md border border-paper-line bg-paper-raised px-3 py-2 text-base shadow-inner"
        value={q}
        onChange={(e) => {
          setQ(e.target.value);
          setActive(0);
        }}
        onKeyDown={(e) => {
          if (e.key === 'ArrowDown') {
            e.preventDefault();
            setActive((a) => Math.min(a + 1, Math.max(items.length - 1, 0)));
          } else if (e.key === 'ArrowUp') {
            e.preventDefault();
            setActive((a) => Math.max(a - 1, 0));
          } else if (e.key === 'Enter') {
            e.preventDefault();
            choose(items[active]);
          } else if (e.key === 'Escape') {
            setQ('');
          }
        }}
      />
      {items.length > 0 ? (
        <ul id={listId} role="listbox" aria-label="Matching patients" className="max-w-2xl divide-y divide-paper-line rounded-md border border-paper-line bg-paper-raised">
          {items.map((p, i) => (
            <li
              key={p.id}
              id={`${listId}-${p.id}`}
              role="option"
              aria-selected={i === active}
              className={`cursor-pointer px-3 py-2 ${i === active ? 'bg-matrix-50' : 'hover:bg-paper'}`}
              onMouseEnter={() => setActive(i)}
              onMouseDown={(e) => {
                e.preventDefault();
                choose(p);
              }}
            >
              <PatientSummary patient={p} />
            </li>
          ))}
        </ul>
      ) : debounced.length >= 2 && !results.isFetching ? (
        <p className="text-sm text-ink-soft" role="status">
          No registered patient matches “{debounced}”.
        </p>
      ) : (
        <p className="text-xs text-ink-faint">Type two or more characters. ↑ ↓ to move, Enter to choose.</p>
      )}
      <div>
        <Button variant="secondary" onClick={() => setMode('new')}>
          Register a new patient{q.trim() ? ` from “${q.trim()}”` : ''}
        </Button>
      </div>
    </div>
  );
}
