import { z } from 'zod';
import { flagSchema, rateWindowSchema } from './assay';
import { assayCodeSchema, dateTimeSchema, plainText } from './common';
import { plateGroupPreviewSchema, platePathlengthSchema, plateReplicateSummarySchema, uploadSummarySchema } from './measurement';
import {
  anyWellIdSchema,
  describeWellRange,
  normaliseWellIdFor,
  plateFormatSchema,
  refinePlateEntries,
  wellRoleSchema,
  type PlateFormat,
} from './plate';
import { runQcStatusSchema, westgardRuleSchema, type RunQcStatus } from './qc';

/*
 * Analytical runs: one plate read on one instrument, carrying specimens of several open cases, control materials
 * and blanks. Shared by the run pages and the server (server/modules/runs). The plate file format is the one of
 * docs/plate-file-format.md, with well columns up to the plate's size.
 */

/* ---------------------------------------------------------------- the plan of a run */

const positiveId = (what: string) =>
  z.number({ error: `Choose the ${what}` }).int(`Choose the ${what}`).positive(`Choose the ${what}`);
const replicate = z
  .number({ error: 'Replicate is required' })
  .int('Replicate must be a whole number')
  .min(1, 'Replicate starts at 1')
  .max(20, 'Replicate is at most 20');
const volume = (label: string) =>
  z.number({ error: `${label} must be a number` }).positive(`${label} must be greater than 0`).max(5000, `${label} is at most 5000 µL`);

/** A well holding one replicate of one specimen (of any open case) for one assay, in its role within the group. */
export const runSpecimenWellSchema = z.strictObject({
  use: z.literal('specimen'),
  well: anyWellIdSchema,
  specimenId: positiveId('specimen'),
  assay: assayCodeSchema,
  role: wellRoleSchema,
  replicate,
});
/** A well holding one replicate of a control material for one assay. */
export const runControlWellSchema = z.strictObject({
  use: z.literal('control'),
  well: anyWellIdSchema,
  controlMaterialId: positiveId('control material'),
  assay: assayCodeSchema,
  role: wellRoleSchema,
  replicate,
});
/**
 * A well with no sample, kept in the layout (a plate blank). A group uses a blank well for its own correction by
 * listing the same well again with role "blank".
 */
export const runBlankWellSchema = z.strictObject({
  use: z.literal('blank'),
  well: anyWellIdSchema,
  note: z.string().trim().max(120, 'Note is at most 120 characters').superRefine(plainText('Note', false)).optional(),
});
export const runWellSchema = z.discriminatedUnion('use', [runSpecimenWellSchema, runControlWellSchema, runBlankWellSchema]);
export type RunWell = z.infer<typeof runWellSchema>;
export type RunGroupWell = Exclude<RunWell, { use: 'blank' }>;
export const runWellUses = ['specimen', 'control', 'blank'] as const;

type GroupOwner =
  | { use: 'specimen'; specimenId: number; assay: string; replicate: number }
  | { use: 'control'; controlMaterialId: number; assay: string; replicate: number };

/** The owner part of a group id: "specimen:12" or "control:3". */
export function runWellOwner(w: GroupOwner): string {
  return w.use === 'specimen' ? `specimen:${w.specimenId}` : `control:${w.controlMaterialId}`;
}

/** Identity of one well group of a run, also the key of `windows`: "specimen:12|CI|1", "control:3|CS|2". */
export function runGroupId(w: GroupOwner): string {
  return `${runWellOwner(w)}|${w.assay}|${w.replicate}`;
}

/** Largest number of layout entries (a 384-well plate with shared blanks listed per group). */
export const MAX_RUN_WELL_ENTRIES = 1536;

