import { useQuery } from '@tanstack/react-query';
import { useState, type ReactNode } from 'react';
import { Button } from '@/components/ui/button';
import { TextField } from '@/components/ui/field';
import { Card, Loading, Notice } from '@/components/ui/layout';
import { AwaitingSecondDirector, mayApprove, type ApprovalViewer } from '@/components/ui/second-director';
import { ApiError } from '@/lib/api-client';
import { specimenTypeLabels } from '@/schemas/common';
import type { StoredInterval } from '@/schemas/reference-interval-api';
import { useApproveInterval, useRetireInterval } from '../api/change-interval-status';
import { controlFileHref, intervalQueries } from '../api/interval-queries';
import { ageText, measureText, methodNames, num, outlierNames, periodText } from './interval-text';
import { EditDraftForm } from './edit-draft-form';
import { StatusTag } from './status-tag';
import { VersionHistory } from './version-history';
import { formatWhen } from '@/utils/format';

function Item({ label, children }: { label: string; children: ReactNode }) {
  return (
    <div>
      <dt className="text-xs text-ink-faint">{label}</dt>
      <dd className="num text-sm text-ink">{children}</dd>
    </div>
  );
}

function ApprovePanel({ interval, onClose }: { interval: StoredInterval; onClose: () => void }) {
  const approve = useApproveInterval();
  const history = useQuery(intervalQueries.history(interval.id));
  const current = history.data?.find(
    (v) => v.status === 'approved' && v.effectiveTo === null && v.effectiveFrom < interval.effectiveFrom,
  );
  return (
    <div role="group" aria-label="Confirm approval" className="mt-4 rounded-md border border-copper-300 bg-copper-50 p-4 text-sm">
      <p className="font-semibold text-copper-700">Approve version {interval.version}?</p>
      <ul className="mt-2 list-disc space-y-1 pl-5 text-ink">
        <li>
          It applies to {measureText(interval.assay, interval.measure)} in {specimenTypeLabels[interval.specimenType].toLowerCase()},{' '}
          {ageText(interval.ageBand).toLowerCase()}, {periodText(interval)}.
        </li>
        {current ? (
          <li>
            Version {current.version} stays readable and ends on {interval.effectiveFrom}; results already compared with it keep it.
          </li>
        ) : (
          <li>No earlier approved version is open for this key.</li>
        )}
        <li>
          Drafted by {interval.createdByName ?? 'a director'}; your name and the time are recorded with the approval.
        </li>
      </ul>
      {approve.error ? (
        <div className="mt-3">
          <Notice tone="error">{approve.error instanceof ApiError ? approve.error.message : 'Not approved'}</Notice>
        </div>
      ) : null}
      <div className="mt-3 flex gap-2">
        <Button
          disabled={approve.isPending}
          onClick={() => approve.mutate({ id: interval.id, revision: interval.revision }, { onSuccess: onClose })}
        >
          {approve.isPending ? 'Approving…' : `Confirm approval of v${interval.version}`}
        </Button>
        <Button variant="quiet" onClick={onClose}>
          Cancel
        </Button>
      </div>
    </div>
  );
}

function RetirePanel({ interval, onClose }: { interval: StoredInterval; onClose: () => void }) {
  const retire = useRetireInterval();
  const [reason, setReason] = useState('');
  const fieldError = retire.error instanceof ApiError ? retire.error.fields.reason : undefined;
  return (
    <form
      aria-label="Confirm retirement"
      className="mt-4 flex flex-col gap-3 rounded-md border border-below/40 bg-below-bg p-4 text-sm"
      onSubmit={(e) => {
        e.preventDefault();
        retire.mutate({ id: interval.id, revision: interval.revision, reason }, { onSuccess: onClose });
      }}
    >
      <p className="font-semibold text-below">
        {interval.status === 'draft' ? `Discard draft v${interval.version}?` : `Retire version ${interval.version}?`}
      </p>
      <p className="text-ink">
        It stays readable, and results already compared with it keep it, but it will not be used for new comparisons.
        {interval.status === 'approved' ? ' No other version takes over automatically.' : ''}
      </p>
      <TextField label="Reason" value={reason} onChange={(e) => setReason(e.target.value)} error={fieldError} />
      {retire.error && !fieldError ? <Notice tone="error">{retire.error.message}</Notice> : null}
      <div className="flex gap-2">
        <Button type="submit" variant="danger" disabled={retire.isPending}>
          {interval.status === 'draft' ? 'Discard draft' : 'Retire this version'}
        </Button>
        <Button variant="quiet" onClick={onClose}>
          Cancel
        </Button>
      </div>
    </form>
  );
}

/**
 * One version with its source, derivation and history. Directors (`viewer`) approve or retire it here; a draft is
 * approved by a director other than its drafter, who may still edit it.
 */
