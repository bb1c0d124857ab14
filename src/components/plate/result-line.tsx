import type { CalculationResult } from '@/schemas/assay';
import { fmt } from '@/utils/format';
import { FlagList } from '@/components/ui/flag-list';

/** One computed result: the activity, the slopes behind it, the window and the flags. */
export function ResultLine({ result, compact = false }: { result: CalculationResult; compact?: boolean }) {
  return (
    <div className="flex flex-col gap-2">
      <p className="flex flex-wrap items-baseline gap-2">
        <span className={`num font-semibold text-matrix-900 ${compact ? 'text-lg' : 'text-2xl'}`} data-testid="computed-activity">
          {result.activity === null ? 'No activity' : fmt(result.activity)}
        </span>
        <span className="text-sm text-ink-soft">{result.activity === null ? 'see the flags' : result.unit}</span>
      </p>
      <dl className="num grid grid-cols-2 gap-x-4 gap-y-0.5 text-xs text-ink-soft sm:grid-cols-3">
        <div>
          <dt className="inline text-ink-faint">Total </dt>
          <dd className="inline">{fmt(result.slopeTotalPerMin)} A/min</dd>
        </div>
        <div>
          <dt className="inline text-ink-faint">Background </dt>
          <dd className="inline">{fmt(result.slopeBackgroundPerMin)} A/min</dd>
        </div>
        <div>
          <dt className="inline text-ink-faint">Specific </dt>
          <dd className="inline">{fmt(result.specificSlopePerMin)} A/min</dd>
        </div>
        <div>
          <dt className="inline text-ink-faint">r² </dt>
          <dd className="inline">{fmt(result.r2, 5)}</dd>
        </div>
        <div>
          <dt className="inline text-ink-faint">Window </dt>
          <dd className="inline">
            {result.window ? `${fmt(result.window.fromS)}–${fmt(result.window.toS)} s ${result.windowAuto ? '(automatic)' : '(set by hand)'}` : '—'}
          </dd>
        </div>
        <div>
          <dt className="inline text-ink-faint">Definition </dt>
          <dd className="inline">
            {result.assay} v{result.definitionVersion}
          </dd>
        </div>
      </dl>
      <FlagList flags={result.flags} />
    </div>
  );
}
