import { z } from 'zod';
import { valueBasisSchema } from './assay';
import { assayCodeSchema, calendarDateSchema, EARLIEST_DATE, measureSchema, plainText, specimenTypeSchema } from './common';
import {
  ageBandSchema,
  controlDataUploadResultSchema,
  createReferenceIntervalInputSchema,
  deriveResultSchema,
  findIntervalOrderingProblems,
  intervalMethodSchema,
  outlierRuleSchema,
  partitionCheckResultSchema,
  referenceIntervalSchema,
  updateReferenceIntervalInputSchema,
} from './reference-interval';

/*
 * Request and response shapes of the reference-interval routes beyond ./reference-interval (storage
 * provenance, control uploads, approval). The server's router parses requests with these, the client's
 * forms and API calls use the same ones, and the API tests parse every response with the response schemas.
 */

const setNameSchema = (example: string) =>
  z
    .string()
    .trim()
    .min(1, `Name the interval set, e.g. "${example}"`)
    .max(160, 'At most 160 characters')
    .superRefine(plainText('Set name'));

// ---------------------------------------------------------------------------------------------
// Requests

/** POST /api/reference-intervals: a draft typed in (e.g. adopted from a publication or another lab). */
export const createIntervalBodySchema = z.intersection(
  createReferenceIntervalInputSchema,
  z.object({
    setName: setNameSchema('Muscle 2026'),
    /** Defaults to nmol/min/mg protein for activities and "ratio" for ratios. */
    unit: z.string().trim().min(1, 'Give the unit').max(40, 'At most 40 characters').optional(),
  }),
);
export type CreateIntervalBody = z.infer<typeof createIntervalBodySchema>;

/** The "New interval" form: the shared interval input plus the name of the set it belongs to. */
export const newIntervalFormSchema = z.intersection(
  // First, so its plain messages win over the generic ones for empty number inputs (NaN).
  z.object({
    setName: setNameSchema('Liver 2026'),
    ageBand: z.object({ minYears: z.number({ error: 'Enter the lower age (0 from birth)' }) }),
    lower: z.number({ error: 'Enter the lower limit' }),
    upper: z.number({ error: 'Enter the upper limit' }),
    mean: z.number({ error: 'Enter the mean' }),
    n: z.number({ error: 'Enter how many reference individuals' }),
  }),
  createReferenceIntervalInputSchema,
);
export type NewIntervalInput = z.infer<typeof newIntervalFormSchema>;

const pctSchema = z.number().positive('Must be above 0').max(1000, 'At most 1000%');

/** What to derive from a stored control file: one series, one age band, one method. */
export const controlSelectionSchema = z
  .object({
    specimenType: specimenTypeSchema,
    assay: assayCodeSchema,
    measure: measureSchema,
    ageBand: ageBandSchema,
    method: intervalMethodSchema,
    outliers: outlierRuleSchema,
    /** "% of control mean" only: the limits as percentages of the mean (defaults 30 and 170). */
    pctLower: pctSchema.optional(),
    pctUpper: pctSchema.optional(),
  })
  .strict()
  .superRefine((v, ctx) => {
    if (v.pctLower !== undefined && v.pctUpper !== undefined && !(v.pctLower < v.pctUpper)) {
      ctx.addIssue({ code: 'custom', path: ['pctUpper'], message: 'Must be greater than the lower percentage' });
    }
  });
export type ControlSelection = z.infer<typeof controlSelectionSchema>;

/** POST /api/reference-intervals/controls/:id/draft */
export const draftFromControlsBodySchema = z.intersection(
  controlSelectionSchema,
  z
    .object({
      setName: setNameSchema('Muscle 2026'),
      effectiveFrom: calendarDateSchema({ label: 'Effective from', notBefore: EARLIEST_DATE }),
      effectiveTo: calendarDateSchema({ label: 'Effective to', notBefore: EARLIEST_DATE }).nullable(),
      /** Added to the generated source note. */
      note: z.string().trim().max(1000, 'At most 1000 characters').superRefine(plainText('Note', true)).optional(),
    })
    .superRefine((v, ctx) => {
      for (const p of findIntervalOrderingProblems(v)) ctx.addIssue({ code: 'custom', path: [p.path], message: p.message });
    }),
);
export type DraftFromControlsBody = z.infer<typeof draftFromControlsBodySchema>;
/** The client's name for the same body. */
export type DraftFromControlsInput = DraftFromControlsBody;

const revisionSchema = z.number({ error: 'Send the revision you saw' }).int().nonnegative();

export const revisionBodySchema = z.object({ revision: revisionSchema }).strict();

