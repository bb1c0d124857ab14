import { useState } from 'react';
import { Button } from '@/components/ui/button';
import { Card, Notice } from '@/components/ui/layout';
import { useQuery } from '@tanstack/react-query';
import { ApiError } from '@/lib/api-client';
import { applyServerError, useUnsavedChangesPrompt, useZodForm } from '@/lib/form';
import { specimenTypeLabels } from '@/schemas/common';
import {
  receiveSpecimenInputSchema,
  transportConditionLabels,
  updateSpecimenInputSchema,
  type CaseDetail,
  type Specimen,
} from '@/schemas/case';
import { caseQueries } from '../api/case-queries';
import { useChangeSpecimen } from '../api/change-specimen';
import { useReceiveSpecimen } from '../api/receive-specimen';
import { formatLabDateTime } from '../utils/lab-time';
import { ReasonPicker } from './reason-picker';
import { arrivingSpecimenDefaults, SpecimenFields } from './specimen-fields';
import { isStale, StaleNotice } from './stale-notice';
import { TableBox } from '@/components/ui/table-box';

const receivable = new Set(['received', 'in_assay']);

function ReceiveSpecimenForm({ caseId, timeZone, onDone }: { caseId: number; timeZone: string; onDone: () => void }) {
  const receive = useReceiveSpecimen(caseId);
  const [message, setMessage] = useState<string | null>(null);
  const form = useZodForm(receiveSpecimenInputSchema, { defaultValues: arrivingSpecimenDefaults(timeZone) });
  useUnsavedChangesPrompt(form.formState.isDirty && !receive.isSuccess);
  return (
    <form
      noValidate
      aria-label="Receive another specimen"
      className="flex flex-col gap-4 rounded-md border border-matrix-200 bg-matrix-50/50 p-4"
      onSubmit={form.handleSubmit((values) => {
        setMessage(null);
        receive.mutate(values, {
          onSuccess: () => {
            form.reset(values);
            onDone();
          },
          onError: (err) => setMessage(applyServerError(form, err)),
        });
      })}
    >
      <SpecimenFields form={form} prefix="" timeZone={timeZone} />
      {message ? <Notice tone="error">{message}</Notice> : null}
      <div className="flex gap-2">
        <Button type="submit" disabled={receive.isPending}>
          {receive.isPending ? 'Saving…' : 'Receive the specimen'}
        </Button>
        <Button variant="quiet" onClick={onDone}>
          Discard
        </Button>
      </div>
    </form>
  );
}

function RecordRejection({ caseId, specimen, onDone, onReload }: { caseId: number; specimen: Specimen; onDone: () => void; onReload: () => void }) {
  const reasons = useQuery(caseQueries.rejectionReasons());
  const change = useChangeSpecimen(caseId);
  const [reason, setReason] = useState<string | null>(null);
  const [error, setError] = useState<string | undefined>();
  const [stale, setStale] = useState<string | null>(null);
  useUnsavedChangesPrompt(reason !== null && reason !== '' && !change.isSuccess);
  return (
    <form
      noValidate
      aria-label={`Record rejection of specimen ${specimen.label}`}
      className="flex flex-col gap-3 rounded-md border border-below/30 bg-below-bg/50 p-3"
      onSubmit={(e) => {
        e.preventDefault();
        const input = { accepted: false, rejectionReason: reason, version: specimen.version };
        const parsed = updateSpecimenInputSchema.safeParse(input);
        if (!parsed.success) {
          setError(parsed.error.issues.find((i) => i.path[0] === 'rejectionReason')?.message ?? parsed.error.issues[0]?.message);
          return;
        }
        change.mutate(
          { id: specimen.id, input: parsed.data },
          {
            onSuccess: onDone,
            onError: (err) => {
              if (isStale(err)) setStale((err as Error).message);
              else setError(err instanceof ApiError ? (err.fields.rejectionReason ?? err.message) : 'The rejection was not saved');
            },
          },
        );
      }}
    >
      <div className="max-w-md">
        <ReasonPicker reasons={reasons.data ?? []} value={reason} onChange={setReason} error={error} />
      </div>
      {stale ? <StaleNotice message={stale} onReload={onReload} /> : null}
      <div className="flex gap-2">
        <Button type="submit" variant="danger" disabled={change.isPending || stale !== null}>
          Reject specimen {specimen.label}
        </Button>
        <Button variant="quiet" onClick={onDone}>
          Keep it accepted
        </Button>
      </div>
    </form>
  );
}

