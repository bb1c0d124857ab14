import { z } from 'zod';
import { valueBasisSchema } from '@/schemas/assay';
import type { AssayCode, Measure, SpecimenType } from '@/schemas/common';
import {
  controlDataUploadResultSchema,
  createReferenceIntervalInputSchema,
  deriveResultSchema,
  outlierRuleSchema,
  partitionCheckResultSchema,
  referenceIntervalSchema,
  type AgeBand,
  type IntervalMethod,
  type OutlierRule,
} from '@/schemas/reference-interval';

/*
 * Response shapes of the reference-interval routes beyond the shared schema file. They mirror the types in
 * server/modules/reference-intervals/reference-intervals.schemas.ts; the API tests parse real responses
 * with these, so a change on either side fails there.
 */

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

export const storedIntervalSchema = referenceIntervalSchema.extend({
  revision: z.number().int().nonnegative(),
  intervalKey: z.string(),
  label: z.string(),
  setName: z.string(),
  unit: z.string(),
  basis: valueBasisSchema,
  derivation: intervalDerivationSchema.nullable(),
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
  values: z.array(z.number()),
  unit: z.string(),
  partition: partitionCheckResultSchema.nullable(),
  partitionNote: z.string().nullable(),
});
export type ControlPreview = z.infer<typeof controlPreviewSchema>;

// ---------------------------------------------------------------------------------------------
// Request shapes (the server validates them with the same rules)

export type ControlSelection = {
  specimenType: SpecimenType;
  assay: AssayCode;
  measure: Measure;
  ageBand: AgeBand;
  method: IntervalMethod;
  outliers: OutlierRule;
  pctLower?: number;
  pctUpper?: number;
};

export type DraftFromControlsInput = ControlSelection & {
  setName: string;
  effectiveFrom: string;
  effectiveTo: string | null;
  note?: string;
};

/** The "New interval" form: the shared interval input plus the name of the set it belongs to. */
export const newIntervalFormSchema = z.intersection(
  // First, so its plain messages win over the generic ones for empty number inputs (NaN).
  z.object({
    setName: z.string().trim().min(1, 'Name the interval set, e.g. "Liver 2026"').max(160, 'At most 160 characters'),
    ageBand: z.object({ minYears: z.number({ error: 'Enter the lower age (0 from birth)' }) }),
    lower: z.number({ error: 'Enter the lower limit' }),
    upper: z.number({ error: 'Enter the upper limit' }),
    mean: z.number({ error: 'Enter the mean' }),
    n: z.number({ error: 'Enter how many reference individuals' }),
  }),
  createReferenceIntervalInputSchema,
);
export type NewIntervalInput = z.infer<typeof newIntervalFormSchema>;
