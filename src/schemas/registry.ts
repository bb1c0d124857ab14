import { z } from 'zod';
import { sexSchema } from './case';
import { assayCodeSchema, calendarDateSchema, measureSchema, specimenTypeSchema, type AssayCode } from './common';

/*
 * Cohorts: signed results searched as a group. One filter shape serves the cohort page, GET /api/registry/cohort
 * and the research export (GET /api/registry/export.csv), so every value is query-string friendly: plain strings
 * and numbers, the range conditions as short tokens that may repeat (?range=CI:ratio_cs:pct::40&range=…).
 * Only each case's current signed version counts: a corrected report replaces the version it supersedes.
 */

/** Pattern kinds as the results module writes them in pattern codes (see patternCodeOf in ./results). */
export const cohortPatterns = ['normal', 'isolated', 'combined', 'linked', 'raised_cs', 'insufficient'] as const;
export const cohortPatternSchema = z.enum(cohortPatterns);
export type CohortPattern = z.infer<typeof cohortPatternSchema>;
export const cohortPatternLabels: Record<CohortPattern, string> = {
  normal: 'No deficiency',
  isolated: 'Isolated deficiency',
  combined: 'Combined deficiency',
  linked: 'Low linked activity only',
  raised_cs: 'Raised citrate synthase',
  insufficient: 'Too little data to read',
};

/** The complexes a deficiency can name (citrate synthase is the reference, never "deficient"). */
export const cohortComplexes = ['CI', 'CII', 'CIII', 'CIV', 'CI+III', 'CII+III'] as const satisfies readonly AssayCode[];
export const cohortComplexSchema = z.enum(cohortComplexes);
export type CohortComplex = z.infer<typeof cohortComplexSchema>;

/**
 * Age at collection in completed years (the day of collection, or of receipt when collection was not recorded),
 * in bands of our choosing: infancy, early childhood, school age, adulthood, later life. Bounds are inclusive.
 */
export const ageBands = {
  under_1: { label: 'Under 1 year', min: 0, max: 0 },
  '1_to_4': { label: '1 to 4 years', min: 1, max: 4 },
  '5_to_17': { label: '5 to 17 years', min: 5, max: 17 },
  '18_to_64': { label: '18 to 64 years', min: 18, max: 64 },
  '65_plus': { label: '65 years and over', min: 65, max: null },
} as const satisfies Record<string, { label: string; min: number; max: number | null }>;
export type AgeBand = keyof typeof ageBands;
export const ageBandSchema = z.enum(Object.keys(ageBands) as [AgeBand, ...AgeBand[]]);

/** A range condition on the value itself ('value': nmol/min/mg or ratio) or on its % of the reference mean ('pct'). */
export const rangeScales = ['value', 'pct'] as const;
export const rangeScaleSchema = z.enum(rangeScales);
export type RangeScale = z.infer<typeof rangeScaleSchema>;

const optionalBound = (label: string) =>
  z
    .number({ message: `${label} must be a number` })
    .finite(`${label} must be a finite number`)
    .min(-1e9)
    .max(1e9)
    .nullable();

/** One range condition: a measure of one assay between min and max (either may be open). */
export const cohortRangeSchema = z
  .object({
    assay: assayCodeSchema,
    measure: measureSchema,
    scale: rangeScaleSchema,
    min: optionalBound('Lowest value'),
    max: optionalBound('Highest value'),
  })
  .superRefine((r, ctx) => {
    if (r.min === null && r.max === null) ctx.addIssue({ code: 'custom', path: ['min'], message: 'Give a lowest or a highest value (or both)' });
    if (r.min !== null && r.max !== null && r.min > r.max) ctx.addIssue({ code: 'custom', path: ['max'], message: 'Highest value is below the lowest' });
    if (r.assay === 'CS' && r.measure !== 'activity') ctx.addIssue({ code: 'custom', path: ['measure'], message: 'Citrate synthase has an activity only' });
    if (r.assay === 'CII' && r.measure === 'ratio_cii') ctx.addIssue({ code: 'custom', path: ['measure'], message: 'Complex II has no ratio to itself' });
  });
