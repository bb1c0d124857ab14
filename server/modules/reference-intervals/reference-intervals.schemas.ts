import { z } from 'zod';
import type { ValueBasis } from '@/schemas/assay';
import { assayCodeSchema, measureSchema, specimenTypeSchema } from '@/schemas/common';
import {
  ageBandSchema,
  createReferenceIntervalInputSchema,
  findIntervalOrderingProblems,
  intervalMethodSchema,
  outlierRuleSchema,
  type ControlDataUploadResult,
  type DeriveResult,
  type OutlierRule,
  type PartitionCheckResult,
  type ReferenceInterval,
} from '@/schemas/reference-interval';

/*
 * Request schemas and response types of the reference-interval routes that the shared schema file does
 * not cover (storage provenance, control uploads, approval). The client mirrors the response shapes in
 * src/features/reference-intervals/api/interval-schemas.ts, and the API tests parse every response with
 * those mirrors, so the two cannot drift apart unnoticed.
 */

const setNameSchema = z
  .string()
  .trim()
  .min(1, 'Name the interval set, e.g. "Muscle 2026"')
  .max(160, 'At most 160 characters');

const isoDate = (what: string) => z.iso.date(`Use a date such as ${what}`);

/** POST /api/reference-intervals: a draft typed in (e.g. adopted from a publication or another lab). */
export const createIntervalBodySchema = z.intersection(
  createReferenceIntervalInputSchema,
  z.object({
    setName: setNameSchema,
    /** Defaults to nmol/min/mg protein for activities and "ratio" for ratios. */
    unit: z.string().trim().min(1, 'Give the unit').max(40, 'At most 40 characters').optional(),
  }),
);
export type CreateIntervalBody = z.infer<typeof createIntervalBodySchema>;

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
      setName: setNameSchema,
      effectiveFrom: isoDate('2026-01-31'),
      effectiveTo: isoDate('2026-12-31').nullable(),
      /** Added to the generated source note. */
      note: z.string().trim().max(1000, 'At most 1000 characters').optional(),
    })
    .superRefine((v, ctx) => {
      for (const p of findIntervalOrderingProblems(v)) ctx.addIssue({ code: 'custom', path: [p.path], message: p.message });
    }),
);
export type DraftFromControlsBody = z.infer<typeof draftFromControlsBodySchema>;

export const revisionBodySchema = z
  .object({ revision: z.number({ error: 'Send the revision you saw' }).int().nonnegative() })
  .strict();

export const retireBodySchema = z
  .object({
    revision: z.number({ error: 'Send the revision you saw' }).int().nonnegative(),
    reason: z.string().trim().min(1, 'Say why the interval is withdrawn').max(500, 'At most 500 characters'),
  })
  .strict();
export type RetireBody = z.infer<typeof retireBodySchema>;

const groupSchema = z.object({
  label: z.string().trim().min(1, 'Name the group').max(60),
  values: z.array(z.number({ error: 'Every value must be a finite number' })).max(20_000),
});
/** POST /api/reference-intervals/partition: Harris & Boyd check between two groups. */
export const partitionBodySchema = z.object({ groups: z.tuple([groupSchema, groupSchema]) }).strict();
export type PartitionBody = z.infer<typeof partitionBodySchema>;

export const controlUploadIdParamsSchema = z.object({ id: z.coerce.number().int().positive() });

// ---------------------------------------------------------------------------------------------
// Responses

export interface IntervalDerivation {
  outliers: OutlierRule;
  excluded: number[];
  lowerCi: [number, number] | null;
  upperCi: [number, number] | null;
  warnings: string[];
  pctLower: number | null;
  pctUpper: number | null;
}

/** A stored interval version as every route (and findApplicableInterval) returns it. */
export type StoredInterval = ReferenceInterval & {
  /** Optimistic-locking counter; send it back to approve or retire. */
  revision: number;
  /** Groups the versions of one assay × measure × specimen type × age band. */
  intervalKey: string;
  /** Human label that a comparison prints, e.g. "Skeletal muscle · 0–16 y · v2". */
  label: string;
  setName: string;
  unit: string;
  basis: ValueBasis;
  derivation: IntervalDerivation | null;
  /** The control file the interval was derived from. */
  upload: { id: number; filename: string; sha256: string } | null;
  createdBy: number | null;
  createdByName: string | null;
  createdAt: string;
  approvedByName: string | null;
  retiredBy: number | null;
  retiredByName: string | null;
  retiredAt: string | null;
  retireReason: string | null;
};

export interface ControlUploadSummary {
  id: number;
  filename: string;
  sizeBytes: number;
  sha256: string;
  uploadedBy: number | null;
  uploadedByName: string | null;
  createdAt: string;
}

export type ControlUploadDetail = ControlUploadSummary & { data: ControlDataUploadResult };

export interface ControlPreview {
  result: DeriveResult;
  /** Every value of the selected series and age band, before outlier exclusion, ascending. */
  values: number[];
  unit: string;
  /** Harris & Boyd check of this band against the rest of the series, or null when it cannot be run. */
  partition: PartitionCheckResult | null;
  partitionNote: string | null;
}
