import {
  criteriaRuleFor,
  defaultDiagnosticCriteria,
  type ComparisonInterval,
  type CriteriaBand,
  type DiagnosticCriteria,
  type Flag,
  type IntervalPosition,
  type ValueBasis,
} from '@/schemas/assay';
import { specimenTypeLabels, type AssayCode, type Measure, type SpecimenType } from '@/schemas/common';
import { percentOfMean, zScore } from './normalise';
import { fmt } from './trace';

export interface ComparisonContext {
  specimenType: SpecimenType;
  /** Age at collection in years; null when unknown (then only all-age intervals match). */
  ageYears: number | null;
}

export interface ValueToCompare {
  assay: AssayCode;
  measure: Measure;
  value: number | null;
  /** How the value was obtained; defaults to a linear rate. */
  basis?: ValueBasis;
}

export interface Comparison {
  assay: AssayCode;
  measure: Measure;
  value: number | null;
  basis: ValueBasis;
  interval: ComparisonInterval | null;
  position: IntervalPosition | null;
  percentOfMean: number | null;
  zScore: number | null;
  /**
   * Band of the diagnostic criteria; null for citrate synthase, for a measure the rule set does not apply
   * to (criteria.appliesTo) and whenever no comparison was made.
   */
  band: CriteriaBand | null;
  /** Why a band is shown that the case's pattern does not reflect; set by summarisePattern. */
  bandNote: string | null;
  flags: Flag[];
}

function ageMatches(i: ComparisonInterval, age: number | null): boolean {
  if (age === null) return i.ageFromYears === null && i.ageToYears === null;
  return (i.ageFromYears === null || age >= i.ageFromYears) && (i.ageToYears === null || age < i.ageToYears);
}

function ageWidth(i: ComparisonInterval): number {
  return (i.ageToYears ?? Number.POSITIVE_INFINITY) - (i.ageFromYears ?? 0);
}

/**
 * The interval for an assay, measure, specimen type and age. Among several, one of the value's basis
 * wins, then the narrowest age band, then the latest version. An interval of the other basis is
 * returned only when none matches, so the comparison can say why it refused.
 */
export function findInterval(
  intervals: readonly ComparisonInterval[],
  assay: AssayCode,
  measure: Measure,
  context: ComparisonContext,
  basis: ValueBasis = 'linear_rate',
): ComparisonInterval | null {
  let best: ComparisonInterval | null = null;
  for (const i of intervals) {
    if (i.assay !== assay || i.measure !== measure || i.specimenType !== context.specimenType) continue;
    if (!ageMatches(i, context.ageYears)) continue;
    if (!best) {
      best = i;
      continue;
    }
    const bestBasisOk = best.basis === basis;
    const iBasisOk = i.basis === basis;
    if (iBasisOk !== bestBasisOk) {
      if (iBasisOk) best = i;
      continue;
    }
    const wi = ageWidth(i);
    const wb = ageWidth(best);
    if (wi < wb || (wi === wb && i.version > best.version)) best = i;
  }
  return best;
}

/** Band of the diagnostic criteria for a value at `pct` % of the control mean. */
export function criteriaBand(
  pct: number,
  specimenType: SpecimenType,
  criteria: DiagnosticCriteria = defaultDiagnosticCriteria,
): CriteriaBand {
  const rule = criteriaRuleFor(specimenType, criteria);
  if (pct < rule.majorBelowPct) return 'major';
  if (pct < rule.minorBelowPct) return 'minor';
  return 'not_met';
}

export function measureLabel(assay: AssayCode, measure: Measure): string {
  if (measure === 'ratio_cs') return `${assay}/CS`;
  if (measure === 'ratio_cii') return `${assay}/CII`;
  return `${assay} activity`;
}

/**
 * A value against its interval: below, within (bounds inclusive) or above; % of the reference mean;
 * z-score when the SD is known; and the criteria band for respiratory-chain complexes, on the measure the
 * rule set applies to (by default the ratio to citrate synthase), decided on the unrounded % of mean.
 */
export function compareValue(
  v: ValueToCompare,
  interval: ComparisonInterval | null,
  context: ComparisonContext,
  criteria: DiagnosticCriteria = defaultDiagnosticCriteria,
): Comparison {
  const basis = v.basis ?? 'linear_rate';
  const flags: Flag[] = [];
  const base: Comparison = {
    assay: v.assay,
    measure: v.measure,
    value: v.value,
    basis,
    interval,
    position: null,
    percentOfMean: null,
    zScore: null,
    band: null,
    bandNote: null,
    flags,
  };
  const label = measureLabel(v.assay, v.measure);
  if (v.value === null || !Number.isFinite(v.value)) {
    flags.push({ code: 'MISSING_VALUE', message: `${label}: no value to compare` });
    return base;
  }
  if (!interval) {
    flags.push({
      code: 'NO_INTERVAL',
      message: `${label}: no reference interval for ${specimenTypeLabels[context.specimenType].toLowerCase()}${context.ageYears === null ? '' : ` at ${fmt(context.ageYears, 3)} years`}`,
    });
    return base;
  }
  if (interval.basis !== basis) {
    flags.push({
      code: 'BASIS_MISMATCH',
      message: `${label}: a ${basis === 'first_order_k' ? 'first-order rate constant' : 'linear rate'} is never compared with an interval built from ${interval.basis === 'first_order_k' ? 'first-order rate constants' : 'linear rates'} (${interval.setLabel})`,
    });
    return base;
  }
  const value = v.value;
  base.position = value < interval.lower ? 'below' : value > interval.upper ? 'above' : 'within';
  base.percentOfMean = percentOfMean(value, interval.mean);
  base.zScore = zScore(value, interval.mean, interval.sd);
  const banded = v.assay !== 'CS' && v.measure === criteria.appliesTo;
  base.band = banded ? criteriaBand(base.percentOfMean, context.specimenType, criteria) : null;
  return base;
}
