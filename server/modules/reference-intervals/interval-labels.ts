import { specimenTypeLabels, type AssayCode, type Measure, type SpecimenType } from '@/schemas/common';
import type { IntervalMethod, OutlierRule } from '@/schemas/reference-interval';

/** Ages print without trailing zeros: 0.5, 2, 16. */
function years(x: number): string {
  return String(Math.round(x * 100) / 100);
}

/** "0–16 y", "16 y and over", "All ages". */
export function ageBandText(minYears: number, maxYears: number | null): string {
  if (maxYears === null) return minYears === 0 ? 'All ages' : `${years(minYears)} y and over`;
  return `${years(minYears)}–${years(maxYears)} y`;
}

/** The human label a comparison records and a report prints: "Skeletal muscle · 0–16 y · v2". */
export function intervalLabel(r: {
  specimenType: SpecimenType;
  ageMinYears: number;
  ageMaxYears: number | null;
  version: number;
}): string {
  return `${specimenTypeLabels[r.specimenType]} · ${ageBandText(r.ageMinYears, r.ageMaxYears)} · v${r.version}`;
}

/**
 * The key whose versions an interval belongs to. Age bounds are written with a fixed number of decimals
 * so 16 and 16.0 give the same key.
 */
export function intervalKeyOf(k: {
  assay: AssayCode;
  measure: Measure;
  specimenType: SpecimenType;
  ageMinYears: number;
  ageMaxYears: number | null;
}): string {
  const age = (x: number | null) => (x === null ? 'open' : x.toFixed(4));
  return [k.assay, k.measure, k.specimenType, age(k.ageMinYears), age(k.ageMaxYears)].join('|');
}

export const methodDescriptions: Record<IntervalMethod, string> = {
  nonparametric: 'nonparametric 2.5th–97.5th percentiles with 90% CIs (CLSI EP28-A3c)',
  robust: 'robust biweight method (Horn, Pesce & Copeland, Clin Chem 1998;44:622–631)',
  mean2sd: 'mean ± 2 SD',
  pct_of_mean: '% of the control mean',
};

export const outlierDescriptions: Record<OutlierRule, string> = {
  none: 'no outlier screening',
  tukey: "Tukey's fences (Q1 − 1.5 IQR, Q3 + 1.5 IQR)",
  dixon: 'Dixon/Reed rule (gap over range above 1/3)',
};
