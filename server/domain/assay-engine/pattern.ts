import {
  defaultDiagnosticCriteria,
  type ComparisonInterval,
  type CriteriaBand,
  type DiagnosticCriteria,
  type IntervalPosition,
  type PatternKind,
  type ValueBasis,
} from '@/schemas/assay';
import type { AssayCode, Measure } from '@/schemas/common';
import {
  bandThresholds,
  formatPercentOfMean,
  formatResultNumber,
  intervalThresholds,
  type Thresholds,
} from '@/schemas/result-format';
import {
  compareValue,
  findInterval,
  measureLabel,
  type Comparison,
  type ComparisonContext,
} from './compare';
import { computeRatios, type ActivityMap } from './normalise';

/*
 * Case-level reading of the numbers, after docs/domain.md §2: an isolated defect shows low X/CS and
 * low X/CII with CII/CS normal; raised CS with normal ratios suggests mitochondrial proliferation
 * [from memory] (Thorburn and colleagues; Kirby DM et al., Neurology 1999;52:1255–1264 [confirmed]).
 * Cristae shows the pattern and the numbers behind it; the director decides.
 */

export interface PatternInput extends ComparisonContext {
  activities: ActivityMap;
  /** How each activity was obtained; a first-order CIV value is compared only with first-order intervals. */
  bases?: Partial<Record<AssayCode, ValueBasis>>;
  intervals: readonly ComparisonInterval[];
  criteria?: DiagnosticCriteria;
}

export interface EvidenceLine {
  assay: AssayCode;
  measure: Measure;
  value: number;
  intervalId: string;
  intervalSetLabel: string;
  lower: number;
  upper: number;
  mean: number;
  position: IntervalPosition;
  percentOfMean: number;
  band: CriteriaBand | null;
  /** e.g. "CI/CS 0.06 is below the interval 0.15–0.35 (24% of the reference mean; DEMO …)"; printed as on screen and report. */
  text: string;
}

export interface PatternFinding {
  kind: PatternKind;
  label: string;
  complexes: AssayCode[];
  evidence: EvidenceLine[];
}

export interface PatternSummary {
  findings: PatternFinding[];
  /** The findings' labels joined, for a one-line display. */
  headline: string;
  comparisons: Comparison[];
  /** Plain remarks that are not findings (missing values, intervals not found). */
  notes: string[];
  criteriaCitation: string;
  /** The rule set the bands were decided with (thresholds and the measure they apply to). */
  criteria: DiagnosticCriteria;
}

const complexNames: Record<AssayCode, string> = {
  CI: 'complex I',
  CII: 'complex II',
  CIII: 'complex III',
  CIV: 'complex IV',
  'CI+III': 'complex I+III',
  'CII+III': 'complex II+III',
  CS: 'citrate synthase',
};

const singleComplexes = ['CI', 'CII', 'CIII', 'CIV'] as const satisfies readonly AssayCode[];
const linkedActivities = ['CI+III', 'CII+III'] as const satisfies readonly AssayCode[];

function evidenceOf(c: Comparison | undefined, pctThresholds: Thresholds): EvidenceLine | null {
  if (!c || !c.interval || c.position === null || c.percentOfMean === null || c.value === null) return null;
  const i = c.interval;
  const band = c.band === 'major' || c.band === 'minor' ? `; ${c.band} band of the criteria` : '';
  return {
    assay: c.assay,
    measure: c.measure,
    value: c.value,
    intervalId: i.id,
    intervalSetLabel: i.setLabel,
    lower: i.lower,
    upper: i.upper,
    mean: i.mean,
    position: c.position,
    percentOfMean: c.percentOfMean,
    band: c.band,
    text: `${measureLabel(c.assay, c.measure)} ${formatResultNumber(c.value, undefined, intervalThresholds(i))} is ${c.position} the interval ${formatResultNumber(i.lower)}–${formatResultNumber(i.upper)} (${formatPercentOfMean(c.percentOfMean, pctThresholds)} of the reference mean${band}; ${i.setLabel} v${i.version})`,
  };
}