/** The case's specimens as received, with receipt of another and the recording of a rejection. */
export function SpecimensPanel({ detail, timeZone, onReload }: { detail: CaseDetail; timeZone: string; onReload: () => void }) {
  const [receiving, setReceiving] = useState(false);
  const [rejecting, setRejecting] = useState<number | null>(null);
  const open = receivable.has(detail.state);
  return (
    <Card
      title="Specimens"
      actions={
        open && !receiving ? (
          <Button variant="secondary" onClick={() => setReceiving(true)}>
            Receive another specimen
          </Button>
        ) : null
      }
    >
      <TableBox label="Specimens">
        <table className="w-full text-left text-sm">
          <thead className="border-b border-paper-line text-xs uppercase tracking-wide text-ink-faint">
            <tr>
              <th className="py-2 pr-3 font-medium">Label</th>
              <th className="py-2 pr-3 font-medium">Type and source</th>
              <th className="py-2 pr-3 font-medium">Collected</th>
              <th className="py-2 pr-3 font-medium">Received</th>
              <th className="py-2 pr-3 font-medium">Arrived</th>
              <th className="py-2 pr-3 text-right font-medium">Wet weight</th>
              <th className="py-2 pr-3 font-medium">Receipt</th>
              <th className="py-2 font-medium">
                <span className="sr-only">Actions</span>
              </th>
            </tr>
          </thead>
          <tbody>
            {detail.specimens.map((s) => (
              <tr key={s.id} className={`border-b border-paper-line/70 align-top ${s.accepted ? '' : 'bg-below-bg/40'}`}>
                <td className="py-2.5 pr-3">
                  <span className="inline-flex h-7 w-7 items-center justify-center rounded-md bg-matrix-800 font-mono text-sm font-semibold text-white">{s.label}</span>
                </td>
                <td className="py-2.5 pr-3">
                  <span className="font-medium">{specimenTypeLabels[s.type]}</span>
                  {s.source ? <span className="block text-xs text-ink-soft">{s.source}</span> : null}
                </td>
                <td className="num py-2.5 pr-3">{formatLabDateTime(s.collectedAt, timeZone)}</td>
                <td className="num py-2.5 pr-3">{formatLabDateTime(s.receivedAt, timeZone)}</td>
                <td className="py-2.5 pr-3">{transportConditionLabels[s.transportCondition]}</td>
                <td className="num py-2.5 pr-3 text-right">{s.wetWeightMg === null ? '—' : `${s.wetWeightMg} mg`}</td>
                <td className="py-2.5 pr-3">
                  {s.accepted ? (
                    <span className="text-within">Accepted</span>
                  ) : (
                    <span className="text-below">
                      <strong className="font-semibold">Rejected</strong>
                      <span className="block text-xs">{s.rejectionReason}</span>
                    </span>
                  )}
                </td>
                <td className="py-2.5 text-right">
                  {open && s.accepted && rejecting !== s.id ? (
                    <Button variant="quiet" className="text-below hover:bg-below-bg" onClick={() => setRejecting(s.id)}>
                      Record rejection
                    </Button>
                  ) : null}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </TableBox>
      {rejecting !== null
        ? (() => {
            const s = detail.specimens.find((x) => x.id === rejecting);
            return s ? (
              <div className="mt-3">
                <RecordRejection key={s.version} caseId={detail.id} specimen={s} onDone={() => setRejecting(null)} onReload={onReload} />
              </div>
            ) : null;
          })()
        : null}
      {receiving ? (
        <div className="mt-4">
          <ReceiveSpecimenForm caseId={detail.id} timeZone={timeZone} onDone={() => setReceiving(false)} />
        </div>
      ) : null}
      {!open ? <p className="mt-3 text-xs text-ink-faint">Specimens can be received or rejected only while the case is received or in assay.</p> : null}
    </Card>
  );
}
