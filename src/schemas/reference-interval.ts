import { z } from 'zod';
import { readPastedNumbers } from './pasted-numbers';
import { assayCodeSchema, calendarDateSchema, EARLIEST_DATE, measureSchema, plainText, specimenTypeSchema } from './common';

/**
 * How an interval's limits were obtained. Recorded with every stored interval (domain.md §3: "record the
 * method with every interval").
 */
export const intervalMethods = ['nonparametric', 'robust', 'mean2sd', 'pct_of_mean'] as const;
export const intervalMethodSchema = z.enum(intervalMethods);
export type IntervalMethod = z.infer<typeof intervalMethodSchema>;

/** The methods the derive endpoint accepts (API contract); "% of control mean" is set by the caller. */
export const deriveMethodSchema = intervalMethodSchema.extract(['nonparametric', 'robust', 'mean2sd']);
export type DeriveMethod = z.infer<typeof deriveMethodSchema>;

export const outlierRules = ['none', 'tukey', 'dixon'] as const;
export const outlierRuleSchema = z.enum(outlierRules);
export type OutlierRule = z.infer<typeof outlierRuleSchema>;

/** Upper bound on a list of reference values in one request; keeps a request body reasonable. */
export const maxReferenceValues = 20_000;

// zod 4's z.number() already refuses NaN and ±Infinity.
const valueListSchema = z
  .array(z.number({ error: 'Every value must be a finite number' }))
  .min(1, 'Enter at least one value')
  .max(maxReferenceValues, `At most ${maxReferenceValues} values`);

/** POST /api/reference-intervals/derive body. */
export const deriveRequestSchema = z
  .object({
    method: deriveMethodSchema,
    outliers: outlierRuleSchema,
    values: valueListSchema,
  })
  .strict();
export type DeriveRequest = z.infer<typeof deriveRequestSchema>;

const limitCiSchema = z.tuple([z.number(), z.number()]).nullable();
const rankPairSchema = z.tuple([z.number().int(), z.number().int()]);

/**
 * POST /api/reference-intervals/derive response. `n` counts the values kept after outlier exclusion.
 * The fields after `warnings` are additions to the contract and may be ignored by callers.
 */
export const deriveResultSchema = z.object({
  n: z.number().int().nonnegative(),
  lower: z.number(),
  upper: z.number(),
  lowerCi: limitCiSchema,
  upperCi: limitCiSchema,
  excluded: z.array(z.number()),
  warnings: z.array(z.string()),
  method: intervalMethodSchema,
  outliers: outlierRuleSchema,
  /** Arithmetic mean and sample SD (n − 1) of the kept values; sd is null when n < 2. */
  mean: z.number(),
  sd: z.number().nullable(),
  /** Nonparametric only: fractional ranks of the limits and the integer ranks bounding each 90% CI. */
  ranks: z
    .object({
      lower: z.number(),
      upper: z.number(),
      lowerCi: rankPairSchema,
      upperCi: rankPairSchema,
      ciCoverage: z.number(),
    })
    .nullable(),
  /** Robust only: biweight location, spread, standard error of the location and the t multiplier. */
  robust: z
    .object({
      location: z.number(),
      spread: z.number(),
      locationSe: z.number(),
      t: z.number(),
    })
    .nullable(),
});
export type DeriveResult = z.infer<typeof deriveResultSchema>;

// ---------------------------------------------------------------------------------------------
// Stored intervals

export const referenceIntervalStatuses = ['draft', 'approved', 'retired'] as const;
export const referenceIntervalStatusSchema = z.enum(referenceIntervalStatuses);
export type ReferenceIntervalStatus = z.infer<typeof referenceIntervalStatusSchema>;

/** An age band: minYears inclusive, maxYears exclusive, maxYears null meaning "and older". */
export const ageBandSchema = z
  .object({
    label: z.string().trim().min(1, 'Name the age band').max(60, 'At most 60 characters').superRefine(plainText('Age band')),
    minYears: z.number().min(0, 'Age cannot be negative').max(130, 'At most 130 years'),
    maxYears: z.number().min(0, 'Age cannot be negative').max(130, 'At most 130 years').nullable(),
  })
  .superRefine((band, ctx) => {
    if (band.maxYears !== null && band.maxYears <= band.minYears) {
      ctx.addIssue({
        code: 'custom',
        path: ['maxYears'],
        message: 'The upper age must be greater than the lower age',
      });
    }
  });
