import { FlagList } from '@/components/ui/flag-list';
import { Card } from '@/components/ui/layout';
import type { CalculationResult } from '@/schemas/assay';

const fmt = (v: number | null | undefined, digits = 4) => (v == null ? '—' : Number(v.toPrecision(digits)).toString());

function windowText(result: CalculationResult): string {
  const span = result.window ? `${result.window.fromS}–${result.window.toS} s` : '—';
  if (!result.windowAuto) return `${span} (set by hand)`;
  // The automatic search found nothing straight: say so rather than show the readings' span as a window.
  return result.fitTotal ? `${span} (automatic)` : `none straight in ${span}`;
}

/** The activity with everything that produced it: slopes, window, r², constants and their source, flags. */
export function ResultSummary({ result }: { result: CalculationResult }) {
  const i = result.inputs;
  return (
    <Card title="Result">
      <div className="flex flex-wrap items-baseline gap-3">
        <p className="num text-3xl font-semibold text-matrix-900" data-testid="activity">
          {result.activity == null ? 'No activity' : fmt(result.activity, 4)}
        </p>
        <p className="text-sm text-ink-soft">{result.activity == null ? 'see the flags below' : result.unit}</p>
      </div>
      <div className="mt-3">
        <FlagList flags={result.flags} size="sm" />
      </div>
      <dl className="num mt-4 grid grid-cols-2 gap-x-6 gap-y-1.5 text-sm sm:grid-cols-3">
        <div><dt className="text-ink-faint">Total slope</dt><dd>{fmt(result.slopeTotalPerMin)} A/min</dd></div>
        <div><dt className="text-ink-faint">Background slope</dt><dd>{fmt(result.slopeBackgroundPerMin)} A/min</dd></div>
        <div><dt className="text-ink-faint">Specific slope</dt><dd>{fmt(result.specificSlopePerMin)} A/min</dd></div>
        <div><dt className="text-ink-faint">r² (total)</dt><dd>{fmt(result.r2, 5)}</dd></div>
        <div><dt className="text-ink-faint">Window</dt><dd>{windowText(result)}</dd></div>
        <div><dt className="text-ink-faint">Definition</dt><dd>{result.assay} v{result.definitionVersion}</dd></div>
      </dl>
      <div className="mt-4 rounded-md bg-paper-sunk px-3 py-2 text-xs text-ink-soft">
        <p className="font-medium text-ink">How the number was made</p>
        <p className="num mt-1 font-mono">
          activity = |ΔA/min| × V<sub>reaction</sub> × 1000 / (ε × l × V<sub>sample</sub> × protein) = {fmt(result.specificSlopePerMin == null ? null : Math.abs(result.specificSlopePerMin))} × {i.reactionVolumeUl} × 1000 / ({i.epsilonPerMmPerCm} × {i.pathlengthCm} × {i.sampleVolumeUl} × {i.proteinMgPerMl}) → factor {fmt(result.factor, 5)}
        </p>
        <p className="mt-1">ε source: {i.epsilonSource}</p>
        <p className="mt-1">Beer–Lambert law, A = ε·c·l (IUPAC Gold Book). Background subtracted before dividing by protein.</p>
      </div>
    </Card>
  );
}
