import { Fragment, useState } from 'react';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/layout';
import { ApiError } from '@/lib/api-client';
import { flagSummary } from '@/schemas/assay';
import { assayCodes } from '@/schemas/common';
import { inputModeLabels, type CaseWorkup, type Measurement } from '@/schemas/measurement';
import { formatWhen } from '@/utils/format';
import { useIncludeMeasurement } from '../api/exclude-measurement';
import { useDeleteMeasurement } from '../api/save-measurement';
import { fmt } from '../utils/format';
import { ExcludeForm } from './exclude-form';
import { MeasurementEditForm } from './measurement-edit-form';
import { TableBox } from '@/components/ui/table-box';

type Open = { id: number; form: 'edit' | 'exclude' } | null;
type Message = { tone: 'success' | 'error'; text: string };

const small = '!px-2 !py-0.5 text-xs';

/** "Excluded by … on …: reason", under an excluded replicate. */
export function ExclusionNote({ m }: { m: Pick<Measurement, 'excluded'> }) {
  if (!m.excluded) return null;
  return (
    <span className="block text-xs text-caution" data-testid="exclusion-note">
      Excluded{m.excluded.by ? ` by ${m.excluded.by}` : ''} on {formatWhen(m.excluded.at)}: {m.excluded.reason}
    </span>
  );
}

function RowActions({
  caseId,
  m,
  specimenLabel,
  open,
  setOpen,
  say,
}: {
  caseId: number;
  m: Measurement;
  specimenLabel: string;
  open: Open;
  setOpen: (o: Open) => void;
  say: (msg: Message) => void;
}) {
  const remove = useDeleteMeasurement(caseId);
  const include = useIncludeMeasurement(caseId);
  const toggle = (form: 'edit' | 'exclude') => setOpen(open?.id === m.id && open.form === form ? null : { id: m.id, form });
  const fail = (fallback: string) => (err: unknown) => say({ tone: 'error', text: err instanceof ApiError ? err.message : fallback });
  return (
    <div className="flex flex-wrap gap-1">
      <Button variant="quiet" className={small} onClick={() => toggle('edit')}>
        Edit
      </Button>
      {m.excluded ? (
        <Button
          variant="quiet"
          className={small}
          disabled={include.isPending}
          onClick={() =>
            include.mutate(
              { id: m.id, input: { version: m.version } },
              { onSuccess: () => say({ tone: 'success', text: `${m.assay} replicate ${m.replicate} counts again.` }), onError: fail('Not saved') },
            )
          }
        >
          Include again
        </Button>
      ) : (
        <Button variant="quiet" className={`${small} text-caution`} onClick={() => toggle('exclude')}>
          Exclude
        </Button>
      )}
      {m.submittedAt ? null : (
        // Once part of a submission a replicate can only be excluded, never deleted (the server refuses it too).
        <Button
          variant="quiet"
          className={`${small} text-below`}
          onClick={() => {
            if (!window.confirm(`Delete ${m.assay} replicate ${m.replicate} of specimen ${specimenLabel}? It has never been submitted.`)) return;
            remove.mutate(
              { id: m.id, version: m.version },
              { onSuccess: () => say({ tone: 'success', text: `Deleted ${m.assay} replicate ${m.replicate}.` }), onError: fail('Not deleted') },
            );
          }}
        >
          Delete
        </Button>
      )}
    </div>
  );
}

/**
 * The saved measurements of a case, by specimen: activity, window, flags, who entered them. While the case is
 * open for assay work each can be edited, excluded with a reason (struck through, still listed) or included
 * again; one never submitted can also be deleted.
 */
export function MeasurementsTable({ workup }: { workup: CaseWorkup }) {
  const [open, setOpen] = useState<Open>(null);
  const [message, setMessage] = useState<Message | null>(null);
  if (workup.measurements.length === 0) return <p className="text-sm text-ink-faint">No measurement saved yet.</p>;
  const label = new Map(workup.specimens.map((s) => [s.id, s.label]));
  const rows = [...workup.measurements].sort(
    (a, b) => a.specimenId - b.specimenId || assayCodes.indexOf(a.assay) - assayCodes.indexOf(b.assay) || a.replicate - b.replicate,
  );
  const columns = workup.editable ? 9 : 8;
  const done = (text: string) => {
    setMessage({ tone: 'success', text });
    setOpen(null);
  };
  return (
    <div className="flex flex-col gap-2">
      {message ? <Notice tone={message.tone}>{message.text}</Notice> : null}
      <TableBox label="Saved measurements">
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
            {rows.map((m) => {
              const struck = m.excluded ? 'line-through text-ink-faint' : '';
              return (
                <Fragment key={m.id}>
                  <tr
                    className={`border-b border-paper-line/70 align-top ${m.excluded ? 'bg-paper-line/20' : ''}`}
                    data-testid={`measurement-${m.id}`}
                    data-excluded={m.excluded ? 'true' : undefined}
                  >
                    <td className="py-1.5 pr-3">{label.get(m.specimenId)}</td>
                    <td className="py-1.5 pr-3 font-medium">
                      <span className={struck}>{m.assay}</span>
                      <ExclusionNote m={m} />
                    </td>
                    <td className={`num py-1.5 pr-3 ${struck}`}>{m.replicate}</td>
                    <td className="py-1.5 pr-3 text-ink-soft">
                      {inputModeLabels[m.inputMode]}
                      {m.inputs.mode === 'plate' ? (
                        <span className="block text-xs text-ink-faint">
                          wells {[m.inputs.wells.total, m.inputs.wells.background, m.inputs.wells.blank].filter(Boolean).join(', ')}
                        </span>
                      ) : null}
                    </td>
                    <td className={`num py-1.5 pr-3 ${struck}`}>{m.activity === null ? '—' : fmt(m.activity)}</td>
                    <td className={`num py-1.5 pr-3 text-xs ${struck}`}>
                      {m.result.window ? `${fmt(m.result.window.fromS)}–${fmt(m.result.window.toS)} s${m.result.windowAuto ? ' (auto)' : ''}` : '—'}
                    </td>
                    <td className={`py-1.5 pr-3 text-xs text-caution ${struck}`} title={m.flags.map((f) => f.message).join('\n')}>
                      {flagSummary(m.flags) || <span className="text-within">none</span>}
                    </td>
                    <td className="py-1.5 pr-3 text-xs text-ink-soft">{m.enteredBy ?? '—'}</td>
                    {workup.editable ? (
                      <td className="py-1.5">
                        <RowActions
                          caseId={workup.caseId}
                          m={m}
                          specimenLabel={label.get(m.specimenId) ?? String(m.specimenId)}
                          open={open}
                          setOpen={setOpen}
                          say={setMessage}
                        />
                      </td>
                    ) : null}
                  </tr>
                  {workup.editable && open?.id === m.id ? (
                    <tr className="border-b border-paper-line/70">
                      <td colSpan={columns} className="py-2">
                        {open.form === 'edit' ? (
                          <MeasurementEditForm caseId={workup.caseId} m={m} onDone={done} onCancel={() => setOpen(null)} />
                        ) : (
                          <ExcludeForm caseId={workup.caseId} m={m} onDone={done} onCancel={() => setOpen(null)} />
                        )}
                      </td>
                    </tr>
                  ) : null}
                </Fragment>
              );
            })}
          </tbody>
        </table>
      </TableBox>
      {rows.some((m) => m.excluded) ? (
        <p className="text-xs text-ink-faint">Struck-through replicates are excluded: they count in no mean, SD, CV, ratio or pattern, and the report lists them with their reason.</p>
      ) : null}
    </div>
  );
}
