import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { Button } from '@/components/ui/button';
import { SelectField, TextField } from '@/components/ui/field';
import { Card, Loading, Notice } from '@/components/ui/layout';
import { AwaitingSecondDirector, mayApprove, type ApprovalViewer } from '@/components/ui/second-director';
import { TableBox } from '@/components/ui/table-box';
import { ApiError } from '@/lib/api-client';
import { applyServerError, useZodForm } from '@/lib/form';
import { ACTIVITY_UNIT } from '@/schemas/assay';
import { assayCodes, type AssayCode } from '@/schemas/common';
import { createControlTargetBodySchema, ESTABLISH_FROM_RESULTS, type ControlMaterialDetail, type ControlTarget } from '@/schemas/qc';
import { fmt, formatDay, formatWhen } from '@/utils/format';
import { qcQueries } from '../api/qc-queries';
import { useApproveControlTarget } from '../api/use-approve-control-target';
import { useEnterControlTarget, useEstablishControlTarget } from '../api/use-create-control-target';
import { LeveyJenningsChart } from './levey-jennings-chart';

const statusWords: Record<ControlTarget['status'], string> = {
  draft: 'Draft, not in use',
  approved: 'In force',
  retired: 'Replaced',
};

function TargetForms({ material }: { material: ControlMaterialDetail }) {
  const enter = useEnterControlTarget(material.id);
  const establish = useEstablishControlTarget(material.id);
  const [message, setMessage] = useState<string | null>(null);
  const [establishAssay, setEstablishAssay] = useState<AssayCode>('CI');
  const [establishMessage, setEstablishMessage] = useState<string | null>(null);
  const form = useZodForm(createControlTargetBodySchema, { defaultValues: { assayCode: 'CI', note: '' } });
  const { errors } = form.formState;
  const num = { valueAsNumber: true } as const;
  const assayOptions = assayCodes.map((a) => ({ value: a, label: a }));
  return (
    <div className="grid gap-6 lg:grid-cols-2">
      <form
        noValidate
        aria-label="Enter a target"
        className="grid gap-3 sm:grid-cols-3"
        onSubmit={form.handleSubmit((values) => {
          setMessage(null);
          enter.mutate(values, {
            onSuccess: () => form.reset({ assayCode: values.assayCode, note: '' }),
            onError: (err) => setMessage(applyServerError(form, err)),
          });
        })}
      >
        <h3 className="text-sm font-semibold text-matrix-900 sm:col-span-3">Enter a target</h3>
        <SelectField label="Assay" options={assayOptions} registration={form.register('assayCode')} error={errors.assayCode?.message} />
        <TextField label="Target mean" type="number" step="any" registration={form.register('mean', num)} error={errors.mean?.message} />
        <TextField label="Target SD" type="number" step="any" registration={form.register('sd', num)} error={errors.sd?.message} />
        <div className="sm:col-span-3">
          <TextField label="Source (optional)" hint="e.g. the lot's value sheet" registration={form.register('note')} error={errors.note?.message} />
        </div>
        {message ? (
          <div className="sm:col-span-3">
            <Notice tone="error">{message}</Notice>
          </div>
        ) : null}
        <div className="sm:col-span-3">
          <Button type="submit" disabled={enter.isPending}>
            {enter.isPending ? 'Saving…' : 'Save as draft'}
          </Button>
        </div>
      </form>
      <div className="flex flex-col gap-3">
        <h3 className="text-sm font-semibold text-matrix-900">Establish from this laboratory&apos;s runs</h3>
        <p className="text-sm text-ink-soft">
          Mean and sample SD (n − 1) of the first {ESTABLISH_FROM_RESULTS} results of this material for the assay, in run order. The
          result is a draft: check it, then have it approved.
        </p>
        <div className="flex items-end gap-3">
          <SelectField label="Assay" options={assayOptions} value={establishAssay} onChange={(e) => setEstablishAssay(e.target.value as AssayCode)} />
          <Button
            variant="secondary"
            disabled={establish.isPending}
            onClick={() => {
              setEstablishMessage(null);
              establish.mutate(establishAssay, {
                onError: (err) =>
                  setEstablishMessage(err instanceof ApiError ? (err.fields.assayCode ?? err.message) : 'Not computed.'),
              });
            }}
          >
            {establish.isPending ? 'Computing…' : `Compute from the first ${ESTABLISH_FROM_RESULTS}`}
          </Button>
        </div>
        {establishMessage ? <Notice tone="error">{establishMessage}</Notice> : null}
      </div>
    </div>
  );
}