/**
 * What an isolated finding of complex x was shown against: CII/CS alone for complex II; for the others X/CS, and
 * X/CII when it could be compared (not when CII was not measured or X/CII has no interval).
 */
function isolatedQualifier(x: AssayCode, toCii: IntervalPosition | null): string {
  if (x === 'CII') return '';
  return toCii === 'below'
    ? ' (low relative to citrate synthase and to complex II)'
    : ' (low relative to citrate synthase; the ratio to complex II could not be compared)';
}

function listNames(codes: readonly AssayCode[]): string {
  const names = codes.map((c) => complexNames[c]);
  if (names.length <= 1) return names.join('');
  return `${names.slice(0, -1).join(', ')} and ${names[names.length - 1]}`;
}

function pushEvidenceWith(pctThresholds: Thresholds, target: EvidenceLine[], cs: (Comparison | undefined)[]): void {
  for (const c of cs) {
    const e = evidenceOf(c, pctThresholds);
    if (e) target.push(e);
  }
}

/** Compares every activity and ratio of a case and names the pattern with the numbers behind it. */
export function summarisePattern(input: PatternInput): PatternSummary {
  const criteria = input.criteria ?? defaultDiagnosticCriteria;
  const context: ComparisonContext = { specimenType: input.specimenType, ageYears: input.ageYears };
  const comparisons: Comparison[] = [];
  const byKey = new Map<string, Comparison>();
  const notes: string[] = [];
  const basisOf = (a: AssayCode): ValueBasis => input.bases?.[a] ?? 'linear_rate';
  const pctThresholds = bandThresholds(input.specimenType, criteria);
  const pushEvidence = (target: EvidenceLine[], ...cs: (Comparison | undefined)[]) => pushEvidenceWith(pctThresholds, target, cs);

  const add = (assay: AssayCode, measure: Measure, value: number | null, basis: ValueBasis) => {
    const interval = findInterval(input.intervals, assay, measure, context, basis);
    const c = compareValue({ assay, measure, value, basis }, interval, context, criteria);
    comparisons.push(c);
    byKey.set(`${assay}:${measure}`, c);
    for (const f of c.flags) notes.push(f.message);
  };

  for (const assay of ['CS', ...singleComplexes, ...linkedActivities] as const) {
    const v = input.activities[assay];
    if (v === undefined) continue;
    add(assay, 'activity', v, basisOf(assay));
  }
  for (const r of computeRatios(input.activities)) {
    if (input.activities[r.assay] === undefined) continue;
    for (const f of r.flags) if (f.code === 'NO_DENOMINATOR') notes.push(f.message);
    // A ratio carries its numerator's basis: k/CS is not a linear-rate ratio either.
    add(r.assay, r.measure, r.value, basisOf(r.assay));
  }

  const get = (assay: AssayCode, measure: Measure) => byKey.get(`${assay}:${measure}`);
  const pos = (assay: AssayCode, measure: Measure) => get(assay, measure)?.position ?? null;
  const findings: PatternFinding[] = [];

  const csActivity = get('CS', 'activity');
  const anyRatio = comparisons.some((c) => c.measure === 'ratio_cs' && c.position !== null);
  if (!anyRatio) {
    findings.push({
      kind: 'insufficient_data',
      label: 'Not enough results to read a pattern (no activity could be compared relative to citrate synthase)',
      complexes: [],
      evidence: [],
    });
    return finish(findings, comparisons, notes, criteria, pctThresholds);
  }

  const ciiToCs = pos('CII', 'ratio_cs');
  const ciiNormal = ciiToCs === 'within' || ciiToCs === 'above';
  const low: AssayCode[] = [];
  const lowEvidence = new Map<AssayCode, EvidenceLine[]>();
  for (const x of singleComplexes) {
    const toCs = pos(x, 'ratio_cs');
    if (toCs !== 'below') continue;
    const lines: EvidenceLine[] = [];
    if (x === 'CII') {
      pushEvidence(lines, get(x, 'ratio_cs'));
    } else {
      const toCii = pos(x, 'ratio_cii');
      // With CII/CS normal, a defect must also show against CII; when CII is itself low, X/CII says nothing.
      if (ciiNormal && toCii !== null && toCii !== 'below') {
        notes.push(
          `${measureLabel(x, 'ratio_cs')} is below its interval but ${measureLabel(x, 'ratio_cii')} is not: not counted as a deficiency`,
        );
        continue;
      }
      pushEvidence(lines, get(x, 'ratio_cs'), get(x, 'ratio_cii'), get('CII', 'ratio_cs'));
    }
    low.push(x);
    lowEvidence.set(x, lines);
  }
  const linkedLow = linkedActivities.filter((x) => pos(x, 'ratio_cs') === 'below');

  if (low.length === 1) {
    const x = low[0]!;
    const evidence = [...lowEvidence.get(x)!];
    for (const l of linkedLow) pushEvidence(evidence, get(l, 'ratio_cs'));
    findings.push({
      kind: 'isolated_deficiency',
      label: `Isolated low ${complexNames[x]} activity${isolatedQualifier(x, pos(x, 'ratio_cii'))}`,
      complexes: [x],
      evidence,
    });
  } else if (low.length > 1) {
    const evidence: EvidenceLine[] = [];
    for (const x of low) evidence.push(...lowEvidence.get(x)!);
    for (const l of linkedLow) pushEvidence(evidence, get(l, 'ratio_cs'));
    findings.push({
      kind: 'combined_deficiency',
      label: `Low activity of more than one complex: ${listNames(low)}`,
      complexes: [...low],
      evidence: dedupe(evidence),
    });
  } else if (linkedLow.length > 0) {
    const evidence: EvidenceLine[] = [];
    for (const l of linkedLow) pushEvidence(evidence, get(l, 'ratio_cs'));
    for (const x of singleComplexes) pushEvidence(evidence, get(x, 'ratio_cs'));
    findings.push({
      kind: 'linked_activity_low',
      label: `Low linked activity (${listNames(linkedLow)}) with each single complex within its interval`,
      complexes: [...linkedLow],
      evidence,
    });
  }

  if (csActivity?.position === 'above') {
    const evidence: EvidenceLine[] = [];
    pushEvidence(evidence, csActivity);
    // Lines without a position add no evidence and are never 'below'.
    const ratioLines = comparisons.filter((c) => c.measure === 'ratio_cs');
    pushEvidence(evidence, ...ratioLines);
    const ratiosNormal = ratioLines.every((c) => c.position !== 'below');
    findings.push({
      kind: 'raised_cs',
      label: ratiosNormal
        ? 'Raised citrate synthase with ratios to citrate synthase within their intervals: possible mitochondrial proliferation'
        : 'Raised citrate synthase: ratios to citrate synthase are lowered by the raised denominator as well as by any defect',
      complexes: ['CS'],
      evidence,
    });
  }

  if (findings.length === 0) {
    const evidence: EvidenceLine[] = [];
    pushEvidence(evidence, csActivity);
    for (const c of comparisons) if (c.measure !== 'activity') pushEvidence(evidence, c);
    const lowActivities = comparisons.filter((c) => c.measure === 'activity' && c.position === 'below');
    if (lowActivities.length > 0) {
      notes.push(
        `Activities below their intervals (${lowActivities.map((c) => c.assay).join(', ')}) while the ratios are within theirs: this points to low mitochondrial content or sample quality rather than a single defect`,
      );
    }
    findings.push({
      kind: 'normal',
      label: 'No deficiency pattern: ratios to citrate synthase and to complex II within their intervals',
      complexes: [],
      evidence,
    });
  }
  return finish(findings, comparisons, notes, criteria, pctThresholds);
}

