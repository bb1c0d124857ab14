import { useState } from 'react';
import { LayoutProblems } from '@/components/plate/layout-problems';
import { Button } from '@/components/ui/button';
import { SelectField, TextField } from '@/components/ui/field';
import { Notice } from '@/components/ui/layout';
import { assayCodes, type AssayCode } from '@/schemas/common';
import { wellRoleLabels, wellRoles, type WellRole } from '@/schemas/plate';
import type { ControlMaterial } from '@/schemas/qc';
import type { OpenSpecimen, RunWell } from '@/schemas/run';
import { blockPatternLabels, copyBlock, lastWell, parseWellSelection, type BlockPattern, type PlateFormat } from '@/utils/plate-grid';
import { paint, type OwnerNames, type RunBrush } from '../utils/run-layout';
import { PlateLegend, PlatePicture } from './plate-picture';

export function specimenOption(s: OpenSpecimen): string {
  return `${s.accession} · ${s.patientName} · specimen ${s.label}${s.proteinMgPerMl === null ? ' (no protein yet)' : ''}`;
}

export function materialOption(m: Pick<ControlMaterial, 'name' | 'lot' | 'level'>): string {
  return `${m.name} · lot ${m.lot} · ${m.level}`;
}

const placeOptions = [
  { value: 'specimen', label: 'A specimen of an open case' },
  { value: 'control', label: 'A control material' },
  { value: 'blank', label: 'A plate blank (no sample)' },
  { value: 'erase', label: 'Nothing (empty the well)' },
];

/**
 * Lays out a run's plate: choose what a click lays down (a specimen of any open case, a control material, or a
 * plate blank; assay, role, replicate), click wells, or fill a row, a column, a block or a list of wells at once,
 * and copy a laid-out block elsewhere — quick enough for 384 wells.
 */