export type AgeBand = z.infer<typeof ageBandSchema>;

const referenceIntervalInputObject = z.object({
  assay: assayCodeSchema,
  measure: measureSchema,
  specimenType: specimenTypeSchema,
  ageBand: ageBandSchema,
  lower: z.number(),
  upper: z.number(),
  mean: z.number(),
  sd: z.number().nonnegative('SD cannot be negative').nullable(),
  n: z.number().int('n must be a whole number').positive('n must be at least 1'),
  method: intervalMethodSchema,
  sourceNote: z
    .string()
    .trim()
    .min(1, 'Say where the interval comes from')
    .max(2000, 'At most 2000 characters')
    .superRefine(plainText('Source note', true)),
  effectiveFrom: calendarDateSchema({ label: 'Effective from', notBefore: EARLIEST_DATE }),
  effectiveTo: calendarDateSchema({ label: 'Effective to', notBefore: EARLIEST_DATE }).nullable(),
});

type IntervalOrderingFields = Partial<
  Pick<z.infer<typeof referenceIntervalInputObject>, 'lower' | 'upper' | 'effectiveFrom' | 'effectiveTo'>
>;

/**
 * Cross-field rules of an interval. Exported so a service can run them on the merged record of a
 * partial update, where one side of a pair may come from the stored row.
 */
export function findIntervalOrderingProblems(
  v: IntervalOrderingFields,
): { path: 'upper' | 'effectiveTo'; message: string }[] {
  const problems: { path: 'upper' | 'effectiveTo'; message: string }[] = [];
  if (v.lower !== undefined && v.upper !== undefined && !(v.lower < v.upper)) {
    problems.push({ path: 'upper', message: 'The upper limit must be greater than the lower limit' });
  }
  if (
    v.effectiveFrom !== undefined &&
    v.effectiveTo !== undefined &&
    v.effectiveTo !== null &&
    v.effectiveTo <= v.effectiveFrom
  ) {
    // ISO dates compare correctly as strings.
    problems.push({ path: 'effectiveTo', message: 'The end date must be after the start date' });
  }
  return problems;
}

function refineOrdering(v: IntervalOrderingFields, ctx: z.RefinementCtx): void {
  for (const p of findIntervalOrderingProblems(v)) {
    ctx.addIssue({ code: 'custom', path: [p.path], message: p.message });
  }
}

export const createReferenceIntervalInputSchema =
  referenceIntervalInputObject.superRefine(refineOrdering);
export type CreateReferenceIntervalInput = z.infer<typeof createReferenceIntervalInputSchema>;

export const updateReferenceIntervalInputSchema = referenceIntervalInputObject
  .partial()
  .superRefine(refineOrdering);
export type UpdateReferenceIntervalInput = z.infer<typeof updateReferenceIntervalInputSchema>;

export const referenceIntervalSchema = referenceIntervalInputObject.extend({
  id: z.number().int().positive(),
  version: z.number().int().positive(),
  status: referenceIntervalStatusSchema,
  /** User id of the director who approved this version. */
  approvedBy: z.number().int().positive().nullable(),
  approvedAt: z.iso.datetime({ offset: true }).nullable(),
});
export type ReferenceInterval = z.infer<typeof referenceIntervalSchema>;

// ---------------------------------------------------------------------------------------------
// Verification of an interval adopted from elsewhere

export const minVerificationValues = 20;

/** Longest pasted text accepted for one set of values (far more than the 20 000 values allowed need). */
const MAX_PASTED_CHARACTERS = 400_000;

/**
 * One set of local values: an array of numbers, or the text as pasted, read by the shared convention of
 * ./pasted-numbers (a point for decimals; an ambiguous comma between digits is refused naming its line).
 */
const verificationValuesSchema = z.preprocess(
  (input, ctx) => {
    if (typeof input !== 'string') return input;
    if (input.length > MAX_PASTED_CHARACTERS) {
      ctx.addIssue({ code: 'custom', message: `Paste at most ${MAX_PASTED_CHARACTERS} characters` });
      return z.NEVER;
    }
    const { values, problem } = readPastedNumbers(input);
    if (problem) {
      ctx.addIssue({ code: 'custom', message: problem });
      return z.NEVER;
    }
    return values;
  },
  z
    .array(z.number({ error: 'Every value must be a finite number' }))
    .min(minVerificationValues, `Verification needs at least ${minVerificationValues} local values`)
    .max(maxReferenceValues, `At most ${maxReferenceValues} values`),
);

