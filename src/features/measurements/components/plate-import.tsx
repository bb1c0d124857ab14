import { useQuery } from '@tanstack/react-query';
import { useMemo, useRef, useState } from 'react';
import { PlateFileField } from '@/components/plate/plate-file-field';
import { conditionsPlan, defaultReadingConditions, ReadingConditionsFields, type ReadingConditions } from '@/components/plate/reading-conditions';
import { ReplicateSummaries } from '@/components/plate/replicate-summaries';
import { WindowedGroupCard } from '@/components/plate/windowed-group';
import { Button } from '@/components/ui/button';
import { SelectField } from '@/components/ui/field';
import { Notice } from '@/components/ui/layout';
import { ApiError } from '@/lib/api-client';
import type { RateWindow } from '@/schemas/assay';
import type { PlateImportPlan, PlatePreview, WorkupSpecimen } from '@/schemas/measurement';
import { useImportPlate, usePreviewPlate } from '../api/plate-import';
import { useRefreshWorkup } from '../api/save-measurement';
import { workupQueries } from '../api/workup-queries';
import { fmt, located } from '../utils/format';

type Problem = { row: number | null; column: string | null; message: string };

const savedClash = (
  <Notice tone="error">This replicate is already saved for the specimen; saving the plate would clash. Change the map, or give the saved one another replicate number (Edit, under Saved measurements).</Notice>
);

/**
 * A plate-reader export read with a saved plate layout: every group plotted with its fitted window, each window
 * movable (recomputed on the server, nothing stored), the results beside them, and only then saved.
 */
export function PlateImport({ caseId, specimens }: { caseId: number; specimens: WorkupSpecimen[] }) {
  const { data: layouts = [] } = useQuery(workupQueries.plateLayouts());
  const [file, setFile] = useState<File | null>(null);
  const [layoutId, setLayoutId] = useState<number | null>(null);
  const [binding, setBinding] = useState<Record<string, number>>({});
  const [conditions, setConditions] = useState<ReadingConditions>(defaultReadingConditions);
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
      ...conditionsPlan(conditions),
      windows: w,
    };
  }

  // A field named after a well group ("groups.<id>") reads as the group's own title, never the raw key.
  const fieldName = (key: string) => {
    const group = preview?.groups.find((g) => `groups.${g.id}` === key);
    return group ? `Specimen ${group.specimenLabel} · ${group.assay} · replicate ${group.replicate}` : key.replace(/^groups\./, '').replace(/\|/g, ' · ');
  };
  const fail = (err: unknown) => {
    if (err instanceof ApiError) {
      const fields = Object.entries(err.fields);
      // One clash is said once: the message already names it.
      const extra = fields.length === 1 && fields[0]![1] === err.message ? [] : fields.map(([k, v]) => ({ row: null, column: null, message: `${fieldName(k)}: ${v}` }));
      setProblems(err.issues.length ? err.issues : extra);
      setMessage({ tone: 'error', text: err.message });
    } else setMessage({ tone: 'error', text: 'The file could not be read' });
  };
  const saving = useRef(false);
  const refresh = useRefreshWorkup(caseId);

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
        <PlateFileField
          onFile={(f, problem) => {
            setPreview(null);
            setWindows({});
            setProblems([]);
            setFile(f);
            setMessage(problem ? { tone: 'error', text: problem } : null);
          }}
        />
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
      <ReadingConditionsFields value={conditions} onChange={setConditions} />
      <div className="flex gap-2">
        <Button variant="secondary" disabled={read.isPending} onClick={() => readFile()}>
          {read.isPending ? 'Reading…' : 'Read the file'}
        </Button>
        {preview ? (
          <Button
            disabled={save.isPending || preview.groups.some((g) => g.alreadySaved)}
            onClick={() => {
              // A double click sends one save: the button's disabled state comes a tick after the first click.
              if (!file || saving.current) return;
              saving.current = true;
              setMessage(null);
              save.mutate(
                { file, plan: plan() },
                {
                  onSettled: () => {
                    saving.current = false;
                  },
                  onSuccess: (r) => {
                    setMessage({ tone: 'success', text: `Saved ${r.measurementIds.length} measurements from ${r.upload.filename}; the file is kept with the case.` });
                    setPreview(null);
                    setWindows({});
                  },
                  onError: (err) => {
                    fail(err);
                    // A clash may mean this plate was saved a moment ago: show what is stored now.
                    if (err instanceof ApiError && err.code === 'CONFLICT') {
                      setMessage({ tone: 'error', text: `${err.message}. Nothing from this file was saved twice; Saved measurements below shows what is stored.` });
                      void refresh();
                    }
                  },
                },
              );
            }}
          >
            {save.isPending ? 'Saving…' : `Save ${preview.groups.length} measurements`}
          </Button>
        ) : null}
      </div>
      {message ? (
        <Notice tone={message.tone} focus>
          {message.text}
        </Notice>
      ) : null}
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
          <ReplicateSummaries rows={preview.summaries} />
          <div className="grid gap-3 xl:grid-cols-2">
            {preview.groups.map((g) => (
              <WindowedGroupCard
                key={`${g.id}:${g.result.window?.fromS}:${g.result.window?.toS}`}
                group={{ ...g, title: `Specimen ${g.specimenLabel} · ${g.assay} · replicate ${g.replicate}` }}
                testId={`group-${g.id}`}
                notice={g.alreadySaved ? savedClash : null}
                busy={read.isPending}
                onWindow={(w) => moveWindow(g.id, w)}
              />
            ))}
          </div>
        </div>
      ) : null}
    </div>
  );
}