function refineRunWells(wells: RunWell[], format: PlateFormat, ctx: z.RefinementCtx): void {
  wells.forEach((w, i) => {
    if (normaliseWellIdFor(w.well, format) !== w.well) {
      ctx.addIssue({
        code: 'custom',
        path: ['wells', i, 'well'],
        message: `Well ${w.well} is not on a ${format}-well plate; wells are ${describeWellRange(format)}`,
      });
    }
  });
  // Groups follow the single-case plate-map rules; plate blanks only claim their well.
  const groupIndex: number[] = [];
  const groups: (RunGroupWell & { specimenRef: string })[] = [];
  wells.forEach((w, i) => {
    if (w.use === 'blank') return;
    groupIndex.push(i);
    groups.push({ ...w, specimenRef: runWellOwner(w) });
  });
  refinePlateEntries(
    groups,
    (k, field, message) => ctx.addIssue({ code: 'custom', path: ['wells', groupIndex[k]!, field], message }),
    (e) => `${e.use === 'specimen' ? `Specimen ${e.specimenId}` : `Control material ${e.controlMaterialId}`} ${e.assay} replicate ${e.replicate}`,
  );
  const plateBlanks = new Map<string, number>();
  wells.forEach((w, i) => {
    if (w.use !== 'blank') return;
    if (plateBlanks.has(w.well)) {
      ctx.addIssue({ code: 'custom', path: ['wells', i, 'well'], message: `Well ${w.well} is listed as a blank twice` });
    }
    plateBlanks.set(w.well, i);
  });
  groups.forEach((g, k) => {
    if (plateBlanks.has(g.well) && g.role !== 'blank') {
      ctx.addIssue({
        code: 'custom',
        path: ['wells', groupIndex[k]!, 'well'],
        message: `Well ${g.well} is a blank (entry ${plateBlanks.get(g.well)! + 1}); a group can use it only as its blank`,
      });
    }
  });
  if (groups.length === 0) {
    ctx.addIssue({ code: 'custom', path: ['wells'], message: 'Place at least one specimen or control on the plate' });
  }
}

/** The run's layout and reading conditions, as sent with the file (multipart field "plan", JSON text). */
export const runPlanSchema = z
  .strictObject({
    instrument: z
      .string({ error: 'Instrument is required' })
      .trim()
      .min(1, 'Instrument is required')
      .max(120, 'Instrument is at most 120 characters')
      .superRefine(plainText('Instrument')),
    /** When the plate was read: the browser's datetime-local value or a full ISO string. */
    startedAt: dateTimeSchema('Start of the run'),
    plateFormat: plateFormatSchema,
    wells: z
      .array(runWellSchema)
      .min(1, 'A run needs at least one well')
      .max(MAX_RUN_WELL_ENTRIES, `A run lists at most ${MAX_RUN_WELL_ENTRIES} entries`),
    pathlength: platePathlengthSchema,
    reactionVolumeUl: volume('Reaction volume'),
    sampleVolumeUl: volume('Sample volume'),
    /**
     * Protein of each control material's homogenate as pipetted on this plate (mg/mL), keyed by control material
     * id: a control's activity is per mg protein like a specimen's. Every control material used needs one.
     */
    controlProteinMgPerMl: z
      .record(z.string(), z.number({ error: 'Protein must be a number' }).positive('Protein must be greater than 0').max(1000, 'Protein is at most 1000 mg/mL'))
      .default({}),
    /** Windows moved by hand, keyed by runGroupId. */
    windows: z.record(z.string(), rateWindowSchema),
  })
  .superRefine((plan, ctx) => {
    refineRunWells(plan.wells, plan.plateFormat, ctx);
    if (plan.sampleVolumeUl > plan.reactionVolumeUl) {
      ctx.addIssue({ code: 'custom', path: ['sampleVolumeUl'], message: 'Sample volume cannot exceed the reaction volume' });
    }
  });
export type RunPlan = z.infer<typeof runPlanSchema>;

/* ---------------------------------------------------------------- quality control of a run */

/** After the Westgard evaluation; 'none' when the run carried no control with an approved target (./qc's shape). */
export { runQcStatusSchema, type RunQcStatus };
export const runQcStatuses = runQcStatusSchema.options;
export const runQcStatusLabels: Record<RunQcStatus, string> = {
  accept: 'Controls accepted',
  warn: 'Accepted with a warning',
  reject: 'Controls rejected',
  none: 'No control evaluated',
};