function dedupe(lines: EvidenceLine[]): EvidenceLine[] {
  const seen = new Set<string>();
  return lines.filter((l) => {
    const k = `${l.assay}:${l.measure}`;
    if (seen.has(k)) return false;
    seen.add(k);
    return true;
  });
}

const deficiencyKinds: readonly PatternKind[] = ['isolated_deficiency', 'combined_deficiency', 'linked_activity_low'];

/** Why the pattern does not count a value that sits in a criterion band, in words a reader can check. */
function bandReason(c: Comparison, get: (a: AssayCode, m: Measure) => Comparison | undefined, csRaised: boolean): string {
  const x = c.assay;
  const toCs = get(x, 'ratio_cs');
  if (c.measure === 'activity') {
    if (toCs?.position === 'within' || toCs?.position === 'above') {
      return 'low activity with a normal ratio to citrate synthase: this suggests low mitochondrial content (or a specimen of poor quality), not a respiratory-chain defect';
    }
    if (toCs?.position !== 'below') {
      return 'no ratio to citrate synthase could be compared, so the pattern cannot tell a defect from low mitochondrial content';
    }
  } else if (c.position !== 'below') {
    return `${measureLabel(x, c.measure)} is still within its reference interval, so the pattern does not count it as low; the band only describes how far it is from the reference mean`;
  }
  if (csRaised) {
    return 'citrate synthase is raised, which lowers every ratio to it; the band may reflect the raised citrate synthase rather than a defect';
  }
  const toCii = get(x, 'ratio_cii');
  if (c.measure !== 'ratio_cii' && toCii?.position && toCii.position !== 'below') {
    return `${measureLabel(x, 'ratio_cii')} is within its interval while complex II relative to citrate synthase is normal, so a defect of ${complexNames[x]} is not shown`;
  }
  if (c.measure === 'ratio_cii' && toCs?.position && toCs.position !== 'below') {
    return `${measureLabel(x, 'ratio_cs')} is within its interval; the pattern reads the ratio to citrate synthase, and a low ratio to complex II alone may reflect a raised complex II`;
  }
  return `the pattern does not count ${complexNames[x]} as deficient`;
}

