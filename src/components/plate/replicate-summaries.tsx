import type { ReactNode } from 'react';
import { TableBox } from '@/components/ui/table-box';
import { flagSummary, type Flag } from '@/schemas/assay';
import { fmt } from '@/utils/format';

export type ReplicateSummaryRow = {
  specimenId: number;
  specimenLabel: string;
  assay: string;
  n: number;
  mean: number | null;
  sd: number | null;
  cvPct: number | null;
  flags: Flag[];
};

/** Replicates per specimen × assay as a plate would save them; `caseCell` adds a first column naming the case. */
export function ReplicateSummaries<R extends ReplicateSummaryRow>({ rows, caseCell }: { rows: R[]; caseCell?: (row: R) => ReactNode }) {
  return (
    <TableBox label="Plate summary">
      <table className="w-full text-left text-sm">
        <caption className="mb-1 text-left text-sm font-medium text-ink-soft">Replicates, as the plate would save them</caption>
        <thead className="border-b border-paper-line text-ink-soft">
          <tr>
            {caseCell ? <th className="py-1 pr-3 font-medium">Case</th> : null}
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
          {rows.map((s) => (
            <tr key={`${s.specimenId}-${s.assay}`} className="border-b border-paper-line/70">
              {caseCell ? <td className="py-1 pr-3">{caseCell(s)}</td> : null}
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
