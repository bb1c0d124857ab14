import { useQuery } from '@tanstack/react-query';
import { useId, useMemo, useState } from 'react';
import { TraceChart } from '@/components/charts/trace-chart';
import { Button } from '@/components/ui/button';
import { SelectField, TextField } from '@/components/ui/field';
import { Notice } from '@/components/ui/layout';
import { ApiError } from '@/lib/api-client';
import { flagSummary, type RateWindow } from '@/schemas/assay';
import type { PlateGroupPreview, PlateImportPlan, PlatePreview, WorkupSpecimen } from '@/schemas/measurement';
import { MAX_PLATE_FILE_BYTES } from '@/schemas/plate';
import { useImportPlate, usePreviewPlate } from '../api/plate-import';
import { workupQueries } from '../api/workup-queries';
import { fmt, located } from '../utils/format';
import { ResultLine } from './result-line';
import { TableBox } from '@/components/ui/table-box';

type Problem = { row: number | null; column: string | null; message: string };

function GroupCard({
  group,
  onWindow,
  busy,
}: {
  group: PlateGroupPreview;
  onWindow: (w: RateWindow | null) => void;
  busy: boolean;
}) {
  const r = group.result;
  const [fromS, setFromS] = useState(r.window ? String(r.window.fromS) : '');
  const [toS, setToS] = useState(r.window ? String(r.window.toS) : '');
  const [error, setError] = useState<string | null>(null);
  const title = `Specimen ${group.specimenLabel} · ${group.assay} · replicate ${group.replicate}`;
  const wells = [`total ${group.wells.total}`, group.wells.background ? `background ${group.wells.background}` : null, group.wells.blank ? `blank ${group.wells.blank}` : null]
    .filter(Boolean)
    .join(', ');
  return (
    <section aria-label={title} className="rounded-card border border-paper-line bg-paper-raised p-3" data-testid={`group-${group.id}`}>
      <header className="mb-1 flex flex-wrap items-baseline justify-between gap-2">
        <h4 className="font-medium text-matrix-900">{title}</h4>
        <span className="text-xs text-ink-faint">Wells: {wells}</span>
      </header>
      {group.alreadySaved ? <Notice tone="error">This replicate is already saved for the specimen; saving the plate would clash. Change the map, or give the saved one another replicate number (Edit, under Saved measurements).</Notice> : null}
      <TraceChart
        label={`${title} readings`}
        height={200}
        window={r.window}
        series={[
          { name: 'total', points: group.total, fit: r.fitTotal, color: '#184a42' },
          ...(group.background ? [{ name: 'background', points: group.background, fit: r.fitBackground, color: '#b8682f' }] : []),
          ...(group.blank ? [{ name: 'blank', points: group.blank, fit: null, color: '#77817c' }] : []),
        ]}
      />
      <form
        className="mt-2 flex flex-wrap items-end gap-2"
        onSubmit={(e) => {
          e.preventDefault();
          const w = { fromS: Number(fromS), toS: Number(toS) };
          if (fromS.trim() === '' || toS.trim() === '' || !Number.isFinite(w.fromS) || !Number.isFinite(w.toS)) return setError('Give both ends of the window in seconds');
          if (!(w.toS > w.fromS)) return setError('The window must end after it starts');
          setError(null);
          onWindow(w);
        }}
      >
        <div className="w-28">
          <TextField label="From (s)" inputMode="decimal" value={fromS} onChange={(e) => setFromS(e.target.value)} error={error ?? undefined} />
        </div>
        <div className="w-28">
          <TextField label="To (s)" inputMode="decimal" value={toS} onChange={(e) => setToS(e.target.value)} />
        </div>
        <Button type="submit" variant="secondary" disabled={busy}>
          Use this window
        </Button>
        {!r.windowAuto ? (
          <Button variant="quiet" disabled={busy} onClick={() => onWindow(null)}>
            Back to automatic
          </Button>
        ) : null}
      </form>
      <div className="mt-2">
        <ResultLine result={r} compact />
      </div>
    </section>
  );
}