export type CohortRange = z.infer<typeof cohortRangeSchema>;

/** "CI:ratio_cs:pct::40" — assay, measure, scale, lowest, highest (blank for open); what the query string carries. */
export function rangeToken(r: CohortRange): string {
  return [r.assay, r.measure, r.scale, r.min ?? '', r.max ?? ''].join(':');
}

/** The parts of a range token, not yet checked (cohortRangeSchema checks them); null unless it has five parts. */
export function rangeTokenParts(token: string): Record<keyof CohortRange, unknown> | null {
  const parts = token.split(':');
  if (parts.length !== 5) return null;
  const [assay, measure, scale, min, max] = parts as [string, string, string, string, string];
  const num = (s: string) => (s.trim() === '' ? null : Number(s));
  return { assay, measure, scale, min: num(min), max: num(max) };
}

/** Parses a token already accepted by cohortFilterSchema. */
export function parseRangeToken(token: string): CohortRange {
  return cohortRangeSchema.parse(rangeTokenParts(token));
}

export const MAX_RANGES = 6;

/** Wraps a single query-string value in an array, so ?range=a and ?range=a&range=b both parse. */
const oneOrMany = (v: unknown) => (typeof v === 'string' ? [v] : v);

const rangeListSchema = z.preprocess(
  oneOrMany,
  z
    .array(z.string().max(80, 'A range is at most 80 characters'))
    .max(MAX_RANGES, `At most ${MAX_RANGES} range conditions`)
    .superRefine((tokens, ctx) => {
      tokens.forEach((token, i) => {
        const parts = rangeTokenParts(token);
        if (!parts) {
          ctx.addIssue({ code: 'custom', path: [i], message: `Range "${token}": write assay:measure:value|pct:lowest:highest, e.g. CI:ratio_cs:pct::40` });
          return;
        }
        const parsed = cohortRangeSchema.safeParse(parts);
        if (!parsed.success) {
          const issue = parsed.error.issues[0]!;
          ctx.addIssue({
            code: 'custom',
            path: [i, ...issue.path.map((p) => p as string | number)],
            message: `Range "${token}" (assay:measure:value|pct:lowest:highest): ${issue.message}`,
          });
        }
      });
    }),
);

export const cohortSortFields = ['signedOn', 'accession', 'ageYears'] as const;

/**
 * The fields of a cohort filter, without the checks across fields (extend this, then add refineCohortFilter:
 * zod refuses to extend a refined object).
 */
export const cohortFilterBaseSchema = z
  .object({
    pattern: cohortPatternSchema.optional(),
    /** Named by a deficiency finding (isolated, combined or low linked activity) of the specimen. */
    complex: cohortComplexSchema.optional(),
    specimenType: specimenTypeSchema.optional(),
    ageBand: ageBandSchema.optional(),
    sex: sexSchema.optional(),
    /** Report date: the laboratory's calendar day on which the current version was signed, inclusive. */
    signedFrom: calendarDateSchema({ label: 'Signed from' }).optional(),
    signedTo: calendarDateSchema({ label: 'Signed to' }).optional(),
    range: rangeListSchema.optional(),
    page: z.coerce.number().int().min(1, 'page starts at 1').max(100_000).optional(),
    pageSize: z.coerce.number().int().min(1).max(200, 'pageSize is at most 200').optional(),
    sort: z.enum(cohortSortFields).optional(),
    dir: z.enum(['asc', 'desc']).optional(),
  })
  .strict();

export function refineCohortFilter(f: { signedFrom?: string; signedTo?: string }, ctx: z.RefinementCtx): void {
  if (f.signedFrom && f.signedTo && f.signedFrom > f.signedTo) {
    ctx.addIssue({ code: 'custom', path: ['signedTo'], message: 'Signed to is before Signed from' });
  }
}

