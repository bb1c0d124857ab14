import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { Button } from '@/components/ui/button';
import { Loading, Notice } from '@/components/ui/layout';
import { ApiError } from '@/lib/api-client';
import type { StoredPlateMap } from '@/schemas/measurement';
import { plateMapQueries, useDeletePlateMap } from '../api/plate-map-queries';

/** Saved layouts, with who made them; one can be opened in the editor or deleted. */
export function PlateMapList({ selectedId, onOpen }: { selectedId: number | null; onOpen: (map: StoredPlateMap | null) => void }) {
  const { data, isPending, error } = useQuery(plateMapQueries.list());
  const remove = useDeletePlateMap();
  const [message, setMessage] = useState<string | null>(null);
  if (isPending) return <Loading what="Loading layouts" />;
  if (error) return <Notice tone="error">{error.message}</Notice>;
  return (
    <div className="flex flex-col gap-2">
      {message ? <Notice tone="error">{message}</Notice> : null}
      {data.length === 0 ? <p className="text-sm text-ink-faint">No saved layout yet.</p> : null}
      <ul className="flex flex-col divide-y divide-paper-line">
        {data.map((m) => (
          <li key={m.id} className={`flex flex-wrap items-center justify-between gap-2 py-2 ${m.id === selectedId ? 'bg-matrix-50' : ''}`}>
            <span className="text-sm">
              <span className="font-medium">{m.name}</span>
              <span className="text-ink-faint"> · {new Set(m.wells.map((w) => w.well)).size} wells · {m.createdBy ?? 'unknown'}</span>
              {m.description ? <span className="block text-xs text-ink-soft">{m.description}</span> : null}
            </span>
            <span className="flex gap-1">
              <Button variant="secondary" onClick={() => onOpen(m)}>
                Open
              </Button>
              <Button
                variant="quiet"
                onClick={() => {
                  if (!window.confirm(`Delete the layout “${m.name}”? Uploads already read with it keep their wells.`)) return;
                  remove.mutate(
                    { id: m.id, version: m.version },
                    {
                      onSuccess: () => (m.id === selectedId ? onOpen(null) : undefined),
                      onError: (err) => setMessage(err instanceof ApiError ? err.message : 'Not deleted'),
                    },
                  );
                }}
              >
                Delete
              </Button>
            </span>
          </li>
        ))}
      </ul>
    </div>
  );
}