/** One rule that fired on this run: the rule name ("1-3s", "2-2s", …), the assay and the control materials. */
export const runViolationSchema = z.object({
  rule: westgardRuleSchema,
  assayCode: assayCodeSchema,
  controlMaterialIds: z.array(z.number().int()),
});
export type RunViolation = z.infer<typeof runViolationSchema>;

/** A director's documented release of a run whose controls did not pass. */
export const runOverrideSchema = z.object({
  reason: z.string(),
  by: z.string().nullable(),
  at: z.string(),
});
export type RunOverride = z.infer<typeof runOverrideSchema>;

/** POST /api/runs/:id/override: why, and the director's password typed again (checked like a signature). */
export const runOverrideInputSchema = z.strictObject({
  reason: z
    .string({ error: 'Give the reason for releasing this run' })
    .trim()
    .min(10, 'Give the reason for releasing this run (at least 10 characters)')
    .max(1000, 'The reason is at most 1000 characters')
    .superRefine(plainText('Reason', true)),
  password: z
    .string({ error: 'Enter your password to release the run' })
    .min(1, 'Enter your password to release the run')
    .max(200),
});
export type RunOverrideInput = z.infer<typeof runOverrideInputSchema>;

/** What a result's run says about its release: printed per measurement in the results and the report. */
export const runQcStampSchema = z.object({
  runId: z.number().int(),
  runNumber: z.string(),
  qcStatus: runQcStatusSchema,
  /** The director's reason when the run was released despite its controls; null otherwise. */
  overrideReason: z.string().nullable(),
});
export type RunQcStamp = z.infer<typeof runQcStampSchema>;

/** A control material as a run shows it. */
const controlMaterialRef = {
  controlMaterialId: z.number().int(),
  material: z.string(),
  lot: z.string(),
  level: z.string(),
};

/** The value of one control material for one assay on this run (mean of its replicate groups) and its z. */
export const runControlResultSchema = z.object({
  ...controlMaterialRef,
  assay: assayCodeSchema,
  /** Mean activity of the replicate groups; null when none gave an activity (then the import is refused). */
  value: z.number().nullable(),
  unit: z.string(),
  /** The replicate groups behind the value, by runGroupId, with their activities. */
  groups: z.array(z.object({ id: z.string(), replicate: z.number().int(), activity: z.number().nullable() })),
  /** The approved target it was judged against; null when none is approved. */
  target: z.object({ id: z.number().int(), mean: z.number(), sd: z.number() }).nullable(),
  z: z.number().nullable(),
});
export type RunControlResult = z.infer<typeof runControlResultSchema>;

/* ---------------------------------------------------------------- preview */

/** One well group of the preview (a specimen's or a control's replicate), with its window-editing readings. */
export const runGroupPreviewSchema = plateGroupPreviewSchema
  .omit({ specimenRef: true, specimenId: true, specimenLabel: true })
  .extend({
    /** runGroupId: the key of plan.windows. */
    id: z.string(),
    use: z.enum(['specimen', 'control']),
    /** For a specimen group: the specimen and its case; null for a control. */
    specimenId: z.number().int().nullable(),
    specimenLabel: z.string().nullable(),
    caseId: z.number().int().nullable(),
    accession: z.string().nullable(),
    /** For a control group: the material; null for a specimen. */
    controlMaterialId: z.number().int().nullable(),
    controlLabel: z.string().nullable(),
  });
/** Also carried: assay, replicate, wells {total, background, blank}, the readings, result and alreadySaved. */
export type RunGroupPreview = z.infer<typeof runGroupPreviewSchema>;

/** POST /api/runs/preview: what the file gives with this plan; nothing is stored. */
export const runPreviewSchema = z.object({
  filename: z.string(),
  sizeBytes: z.number().int(),
  sha256: z.string(),
  plateFormat: plateFormatSchema,
  wavelengthNm: z.number().nullable(),
  metadata: z.record(z.string(), z.string()),
  pathlengthCm: z.number(),
  warnings: z.array(z.object({ row: z.number().int().nullable(), column: z.string().nullable(), message: z.string() })),
  groups: z.array(runGroupPreviewSchema),
  /** Replicate summaries of each specimen × assay, with the case they belong to. */
  summaries: z.array(plateReplicateSummarySchema.extend({ caseId: z.number().int(), accession: z.string() })),
  controls: z.array(runControlResultSchema),
  /** The provisional evaluation of the controls against the run history. */
  qc: z.object({ status: runQcStatusSchema, violations: z.array(runViolationSchema) }),
});
export type RunPreview = z.infer<typeof runPreviewSchema>;

