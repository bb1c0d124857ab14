import { defaultDiagnosticCriteria, flagSummary } from '@/schemas/assay';
import { specimenTypeLabels } from '@/schemas/common';
import {
  bandThresholds,
  formatPercentOfMean,
  formatResultNumber,
  intervalThresholds,
  type Thresholds,
} from '@/schemas/result-format';
import {
  criteriaBandLabels,
  intervalPositionLabels,
  type AssayResult,
  type CaseResults,
  type PatternResult,
  type ResultComparison,
  type SpecimenResult,
} from '@/schemas/results';
import { fmt, measureNames } from '../utils/format';
import { formatWhen } from '@/utils/format';
import { TableBox } from '@/components/ui/table-box';

const positionTone = { below: 'text-below', within: 'text-within', above: 'text-above' } as const;

/** A number as the report prints it (src/schemas/result-format.ts), or a dash when there is none. */
function num(v: number | null, thresholds: Thresholds = {}): string {
  return v === null || !Number.isFinite(v) ? '—' : formatResultNumber(v, undefined, thresholds);
}

/**
 * One value against its interval: the value, where it falls (in words), % of the reference mean, and the
 * interval used. Numbers print as on the report, never on the other side of a limit or band threshold.
 */
function ComparisonCell({
  c,
  pctThresholds,
  extra,
  showLabel,
}: {
  c: ResultComparison | null;
  pctThresholds: Thresholds;
  extra?: React.ReactNode;
  showLabel: boolean;
}) {
  if (!c) return <td className="px-2 py-2 text-ink-faint">n/a</td>;
  return (
    <td className="px-2 py-2 align-top">
      <div className="num font-semibold text-ink">{num(c.value, intervalThresholds(c.interval))}</div>
      {extra}
      {c.position ? (
        <div className="text-xs">
          <span className={`font-semibold ${positionTone[c.position]}`}>{intervalPositionLabels[c.position]}</span>
          {c.percentOfMean === null ? null : (
            <span className="num text-ink-soft"> · {formatPercentOfMean(c.percentOfMean, pctThresholds)} of mean</span>
          )}
          {c.band && c.band !== 'not_met' ? (
            <span className="ml-1 rounded bg-below-bg px-1 text-below">{bandWords[c.band]}</span>
          ) : null}
        </div>
      ) : (
        <div className="text-xs text-ink-faint">not compared</div>
      )}
      {c.interval ? (
        <div className="num text-xs text-ink-faint" title={`${c.interval.method}; interval id ${c.interval.id}`}>
          interval {num(c.interval.lower)}–{num(c.interval.upper)} · {showLabel ? c.interval.label : `v${c.interval.version}`}
        </div>
      ) : null}
    </td>
  );
}

const bandWords = { major: 'major-criterion band', minor: 'minor-criterion band' } as const;

function bandSummary(a: AssayResult): string {
  const parts = [a.activity, a.ratioCs, a.ratioCii]
    .filter((c): c is ResultComparison => !!c && c.band !== null)
    .map((c) => `${criteriaBandLabels[c.band!]} (${measureNames[c.measure]})`);
  if (parts.length === 0) return a.assay === 'CS' ? 'n/a (CS)' : '—';
  const met = parts.filter((p) => !p.startsWith(criteriaBandLabels.not_met));
  return met.length ? met.join('; ') : criteriaBandLabels.not_met;
}

/** The reasons given for bands the pattern does not reflect, once each. */
function bandNotes(a: AssayResult): string[] {
  const notes = [a.activity, a.ratioCs, a.ratioCii].flatMap((c) => (c?.bandNote ? [c.bandNote] : []));
  return [...new Set(notes)];
}

