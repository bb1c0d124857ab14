import { useQuery } from '@tanstack/react-query';
import { useMemo, useState } from 'react';
import { Link } from 'react-router-dom';
import { PlateFileField } from '@/components/plate/plate-file-field';
import { conditionsPlan, defaultReadingConditions, ReadingConditionsFields, type ReadingConditions } from '@/components/plate/reading-conditions';
import { ReplicateSummaries } from '@/components/plate/replicate-summaries';
import { WindowedGroupCard } from '@/components/plate/windowed-group';
import { Button } from '@/components/ui/button';
import { SelectField, TextField } from '@/components/ui/field';
import { Card, Notice } from '@/components/ui/layout';
import { paths } from '@/config/paths';
import { ApiError } from '@/lib/api-client';
import type { RateWindow } from '@/schemas/assay';
import { plateFormats } from '@/schemas/plate';
import { runPlanSchema, runQcStatusLabels, type RunGroupPreview, type RunImportResult, type RunPlan, type RunPreview, type RunWell } from '@/schemas/run';
import { fmt, located } from '@/utils/format';
import { locateWell, type PlateFormat } from '@/utils/plate-grid';
import { usePreviewRun, useSaveRun } from '../api/run-import';
import { runQueries } from '../api/run-queries';
import { nameProblem, ownerKeys, wellIndexOf, type OwnerNames } from '../utils/run-layout';
import { ControlTable } from './control-table';
import { LayoutEditor, materialOption } from './layout-editor';
import { QcStatusBadge, ViolationList } from './qc-status';

type Problem = { row: number | null; column: string | null; message: string };

/** The browser's wall clock now, as a datetime-local value. */
function nowLocal(): string {
  const d = new Date();
  return new Date(d.getTime() - d.getTimezoneOffset() * 60_000).toISOString().slice(0, 16);
}

function groupTitle(g: RunGroupPreview): string {
  const who = g.use === 'specimen' ? `${g.accession ?? 'case'} · specimen ${g.specimenLabel ?? g.specimenId}` : `Control ${g.controlLabel ?? g.controlMaterialId}`;
  return `${who} · ${g.assay} · replicate ${g.replicate}`;
}

/** Server field messages in the user's words: "wells.3.role" names the well and group, other keys the field. */
function fieldProblems(fields: Record<string, string>, wells: RunWell[], names: OwnerNames): Problem[] {
  return Object.entries(fields).map(([key, message]) => {
    const i = wellIndexOf(key);
    const well = i === null ? null : (wells[i]?.well ?? null);
    return { row: null, column: null, message: i === null ? `${key}: ${message}` : nameProblem(message, well, names) };
  });
}

function PreviewView({
  preview,
  busy,
  onWindow,
  materialName,
}: {
  preview: RunPreview;
  busy: boolean;
  onWindow: (id: string, w: RateWindow | null) => void;
  materialName: (id: number) => string;
}) {
  const specimenGroups = preview.groups.filter((g) => g.use === 'specimen');
  const controlGroups = preview.groups.filter((g) => g.use === 'control');
  const card = (g: RunGroupPreview) => (
    <WindowedGroupCard
      key={`${g.id}:${g.result.window?.fromS}:${g.result.window?.toS}`}
      group={{ ...g, title: groupTitle(g) }}
      testId={`run-group-${g.id}`}
      notice={g.alreadySaved ? <Notice tone="error">This replicate is already saved for the specimen; the run would be refused. Give this group another replicate number in the layout.</Notice> : null}
      busy={busy}
      onWindow={(w) => onWindow(g.id, w)}
    />
  );
  return (
    <div className="flex flex-col gap-4" data-testid="run-preview">
      <p className="text-sm text-ink-soft">
        {preview.filename} · {preview.plateFormat} wells · {preview.groups.length} well groups · pathlength {fmt(preview.pathlengthCm)} cm
        {preview.wavelengthNm ? ` · ${preview.wavelengthNm} nm` : ''} · SHA-256 <span className="font-mono text-xs">{preview.sha256.slice(0, 12)}…</span>
      </p>
      {preview.warnings.length > 0 ? (
        <details className="text-sm text-ink-soft">
          <summary>{preview.warnings.length} remarks (wells in the file the layout does not use, and the like)</summary>
          <ul className="mt-1 text-xs">
            {preview.warnings.map((w, i) => (
              <li key={i}>{located(w.row, w.column, w.message)}</li>
            ))}
          </ul>
        </details>
      ) : null}
      <section aria-label="Quality control of this run (provisional)" className="flex flex-col gap-2 rounded-card border border-paper-line bg-paper-raised p-3" data-testid="run-qc-preview">
        <h3 className="flex flex-wrap items-center gap-2 font-medium text-matrix-900">
          Quality control, provisional: <QcStatusBadge status={preview.qc.status} />
        </h3>
        <p className="text-xs text-ink-faint">Judged against the approved targets and the laboratory’s earlier runs; it is evaluated again when the run is saved.</p>
        <ViolationList violations={preview.qc.violations} materialName={materialName} />
        <ControlTable controls={preview.controls} caption="Control values on this plate" />
      </section>
      <ReplicateSummaries rows={preview.summaries} caseCell={(s) => s.accession} />
      {controlGroups.length ? (
        <>
          <h3 className="font-medium text-matrix-900">Control wells</h3>
          <div className="grid gap-3 xl:grid-cols-2">{controlGroups.map(card)}</div>
        </>
      ) : null}
      <h3 className="font-medium text-matrix-900">Specimen wells</h3>
      <div className="grid gap-3 xl:grid-cols-2">{specimenGroups.map(card)}</div>
    </div>
  );
}

