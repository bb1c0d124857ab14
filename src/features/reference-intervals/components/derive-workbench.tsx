import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { SelectField, TextField } from '@/components/ui/field';
import { Card, Loading, Notice } from '@/components/ui/layout';
import { specimenTypeLabels, type AssayCode, type Measure, type SpecimenType } from '@/schemas/common';
import { intervalMethods, outlierRules, type IntervalMethod, type OutlierRule } from '@/schemas/reference-interval';
import type { ControlSelection, ControlUploadDetail } from '@/schemas/reference-interval-api';
import { intervalQueries } from '../api/interval-queries';
import { ControlFilePicker } from './control-file-picker';
import { DerivationPanel } from './derivation-panel';
import { ageText, measureNames, methodHints, methodNames, num, outlierNames } from './interval-text';
import { SaveDraftForm } from './save-draft-form';
import { TableBox } from '@/components/ui/table-box';

type Target = { specimenType: SpecimenType; assay: AssayCode; measure: Measure };

function firstTarget(file: ControlUploadDetail): Target | null {
  const s = file.data.series[0];
  return s ? { specimenType: s.specimenType, assay: s.assay, measure: s.measure } : null;
}

function readBand(from: string, to: string): { band: { minYears: number; maxYears: number | null } | null; error: string | null } {
  const min = from.trim() === '' ? 0 : Number(from);
  const max = to.trim() === '' ? null : Number(to);
  if (!Number.isFinite(min) || min < 0) return { band: null, error: 'The lower age must be 0 or more' };
  if (max !== null && (!Number.isFinite(max) || max <= min)) return { band: null, error: 'The upper age must be greater than the lower age' };
  return { band: { minYears: min, maxYears: max }, error: null };
}

