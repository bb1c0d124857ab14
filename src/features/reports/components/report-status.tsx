import { reportStatusLabels, type ReportListStatus } from '@/schemas/report';

const tones: Record<ReportListStatus, string> = {
  final: 'border-matrix-300 bg-matrix-50 text-matrix-800',
  corrected: 'border-copper-300 bg-copper-50 text-copper-700',
  superseded: 'border-dashed border-ink-faint bg-paper-sunk text-ink-soft',
};

/** A report version's status in words; the tone only supports the word. */
export function ReportStatus({ status, supersededBy }: { status: ReportListStatus; supersededBy?: number | null }) {
  return (
    <span className={`inline-block whitespace-nowrap rounded border px-1.5 py-0.5 text-xs font-medium ${tones[status]}`}>
      {reportStatusLabels[status]}
      {status === 'superseded' && supersededBy ? ` by version ${supersededBy}` : null}
    </span>
  );
}
