import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/layout';
import { ApiError } from '@/lib/api-client';
import type { CohortCriteria, SavedSearch } from '@/schemas/registry';
import { useDeleteSearch } from '../api/delete-search';
import { registryQueries } from '../api/registry-queries';
import { useSaveSearch } from '../api/save-search';
import { hasCriteria } from '../utils/cohort-params';

/** The user's own saved searches: keep the current criteria under a name, run one again, or delete it. */
export function SavedSearches({ current, onRun }: { current: CohortCriteria; onRun: (s: SavedSearch) => void }) {
  const list = useQuery(registryQueries.savedSearches());
  const save = useSaveSearch();
  const remove = useDeleteSearch();
  const [name, setName] = useState('');
  const [error, setError] = useState<string | null>(null);

  const onSave = (e: React.FormEvent) => {
    e.preventDefault();
    setError(null);
    save.mutate(
      { name: name.trim(), filters: current },
      {
        onSuccess: () => setName(''),
        onError: (err) => setError(err instanceof ApiError ? (err.fields.name ?? Object.values(err.fields)[0] ?? err.message) : 'Could not save the search.'),
      },
    );
  };

  return (
    <div className="flex flex-col gap-3">
      <form onSubmit={onSave} className="flex flex-col gap-1.5" aria-label="Save these criteria">
        <label htmlFor="saved-search-name" className="text-sm font-medium text-ink-soft">Save the criteria now applied as</label>
        <div className="flex gap-2">
          <input
            id="saved-search-name"
            value={name}
            maxLength={80}
            onChange={(e) => setName(e.target.value)}
            placeholder={hasCriteria(current) ? 'e.g. Isolated CI, under 5' : 'Every signed case'}
            aria-invalid={error ? true : undefined}
            className="min-w-0 flex-1 rounded-md border border-paper-line bg-paper-raised px-2.5 py-1.5 text-sm aria-[invalid=true]:border-below"
          />
          <Button type="submit" variant="secondary" disabled={save.isPending || name.trim() === ''}>Save</Button>
        </div>
        {error ? <p role="alert" className="text-xs font-medium text-below">{error}</p> : null}
      </form>
      {list.error ? <Notice tone="error">{list.error.message}</Notice> : null}
      {list.data && list.data.length === 0 ? <p className="text-xs text-ink-faint">You have no saved searches yet.</p> : null}
      <ul className="flex flex-col divide-y divide-paper-line/70" aria-label="My saved searches">
        {list.data?.map((s) => (
          <li key={s.id} className="flex items-center justify-between gap-2 py-1.5">
            <span className="min-w-0 truncate text-sm text-ink" title={s.name}>{s.name}</span>
            <span className="flex shrink-0 gap-1">
              <Button variant="quiet" className="px-2 py-1" onClick={() => onRun(s)} aria-label={`Run ${s.name}`}>Run</Button>
              <Button variant="quiet" className="px-2 py-1 text-below hover:bg-below-bg" disabled={remove.isPending} onClick={() => {
                if (window.confirm(`Delete the saved search “${s.name}”?`)) remove.mutate(s.id);
              }} aria-label={`Delete ${s.name}`}>Delete</Button>
            </span>
          </li>
        ))}
      </ul>
    </div>
  );
}
