import { useState } from 'react';
import { useNavigate } from 'react-router-dom';
import { Button } from '@/components/ui/button';
import { TextField } from '@/components/ui/field';
import { Notice } from '@/components/ui/layout';
import { paths } from '@/config/paths';
import { ApiError } from '@/lib/api-client';
import type { ControlSelection } from '@/schemas/reference-interval-api';
import { useCreateDraftFromControls } from '../api/create-interval';
import { methodNames, todayIso } from './interval-text';

/** Names the set and the dates; the server derives the numbers again from the stored file and keeps the draft. */
export function SaveDraftForm({
  uploadId,
  selection,
  suggestedName,
  title,
  onCancel,
}: {
  uploadId: number;
  selection: ControlSelection;
  suggestedName: string;
  title: string;
  onCancel: () => void;
}) {
  const navigate = useNavigate();
  const save = useCreateDraftFromControls();
  const [setName, setSetName] = useState(suggestedName);
  const [effectiveFrom, setEffectiveFrom] = useState(todayIso());
  const [effectiveTo, setEffectiveTo] = useState('');
  const [note, setNote] = useState('');
  const fields = save.error instanceof ApiError ? save.error.fields : {};
  const placed = ['setName', 'effectiveFrom', 'effectiveTo', 'note'];
  const unplaced = save.error && !Object.keys(fields).some((f) => placed.includes(f));

  return (
    <form
      aria-label="Save as draft"
      className="flex flex-col gap-3 rounded-card border border-copper-300 bg-copper-50/60 p-4"
      onSubmit={(e) => {
        e.preventDefault();
        save.mutate(
          {
            uploadId,
            input: { ...selection, setName, effectiveFrom, effectiveTo: effectiveTo === '' ? null : effectiveTo, ...(note.trim() ? { note } : {}) },
          },
          { onSuccess: (created) => navigate(paths.intervalDetail.href(created.id)) },
        );
      }}
    >
      <h3 className="text-base font-semibold text-matrix-900">Save {title} · {methodNames[selection.method]} as a draft</h3>
      <div className="grid gap-3 sm:grid-cols-3">
        <div className="sm:col-span-3">
          <TextField label="Interval set" value={setName} onChange={(e) => setSetName(e.target.value)} error={fields.setName} />
        </div>
        <TextField label="Effective from" type="date" value={effectiveFrom} onChange={(e) => setEffectiveFrom(e.target.value)} error={fields.effectiveFrom} />
        <TextField label="Effective until (optional)" type="date" value={effectiveTo} onChange={(e) => setEffectiveTo(e.target.value)} error={fields.effectiveTo} />
        <TextField label="Note for the source (optional)" value={note} onChange={(e) => setNote(e.target.value)} error={fields.note} />
      </div>
      {unplaced ? <Notice tone="error">{save.error?.message}</Notice> : null}
      <div className="flex gap-2">
        <Button type="submit" disabled={save.isPending}>
          {save.isPending ? 'Saving…' : 'Save draft'}
        </Button>
        <Button variant="quiet" onClick={onCancel}>
          Cancel
        </Button>
      </div>
      <p className="text-xs text-ink-faint">
        The draft records the control file, the method and the outlier rule. It is not used until a second director approves it.
      </p>
    </form>
  );
}