export function IntervalDetail({ id, viewer }: { id: number; viewer: ApprovalViewer | null }) {
  const { data: i, isPending, error } = useQuery(intervalQueries.detail(id));
  const [panel, setPanel] = useState<'approve' | 'retire' | 'edit' | null>(null);
  if (isPending) return <Loading what="Loading the interval" />;
  if (error) return <Notice tone="error">{error.message}</Notice>;
  const d = i.derivation;
  const canManage = viewer !== null;
  const isDrafter = viewer !== null && i.createdBy !== null && i.createdBy === viewer.userId;
  return (
    <div className="flex flex-col gap-6">
      <Card
        title={`${measureText(i.assay, i.measure)} · ${i.label}`}
        actions={<StatusTag interval={i} />}
      >
        <dl className="grid grid-cols-2 gap-x-6 gap-y-3 sm:grid-cols-4">
          <Item label="Lower limit">{num(i.lower)} {i.unit}</Item>
          <Item label="Upper limit">{num(i.upper)} {i.unit}</Item>
          <Item label="Mean ± SD">
            {num(i.mean)}
            {i.sd !== null ? ` ± ${num(i.sd)}` : ''}
          </Item>
          <Item label="n">{i.n}</Item>
          <Item label="Method">{methodNames[i.method]}</Item>
          <Item label="Age band">
            {ageText(i.ageBand)}
            {i.ageBand.label !== ageText(i.ageBand) ? ` (${i.ageBand.label})` : ''}
          </Item>
          <Item label="Effective">{periodText(i)}</Item>
          <Item label="Set">{i.setName}</Item>
          <Item label="Approved">
            {i.approvedByName ? `${i.approvedByName}, ${formatWhen(i.approvedAt!)}` : 'Not yet'}
          </Item>
          <Item label="Created">
            {i.createdByName ?? '—'}, {formatWhen(i.createdAt)}
          </Item>
          {i.status === 'retired' ? (
            <Item label="Retired">
              {i.retiredByName ?? '—'}, {formatWhen(i.retiredAt!)}: {i.retireReason}
            </Item>
          ) : null}
        </dl>
        {viewer && i.status === 'draft' ? (
          <div className="mt-4">
            <AwaitingSecondDirector viewer={viewer} drafterId={i.createdBy} drafterName={i.createdByName} draftedAt={i.createdAt} />
          </div>
        ) : null}
        {canManage && i.status !== 'retired' ? (
          panel === null ? (
            <div className="mt-5 flex gap-2 border-t border-paper-line pt-4">
              {i.status === 'draft' && mayApprove(viewer, i.createdBy) ? (
                <Button onClick={() => setPanel('approve')}>{isDrafter ? 'Approve my own draft…' : 'Approve as second director…'}</Button>
              ) : null}
              {i.status === 'draft' && (isDrafter || i.createdBy === null) ? (
                <Button variant="secondary" onClick={() => setPanel('edit')}>
                  Edit draft…
                </Button>
              ) : null}
              <Button variant="secondary" onClick={() => setPanel('retire')}>
                {i.status === 'draft' ? 'Discard draft…' : 'Retire…'}
              </Button>
            </div>
          ) : panel === 'approve' ? (
            <ApprovePanel interval={i} onClose={() => setPanel(null)} />
          ) : panel === 'edit' ? (
            <EditDraftForm interval={i} onClose={() => setPanel(null)} />
          ) : (
            <RetirePanel interval={i} onClose={() => setPanel(null)} />
          )
        ) : null}
      </Card>

      <Card title="Where it comes from">
        <p className="text-sm text-ink">{i.sourceNote}</p>
        <dl className="mt-3 grid grid-cols-1 gap-3 sm:grid-cols-2">
          {i.upload ? (
            <Item label="Control file">
              <a className="text-matrix-700 underline" href={controlFileHref(i.upload.id)} download>
                {i.upload.filename}
              </a>{' '}
              <span className="font-mono text-xs text-ink-faint">SHA-256 {i.upload.sha256.slice(0, 16)}…</span>
            </Item>
          ) : null}
          {d ? (
            <>
              <Item label="Outlier screening">{outlierNames[d.outliers]}</Item>
              <Item label="Excluded values">{d.excluded.length ? d.excluded.map(num).join(', ') : 'None'}</Item>
              <Item label="90% CI of the lower limit">{d.lowerCi ? `${num(d.lowerCi[0])} – ${num(d.lowerCi[1])}` : 'Not given by this method'}</Item>
              <Item label="90% CI of the upper limit">{d.upperCi ? `${num(d.upperCi[0])} – ${num(d.upperCi[1])}` : 'Not given by this method'}</Item>
            </>
          ) : null}
        </dl>
        {d && d.warnings.length > 0 ? (
          <div className="mt-3 flex flex-col gap-2">
            {d.warnings.map((w) => (
              <Notice key={w}>{w}</Notice>
            ))}
          </div>
        ) : null}
      </Card>

      <Card title="Versions of this interval">
        <VersionHistory id={id} />
      </Card>
    </div>
  );
}
