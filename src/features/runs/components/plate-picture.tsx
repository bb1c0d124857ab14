import { TableBox } from '@/components/ui/table-box';
import { runWellOwner, type RunWell } from '@/schemas/run';
import { plateShape, type PlateFormat } from '@/utils/plate-grid';
import { describeEntry, type OwnerNames } from '../utils/run-layout';

/*
 * The plate as a grid of wells, each showing its use in text: the owner's short key (S1 a specimen, Q1 a control,
 * ∅ a plate blank), the assay, and the role as a letter (T total, Bg background, Bl blank) with the replicate.
 * Shape supports the words without colour: specimen wells are square, control wells round-cornered with a
 * double border, blanks dotted. Clickable when `onWell` is given (the layout editor), read-only otherwise.
 */
const roleMark = { total: 'T', background: 'Bg', blank: 'Bl' } as const;

function wellText(entries: RunWell[], names: OwnerNames, compact: boolean): { top: string; bottom: string } {
  const first = entries[0];
  if (!first) return { top: '', bottom: '' };
  if (entries.length > 1) return { top: 'blank', bottom: `×${entries.length}` };
  if (first.use === 'blank') return { top: '∅', bottom: compact ? '' : 'blank' };
  const key = names.get(runWellOwner(first))?.key ?? '?';
  return compact ? { top: key, bottom: first.assay } : { top: `${key}·${first.assay}`, bottom: `${roleMark[first.role]} r${first.replicate}` };
}

function wellClass(entries: RunWell[]): string {
  const first = entries[0];
  if (!first) return 'border-dashed border-paper-line bg-paper-raised text-ink-faint';
  if (first.use === 'blank' || entries.every((e) => e.use === 'blank' || e.role === 'blank')) return 'border-dotted border-2 border-ink-faint bg-paper-sunk text-ink-soft';
  if (first.use === 'control') return 'rounded-lg border-4 border-double border-copper-300 bg-copper-50 text-copper-700';
  return first.role === 'background' ? 'border-matrix-300 bg-matrix-50 text-matrix-800' : 'border-matrix-400 bg-matrix-100 text-matrix-900';
}

export function PlatePicture({
  format,
  wells,
  names,
  onWell,
  label,
}: {
  format: PlateFormat;
  wells: RunWell[];
  names: OwnerNames;
  onWell?: (well: string) => void;
  label: string;
}) {
  const { rows, columns } = plateShape(format);
  const compact = format === 384;
  const byWell = new Map<string, RunWell[]>();
  for (const w of wells) byWell.set(w.well, [...(byWell.get(w.well) ?? []), w]);
  const size = compact ? 'h-8 min-w-[2.1rem] text-[0.58rem]' : 'h-12 min-w-[3.6rem] text-[0.68rem]';
  return (
    <TableBox label={label}>
      <table className={`border-separate ${compact ? 'border-spacing-[2px]' : 'border-spacing-1'}`} aria-label={`${label}, ${rows.length} rows by ${columns} columns`}>
        <thead>
          <tr>
            <th className="w-5" />
            {Array.from({ length: columns }, (_, i) => (
              <th key={i} scope="col" className="text-[0.65rem] font-medium text-ink-faint">
                {i + 1}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {rows.map((row) => (
            <tr key={row}>
              <th scope="row" className="pr-1 text-[0.65rem] font-medium text-ink-faint">
                {row}
              </th>
              {Array.from({ length: columns }, (_, i) => {
                const well = `${row}${i + 1}`;
                const here = byWell.get(well) ?? [];
                const text = wellText(here, names, compact);
                const aria = `Well ${well}: ${here.length ? here.map((e) => describeEntry(e, names)).join('; ') : 'empty'}`;
                const cls = `flex w-full flex-col items-center justify-center rounded border leading-tight ${size} ${wellClass(here)}`;
                return (
                  <td key={well} className="p-0">
                    {onWell ? (
                      <button type="button" aria-label={aria} title={aria} onClick={() => onWell(well)} className={`${cls} hover:ring-2 hover:ring-copper-300`}>
                        <span className="font-semibold">{text.top || (compact ? '' : well)}</span>
                        <span>{text.bottom}</span>
                      </button>
                    ) : (
                      <div role="img" aria-label={aria} title={aria} className={cls} data-well={well}>
                        <span className="font-semibold">{text.top}</span>
                        <span>{text.bottom}</span>
                      </div>
                    )}
                  </td>
                );
              })}
            </tr>
          ))}
        </tbody>
      </table>
    </TableBox>
  );
}

/** The key of the plate picture: who S1, Q1, … are, and what the marks mean. */
export function PlateLegend({ names }: { names: OwnerNames }) {
  return (
    <div className="flex flex-col gap-1 text-xs text-ink-soft">
      {names.size > 0 ? (
        <ul aria-label="Who is on the plate" className="flex flex-wrap gap-x-4 gap-y-0.5">
          {[...names.values()].map((n) => (
            <li key={n.key}>
              <span className="font-semibold text-ink">{n.key}</span> {n.label}
            </li>
          ))}
        </ul>
      ) : null}
      <p>T total · Bg background · Bl blank of its group · ∅ plate blank (dotted) · controls have a double border.</p>
    </div>
  );
}
