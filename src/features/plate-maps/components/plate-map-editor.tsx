import { useState } from 'react';
import { LayoutProblems } from '@/components/plate/layout-problems';
import { Button } from '@/components/ui/button';
import { SelectField, TextField } from '@/components/ui/field';
import { Notice } from '@/components/ui/layout';
import { ApiError } from '@/lib/api-client';
import { assayCodes, type AssayCode } from '@/schemas/common';
import type { StoredPlateMap } from '@/schemas/measurement';
import { plateColumnCount, plateMapWellsSchema, plateRowLetters, wellRoleLabels, wellRoles, type PlateMapEntry, type WellRole } from '@/schemas/plate';
import { useChangePlateMap, useCreatePlateMap } from '../api/plate-map-queries';
import { applyEntries, blockPatternLabels, blockWells, fillBlock, type BlockPattern, type Brush } from '../utils/layout';
import { TableBox } from '@/components/ui/table-box';

const columns = Array.from({ length: plateColumnCount }, (_, i) => i + 1);
const roleStyle: Record<WellRole, string> = {
  total: 'border-matrix-400 bg-matrix-100 text-matrix-900',
  background: 'border-copper-300 bg-copper-100 text-copper-700',
  blank: 'border-paper-line bg-paper-sunk text-ink-soft',
};
const roleWord: Record<WellRole, string> = { total: 'total', background: 'bkg', blank: 'blank' };

function describeWell(entries: PlateMapEntry[]): string {
  if (entries.length === 0) return 'empty';
  return entries.map((e) => `${e.specimenRef} ${e.assay} ${e.role} replicate ${e.replicate}`).join('; ');
}

function WellButton({ well, entries, onClick }: { well: string; entries: PlateMapEntry[]; onClick: () => void }) {
  const first = entries[0];
  return (
    <button
      type="button"
      aria-label={`Well ${well}: ${describeWell(entries)}`}
      onClick={onClick}
      className={`flex h-12 w-full min-w-[3.6rem] flex-col items-center justify-center rounded border text-[0.68rem] leading-tight hover:ring-2 hover:ring-copper-300 ${
        first ? roleStyle[first.role] : 'border-dashed border-paper-line bg-paper-raised text-ink-faint'
      }`}
    >
      {first ? (
        entries.length > 1 ? (
          <>
            <span className="font-semibold">blank</span>
            <span>×{entries.length} groups</span>
          </>
        ) : (
          <>
            <span className="font-semibold">
              {first.specimenRef}·{first.assay}
            </span>
            <span>
              {roleWord[first.role]} r{first.replicate}
            </span>
          </>
        )
      ) : (
        <span>{well}</span>
      )}
    </button>
  );
}

/**
 * The 8 × 12 plate: choose what a click lays down (specimen label, assay, role, replicate), click wells, or fill a
 * block of wells at once; then save the layout as a reusable template.
 */
