import type { FieldErrors, ResolverResult } from 'react-hook-form';
import {
  cohortFilterBaseSchema,
  cohortFilterSchema,
  type CohortCriteria,
  type CohortFilter,
} from '@/schemas/registry';

/*
 * The cohort view's state lives in the address bar (bookmark it, send it, run it again), in exactly the query
 * string GET /api/registry/cohort and the research export read: the shared cohortFilterSchema parses both.
 */

export const DEFAULT_PAGE_SIZE = 25;
export const pageSizes = [25, 50, 100, 200] as const;

const scalarKeys = Object.keys(cohortFilterBaseSchema.shape).filter((k) => k !== 'range') as (keyof CohortFilter)[];

/** The filter in the address bar; an edited link that does not parse is reported, and the view falls back to no filter. */
export function readCohortParams(params: URLSearchParams): { filter: CohortFilter; problem: string | null } {
  const raw: Record<string, unknown> = {};
  for (const key of scalarKeys) {
    const v = params.get(key);
    if (v !== null && v !== '') raw[key] = v;
  }
  const ranges = params.getAll('range').filter((r) => r !== '');
  if (ranges.length) raw.range = ranges;
  const parsed = cohortFilterSchema.safeParse(raw);
  if (parsed.success) return { filter: parsed.data, problem: null };
  const issue = parsed.error.issues[0]!;
  return { filter: {}, problem: `The link’s ${issue.path.join('.') || 'filter'} is not valid (${issue.message}); showing every signed case.` };
}

/** The filter as a query string (no leading "?"), ranges repeated. */
export function cohortQueryString(f: CohortFilter): string {
  const sp = new URLSearchParams();
  for (const [k, v] of Object.entries(f)) {
    if (v === undefined || v === null || v === '') continue;
    if (Array.isArray(v)) for (const item of v) sp.append(k, String(item));
    else sp.set(k, String(v));
  }
  return sp.toString();
}

export function criteriaOf(f: CohortFilter): CohortCriteria {
  const { page: _p, pageSize: _s, sort: _o, dir: _d, ...criteria } = f;
  return criteria;
}

export function hasCriteria(f: CohortFilter): boolean {
  return Object.values(criteriaOf(f)).some((v) => (Array.isArray(v) ? v.length > 0 : v !== undefined));
}

/* ---------------------------------------------------------------- the form */

export type RangeRow = { assay: string; measure: string; scale: string; min: string; max: string };
/** What the form's controls hold: text, '' for "any". */
export type CohortFormValues = {
  pattern: string;
  complex: string;
  specimenType: string;
  ageBand: string;
  sex: string;
  signedFrom: string;
  signedTo: string;
  ranges: RangeRow[];
};

export const emptyRange: RangeRow = { assay: 'CI', measure: 'ratio_cs', scale: 'pct', min: '', max: '' };

export function formValuesOf(f: CohortCriteria): CohortFormValues {
  return {
    pattern: f.pattern ?? '',
    complex: f.complex ?? '',
    specimenType: f.specimenType ?? '',
    ageBand: f.ageBand ?? '',
    sex: f.sex ?? '',
    signedFrom: f.signedFrom ?? '',
    signedTo: f.signedTo ?? '',
    ranges: (f.range ?? []).map((token) => {
      const [assay = '', measure = '', scale = '', min = '', max = ''] = token.split(':');
      return { assay, measure, scale, min, max };
    }),
  };
}

function rawFilterOf(v: CohortFormValues): Record<string, unknown> {
  const raw: Record<string, unknown> = {};
  for (const key of ['pattern', 'complex', 'specimenType', 'ageBand', 'sex', 'signedFrom', 'signedTo'] as const) {
    if (v[key] !== '') raw[key] = v[key];
  }
  if (v.ranges.length) raw.range = v.ranges.map((r) => [r.assay, r.measure, r.scale, r.min.trim(), r.max.trim()].join(':'));
  return raw;
}

/**
 * react-hook-form's resolver for the cohort form: the form's values become the query the server reads and are
 * checked with the shared cohortFilterSchema; a range's message goes beside its row's control.
 */
export function cohortFormResolver(values: CohortFormValues): ResolverResult<CohortFormValues, CohortCriteria> {
  const parsed = cohortFilterSchema.safeParse(rawFilterOf(values));
  if (parsed.success) return { values: criteriaOf(parsed.data), errors: {} };
  const errors: Record<string, unknown> = {};
  for (const issue of parsed.error.issues) {
    const [head, index, field] = issue.path.map(String);
    if (head === 'range') {
      const rows = (errors.ranges ??= []) as Record<string, unknown>[];
      const row = (rows[Number(index)] ??= {});
      const message = issue.message.replace(/^Range "[^"]*"(?: \([^)]*\))?: /, '');
      (row as Record<string, unknown>)[field ?? 'min'] ??= { type: 'validate', message };
    } else if (head) {
      errors[head] ??= { type: 'validate', message: issue.message };
    }
  }
  return { values: {}, errors: errors as FieldErrors<CohortFormValues> };
}