/** THE cohort filter: cohort page, GET /api/registry/cohort and the export parse the same query with it. */
export const cohortFilterSchema = cohortFilterBaseSchema.superRefine(refineCohortFilter);
export type CohortFilter = z.infer<typeof cohortFilterSchema>;
/** The filter without paging and order: what a saved search keeps and an export applies. */
export type CohortCriteria = Omit<CohortFilter, 'page' | 'pageSize' | 'sort' | 'dir'>;

/**
 * GET /api/registry/export.csv: the cohort criteria (no paging or order: every member is exported) and whether to
 * de-identify ('true': HIPAA Safe Harbor, docs/registry-export.md; anything else absent: the identified export).
 */
export const registryExportQuerySchema = cohortFilterBaseSchema
  .omit({ page: true, pageSize: true, sort: true, dir: true })
  .extend({ deidentified: z.enum(['true', 'false'], { message: 'deidentified is true or false' }).optional() })
  .superRefine(refineCohortFilter);
export type RegistryExportQuery = z.infer<typeof registryExportQuerySchema>;

/* ---------------------------------------------------------------- answers */

/** One value of a cohort member as signed. */
export const cohortValueSchema = z.object({
  assay: assayCodeSchema,
  measure: measureSchema,
  value: z.number().nullable(),
  pctOfMean: z.number().nullable(),
  lower: z.number().nullable(),
  upper: z.number().nullable(),
});
export type CohortValue = z.infer<typeof cohortValueSchema>;

/** One member of a cohort: a signed specimen of a case's current report. */
export const cohortMemberSchema = z.object({
  reportId: z.number().int(),
  caseId: z.number().int(),
  accession: z.string(),
  reportVersion: z.number().int(),
  reportStatus: z.enum(['final', 'corrected']),
  specimenLabel: z.string(),
  specimenType: specimenTypeSchema,
  sex: sexSchema,
  ageYears: z.number().int().nullable(),
  signedOn: z.string(),
  patternCode: z.string().nullable(),
  values: z.array(cohortValueSchema),
});
export type CohortMember = z.infer<typeof cohortMemberSchema>;

export const cohortPageSchema = z.object({
  items: z.array(cohortMemberSchema),
  total: z.number().int(),
  page: z.number().int(),
  pageSize: z.number().int(),
});
export type CohortPage = z.infer<typeof cohortPageSchema>;

/** What the plots draw, over the whole cohort (not only the page). */
export const cohortPlotsSchema = z.object({
  total: z.number().int(),
  /** Per complex: the distribution of its ratio to CS, with the reference interval most of the cohort was read against. */
  ratioToCs: z.array(
    z.object({
      assay: cohortComplexSchema,
      n: z.number().int(),
      binWidth: z.number(),
      bins: z.array(z.object({ from: z.number(), count: z.number().int() })),
      interval: z.object({ lower: z.number(), upper: z.number(), mean: z.number().nullable(), n: z.number().int() }).nullable(),
    }),
  ),
  /** Per complex: quartiles of the ratio to CS as % of the reference mean. */
  pctOfMean: z.array(
    z.object({
      assay: cohortComplexSchema,
      n: z.number().int(),
      min: z.number().nullable(),
      q1: z.number().nullable(),
      median: z.number().nullable(),
      q3: z.number().nullable(),
      max: z.number().nullable(),
    }),
  ),
});
export type CohortPlots = z.infer<typeof cohortPlotsSchema>;

/* ---------------------------------------------------------------- saved searches */

const criteriaSchema = cohortFilterBaseSchema.omit({ page: true, pageSize: true, sort: true, dir: true }).superRefine(refineCohortFilter);

export const savedSearchInputSchema = z
  .object({
    name: z.string().trim().min(1, 'Give the search a name').max(80, 'At most 80 characters'),
    filters: criteriaSchema,
  })
  .strict();
export type SavedSearchInput = z.infer<typeof savedSearchInputSchema>;

export const savedSearchSchema = z.object({
  id: z.number().int(),
  name: z.string(),
  filters: criteriaSchema,
  createdAt: z.string(),
});
export type SavedSearch = z.infer<typeof savedSearchSchema>;
export const savedSearchListSchema = z.object({ items: z.array(savedSearchSchema) });