export const retireBodySchema = z
  .object({
    revision: revisionSchema,
    reason: z
      .string()
      .trim()
      .min(1, 'Say why the interval is withdrawn')
      .max(500, 'At most 500 characters')
      .superRefine(plainText('Reason', true)),
  })
  .strict();
export type RetireBody = z.infer<typeof retireBodySchema>;

/**
 * PATCH /api/reference-intervals/:id: changes to a draft before it is approved (any subset of its fields, with the
 * revision seen). Its series (assay, measure, specimen type, age limits) stays: a different series is a new draft.
 */
export const editDraftBodySchema = z.intersection(
  updateReferenceIntervalInputSchema,
  z.object({
    revision: revisionSchema,
    setName: setNameSchema('Muscle 2026').optional(),
    unit: z.string().trim().min(1, 'Give the unit').max(40, 'At most 40 characters').optional(),
  }),
);
export type EditDraftBody = z.infer<typeof editDraftBodySchema>;

const groupSchema = z.object({
  label: z.string().trim().min(1, 'Name the group').max(60).superRefine(plainText('Group name')),
  values: z.array(z.number({ error: 'Every value must be a finite number' })).max(20_000),
});
/** POST /api/reference-intervals/partition: Harris & Boyd check between two groups. */
export const partitionBodySchema = z.object({ groups: z.tuple([groupSchema, groupSchema]) }).strict();
export type PartitionBody = z.infer<typeof partitionBodySchema>;

export const controlUploadIdParamsSchema = z.object({ id: z.coerce.number().int().positive() });

// ---------------------------------------------------------------------------------------------
// Responses

const ciSchema = z.tuple([z.number(), z.number()]).nullable();

export const intervalDerivationSchema = z.object({
  outliers: outlierRuleSchema,
  excluded: z.array(z.number()),
  lowerCi: ciSchema,
  upperCi: ciSchema,
  warnings: z.array(z.string()),
  pctLower: z.number().nullable(),
  pctUpper: z.number().nullable(),
});
export type IntervalDerivation = z.infer<typeof intervalDerivationSchema>;

/** A stored interval version as every route (and findApplicableInterval) returns it. */
export const storedIntervalSchema = referenceIntervalSchema.extend({
  /** Optimistic-locking counter; send it back to approve or retire. */
  revision: z.number().int().nonnegative(),
  /** Groups the versions of one assay × measure × specimen type × age band. */
  intervalKey: z.string(),
  /** Human label that a comparison prints, e.g. "Skeletal muscle · 0–16 y · v2". */
  label: z.string(),
  setName: z.string(),
  unit: z.string(),
  basis: valueBasisSchema,
  derivation: intervalDerivationSchema.nullable(),
  /** The control file the interval was derived from. */
  upload: z.object({ id: z.number().int(), filename: z.string(), sha256: z.string() }).nullable(),
  createdBy: z.number().int().nullable(),
  createdByName: z.string().nullable(),
  createdAt: z.string(),
  approvedByName: z.string().nullable(),
  retiredBy: z.number().int().nullable(),
  retiredByName: z.string().nullable(),
  retiredAt: z.string().nullable(),
  retireReason: z.string().nullable(),
});
export type StoredInterval = z.infer<typeof storedIntervalSchema>;

export const intervalListSchema = z.object({ items: z.array(storedIntervalSchema) });

export const controlUploadSummarySchema = z.object({
  id: z.number().int(),
  filename: z.string(),
  sizeBytes: z.number().int(),
  sha256: z.string(),
  uploadedBy: z.number().int().nullable(),
  uploadedByName: z.string().nullable(),
  createdAt: z.string(),
});
export type ControlUploadSummary = z.infer<typeof controlUploadSummarySchema>;

export const controlUploadListSchema = z.object({ items: z.array(controlUploadSummarySchema) });

export const controlUploadDetailSchema = controlUploadSummarySchema.extend({
  data: controlDataUploadResultSchema,
});
export type ControlUploadDetail = z.infer<typeof controlUploadDetailSchema>;

export const controlUploadResponseSchema = controlUploadDetailSchema.extend({ alreadyStored: z.boolean() });

export const controlPreviewSchema = z.object({
  result: deriveResultSchema,
  /** Every value of the selected series and age band, before outlier exclusion, ascending. */
  values: z.array(z.number()),
  unit: z.string(),
  /** Harris & Boyd check of this band against the rest of the series, or null when it cannot be run. */
  partition: partitionCheckResultSchema.nullable(),
  partitionNote: z.string().nullable(),
});
export type ControlPreview = z.infer<typeof controlPreviewSchema>;