/**
 * A new analytical run: instrument, time and plate size, the layout (specimens of any open case, control
 * materials, blanks), the plate file, a preview of every group with window editing and the provisional QC, then
 * one save of everything (or nothing).
 */
export function NewRun() {
  const { data: specimens = [] } = useQuery(runQueries.openSpecimens());
  const { data: materials = [] } = useQuery(runQueries.controlMaterials());
  const [instrument, setInstrument] = useState('');
  const [startedAt, setStartedAt] = useState(nowLocal);
  const [format, setFormat] = useState<PlateFormat>(96);
  const [wells, setWells] = useState<RunWell[]>([]);
  const [file, setFile] = useState<File | null>(null);
  const [conditions, setConditions] = useState<ReadingConditions>(defaultReadingConditions);
  const [controlProtein, setControlProtein] = useState<Record<string, string>>({});
  const [windows, setWindows] = useState<Record<string, RateWindow>>({});
  const [preview, setPreview] = useState<RunPreview | null>(null);
  const [problems, setProblems] = useState<Problem[]>([]);
  const [fields, setFields] = useState<Record<string, string>>({});
  const [message, setMessage] = useState<{ tone: 'error' | 'success' | 'info'; text: string } | null>(null);
  const [saved, setSaved] = useState<RunImportResult | null>(null);
  const read = usePreviewRun();
  const save = useSaveRun();

  const names = useMemo(
    () =>
      ownerKeys(wells, (owner) => {
        const [kind, id] = owner.split(':') as [string, string];
        if (kind === 'specimen') {
          const s = specimens.find((x) => x.specimenId === Number(id));
          return s ? `${s.accession} specimen ${s.label} (${s.patientName})` : `specimen ${id}`;
        }
        const m = materials.find((x) => x.id === Number(id));
        return m ? materialOption(m) : `control material ${id}`;
      }),
    [wells, specimens, materials],
  );
  const materialName = (id: number) => {
    const m = materials.find((x) => x.id === id);
    return m ? `${m.name} ${m.level} (lot ${m.lot})` : `control material ${id}`;
  };

  const usedMaterials = [...new Set(wells.flatMap((x) => (x.use === 'control' ? [x.controlMaterialId] : [])))];
  const plan = (w: Record<string, RateWindow> = windows): RunPlan => ({
    instrument,
    startedAt,
    plateFormat: format,
    wells,
    ...conditionsPlan(conditions),
    controlProteinMgPerMl: Object.fromEntries(usedMaterials.map((id) => [String(id), Number(controlProtein[id] ?? '')])),
    windows: w,
  });
  const checked = runPlanSchema.safeParse(plan());
  const layoutProblems =
    wells.length === 0 || checked.success
      ? []
      : checked.error.issues
          .filter((i) => i.path[0] === 'wells')
          .map((i) => {
            const at = wellIndexOf(i.path);
            return nameProblem(i.message, at === null ? null : (wells[at]?.well ?? null), names);
          });

  const stale = () => {
    setPreview(null);
    setSaved(null);
  };
  const changeWells = (next: RunWell[]) => {
    setWells(next);
    setWindows({});
    stale();
  };
  const changeFormat = (next: PlateFormat) => {
    const kept = wells.filter((w) => locateWell(w.well, next) !== null);
    setFormat(next);
    changeWells(kept);
    const dropped = new Set(wells.map((w) => w.well)).size - new Set(kept.map((w) => w.well)).size;
    setMessage(dropped > 0 ? { tone: 'info', text: `${dropped} wells are not on a ${next}-well plate and were taken off the layout.` } : null);
  };

  const fail = (err: unknown) => {
    if (err instanceof ApiError) {
      // The server names plan fields as "plan.<field>"; the form's fields are the plan's own.
      const named = Object.fromEntries(Object.entries(err.fields).map(([k, v]) => [k.replace(/^plan\./, ''), v]));
      setFields(named);
      setProblems(err.issues.length ? err.issues : fieldProblems(named, wells, names));
      setMessage({ tone: 'error', text: err.message });
    } else setMessage({ tone: 'error', text: 'The server could not be reached; nothing was saved.' });
  };

  function readFile(w: Record<string, RateWindow> = windows) {
    setSaved(null);
    if (!file) return setMessage({ tone: 'error', text: 'Choose the plate file first.' });
    const local = runPlanSchema.safeParse(plan(w));
    if (!local.success) {
      const f: Record<string, string> = {};
      for (const i of local.error.issues) f[i.path.join('.')] ??= i.message;
      setFields(f);
      setProblems([]);
      return setMessage({ tone: 'error', text: 'Some details of the run need attention (see the marked fields and the layout problems).' });
    }
    setMessage(null);
    setProblems([]);
    setFields({});
    read.mutate({ file, plan: plan(w) }, { onSuccess: setPreview, onError: (err) => (setPreview(null), fail(err)) });
  }

  const moveWindow = (id: string, w: RateWindow | null) => {
    const next = { ...windows };
    if (w) next[id] = w;
    else delete next[id];
    setWindows(next);
    readFile(next);
  };

  const saveRun = () => {
    if (!file || !preview) return;
    save.mutate(
      { file, plan: plan() },
      {
        onSuccess: (r) => {
          setSaved(r);
          setPreview(null);
          setMessage(null);
        },
        onError: fail,
      },
    );
  };

  return (
    <div className="flex flex-col gap-5">
      <Card title="The run">
        <div className="grid gap-3 sm:grid-cols-3">
          <TextField label="Instrument" value={instrument} onChange={(e) => (setInstrument(e.target.value), stale())} error={fields.instrument} placeholder="e.g. Plate reader 2, bench 4" />
          <TextField label="Read at (date and time)" type="datetime-local" value={startedAt} onChange={(e) => (setStartedAt(e.target.value), stale())} error={fields.startedAt} />
          <SelectField
            label="Plate size"
            value={String(format)}
            onChange={(e) => changeFormat(Number(e.target.value) as PlateFormat)}
            options={plateFormats.map((f) => ({ value: String(f), label: `${f} wells` }))}
            error={fields.plateFormat}
          />
        </div>
      </Card>
      <Card title="Layout">
        <LayoutEditor format={format} wells={wells} onChange={changeWells} specimens={specimens} materials={materials} names={names} problems={layoutProblems} />
      </Card>
      <Card title="Plate file and reading conditions">
        <div className="flex flex-col gap-4">
          <PlateFileField
            onFile={(f, problem) => {
              setFile(f);
              setWindows({});
              setProblems([]);
              stale();
              setMessage(problem ? { tone: 'error', text: problem } : null);
            }}
            hint="Time in seconds in the first column, one column per well of the plate (A1 up to the plate's last well)."
          />
          <ReadingConditionsFields value={conditions} onChange={(c) => (setConditions(c), stale())} errors={fields} />
          {usedMaterials.length ? (
            <fieldset className="grid gap-3 sm:grid-cols-3">
              <legend className="mb-1 text-sm font-medium text-ink-soft">Protein of each control homogenate as pipetted on this plate</legend>
              {usedMaterials.map((id) => (
                <TextField
                  key={id}
                  label={`${materialName(id)} protein (mg/mL)`}
                  inputMode="decimal"
                  value={controlProtein[id] ?? ''}
                  onChange={(e) => (setControlProtein({ ...controlProtein, [id]: e.target.value }), stale())}
                  error={fields[`controlProteinMgPerMl.${id}`]}
                />
              ))}
            </fieldset>
          ) : null}
          <div className="flex flex-wrap items-center gap-2">
            <Button variant="secondary" disabled={read.isPending} onClick={() => readFile()}>
              {read.isPending ? 'Reading…' : 'Read the file'}
            </Button>
            <Button disabled={!preview || save.isPending || read.isPending || preview.groups.some((g) => g.alreadySaved)} onClick={saveRun}>
              {save.isPending ? 'Saving…' : 'Save run'}
            </Button>
            {!preview && !saved ? <span className="text-xs text-ink-faint">Read the file first; the run is saved from its preview.</span> : null}
          </div>
          {message ? <Notice tone={message.tone}>{message.text}</Notice> : null}
          {problems.length > 0 ? (
            <ul aria-label="Problems with the run" className="flex flex-col gap-1 text-sm text-below">
              {problems.map((p, i) => (
                <li key={i}>{located(p.row, p.column, p.message)}</li>
              ))}
            </ul>
          ) : null}
          {saved ? (
            <Notice tone="success">
              <span data-testid="run-saved">
                Saved run {saved.run.runNumber}: {saved.measurementIds.length} measurements for {saved.run.caseCount} {saved.run.caseCount === 1 ? 'case' : 'cases'} and{' '}
                {saved.controlResultIds.length} control results from {saved.upload.filename}. {runQcStatusLabels[saved.run.qcStatus]}.{' '}
              </span>
              <Link to={paths.runDetail.href(saved.run.id)} className="font-medium underline">
                Open the run {saved.run.runNumber}
              </Link>
            </Notice>
          ) : null}
        </div>
      </Card>
      {preview ? <PreviewView preview={preview} busy={read.isPending} onWindow={moveWindow} materialName={materialName} /> : null}
    </div>
  );
}