function Summaries({ preview }: { preview: PlatePreview }) {
  return (
    <TableBox label="Plate summary">
      <table className="w-full text-left text-sm">
        <caption className="mb-1 text-left text-sm font-medium text-ink-soft">Replicates, as the plate would save them</caption>
        <thead className="border-b border-paper-line text-ink-soft">
          <tr>
            <th className="py-1 pr-3 font-medium">Specimen</th>
            <th className="py-1 pr-3 font-medium">Assay</th>
            <th className="py-1 pr-3 font-medium">n</th>
            <th className="py-1 pr-3 font-medium">Mean</th>
            <th className="py-1 pr-3 font-medium">SD</th>
            <th className="py-1 pr-3 font-medium">CV%</th>
            <th className="py-1 pr-3 font-medium">Flags</th>
          </tr>
        </thead>
        <tbody className="num">
          {preview.summaries.map((s) => (
            <tr key={`${s.specimenId}-${s.assay}`} className="border-b border-paper-line/70">
              <td className="py-1 pr-3">{s.specimenLabel}</td>
              <td className="py-1 pr-3">{s.assay}</td>
              <td className="py-1 pr-3">{s.n}</td>
              <td className="py-1 pr-3">{fmt(s.mean)}</td>
              <td className="py-1 pr-3">{fmt(s.sd, 3)}</td>
              <td className="py-1 pr-3">{fmt(s.cvPct, 3)}</td>
              <td className="py-1 pr-3 text-xs text-caution" title={s.flags.map((f) => f.message).join('\n')}>{flagSummary(s.flags)}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </TableBox>
  );
}

/**
 * A plate-reader export read with a saved plate layout: every group plotted with its fitted window, each window
 * movable (recomputed on the server, nothing stored), the results beside them, and only then saved.
 */
export function PlateImport({ caseId, specimens }: { caseId: number; specimens: WorkupSpecimen[] }) {
  const fileId = useId();
  const { data: layouts = [] } = useQuery(workupQueries.plateLayouts());
  const [file, setFile] = useState<File | null>(null);
  const [layoutId, setLayoutId] = useState<number | null>(null);
  const [binding, setBinding] = useState<Record<string, number>>({});
  const [pathMode, setPathMode] = useState<'fill' | 'given'>('fill');
  const [fillUl, setFillUl] = useState('200');
  const [areaCm2, setAreaCm2] = useState('0.32');
  const [givenCm, setGivenCm] = useState('0.6');
  const [reaction, setReaction] = useState('200');
  const [sample, setSample] = useState('10');
  const [windows, setWindows] = useState<Record<string, RateWindow>>({});
  const [preview, setPreview] = useState<PlatePreview | null>(null);
  const [problems, setProblems] = useState<Problem[]>([]);
  const [message, setMessage] = useState<{ tone: 'error' | 'success'; text: string } | null>(null);
  const read = usePreviewPlate(caseId);
  const save = useImportPlate(caseId);

  const layout = layouts.find((l) => l.id === layoutId) ?? null;
  const refs = useMemo(() => [...new Set((layout?.wells ?? []).map((w) => w.specimenRef))], [layout]);
  const accepted = specimens.filter((s) => s.accepted);
  const boundFor = (ref: string) =>
    binding[ref] ?? accepted.find((s) => s.label.toLowerCase() === ref.toLowerCase())?.id ?? (refs.length === 1 && accepted.length === 1 ? accepted[0]!.id : undefined);

  function plan(w: Record<string, RateWindow> = windows): PlateImportPlan {
    const specimensByRef: Record<string, number> = {};
    for (const ref of refs) {
      const id = boundFor(ref);
      if (id !== undefined) specimensByRef[ref] = id;
    }
    return {
      plateMapId: layoutId,
      wells: null,
      specimens: specimensByRef,
      pathlength: pathMode === 'fill' ? { mode: 'fill', volumeUl: Number(fillUl), wellAreaCm2: Number(areaCm2) } : { mode: 'given', cm: Number(givenCm) },
      reactionVolumeUl: Number(reaction),
      sampleVolumeUl: Number(sample),
      windows: w,
    };
  }

  const fail = (err: unknown) => {
    if (err instanceof ApiError) {
      setProblems(err.issues.length ? err.issues : Object.entries(err.fields).map(([k, v]) => ({ row: null, column: null, message: `${k}: ${v}` })));
      setMessage({ tone: 'error', text: err.message });
    } else setMessage({ tone: 'error', text: 'The file could not be read' });
  };

  function readFile(w: Record<string, RateWindow> = windows) {
    if (!file || layoutId === null) {
      setMessage({ tone: 'error', text: !file ? 'Choose the plate file first.' : 'Choose the plate layout the file was read with.' });
      return;
    }
    setMessage(null);
    setProblems([]);
    read.mutate(
      { file, plan: plan(w) },
      {
        onSuccess: setPreview,
        onError: (err) => {
          setPreview(null);
          fail(err);
        },
      },
    );
  }

  const moveWindow = (groupId: string, w: RateWindow | null) => {
    const next = { ...windows };
    if (w) next[groupId] = w;
    else delete next[groupId];
    setWindows(next);
    readFile(next);
  };

  return (
    <div className="flex flex-col gap-4">
      <div className="grid gap-3 md:grid-cols-2">
        <div className="flex flex-col gap-1">
          <label htmlFor={fileId} className="text-sm font-medium text-ink-soft">
            Plate file (CSV or tab-separated text)
          </label>
          <input
            id={fileId}
            type="file"
            accept=".csv,.tsv,.txt,text/csv,text/plain,text/tab-separated-values"
            className="text-sm"
            onChange={(e) => {
              const f = e.target.files?.[0] ?? null;
              setPreview(null);
              setWindows({});
              setProblems([]);
              if (f && f.size > MAX_PLATE_FILE_BYTES) {
                setFile(null);
                setMessage({ tone: 'error', text: `The file is ${(f.size / 1048576).toFixed(2)} MiB; the largest accepted is 2 MiB.` });
              } else {
                setFile(f);
                setMessage(null);
              }
            }}
          />
          <p className="text-xs text-ink-faint">Time in seconds in the first column, one column per well (see the plate file layout in the documentation).</p>
        </div>
        <SelectField
          label="Plate layout"
          value={layoutId === null ? '' : String(layoutId)}
          onChange={(e) => {
            setLayoutId(e.target.value === '' ? null : Number(e.target.value));
            setPreview(null);
            setWindows({});
          }}
          options={[{ value: '', label: layouts.length ? 'Choose a saved layout…' : 'No saved layout yet — make one under Plate layouts' }, ...layouts.map((l) => ({ value: String(l.id), label: `${l.name} (${new Set(l.wells.map((w) => w.well)).size} wells)` }))]}
          hint={layout?.description || undefined}
        />
      </div>
      {refs.length > 0 ? (
        <fieldset className="grid gap-3 sm:grid-cols-3">
          <legend className="mb-1 text-sm font-medium text-ink-soft">Which specimen each label of the layout stands for</legend>
          {refs.map((ref) => (
            <SelectField
              key={ref}
              label={`Label “${ref}”`}
              value={String(boundFor(ref) ?? '')}
              onChange={(e) => setBinding({ ...binding, [ref]: Number(e.target.value) })}
              options={[{ value: '', label: 'Choose…' }, ...accepted.map((s) => ({ value: String(s.id), label: `Specimen ${s.label}${s.proteinMgPerMl === null ? ' (no protein yet)' : ''}` }))]}
            />
          ))}
        </fieldset>
      ) : null}
      <div className="grid gap-3 sm:grid-cols-3 lg:grid-cols-6">
        <SelectField
          label="Pathlength"
          value={pathMode}
          onChange={(e) => setPathMode(e.target.value as 'fill' | 'given')}
          options={[
            { value: 'fill', label: 'From the fill volume' },
            { value: 'given', label: 'Measured (cm)' },
          ]}
        />
        {pathMode === 'fill' ? (
          <>
            <TextField label="Fill volume (µL)" inputMode="decimal" value={fillUl} onChange={(e) => setFillUl(e.target.value)} />
            <TextField label="Well area (cm²)" inputMode="decimal" value={areaCm2} onChange={(e) => setAreaCm2(e.target.value)} />
          </>
        ) : (
          <TextField label="Pathlength (cm)" inputMode="decimal" value={givenCm} onChange={(e) => setGivenCm(e.target.value)} />
        )}
        <TextField label="Reaction volume (µL)" inputMode="decimal" value={reaction} onChange={(e) => setReaction(e.target.value)} />
        <TextField label="Sample volume (µL)" inputMode="decimal" value={sample} onChange={(e) => setSample(e.target.value)} />
      </div>
      <div className="flex gap-2">
        <Button variant="secondary" disabled={read.isPending} onClick={() => readFile()}>
          {read.isPending ? 'Reading…' : 'Read the file'}
        </Button>
        {preview ? (
          <Button
            disabled={save.isPending || preview.groups.some((g) => g.alreadySaved)}
            onClick={() =>
              file &&
              save.mutate(
                { file, plan: plan() },
                {
                  onSuccess: (r) => {
                    setMessage({ tone: 'success', text: `Saved ${r.measurementIds.length} measurements from ${r.upload.filename}; the file is kept with the case.` });
                    setPreview(null);
                    setWindows({});
                  },
                  onError: fail,
                },
              )
            }
          >
            {save.isPending ? 'Saving…' : `Save ${preview.groups.length} measurements`}
          </Button>
        ) : null}
      </div>
      {message ? <Notice tone={message.tone}>{message.text}</Notice> : null}
      {problems.length > 0 ? (
        <ul aria-label="Problems in the file" className="flex flex-col gap-1 text-sm text-below">
          {problems.map((p, i) => (
            <li key={i}>{located(p.row, p.column, p.message)}</li>
          ))}
        </ul>
      ) : null}
      {preview ? (
        <div className="flex flex-col gap-4">
          <p className="text-sm text-ink-soft">
            {preview.filename} · {preview.groups.length} well groups · pathlength {fmt(preview.pathlengthCm)} cm
            {preview.wavelengthNm ? ` · ${preview.wavelengthNm} nm` : ''} · SHA-256 <span className="font-mono text-xs">{preview.sha256.slice(0, 12)}…</span>
          </p>
          {preview.warnings.length > 0 ? (
            <details className="text-sm text-ink-soft">
              <summary>{preview.warnings.length} wells in the file are not in the layout and are not used</summary>
              <ul className="mt-1 text-xs">
                {preview.warnings.map((w, i) => (
                  <li key={i}>{w.message}</li>
                ))}
              </ul>
            </details>
          ) : null}
          <Summaries preview={preview} />
          <div className="grid gap-3 xl:grid-cols-2">
            {preview.groups.map((g) => (
              <GroupCard key={`${g.id}:${g.result.window?.fromS}:${g.result.window?.toS}`} group={g} busy={read.isPending} onWindow={(w) => moveWindow(g.id, w)} />
            ))}
          </div>
        </div>
      ) : null}
    </div>
  );
}