/**
 * A band the pattern does not reflect (a complex in a band that no deficiency finding names) gets its
 * reason, on the comparison and among the notes, so no band stands beside a pattern that contradicts it
 * unexplained.
 */
function explainBands(findings: PatternFinding[], comparisons: Comparison[], notes: string[], pctThresholds: Thresholds): void {
  const reflected = new Set<string>();
  for (const f of findings) {
    if (!deficiencyKinds.includes(f.kind)) continue;
    for (const a of f.complexes) for (const m of ['activity', 'ratio_cs', 'ratio_cii'] as const) reflected.add(`${a}:${m}`);
    for (const e of f.evidence) if (e.position === 'below') reflected.add(`${e.assay}:${e.measure}`);
  }
  const byKey = new Map(comparisons.map((c) => [`${c.assay}:${c.measure}`, c]));
  const get = (a: AssayCode, m: Measure) => byKey.get(`${a}:${m}`);
  const csRaised = get('CS', 'activity')?.position === 'above';
  for (const c of comparisons) {
    if (c.band !== 'major' && c.band !== 'minor') continue;
    if (reflected.has(`${c.assay}:${c.measure}`)) continue;
    const pct = c.percentOfMean === null ? '' : ` (${formatPercentOfMean(c.percentOfMean, pctThresholds)} of the reference mean)`;
    c.bandNote = `${measureLabel(c.assay, c.measure)}${pct} is in the ${c.band} band of the criteria, but the pattern shows no deficiency of ${complexNames[c.assay]}: ${bandReason(c, get, csRaised)}`;
    notes.push(c.bandNote);
  }
}

function finish(
  findings: PatternFinding[],
  comparisons: Comparison[],
  notes: string[],
  criteria: DiagnosticCriteria,
  pctThresholds: Thresholds,
): PatternSummary {
  explainBands(findings, comparisons, notes, pctThresholds);
  return {
    findings,
    headline: findings.map((f) => f.label).join('; '),
    comparisons,
    notes,
    criteriaCitation: criteria.citation,
    criteria,
  };
}