export function PlateMapEditor({ initial, onSaved }: { initial: StoredPlateMap | null; onSaved?: (map: StoredPlateMap) => void }) {
  const [name, setName] = useState(initial?.name ?? '');
  const [description, setDescription] = useState(initial?.description ?? '');
  const [entries, setEntries] = useState<PlateMapEntry[]>(initial?.wells ?? []);
  const [brush, setBrush] = useState<Brush>({ specimenRef: 'A', assay: 'CS', role: 'total', replicate: 1 });
  const [erase, setErase] = useState(false);
  const [from, setFrom] = useState('A1');
  const [to, setTo] = useState('A4');
  const [pattern, setPattern] = useState<BlockPattern>('pairs-per-column');
  const [message, setMessage] = useState<{ tone: 'error' | 'success'; text: string } | null>(null);
  const [fields, setFields] = useState<Record<string, string>>({});
  const create = useCreatePlateMap();
  const change = useChangePlateMap();

  const at = (well: string) => entries.filter((e) => e.well === well);
  const checked = entries.length ? plateMapWellsSchema.safeParse(entries) : null;
  const problems = checked && !checked.success ? checked.error.issues.map((i) => {
    const index = typeof i.path[0] === 'number' ? i.path[0] : null;
    return index === null ? i.message : `${entries[index]?.well ?? ''}: ${i.message}`;
  }) : [];

  const click = (well: string) => {
    setMessage(null);
    if (erase) setEntries(entries.filter((e) => e.well !== well));
    else setEntries(applyEntries(entries, [{ ...brush, well }], true));
  };

  const fill = () => {
    const wells = blockWells(from, to);
    if (!wells) return setMessage({ tone: 'error', text: 'Give the block as two corner wells, A1 to H12.' });
    setMessage(null);
    if (erase) setEntries(entries.filter((e) => !wells.includes(e.well)));
    else setEntries(applyEntries(entries, fillBlock(wells, brush, pattern)));
  };

  const saved = (map: StoredPlateMap) => {
    setMessage({ tone: 'success', text: `Layout “${map.name}” saved (${map.wells.length} wells).` });
    setFields({});
    onSaved?.(map);
  };
  const failed = (err: unknown) => {
    if (err instanceof ApiError) {
      setFields(err.fields);
      setMessage({ tone: 'error', text: err.message });
    } else setMessage({ tone: 'error', text: 'The layout was not saved' });
  };

  return (
    <div className="flex flex-col gap-4">
      <div className="grid gap-3 sm:grid-cols-[1fr_2fr]">
        <TextField label="Layout name" value={name} onChange={(e) => setName(e.target.value)} error={fields.name} />
        <TextField label="What it is for (optional)" value={description} onChange={(e) => setDescription(e.target.value)} error={fields.description} />
      </div>
      <fieldset className="grid gap-3 rounded-md border border-paper-line p-3 sm:grid-cols-5">
        <legend className="px-1 text-sm font-medium text-ink-soft">A click on a well lays down</legend>
        <TextField label="Specimen label" value={brush.specimenRef} onChange={(e) => setBrush({ ...brush, specimenRef: e.target.value })} hint="e.g. A; matched to the case's specimen at upload" />
        <SelectField label="Assay" value={brush.assay} onChange={(e) => setBrush({ ...brush, assay: e.target.value as AssayCode })} options={assayCodes.map((a) => ({ value: a, label: a }))} />
        <SelectField
          label="Role"
          value={erase ? 'erase' : brush.role}
          onChange={(e) => {
            if (e.target.value === 'erase') setErase(true);
            else {
              setErase(false);
              setBrush({ ...brush, role: e.target.value as WellRole });
            }
          }}
          options={[...wellRoles.map((r) => ({ value: r, label: wellRoleLabels[r] })), { value: 'erase', label: 'Empty the well' }]}
        />
        <TextField
          label="Replicate"
          inputMode="numeric"
          value={String(brush.replicate)}
          onChange={(e) => setBrush({ ...brush, replicate: Math.max(1, Math.trunc(Number(e.target.value)) || 1) })}
        />
        <p className="self-end pb-1 text-xs text-ink-faint">A blank on a well that already holds blanks is shared by both groups.</p>
      </fieldset>
      <TableBox label="Plate layout">
        <table className="border-separate border-spacing-1" aria-label="Plate layout, 8 rows by 12 columns">
          <thead>
            <tr>
              <th className="w-6" />
              {columns.map((c) => (
                <th key={c} scope="col" className="text-xs font-medium text-ink-faint">
                  {c}
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {plateRowLetters.map((row) => (
              <tr key={row}>
                <th scope="row" className="pr-1 text-xs font-medium text-ink-faint">
                  {row}
                </th>
                {columns.map((c) => (
                  <td key={c}>
                    <WellButton well={`${row}${c}`} entries={at(`${row}${c}`)} onClick={() => click(`${row}${c}`)} />
                  </td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
      </TableBox>
      <fieldset className="grid gap-3 rounded-md border border-paper-line p-3 sm:grid-cols-[7rem_7rem_1fr_auto] sm:items-end">
        <legend className="px-1 text-sm font-medium text-ink-soft">Fill a block</legend>
        <TextField label="From well" value={from} onChange={(e) => setFrom(e.target.value)} />
        <TextField label="To well" value={to} onChange={(e) => setTo(e.target.value)} />
        <SelectField label="Pattern" value={pattern} onChange={(e) => setPattern(e.target.value as BlockPattern)} options={Object.entries(blockPatternLabels).map(([value, label]) => ({ value, label }))} />
        <Button variant="secondary" onClick={fill}>
          {erase ? 'Empty the block' : 'Fill the block'}
        </Button>
      </fieldset>
      <LayoutProblems problems={problems} />
      {message ? <Notice tone={message.tone}>{message.text}</Notice> : null}
      <div className="flex flex-wrap gap-2">
        {initial ? (
          <Button
            disabled={change.isPending || problems.length > 0 || entries.length === 0}
            onClick={() => change.mutate({ id: initial.id, input: { name, description, wells: entries, version: initial.version } }, { onSuccess: saved, onError: failed })}
          >
            Save changes
          </Button>
        ) : null}
        <Button
          variant={initial ? 'secondary' : 'primary'}
          disabled={create.isPending || problems.length > 0 || entries.length === 0}
          onClick={() => create.mutate({ name, description, wells: entries }, { onSuccess: saved, onError: failed })}
        >
          {initial ? 'Save as a new layout' : 'Save layout'}
        </Button>
        <Button variant="quiet" onClick={() => setEntries([])}>
          Empty the plate
        </Button>
        <span className="self-center text-xs text-ink-faint">{entries.length} entries</span>
      </div>
    </div>
  );
}