export const verificationRequestSchema = z
  .object({
    lower: z.number(),
    upper: z.number(),
    /** The first set of local reference values (20 by convention). */
    values: verificationValuesSchema,
    /** A second, new set, tested when the first set failed. */
    additionalValues: verificationValuesSchema.optional(),
  })
  .strict()
  .superRefine(refineOrdering);
export type VerificationRequest = z.infer<typeof verificationRequestSchema>;
/** What a caller may send: each set as numbers or as the pasted text. */
export type VerificationRequestBody = Omit<VerificationRequest, 'values' | 'additionalValues'> & {
  values: number[] | string;
  additionalValues?: number[] | string;
};

export const verificationDecisionSchema = z.enum(['verified', 'test_more', 'not_verified']);
export type VerificationDecision = z.infer<typeof verificationDecisionSchema>;

export const verificationRoundSchema = z.object({
  n: z.number().int().nonnegative(),
  below: z.number().int().nonnegative(),
  above: z.number().int().nonnegative(),
  outside: z.number().int().nonnegative(),
  allowedOutside: z.number().int().nonnegative(),
  passed: z.boolean(),
});
export type VerificationRound = z.infer<typeof verificationRoundSchema>;

export const verificationResultSchema = z.object({
  decision: verificationDecisionSchema,
  firstRound: verificationRoundSchema,
  secondRound: verificationRoundSchema.nullable(),
  message: z.string(),
});
export type VerificationResult = z.infer<typeof verificationResultSchema>;

// ---------------------------------------------------------------------------------------------
// Partition check between two groups (e.g. age bands)

export const partitionGroupSummarySchema = z.object({
  label: z.string(),
  n: z.number().int().positive(),
  mean: z.number(),
  sd: z.number().nonnegative(),
});
export type PartitionGroupSummary = z.infer<typeof partitionGroupSummarySchema>;

export const partitionCheckResultSchema = z.object({
  groups: z.tuple([partitionGroupSummarySchema, partitionGroupSummarySchema]),
  z: z.number(),
  zCritical: z.number(),
  sdRatio: z.number(),
  sdRatioLimit: z.number(),
  decision: z.enum(['partition', 'combine']),
  reason: z.string(),
});
export type PartitionCheckResult = z.infer<typeof partitionCheckResultSchema>;

// ---------------------------------------------------------------------------------------------
// Control-data CSV upload

/** One problem in an uploaded file; row counts the header as row 1, as a spreadsheet does. */
export const controlCsvIssueSchema = z.object({
  row: z.number().int().positive().nullable(),
  column: z.string().nullable(),
  message: z.string(),
});
export type ControlCsvIssue = z.infer<typeof controlCsvIssueSchema>;

export const controlSubjectSchema = z.object({
  row: z.number().int().positive(),
  controlId: z.string().nullable(),
  specimenType: specimenTypeSchema,
  ageYears: z.number().nonnegative(),
  activities: z.partialRecord(assayCodeSchema, z.number().nonnegative()),
});
export type ControlSubject = z.infer<typeof controlSubjectSchema>;

export const controlSeriesPointSchema = z.object({
  row: z.number().int().positive(),
  ageYears: z.number().nonnegative(),
  value: z.number(),
});

/** Values of one measure of one assay in one specimen type, with each subject's age for banding. */
export const controlSeriesSchema = z.object({
  specimenType: specimenTypeSchema,
  assay: assayCodeSchema,
  measure: measureSchema,
  points: z.array(controlSeriesPointSchema),
});
export type ControlSeries = z.infer<typeof controlSeriesSchema>;

export const controlDataUploadResultSchema = z.object({
  rowCount: z.number().int().nonnegative(),
  /** The activity unit the file declared (header suffix or unit column), or null if it declared none. */
  unit: z.string().nullable(),
  assays: z.array(assayCodeSchema),
  specimenTypes: z.array(specimenTypeSchema),
  subjects: z.array(controlSubjectSchema),
  series: z.array(controlSeriesSchema),
  warnings: z.array(z.string()),
});
export type ControlDataUploadResult = z.infer<typeof controlDataUploadResultSchema>;