/** The replicate values behind the mean: those that count as they are, excluded ones struck through. */
function ReplicateValues({ a }: { a: AssayResult }) {
  return (
    <>
      {a.replicates.length > 1 || a.replicates.some((r) => r.excluded) ? (
        <>
          {' ('}
          {a.replicates.map((r, i) => (
            <span key={r.measurementId}>
              {i > 0 ? ' · ' : ''}
              {r.excluded ? (
                <s className="text-ink-faint" title={`Excluded: ${r.excluded.reason}`} data-testid={`excluded-replicate-${r.measurementId}`}>
                  {fmt(r.activity, 4)}
                </s>
              ) : (
                fmt(r.activity, 4)
              )}
            </span>
          ))}
          {')'}
        </>
      ) : null}
    </>
  );
}

/** Each excluded replicate of the assay with who excluded it and why. */
function ExcludedNotes({ a }: { a: AssayResult }) {
  const excluded = a.replicates.filter((r) => r.excluded);
  return (
    <>
      {excluded.map((r) => (
        <span key={r.measurementId} className="block text-caution">
          Replicate {r.replicate} excluded{r.excluded!.by ? ` by ${r.excluded!.by}` : ''}: {r.excluded!.reason}
        </span>
      ))}
    </>
  );
}

function AssayRow({ a, showLabel, pctThresholds }: { a: AssayResult; showLabel: boolean; pctThresholds: Thresholds }) {
  return (
    <tr className="border-b border-paper-line/70" data-testid={`result-row-${a.assay}`}>
      <th scope="row" className="px-2 py-2 text-left align-top font-semibold text-matrix-900">
        {a.assay}
        <span className="block text-xs font-normal text-ink-faint">{a.name}</span>
      </th>
      <ComparisonCell
        c={a.activity}
        pctThresholds={pctThresholds}
        showLabel={showLabel}
        extra={
          <div className="num text-xs text-ink-soft">
            n {a.n}
            <ReplicateValues a={a} /> · SD {fmt(a.sd)} · CV {fmt(a.cvPct, 2)}%
            <ExcludedNotes a={a} />
          </div>
        }
      />
      <ComparisonCell c={a.ratioCs} pctThresholds={pctThresholds} showLabel={showLabel} />
      <ComparisonCell c={a.ratioCii} pctThresholds={pctThresholds} showLabel={showLabel} />
      <td className="px-2 py-2 align-top text-xs" data-testid={`band-${a.assay}`}>
        {bandSummary(a)}
        {bandNotes(a).map((n, i) => (
          <p key={i} className="mt-1 text-ink-soft">
            {n}.
          </p>
        ))}
      </td>
      <td className="px-2 py-2 align-top text-xs">
        {a.flags.length === 0 ? (
          <span className="text-within">none</span>
        ) : (
          <details>
            <summary className="cursor-pointer text-caution">{flagSummary(a.flags)}</summary>
            <ul className="mt-1 flex flex-col gap-0.5 text-ink-soft">
              {a.flags.map((f, i) => (
                <li key={i}>{f.message}</li>
              ))}
            </ul>
          </details>
        )}
      </td>
    </tr>
  );
}

export function PatternSummary({ pattern }: { pattern: PatternResult }) {
  return (
    <div className="rounded-md border border-matrix-200 bg-matrix-50 px-4 py-3 text-sm" data-testid="pattern-summary">
      <p className="font-semibold text-matrix-900">{pattern.headline}</p>
      <p className="font-mono text-xs text-ink-faint">pattern code {pattern.code}</p>
      {pattern.findings.map((f, i) =>
        f.evidence.length ? (
          <div key={i} className="mt-2">
            <p className="text-xs font-medium text-ink-soft">The numbers behind “{f.label}”:</p>
            <ul className="num mt-1 list-disc pl-5 text-xs text-ink">
              {f.evidence.map((e, j) => (
                <li key={j}>{e.text}</li>
              ))}
            </ul>
          </div>
        ) : null,
      )}
      {pattern.notes.length ? (
        <ul className="mt-2 list-disc pl-5 text-xs text-ink-soft">
          {pattern.notes.map((n, i) => (
            <li key={i}>{n}</li>
          ))}
        </ul>
      ) : null}
      <p className="mt-2 text-xs text-ink-faint">
        Criterion bands: {pattern.criteriaCitation}. They are applied to the{' '}
        {measureNames[(pattern.criteria ?? defaultDiagnosticCriteria).appliesTo]}, as % of its reference mean (
        {(pattern.criteria ?? defaultDiagnosticCriteria).appliesToSource}). Cristae shows the band; the director decides.
      </p>
    </div>
  );
}

