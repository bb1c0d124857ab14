import { caseStateLabels, type CaseState } from '@/schemas/case';

/*
 * A case's state, always in words. The pill's tint supports the words and never stands alone: four notches
 * show how far along the path received → in assay → awaiting review → signed the case is; a corrected case
 * keeps all four and gains a copper edge; a cancelled one is outlined only, its notches hollow.
 */
const tone: Record<CaseState, string> = {
  received: 'bg-paper-sunk text-ink-soft border-paper-line',
  in_assay: 'bg-matrix-50 text-matrix-800 border-matrix-200',
  awaiting_review: 'bg-copper-50 text-copper-700 border-copper-100',
  final: 'bg-matrix-700 text-white border-matrix-700',
  corrected: 'bg-matrix-700 text-white border-copper-300 ring-1 ring-copper-300',
  cancelled: 'bg-transparent text-ink-faint border-dashed border-ink-faint',
};

const stepOf: Record<CaseState, number> = { received: 1, in_assay: 2, awaiting_review: 3, final: 4, corrected: 4, cancelled: 0 };

export function StatePill({ state, className = '' }: { state: CaseState; className?: string }) {
  const step = stepOf[state];
  return (
    <span
      className={`inline-flex items-center gap-1.5 whitespace-nowrap rounded-full border py-0.5 pl-1.5 pr-2.5 text-xs font-medium ${tone[state]} ${className}`}
      data-state={state}
    >
      <span aria-hidden="true" className="inline-flex gap-[2px]">
        {[1, 2, 3, 4].map((n) => (
          <span
            key={n}
            className={`h-2 w-[3px] rounded-[1px] ${n <= step ? 'bg-current' : 'border border-current opacity-40'}`}
          />
        ))}
      </span>
      {caseStateLabels[state]}
    </span>
  );
}

/** What each state means, in plain words, for the case page. */
export const stateExplanations: Record<CaseState, string> = {
  received:
    'The specimen is logged in and waiting at the bench. Nothing has been measured yet; assay entry moves the case on.',
  in_assay:
    'Measurements are being entered and checked. When the results are complete, a technologist submits the case for a director to review.',
  awaiting_review:
    'The results are complete and frozen for a director to review, interpret and sign. The director can send the case back with a reason.',
  final:
    'A director has signed the report and the referring clinician has been told. Any change now needs a corrected report.',
  corrected:
    'A corrected report has replaced the earlier signed one. The earlier version stays readable, marked as superseded.',
  cancelled: 'Work on this case has stopped. The reason is kept on the case and in its history.',
};
