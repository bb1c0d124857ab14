import { UNDER_AMENDMENT_NOTE, type ReportDetail } from '@/schemas/report';
import { TableBox } from '@/components/ui/table-box';

/** The on-screen note beside the signed reports of a case the laboratory has reopened (never in the PDF). */
export function UnderAmendmentNote() {
  return (
    <p role="note" className="rounded-md border border-copper-300 bg-copper-50 px-3 py-2 text-sm font-medium text-copper-700">
      {UNDER_AMENDMENT_NOTE}
    </p>
  );
}

/** Every printed value a corrected version changed, from what to what; nothing for other versions. */
export function ChangedValues({ report }: { report: ReportDetail }) {
  if (report.changedValues.length === 0) return null;
  return (
    <TableBox label="Changed values">
      <table className="mt-2 w-full text-left text-sm" aria-label={`Values changed in version ${report.version}`}>
        <caption className="mb-1 text-left text-sm font-medium text-ink">Values changed since version {report.supersedesVersion}</caption>
        <thead className="border-b border-paper-line text-xs text-ink-soft">
          <tr>
            <th className="py-1 pr-3 font-medium">Value</th>
            <th className="py-1 pr-3 font-medium">Version {report.supersedesVersion}</th>
            <th className="py-1 pr-3 font-medium">Version {report.version}</th>
          </tr>
        </thead>
        <tbody>
          {report.changedValues.map((v) => (
            <tr key={`${v.specimen ?? ''}|${v.item}`} className="border-b border-paper-line/60">
              <td className="py-1 pr-3">{v.specimen ? `Specimen ${v.specimen}: ${v.item}` : v.item}</td>
              <td className="py-1 pr-3 text-ink-soft line-through decoration-ink-faint">{v.before}</td>
              <td className="py-1 pr-3 font-medium">{v.after}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </TableBox>
  );
}
