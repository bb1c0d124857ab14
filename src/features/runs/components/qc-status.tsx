import { westgardRuleMeaning, type WestgardRuleName } from '@/schemas/qc';
import { runQcStatusLabels, type RunQcStatus, type RunViolation } from '@/schemas/run';

/*
 * A run's QC status, always in words. The mark beside the words carries the meaning without colour: a tick in a
 * ring (accepted), a ring with one notch cut (accepted with a warning), a ring struck through twice (rejected),
 * a dotted ring (nothing evaluated). The tint only supports them.
 */
const tone: Record<RunQcStatus, string> = {
  accept: 'border-matrix-200 bg-matrix-50 text-matrix-800',
  warn: 'border-copper-100 bg-copper-50 text-copper-700',
  reject: 'border-below/40 bg-below-bg text-below',
  none: 'border-dashed border-ink-faint bg-transparent text-ink-soft',
};

function Mark({ status }: { status: RunQcStatus }) {
  return (
    <svg aria-hidden="true" viewBox="0 0 16 16" className="h-3.5 w-3.5 shrink-0" fill="none" stroke="currentColor" strokeWidth="1.6">
      {status === 'none' ? <circle cx="8" cy="8" r="6" strokeDasharray="2 2" /> : <circle cx="8" cy="8" r="6" />}
      {status === 'accept' ? <path d="M5 8.3 7.2 10.4 11 5.8" /> : null}
      {status === 'warn' ? <path d="M8 4.5v4.2M8 10.8v.7" /> : null}
      {status === 'reject' ? <path d="M4.5 6.2h7M4.5 9.8h7" /> : null}
    </svg>
  );
}

export function QcStatusBadge({ status, overridden = false }: { status: RunQcStatus; overridden?: boolean }) {
  return (
    <span className="inline-flex flex-wrap items-center gap-1.5" data-qc-status={status}>
      <span className={`inline-flex items-center gap-1.5 whitespace-nowrap rounded-full border px-2 py-0.5 text-xs font-medium ${tone[status]}`}>
        <Mark status={status} />
        {runQcStatusLabels[status]}
      </span>
      {overridden ? (
        <span className="inline-flex items-center gap-1 whitespace-nowrap rounded border border-ink-soft px-1.5 py-0.5 text-xs font-medium text-ink">
          <span aria-hidden="true">✎</span>
          Released by a director
        </span>
      ) : null}
    </span>
  );
}

/** A rule in words with its name in small print; unknown names are shown as they are. */
export function RuleWords({ rule }: { rule: string }) {
  const meaning = westgardRuleMeaning[rule as WestgardRuleName];
  return (
    <span>
      {meaning ? meaning.charAt(0).toUpperCase() + meaning.slice(1) : rule}{' '}
      <small className="font-mono text-[0.7rem] text-ink-faint">({rule})</small>
    </span>
  );
}

/** The rules that fired, one line each, with the assay and the control materials they concern. */
export function ViolationList({ violations, materialName }: { violations: RunViolation[]; materialName: (id: number) => string }) {
  if (violations.length === 0) return <p className="text-sm text-ink-soft">No rule fired.</p>;
  return (
    <ul aria-label="Rules that fired" className="flex flex-col gap-1 text-sm">
      {violations.map((v, i) => (
        <li key={i} className="flex flex-wrap gap-x-2">
          <RuleWords rule={v.rule} />
          <span className="text-ink-soft">
            — {v.assayCode}, {v.controlMaterialIds.map(materialName).join(' and ')}
          </span>
        </li>
      ))}
    </ul>
  );
}
