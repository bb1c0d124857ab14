import { useState } from 'react';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/layout';
import { ApiError } from '@/lib/api-client';
import { flagSummary } from '@/schemas/assay';
import { assayCodes } from '@/schemas/common';
import { inputModeLabels, type CaseWorkup, type Measurement } from '@/schemas/measurement';
import { useDeleteMeasurement, useUpdateMeasurement } from '../api/save-measurement';
import { fmt } from '../utils/format';

function WindowEditor({ caseId, m, onDone }: { caseId: number; m: Measurement; onDone: (tone: 'success' | 'error', text: string) => void }) {
  const w = m.result.window;
  const [fromS, setFromS] = useState(w ? String(w.fromS) : '');
  const [toS, setToS] = useState(w ? String(w.toS) : '');
  const update = useUpdateMeasurement(caseId);
  const submit = (window: { fromS: number; toS: number } | null) => {
    if (m.inputs.mode === 'rates') return;
    const input =
      m.inputs.mode === 'plate'
        ? { mode: 'plate' as const, window, version: m.version }
        : {
            mode: 'traces' as const,
            pathlengthCm: m.inputs.pathlengthCm,
            reactionVolumeUl: m.inputs.reactionVolumeUl,
            sampleVolumeUl: m.inputs.sampleVolumeUl,
            total: m.inputs.total,
            background: m.inputs.background,
            window,
            version: m.version,
          };
    update.mutate(
      { id: m.id, input },
      {
        onSuccess: (after) => onDone('success', `${after.assay} replicate ${after.replicate}: ${after.activity === null ? 'no activity' : fmt(after.activity)} with the new window.`),
        onError: (err) => onDone('error', err instanceof ApiError ? err.message : 'Not saved'),
      },
    );
  };
  return (
    <form
      className="flex items-center gap-1"
      onSubmit={(e) => {
        e.preventDefault();
        submit({ fromS: Number(fromS), toS: Number(toS) });
      }}
    >
      <label className="sr-only" htmlFor={`from-${m.id}`}>
        Window start (s) of {m.assay} replicate {m.replicate}
      </label>
      <input id={`from-${m.id}`} className="num w-16 rounded border border-paper-line px-1 py-0.5 text-xs" value={fromS} onChange={(e) => setFromS(e.target.value)} />
      <span className="text-xs">–</span>
      <label className="sr-only" htmlFor={`to-${m.id}`}>
        Window end (s) of {m.assay} replicate {m.replicate}
      </label>
      <input id={`to-${m.id}`} className="num w-16 rounded border border-paper-line px-1 py-0.5 text-xs" value={toS} onChange={(e) => setToS(e.target.value)} />
      <Button type="submit" variant="quiet" className="!px-2 !py-0.5 text-xs" disabled={update.isPending}>
        Apply
      </Button>
      <Button variant="quiet" className="!px-2 !py-0.5 text-xs" disabled={update.isPending} onClick={() => submit(null)}>
        Auto
      </Button>
    </form>
  );
}

/** The saved measurements of a case, by specimen: activity, window, flags, who entered them; windows can be moved. */
export function MeasurementsTable({ workup }: { workup: CaseWorkup }) {
  const remove = useDeleteMeasurement(workup.caseId);
  const [editing, setEditing] = useState<number | null>(null);
  const [message, setMessage] = useState<{ tone: 'success' | 'error'; text: string } | null>(null);
  if (workup.measurements.length === 0) return <p className="text-sm text-ink-faint">No measurement saved yet.</p>;
  const label = new Map(workup.specimens.map((s) => [s.id, s.label]));
  const rows = [...workup.measurements].sort(
    (a, b) => a.specimenId - b.specimenId || assayCodes.indexOf(a.assay) - assayCodes.indexOf(b.assay) || a.replicate - b.replicate,
  );
  return (
    <div className="flex flex-col gap-2">
      {message ? <Notice tone={message.tone}>{message.text}</Notice> : null}
      <table className="w-full text-left text-sm">
        <thead className="border-b border-paper-line text-ink-soft">
          <tr>
            <th className="py-1.5 pr-3 font-medium">Specimen</th>
            <th className="py-1.5 pr-3 font-medium">Assay</th>
            <th className="py-1.5 pr-3 font-medium">Rep.</th>
            <th className="py-1.5 pr-3 font-medium">Entered as</th>
            <th className="py-1.5 pr-3 font-medium">Activity</th>
            <th className="py-1.5 pr-3 font-medium">Window</th>
            <th className="py-1.5 pr-3 font-medium">Flags</th>
            <th className="py-1.5 pr-3 font-medium">Entered by</th>
            {workup.editable ? <th className="py-1.5 font-medium">Change</th> : null}
          </tr>
        </thead>
        <tbody>
          {rows.map((m) => (
            <tr key={m.id} className="border-b border-paper-line/70 align-top" data-testid={`measurement-${m.id}`}>
              <td className="py-1.5 pr-3">{label.get(m.specimenId)}</td>
              <td className="py-1.5 pr-3 font-medium">{m.assay}</td>
              <td className="num py-1.5 pr-3">{m.replicate}</td>
              <td className="py-1.5 pr-3 text-ink-soft">
                {inputModeLabels[m.inputMode]}
                {m.inputs.mode === 'plate' ? <span className="block text-xs text-ink-faint">wells {[m.inputs.wells.total, m.inputs.wells.background, m.inputs.wells.blank].filter(Boolean).join(', ')}</span> : null}
              </td>
              <td className="num py-1.5 pr-3">{m.activity === null ? '—' : fmt(m.activity)}</td>
              <td className="num py-1.5 pr-3 text-xs">
                {editing === m.id ? (
                  <WindowEditor
                    caseId={workup.caseId}
                    m={m}
                    onDone={(tone, text) => {
                      setMessage({ tone, text });
                      if (tone === 'success') setEditing(null);
                    }}
                  />
                ) : m.result.window ? (
                  `${fmt(m.result.window.fromS)}–${fmt(m.result.window.toS)} s${m.result.windowAuto ? ' (auto)' : ''}`
                ) : (
                  '—'
                )}
              </td>
              <td className="py-1.5 pr-3 text-xs text-caution" title={m.flags.map((f) => f.message).join('\n')}>
                {flagSummary(m.flags) || <span className="text-within">none</span>}
              </td>
              <td className="py-1.5 pr-3 text-xs text-ink-soft">{m.enteredBy ?? '—'}</td>
              {workup.editable ? (
                <td className="py-1.5">
                  <div className="flex gap-1">
                    {m.inputMode !== 'rates' ? (
                      <Button variant="quiet" className="!px-2 !py-0.5 text-xs" onClick={() => setEditing(editing === m.id ? null : m.id)}>
                        {editing === m.id ? 'Close' : 'Window'}
                      </Button>
                    ) : null}
                    <Button
                      variant="quiet"
                      className="!px-2 !py-0.5 text-xs text-below"
                      onClick={() => {
                        if (!window.confirm(`Delete ${m.assay} replicate ${m.replicate} of specimen ${label.get(m.specimenId)}?`)) return;
                        remove.mutate(
                          { id: m.id, version: m.version },
                          {
                            onSuccess: () => setMessage({ tone: 'success', text: `Deleted ${m.assay} replicate ${m.replicate}.` }),
                            onError: (err) => setMessage({ tone: 'error', text: err instanceof ApiError ? err.message : 'Not deleted' }),
                          },
                        );
                      }}
                    >
                      Delete
                    </Button>
                  </div>
                </td>
              ) : null}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