/** The interval labels a specimen's comparisons used; one shared label is printed once, above the table. */
function intervalLabels(s: SpecimenResult): string[] {
  const labels = s.assays.flatMap((a) => [a.activity, a.ratioCs, a.ratioCii]).flatMap((c) => (c?.interval ? [c.interval.label.replace(/ · v\d+$/, '')] : []));
  return [...new Set(labels)];
}

function SpecimenSection({ s }: { s: SpecimenResult }) {
  const heading = `Specimen ${s.label} · ${specimenTypeLabels[s.type]}`;
  // The same thresholds the report prints with (server/modules/reports/results-adapter.ts).
  const pctThresholds = bandThresholds(s.type, s.pattern?.criteria ?? defaultDiagnosticCriteria);
  const labels = intervalLabels(s);
  const oneSet = labels.length === 1;
  return (
    <section aria-label={heading} className="flex flex-col gap-3">
      <header className="flex flex-wrap items-baseline gap-x-4 gap-y-1">
        <h3 className="text-base font-semibold text-matrix-900">{heading}</h3>
        <span className="num text-sm text-ink-soft">
          {s.ageYears === null ? 'age unknown' : `age at collection ${fmt(s.ageYears, 3)} years`} · protein{' '}
          {s.proteinMgPerMl === null ? 'not recorded' : `${fmt(s.proteinMgPerMl, 4)} mg/mL`}
        </span>
      </header>
      {!s.accepted ? (
        <p className="text-sm text-below">Rejected on receipt: {s.rejectionReason}. No results.</p>
      ) : s.assays.length === 0 ? (
        <p className="text-sm text-ink-faint">No assay result yet.</p>
      ) : (
        <>
          {oneSet ? <p className="text-xs text-ink-soft">Reference intervals: {labels[0]} (version of each interval in its cell).</p> : null}
          <TableBox label="Results">
            <table className="w-full min-w-[56rem] border-collapse text-sm">
              <thead className="border-b-2 border-paper-line text-left text-xs uppercase tracking-wide text-ink-soft">
                <tr>
                  <th className="px-2 py-1.5 font-medium">Assay</th>
                  <th className="px-2 py-1.5 font-medium">Activity ({s.assays[0]!.unit})</th>
                  <th className="px-2 py-1.5 font-medium">Ratio to CS</th>
                  <th className="px-2 py-1.5 font-medium">Ratio to CII</th>
                  <th className="px-2 py-1.5 font-medium">Criterion band</th>
                  <th className="px-2 py-1.5 font-medium">Flags</th>
                </tr>
              </thead>
              <tbody>
                {s.assays.map((a) => (
                  <AssayRow key={a.assay} a={a} showLabel={!oneSet} pctThresholds={pctThresholds} />
                ))}
              </tbody>
            </table>
          </TableBox>
          {s.pattern ? <PatternSummary pattern={s.pattern} /> : null}
        </>
      )}
    </section>
  );
}

/**
 * Every assay of every specimen against the reference intervals, and the pattern read from them. Used by the
 * results page; the review page may show the same view.
 */
export function ResultsView({ results }: { results: CaseResults }) {
  return (
    <div className="flex flex-col gap-6">
      <p className="text-sm text-ink-soft" data-testid="results-basis">
        {results.frozen
          ? `Frozen when the case was submitted for review (${formatWhen(results.computedAt)}): these numbers and intervals no longer change.`
          : `Computed just now from the saved measurements, against the reference intervals approved and in force on ${results.intervalsAsOf}.`}{' '}
        Definitions: {results.definitions.map((d) => `${d.assay} v${d.version}`).join(', ') || 'none yet'}.
      </p>
      {results.specimens.map((s) => (
        <SpecimenSection key={s.specimenId} s={s} />
      ))}
    </div>
  );
}