/* ---------------------------------------------------------------- list, detail, import result */

export const runSummarySchema = z.object({
  id: z.number().int(),
  runNumber: z.string(),
  instrument: z.string(),
  startedAt: z.string(),
  operator: z.string().nullable(),
  plateFormat: plateFormatSchema,
  qcStatus: runQcStatusSchema,
  violations: z.array(runViolationSchema),
  /** Present when a director released the run despite its controls. */
  override: runOverrideSchema.nullable(),
  caseCount: z.number().int(),
  measurementCount: z.number().int(),
  controlCount: z.number().int(),
  createdAt: z.string(),
});
export type RunSummary = z.infer<typeof runSummarySchema>;

/** GET /api/runs query: page (from 1), pageSize (at most 200), status, q (run number or instrument). */
export const runListQuerySchema = z.strictObject({
  page: z.coerce.number().int().min(1, 'page starts at 1').optional(),
  pageSize: z.coerce.number().int().min(1).max(200, 'pageSize is at most 200').optional(),
  status: runQcStatusSchema.optional(),
  q: z.string().trim().max(80).optional(),
});
export type RunListQuery = z.infer<typeof runListQuerySchema>;

export const runListSchema = z.object({ items: z.array(runSummarySchema), total: z.number().int() });
export type RunList = z.infer<typeof runListSchema>;

/** One measurement the run produced, with its case. */
export const runMeasurementSchema = z.object({
  id: z.number().int(),
  caseId: z.number().int(),
  accession: z.string(),
  specimenId: z.number().int(),
  specimenLabel: z.string(),
  assay: assayCodeSchema,
  replicate: z.number().int(),
  activity: z.number().nullable(),
  flags: z.array(flagSchema),
  excluded: z.boolean(),
});
export type RunMeasurement = z.infer<typeof runMeasurementSchema>;

/** GET /api/runs/:id: every well's use, the control results with z, the rules that fired and what the run produced. */
export const runDetailSchema = runSummarySchema.extend({
  wells: z.array(runWellSchema),
  pathlengthCm: z.number().nullable(),
  /** Assay code → assay definition version used. */
  definitionVersions: z.record(z.string(), z.number().int()),
  /** The plate file (download at /api/uploads/:id/download). */
  upload: uploadSummarySchema.nullable(),
  controls: z.array(runControlResultSchema),
  measurements: z.array(runMeasurementSchema),
  version: z.number().int(),
});
export type RunDetail = z.infer<typeof runDetailSchema>;

/** POST /api/runs answer (201). */
export const runImportResultSchema = z.object({
  run: runSummarySchema,
  upload: uploadSummarySchema,
  measurementIds: z.array(z.number().int()),
  controlResultIds: z.array(z.number().int()),
});
export type RunImportResult = z.infer<typeof runImportResultSchema>;

/* ---------------------------------------------------------------- specimens to place */

/** GET /api/runs/open-specimens: accepted specimens of open cases (received or in assay). */
export const openSpecimenSchema = z.object({
  specimenId: z.number().int(),
  label: z.string(),
  type: z.string(),
  caseId: z.number().int(),
  accession: z.string(),
  patientName: z.string(),
  caseState: z.string(),
  /** Null until recorded; a specimen without protein cannot be imported. */
  proteinMgPerMl: z.number().nullable(),
  /** Replicates already saved, so the layout can pick free numbers. */
  saved: z.array(z.object({ assay: assayCodeSchema, replicate: z.number().int() })),
});
export type OpenSpecimen = z.infer<typeof openSpecimenSchema>;
export const openSpecimenListSchema = z.object({ items: z.array(openSpecimenSchema) });
export type OpenSpecimenList = z.infer<typeof openSpecimenListSchema>;
