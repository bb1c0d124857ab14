import { TableBox } from '@/components/ui/table-box';
import type { RunControlResult } from '@/schemas/run';
import { fmt } from '@/utils/format';

/** z with its sign, and in words how far from the target it lies. */
function zText(z: number | null): string {
  if (z === null) return 'no approved target';
  const shown = Math.abs(z).toFixed(2);
  const sign = shown === '0.00' ? '' : z > 0 ? '+' : '−';
  return `${sign}${shown}`;
}

/** Each control material's value per assay, its target and z = (value − mean) / SD. */
export function ControlTable({ controls, caption }: { controls: RunControlResult[]; caption: string }) {
  if (controls.length === 0) return <p className="text-sm text-ink-soft">No control material on this plate.</p>;
  return (
    <TableBox label={caption}>
      <table className="w-full text-left text-sm">
        <caption className="mb-1 text-left text-sm font-medium text-ink-soft">{caption}</caption>
        <thead className="border-b border-paper-line text-ink-soft">
          <tr>
            <th className="py-1 pr-3 font-medium">Material</th>
            <th className="py-1 pr-3 font-medium">Lot</th>
            <th className="py-1 pr-3 font-medium">Level</th>
            <th className="py-1 pr-3 font-medium">Assay</th>
            <th className="py-1 pr-3 font-medium">Value</th>
            <th className="py-1 pr-3 font-medium">Target mean ± SD</th>
            <th className="py-1 pr-3 font-medium">z</th>
            <th className="py-1 pr-3 font-medium">Replicates</th>
          </tr>
        </thead>
        <tbody className="num">
          {controls.map((c) => (
            <tr key={`${c.controlMaterialId}-${c.assay}`} className="border-b border-paper-line/70" data-testid={`control-${c.level}-${c.assay}`}>
              <td className="py-1 pr-3">{c.material}</td>
              <td className="py-1 pr-3">{c.lot}</td>
              <td className="py-1 pr-3">{c.level}</td>
              <td className="py-1 pr-3">{c.assay}</td>
              <td className="py-1 pr-3">
                {fmt(c.value)} <span className="text-xs text-ink-faint">{c.unit}</span>
              </td>
              <td className="py-1 pr-3">{c.target ? `${fmt(c.target.mean)} ± ${fmt(c.target.sd, 3)}` : '—'}</td>
              <td className={`py-1 pr-3 ${c.z !== null && Math.abs(c.z) > 2 ? 'font-semibold' : ''}`}>
                {zText(c.z)}
                {c.z !== null && Math.abs(c.z) > 2 ? <span className="ml-1 text-xs">(beyond {Math.abs(c.z) > 3 ? 3 : 2} SD)</span> : null}
              </td>
              <td className="py-1 pr-3 text-xs text-ink-soft">{c.groups.map((g) => `r${g.replicate} ${fmt(g.activity)}`).join(', ')}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </TableBox>
  );
}