function PartitionNote({ uploadId, selection, enabled }: { uploadId: number; selection: ControlSelection; enabled: boolean }) {
  // Same key as the first method's panel, so this reuses its answer rather than asking again.
  const { data } = useQuery({ ...intervalQueries.preview(uploadId, selection), enabled });
  if (!data) return null;
  const p = data.partition;
  return (
    <Card title="Should the age groups have separate intervals?">
      {p ? (
        <div className="flex flex-col gap-2 text-sm">
          <Notice tone={p.decision === 'partition' ? 'info' : 'success'}>
            <strong className="font-semibold">{p.decision === 'partition' ? 'Partition: ' : 'One interval will do: '}</strong>
            {p.reason}
          </Notice>
          <TableBox label="Age groups">
            <table className="num w-full max-w-xl text-left text-sm">
              <thead className="text-xs text-ink-faint">
                <tr>
                  <th className="py-1 pr-3 font-medium">Group</th>
                  <th className="py-1 pr-3 font-medium">n</th>
                  <th className="py-1 pr-3 font-medium">Mean</th>
                  <th className="py-1 font-medium">SD</th>
                </tr>
              </thead>
              <tbody>
                {p.groups.map((g) => (
                  <tr key={g.label} className="border-t border-paper-line/60">
                    <td className="py-1 pr-3">{g.label}</td>
                    <td className="py-1 pr-3">{g.n}</td>
                    <td className="py-1 pr-3">{num(g.mean)}</td>
                    <td className="py-1">{num(g.sd)}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </TableBox>
          <p className="text-xs text-ink-faint">
            Harris &amp; Boyd (Clin Chem 1990;36:265–270): separate intervals when z = {num(p.z)} exceeds 3·√((n₁+n₂)/240) = {num(p.zCritical)}, or when one
            SD is more than {p.sdRatioLimit} times the other (here {num(p.sdRatio)}). {data.partitionNote}
          </p>
        </div>
      ) : (
        <p className="text-sm text-ink-soft">{data.partitionNote}</p>
      )}
    </Card>
  );
}

/** Upload or pick control data, choose what to derive, compare two methods side by side, save one as a draft. */
export function DeriveWorkbench() {
  const [uploadId, setUploadId] = useState<number | null>(null);
  const [target, setTarget] = useState<Target | null>(null);
  const [ageFrom, setAgeFrom] = useState('0');
  const [ageTo, setAgeTo] = useState('');
  const [outliers, setOutliers] = useState<OutlierRule>('tukey');
  const [methods, setMethods] = useState<[IntervalMethod, IntervalMethod]>(['nonparametric', 'robust']);
  const [saving, setSaving] = useState<0 | 1 | null>(null);
  const file = useQuery({ ...intervalQueries.controlFile(uploadId ?? 0), enabled: uploadId !== null });

  const data = file.data?.data;
  const current = target ?? (file.data ? firstTarget(file.data) : null);
  const series = data && current ? data.series.find((s) => s.specimenType === current.specimenType && s.assay === current.assay && s.measure === current.measure) : undefined;
  const { band, error: bandError } = readBand(ageFrom, ageTo);
  const inBand = series && band ? series.points.filter((p) => p.ageYears >= band.minYears && (band.maxYears === null || p.ageYears < band.maxYears)).length : 0;
  const ready = uploadId !== null && current !== null && series !== undefined && band !== null;
  const selectionFor = (method: IntervalMethod): ControlSelection | null =>
    ready && current && band ? { ...current, ageBand: { label: ageText(band), ...band }, method, outliers } : null;
  const selections = [selectionFor(methods[0]), selectionFor(methods[1])] as const;

  const choose = (patch: Partial<Target>) => {
    if (!data || !current) return;
    const next = { ...current, ...patch };
    // Keep the choice valid: fall back to a series the file has.
    const ok = data.series.some((s) => s.specimenType === next.specimenType && s.assay === next.assay && s.measure === next.measure);
    const fallback = data.series.find((s) => s.specimenType === next.specimenType && s.assay === next.assay) ?? data.series.find((s) => s.specimenType === next.specimenType);
    setTarget(ok ? next : fallback ? { specimenType: fallback.specimenType, assay: fallback.assay, measure: fallback.measure } : current);
    setSaving(null);
  };

  const assaysHere = data && current ? [...new Set(data.series.filter((s) => s.specimenType === current.specimenType).map((s) => s.assay))] : [];
  const measuresHere = data && current ? data.series.filter((s) => s.specimenType === current.specimenType && s.assay === current.assay).map((s) => s.measure) : [];
  const suggestedName = current ? `${specimenTypeLabels[current.specimenType]} ${new Date().getFullYear()} (derived from ${data?.rowCount ?? 0} controls)` : '';

  return (
    <div className="flex flex-col gap-6">
      <Card title="1 · Control data">
        <ControlFilePicker
          selected={uploadId}
          onSelect={(id) => {
            setUploadId(id);
            setTarget(null);
            setSaving(null);
          }}
        />
        {file.isPending && uploadId !== null ? <Loading what="Reading the file" /> : null}
        {file.error ? <Notice tone="error">{file.error.message}</Notice> : null}
        {data ? (
          <div className="mt-4 flex flex-col gap-2 border-t border-paper-line pt-3 text-sm text-ink-soft">
            <p>
              <span className="font-medium text-ink">{data.rowCount} control subjects</span> ·{' '}
              {data.specimenTypes.map((t) => specimenTypeLabels[t]).join(', ')} · assays {data.assays.join(', ')} · unit{' '}
              {data.unit ?? 'not stated'}
            </p>
            {data.warnings.map((w) => (
              <Notice key={w}>{w}</Notice>
            ))}
          </div>
        ) : null}
      </Card>

      {data && current ? (
        <Card title="2 · What to derive">
          <div className="grid gap-3 sm:grid-cols-3 lg:grid-cols-6">
            <SelectField label="Specimen type" value={current.specimenType} onChange={(e) => choose({ specimenType: e.target.value as SpecimenType })}
              options={data.specimenTypes.map((t) => ({ value: t, label: specimenTypeLabels[t] }))} />
            <SelectField label="Assay" value={current.assay} onChange={(e) => choose({ assay: e.target.value as AssayCode })}
              options={assaysHere.map((a) => ({ value: a, label: a }))} />
            <SelectField label="Measure" value={current.measure} onChange={(e) => choose({ measure: e.target.value as Measure })}
              options={measuresHere.map((m) => ({ value: m, label: measureNames[m] }))} />
            <TextField label="From age (years)" type="number" min={0} step="any" value={ageFrom} onChange={(e) => setAgeFrom(e.target.value)} error={bandError?.startsWith('The lower') ? bandError : undefined} />
            <TextField label="To age (not included)" type="number" min={0} step="any" placeholder="no limit" value={ageTo} onChange={(e) => setAgeTo(e.target.value)}
              error={bandError?.startsWith('The upper') ? bandError : undefined} />
            <div className="flex flex-col justify-end pb-1 text-sm">
              <span className="text-ink-faint">In this band</span>
              <span className="num font-semibold text-ink" data-testid="band-count">{inBand} values</span>
            </div>
          </div>
        </Card>
      ) : null}

      {ready && uploadId !== null ? (
        <>
          <Card title="3 · Methods, side by side">
            <div className="grid gap-3 sm:grid-cols-3">
              <SelectField label="Outlier screening (both methods)" value={outliers} onChange={(e) => { setOutliers(e.target.value as OutlierRule); setSaving(null); }}
                options={outlierRules.map((r) => ({ value: r, label: outlierNames[r] }))} />
              {([0, 1] as const).map((k) => (
                <SelectField key={k} label={k === 0 ? 'Method A' : 'Method B'} value={methods[k]} hint={methodHints[methods[k]]}
                  onChange={(e) => {
                    const next: [IntervalMethod, IntervalMethod] = [...methods];
                    next[k] = e.target.value as IntervalMethod;
                    setMethods(next);
                    setSaving(null);
                  }}
                  options={intervalMethods.map((m) => ({ value: m, label: methodNames[m] }))} />
              ))}
            </div>
            <div className="mt-4 grid gap-4 xl:grid-cols-2">
              {([0, 1] as const).map((k) => {
                const s = selections[k];
                return s ? (
                  <DerivationPanel key={k} uploadId={uploadId} selection={s} enabled={ready} title={k === 0 ? 'A' : 'B'} onSave={() => setSaving(k)} />
                ) : null;
              })}
            </div>
            {saving !== null && selections[saving] ? (
              <div className="mt-4">
                <SaveDraftForm key={`${saving}-${methods[saving]}`} uploadId={uploadId} selection={selections[saving]} suggestedName={suggestedName} title={saving === 0 ? 'A' : 'B'} onCancel={() => setSaving(null)} />
              </div>
            ) : null}
          </Card>
          {selections[0] ? <PartitionNote uploadId={uploadId} selection={selections[0]} enabled={ready} /> : null}
        </>
      ) : null}
    </div>
  );
}