function TargetRows({ targets, viewer }: { targets: ControlTarget[]; viewer: ApprovalViewer | null }) {
  const approve = useApproveControlTarget();
  return (
    <TableBox label="Target versions">
      <table className="w-full text-sm">
        <thead>
          <tr className="border-b border-paper-line text-left text-xs uppercase tracking-wide text-ink-faint">
            <th className="py-1.5 pr-3">Version</th>
            <th className="py-1.5 pr-3">Mean</th>
            <th className="py-1.5 pr-3">SD</th>
            <th className="py-1.5 pr-3">From</th>
            <th className="py-1.5 pr-3">State</th>
            <th className="py-1.5 pr-3">Who</th>
          </tr>
        </thead>
        <tbody>
          {targets.map((t) => (
            <tr key={t.id} className="border-b border-paper-line/60 align-top">
              <td className="num py-1.5 pr-3">v{t.version}</td>
              <td className="num py-1.5 pr-3">{fmt(t.mean, 5)}</td>
              <td className="num py-1.5 pr-3">{fmt(t.sd, 4)}</td>
              <td className="py-1.5 pr-3">
                {t.source === 'established' ? `first ${t.basis?.n ?? ESTABLISH_FROM_RESULTS} results` : 'entered'}
                {t.note ? <span className="block text-xs text-ink-faint">{t.note}</span> : null}
              </td>
              <td className="py-1.5 pr-3">
                {statusWords[t.status]}
                {t.status === 'draft' && viewer ? (
                  <div className="mt-1 flex flex-col gap-1">
                    {mayApprove(viewer, t.createdById) ? (
                      <Button variant="secondary" disabled={approve.isPending} onClick={() => approve.mutate(t.id)}>
                        Approve v{t.version}
                      </Button>
                    ) : null}
                    <AwaitingSecondDirector viewer={viewer} drafterId={t.createdById} drafterName={t.createdByName} draftedAt={t.createdAt} />
                  </div>
                ) : null}
              </td>
              <td className="py-1.5 pr-3 text-xs text-ink-soft">
                drafted by {t.createdByName ?? '—'}
                {t.approvedAt ? (
                  <span className="block">
                    approved by {t.approvedByName ?? '—'}, {formatWhen(t.approvedAt)}
                  </span>
                ) : null}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      {approve.error ? <Notice tone="error">{approve.error.message}</Notice> : null}
    </TableBox>
  );
}

function AssayChart({ materialId, assay, label }: { materialId: number; assay: AssayCode; label: string }) {
  const { data, isPending, error } = useQuery(qcQueries.chart(materialId, assay));
  if (isPending) return <Loading what="Loading the chart" />;
  if (error) return <Notice tone="error">The chart could not be loaded.</Notice>;
  if (data.targets.length === 0 && data.points.length === 0) return null;
  return <LeveyJenningsChart chart={data} unit={ACTIVITY_UNIT} label={label} />;
}

/** One control material: its facts, its targets per assay with their versions, and a Levey–Jennings chart per assay. */
export function MaterialDetail({ id, viewer }: { id: number; viewer: ApprovalViewer | null }) {
  const { data: material, isPending, error } = useQuery(qcQueries.material(id));
  if (isPending) return <Loading what="Loading the control material" />;
  if (error) return <Notice tone="error">{error.message}</Notice>;
  const assays = assayCodes.filter((a) => material.targets.some((t) => t.assayCode === a));
  return (
    <div className="flex flex-col gap-6">
      <Card title={`${material.name} · ${material.level}`}>
        <dl className="grid gap-x-6 gap-y-1 text-sm sm:grid-cols-4">
          <dt className="text-ink-faint">Lot</dt>
          <dd className="font-mono">{material.lot}</dd>
          <dt className="text-ink-faint">Expires</dt>
          <dd>{formatDay(material.expiresOn)}</dd>
          <dt className="text-ink-faint">State</dt>
          <dd>{material.retiredAt ? `Retired ${formatWhen(material.retiredAt)}` : 'In use'}</dd>
          {material.description ? (
            <>
              <dt className="text-ink-faint">Description</dt>
              <dd>{material.description}</dd>
            </>
          ) : null}
        </dl>
      </Card>
      {viewer && !material.retiredAt ? (
        <Card title="New target">
          <TargetForms material={material} />
        </Card>
      ) : null}
      {assays.length === 0 ? <p className="text-sm text-ink-soft">No targets yet for this material.</p> : null}
      {assays.map((assay) => (
        <Card key={assay} title={`${assay} · target and Levey–Jennings chart`}>
          <TargetRows targets={material.targets.filter((t) => t.assayCode === assay)} viewer={viewer} />
          <div className="mt-4">
            <AssayChart materialId={material.id} assay={assay} label={`Levey–Jennings chart of ${material.name} ${material.level}, ${assay}`} />
          </div>
        </Card>
      ))}
    </div>
  );
}
