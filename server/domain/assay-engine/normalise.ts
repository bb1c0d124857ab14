import type { Flag } from '@/schemas/assay';
import type { AssayCode, Measure } from '@/schemas/common';

/*
 * Activities relative to citrate synthase absorb differences in tissue quality, handling and
 * mitochondrial content (Frazier et al. 2020 [confirmed]); relative to complex II, wholly nuclear-encoded
 * [common practice], they separate an isolated defect from low mitochondrial content
 * (docs/domain.md §2).
 */

export type ActivityMap = Partial<Record<AssayCode, number | null>>;

/** Complexes expressed relative to CS. */
export const ratioToCsAssays = ['CI', 'CII', 'CIII', 'CIV', 'CI+III', 'CII+III'] as const satisfies readonly AssayCode[];
/** Complexes expressed relative to CII. */
export const ratioToCiiAssays = ['CI', 'CIII', 'CIV'] as const satisfies readonly AssayCode[];

export interface RatioValue {
  assay: AssayCode;
  measure: Exclude<Measure, 'activity'>;
  value: number | null;
  flags: Flag[];
}

function ratio(
  activities: ActivityMap,
  assay: AssayCode,
  denominator: 'CS' | 'CII',
  measure: RatioValue['measure'],
): RatioValue {
  const num = activities[assay];
  const den = activities[denominator];
  const flags: Flag[] = [];
  if (num === null || num === undefined) {
    flags.push({ code: 'MISSING_VALUE', message: `${assay}/${denominator}: no ${assay} activity` });
    return { assay, measure, value: null, flags };
  }
  if (den === null || den === undefined || !(den > 0) || !Number.isFinite(den)) {
    flags.push({
      code: 'NO_DENOMINATOR',
      message: `${assay}/${denominator}: the ${denominator} activity is ${den === null || den === undefined ? 'missing' : `not a positive number (${String(den)})`}`,
    });
    return { assay, measure, value: null, flags };
  }
  return { assay, measure, value: num / den, flags };
}

/** X/CS for every complex and X/CII for complexes I, III and IV. */
export function computeRatios(activities: ActivityMap): RatioValue[] {
  const out: RatioValue[] = [];
  for (const a of ratioToCsAssays) out.push(ratio(activities, a, 'CS', 'ratio_cs'));
  for (const a of ratioToCiiAssays) out.push(ratio(activities, a, 'CII', 'ratio_cii'));
  return out;
}

/** Value as a percentage of the reference mean. */
export function percentOfMean(value: number, referenceMean: number): number {
  return (100 * value) / referenceMean;
}

/** Standard score against the reference mean and SD; null when the SD is not known. */
export function zScore(value: number, referenceMean: number, referenceSd: number | null): number | null {
  if (referenceSd === null || !(referenceSd > 0)) return null;
  return (value - referenceMean) / referenceSd;
}
