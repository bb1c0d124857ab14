import type { AssayCode, Measure } from '@/schemas/common';
import type { IntervalMethod, OutlierRule, ReferenceIntervalStatus } from '@/schemas/reference-interval';

export const assayNames: Record<AssayCode, string> = {
  CI: 'Complex I',
  CII: 'Complex II',
  CIII: 'Complex III',
  CIV: 'Complex IV',
  'CI+III': 'Complexes I+III',
  'CII+III': 'Complexes II+III',
  CS: 'Citrate synthase',
};

export function measureText(assay: AssayCode, measure: Measure): string {
  if (measure === 'ratio_cs') return `${assay}/CS ratio`;
  if (measure === 'ratio_cii') return `${assay}/CII ratio`;
  return `${assay} activity`;
}

export const measureNames: Record<Measure, string> = {
  activity: 'Activity',
  ratio_cs: 'Ratio to CS',
  ratio_cii: 'Ratio to CII',
};

export const methodNames: Record<IntervalMethod, string> = {
  nonparametric: 'Nonparametric (EP28)',
  robust: 'Robust (biweight)',
  mean2sd: 'Mean ± 2 SD',
  pct_of_mean: '% of control mean',
};

export const methodHints: Record<IntervalMethod, string> = {
  nonparametric: '2.5th and 97.5th percentiles with 90% CIs; needs 120 values or more (CLSI EP28-A3c).',
  robust: 'Biweight location and scale (Horn, Pesce & Copeland 1998); for 20 to 119 values, assumes symmetry.',
  mean2sd: 'Mean ± 2 sample SDs; assumes a roughly Gaussian distribution; 10 values or more.',
  pct_of_mean: 'Limits at 30% and 170% of the control mean; for very small control groups.',
};

export const outlierNames: Record<OutlierRule, string> = {
  none: 'No screening',
  tukey: 'Tukey fences (1.5 × IQR)',
  dixon: 'Dixon/Reed (gap > ⅓ range)',
};

export const statusNames: Record<ReferenceIntervalStatus, string> = {
  draft: 'Draft',
  approved: 'Approved',
  retired: 'Retired',
};

/** "0–16 y", "16 y and over", "All ages". */
export function ageText(band: { minYears: number; maxYears: number | null }): string {
  const y = (x: number) => String(Math.round(x * 100) / 100);
  if (band.maxYears === null) return band.minYears === 0 ? 'All ages' : `${y(band.minYears)} y and over`;
  return `${y(band.minYears)}–${y(band.maxYears)} y`;
}

/** Numbers with a precision that suits their size, for limits, means and ratios alike. */
export function num(x: number | null | undefined): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '—';
  const abs = Math.abs(x);
  const decimals = abs >= 100 ? 1 : abs >= 10 ? 2 : 3;
  return x.toFixed(decimals);
}

export function periodText(p: { effectiveFrom: string; effectiveTo: string | null }): string {
  return p.effectiveTo === null ? `from ${p.effectiveFrom}` : `${p.effectiveFrom} until ${p.effectiveTo}`;
}

export function todayIso(): string {
  return new Date().toISOString().slice(0, 10);
}