export function LayoutEditor({
  format,
  wells,
  onChange,
  specimens,
  materials,
  names,
  problems,
}: {
  format: PlateFormat;
  wells: RunWell[];
  onChange: (wells: RunWell[]) => void;
  specimens: OpenSpecimen[];
  materials: ControlMaterial[];
  names: OwnerNames;
  problems: string[];
}) {
  const [brush, setBrush] = useState<RunBrush>({ use: 'specimen', specimenId: null, controlMaterialId: null, assay: 'CS', role: 'total', replicate: 1 });
  const [search, setSearch] = useState('');
  const [selection, setSelection] = useState('A1:A2');
  const [pattern, setPattern] = useState<BlockPattern>('same');
  const [copyFrom, setCopyFrom] = useState('A1');
  const [copyTo, setCopyTo] = useState('B2');
  const [copyAt, setCopyAt] = useState('C1');
  const [message, setMessage] = useState<string | null>(null);

  const needle = search.trim().toLowerCase();
  const found = needle ? specimens.filter((s) => specimenOption(s).toLowerCase().includes(needle)) : specimens;
  const chosen = specimens.find((s) => s.specimenId === brush.specimenId);
  const specimenChoices = chosen && !found.includes(chosen) ? [chosen, ...found] : found;
  const savedClash = chosen?.saved.some((x) => x.assay === brush.assay && x.replicate === brush.replicate);

  const lay = (targets: string[], toggle: boolean, p: BlockPattern) => {
    const r = paint(wells, targets, brush, p, toggle);
    setMessage(r.error);
    if (r.error === null) onChange(r.wells);
  };

  const fill = () => {
    const sel = parseWellSelection(selection, format);
    if (sel.error !== null) return setMessage(sel.error);
    lay(sel.wells, false, pattern);
  };

  const copy = () => {
    const r = copyBlock(wells, copyFrom, copyTo, format, copyAt);
    if (r.error !== null) return setMessage(r.error);
    const moved = new Set(r.entries.map((e) => e.well));
    setMessage(null);
    onChange([...wells.filter((e) => !moved.has(e.well)), ...r.entries]);
  };

  const groupFields = brush.use === 'specimen' || brush.use === 'control';

  return (
    <div className="flex flex-col gap-4">
      <fieldset className="grid gap-3 rounded-md border border-paper-line p-3 md:grid-cols-2 xl:grid-cols-4">
        <legend className="px-1 text-sm font-medium text-ink-soft">A click on a well lays down</legend>
        <SelectField label="Place" value={brush.use} onChange={(e) => setBrush({ ...brush, use: e.target.value as RunBrush['use'] })} options={placeOptions} />
        {brush.use === 'specimen' ? (
          <>
            <TextField label="Find a specimen" value={search} onChange={(e) => setSearch(e.target.value)} placeholder="Accession, patient or label" hint={`${found.length} of ${specimens.length} specimens of open cases`} />
            <SelectField
              label="Specimen"
              value={brush.specimenId === null ? '' : String(brush.specimenId)}
              onChange={(e) => setBrush({ ...brush, specimenId: e.target.value === '' ? null : Number(e.target.value) })}
              options={[{ value: '', label: specimens.length ? 'Choose…' : 'No specimen of an open case' }, ...specimenChoices.map((s) => ({ value: String(s.specimenId), label: specimenOption(s) }))]}
              hint={savedClash ? `${brush.assay} replicate ${brush.replicate} is already saved for this specimen; choose another replicate.` : undefined}
            />
          </>
        ) : null}
        {brush.use === 'control' ? (
          <SelectField
            label="Control material"
            value={brush.controlMaterialId === null ? '' : String(brush.controlMaterialId)}
            onChange={(e) => setBrush({ ...brush, controlMaterialId: e.target.value === '' ? null : Number(e.target.value) })}
            options={[{ value: '', label: materials.length ? 'Choose…' : 'No control material yet (a director adds them under Quality control)' }, ...materials.map((m) => ({ value: String(m.id), label: materialOption(m) }))]}
          />
        ) : null}
        {groupFields ? (
          <>
            <SelectField label="Assay" value={brush.assay} onChange={(e) => setBrush({ ...brush, assay: e.target.value as AssayCode })} options={assayCodes.map((a) => ({ value: a, label: a }))} />
            <SelectField label="Role" value={brush.role} onChange={(e) => setBrush({ ...brush, role: e.target.value as WellRole })} options={wellRoles.map((r) => ({ value: r, label: wellRoleLabels[r] }))} />
            <TextField
              label="Replicate"
              inputMode="numeric"
              value={String(brush.replicate)}
              onChange={(e) => setBrush({ ...brush, replicate: Math.min(20, Math.max(1, Math.trunc(Number(e.target.value)) || 1)) })}
            />
          </>
        ) : null}
        <p className="self-end pb-1 text-xs text-ink-faint xl:col-span-2">
          A group’s blank laid on a plate blank (or on another group’s blank) shares that well; click it again to take it off.
        </p>
      </fieldset>

      <PlatePicture format={format} wells={wells} names={names} label="Run layout" onWell={(w) => lay([w], true, 'same')} />
      <PlateLegend names={names} />

      <div className="grid gap-3 lg:grid-cols-2">
        <fieldset className="grid gap-3 rounded-md border border-paper-line p-3 sm:grid-cols-[1fr_1fr_auto] sm:items-end">
          <legend className="px-1 text-sm font-medium text-ink-soft">Fill wells</legend>
          <TextField label="Wells" value={selection} onChange={(e) => setSelection(e.target.value)} hint={`A block A1:D6, a row letter, a column number, or a list (A1 to ${lastWell(format)})`} />
          <SelectField label="Pattern" value={pattern} onChange={(e) => setPattern(e.target.value as BlockPattern)} options={Object.entries(blockPatternLabels).map(([value, label]) => ({ value, label }))} />
          <Button variant="secondary" onClick={fill}>
            {brush.use === 'erase' ? 'Empty these wells' : 'Fill'}
          </Button>
        </fieldset>
        <fieldset className="grid gap-3 rounded-md border border-paper-line p-3 sm:grid-cols-[1fr_1fr_1fr_auto] sm:items-end">
          <legend className="px-1 text-sm font-medium text-ink-soft">Copy a block</legend>
          <TextField label="Block from" value={copyFrom} onChange={(e) => setCopyFrom(e.target.value)} />
          <TextField label="Block to" value={copyTo} onChange={(e) => setCopyTo(e.target.value)} />
          <TextField label="Copy to (top-left well)" value={copyAt} onChange={(e) => setCopyAt(e.target.value)} />
          <Button variant="secondary" onClick={copy}>
            Copy the block
          </Button>
        </fieldset>
      </div>

      {message ? <Notice tone="error">{message}</Notice> : null}
      <LayoutProblems problems={problems} />
      <div className="flex items-center gap-3">
        <Button variant="quiet" onClick={() => onChange([])}>
          Empty the plate
        </Button>
        <span className="text-xs text-ink-faint">{new Set(wells.map((w) => w.well)).size} wells laid out</span>
      </div>
    </div>
  );
}
