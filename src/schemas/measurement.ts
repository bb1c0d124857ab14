import { z } from 'zod';
import {
  calculationResultSchema,
  flagSchema,
  physicalNumber,
  rateWindowSchema,
  tracePointSchema,
} from './assay';
import { assayCodeSchema, plainText } from './common';
import { anyWellIdSchema, plateMapWellsSchema } from './plate';

/*
 * Assay entry on a case: one measurement is one replicate of one assay on one specimen, entered as typed
 * rates, pasted readings, or a plate-reader file. Shared by the entry screens and the server.
 */

export const inputModes = ['rates', 'traces', 'plate'] as const;
export const inputModeSchema = z.enum(inputModes);
export type InputMode = z.infer<typeof inputModeSchema>;
export const inputModeLabels: Record<InputMode, string> = {
  rates: 'Typed rates',
  traces: 'Pasted readings',
  plate: 'Plate file',
};

const num = (field: string) =>
  z.number({ error: (iss) => (iss.input === undefined ? `${field} is required` : `${field} must be a number`) });
const positive = (field: string) => num(field).positive(`${field} must be greater than 0`);

/** Cuvette or well conditions of one reading; protein comes from the specimen. */
export const assayConditionsSchema = z.object({
  pathlengthCm: physicalNumber('pathlengthCm', 'Pathlength'),
  reactionVolumeUl: physicalNumber('reactionVolumeUl', 'Reaction volume'),
  sampleVolumeUl: physicalNumber('sampleVolumeUl', 'Sample volume'),
});
export type AssayConditions = z.infer<typeof assayConditionsSchema>;

const sampleWithinReaction = (c: { sampleVolumeUl?: number; reactionVolumeUl?: number }) =>
  !(c.sampleVolumeUl && c.reactionVolumeUl) || c.sampleVolumeUl <= c.reactionVolumeUl;
const sampleWithinReactionIssue = { path: ['sampleVolumeUl'], message: 'Sample volume cannot exceed the reaction volume' };

const trace = (field: string) =>
  z
    .array(tracePointSchema, { error: `${field} must be a list of readings` })
    .min(3, `${field} needs at least 3 readings`)
    .max(5000, `${field} has at most 5000 readings`);

const target = {
  specimenId: z.number({ error: 'Choose the specimen' }).int().positive('Choose the specimen'),
  assay: assayCodeSchema,
  replicate: z.number({ error: 'Replicate is required' }).int('Replicate must be a whole number').min(1, 'Replicate starts at 1').max(20, 'Replicate is at most 20'),
};

const ratesFields = {
  mode: z.literal('rates'),
  ...assayConditionsSchema.shape,
  totalRatePerMin: physicalNumber('ratePerMin', 'Total rate'),
  backgroundRatePerMin: physicalNumber('ratePerMin', 'Background rate').nullable(),
};

const tracesFields = {
  mode: z.literal('traces'),
  ...assayConditionsSchema.shape,
  total: trace('Total readings'),
  background: trace('Background readings').nullable(),
  window: rateWindowSchema.nullable(),
};

export const ratesEntrySchema = z.strictObject({ ...target, ...ratesFields }).refine(sampleWithinReaction, sampleWithinReactionIssue);
export const tracesEntrySchema = z.strictObject({ ...target, ...tracesFields }).refine(sampleWithinReaction, sampleWithinReactionIssue);
export type RatesEntry = z.infer<typeof ratesEntrySchema>;
export type TracesEntry = z.infer<typeof tracesEntrySchema>;

/** A new measurement from typed rates or pasted readings (plate files go through the plate import). */
export const createMeasurementInputSchema = z.discriminatedUnion('mode', [ratesEntrySchema, tracesEntrySchema]);
export type CreateMeasurementInput = z.infer<typeof createMeasurementInputSchema>;

const version = { version: z.number().int().min(0) };

/** A new replicate number for a saved measurement; left out, the number stays. */
const renumber = { replicate: target.replicate.optional() };

/**
 * A change to a saved measurement, with the version the editor saw. Specimen and assay are fixed; the replicate
 * number may change (409 when that number is taken); a plate measurement can only have its window moved and its
 * replicate renumbered (its readings come from the kept file).
 */
export const updateMeasurementInputSchema = z.discriminatedUnion('mode', [
  z.strictObject({ ...ratesFields, ...renumber, ...version }).refine(sampleWithinReaction, sampleWithinReactionIssue),
  z.strictObject({ ...tracesFields, ...renumber, ...version }).refine(sampleWithinReaction, sampleWithinReactionIssue),
  z.strictObject({ mode: z.literal('plate'), window: rateWindowSchema.nullable(), ...renumber, ...version }),
]);
export type UpdateMeasurementInput = z.infer<typeof updateMeasurementInputSchema>;

/**
 * Why a replicate is left out of the case's calculations. One line of plain text: it is printed in the report's
 * methods section beside the replicate.
 */
export const exclusionReasonSchema = z
  .string({ error: 'Give the reason for leaving this replicate out' })
  .trim()
  .min(3, 'Give the reason for leaving this replicate out (at least 3 characters)')
  .max(300, 'The reason is at most 300 characters')
  .superRefine(plainText('Reason'));

/** Leaving a replicate out of means, SD, CV, ratios and patterns, with the version the person saw. */
export const excludeMeasurementInputSchema = z.strictObject({ reason: exclusionReasonSchema, ...version });
export type ExcludeMeasurementInput = z.infer<typeof excludeMeasurementInputSchema>;

/** Counting an excluded replicate again. */
export const includeMeasurementInputSchema = z.strictObject({ ...version });
export type IncludeMeasurementInput = z.infer<typeof includeMeasurementInputSchema>;

/** A replicate left out of the calculations: why, by whom (the account's name) and when; null while it counts. */
export const measurementExclusionSchema = z.object({
  reason: z.string(),
  by: z.string().nullable(),
  at: z.string(),
});
export type MeasurementExclusion = z.infer<typeof measurementExclusionSchema>;

/** `?version=N` on a DELETE: the version the person saw. */
export const versionQuerySchema = z.object({ version: z.coerce.number().int().min(0) }).strict();

/** What a measurement was computed from, as stored with it. */
export const storedInputsSchema = z.discriminatedUnion('mode', [
  z.object({
    mode: z.literal('rates'),
    ...assayConditionsSchema.shape,
    proteinMgPerMl: z.number(),
    totalRatePerMin: z.number(),
    backgroundRatePerMin: z.number().nullable(),
  }),
  z.object({
    mode: z.literal('traces'),
    ...assayConditionsSchema.shape,
    proteinMgPerMl: z.number(),
    total: z.array(tracePointSchema),
    background: z.array(tracePointSchema).nullable(),
    window: rateWindowSchema.nullable(),
  }),
  z.object({
    mode: z.literal('plate'),
    ...assayConditionsSchema.shape,
    proteinMgPerMl: z.number(),
    uploadId: z.number().int(),
    filename: z.string(),
    specimenRef: z.string(),
    wells: z.object({ total: anyWellIdSchema, background: anyWellIdSchema.nullable(), blank: anyWellIdSchema.nullable() }),
    total: z.array(tracePointSchema),
    background: z.array(tracePointSchema).nullable(),
    blank: z.array(tracePointSchema).nullable(),
    window: rateWindowSchema.nullable(),
  }),
]);
export type StoredInputs = z.infer<typeof storedInputsSchema>;

export const measurementSchema = z.object({
  id: z.number().int(),
  caseId: z.number().int(),
  specimenId: z.number().int(),
  assay: assayCodeSchema,
  replicate: z.number().int(),
  inputMode: inputModeSchema,
  inputs: storedInputsSchema,
  result: calculationResultSchema,
  definitionId: z.number().int(),
  definitionVersion: z.number().int(),
  activity: z.number().nullable(),
  flags: z.array(flagSchema),
  uploadId: z.number().int().nullable(),
  enteredBy: z.string().nullable(),
  excluded: measurementExclusionSchema.nullable(),
  /** When the measurement was first part of a submission for review; from then on it is excluded, never deleted. */
  submittedAt: z.string().nullable(),
  version: z.number().int(),
  createdAt: z.string(),
  updatedAt: z.string(),
});
export type Measurement = z.infer<typeof measurementSchema>;

/* ---------------------------------------------------------------- pasted readings */

/** A problem in pasted readings: 1-based line of the pasted text and the column (1 = time, 2 = absorbance). */
export type PasteProblem = { line: number; column: 1 | 2 | null; message: string };

/**
 * Reads pasted readings: one reading per line, time in seconds then absorbance, separated by a tab, comma,
 * semicolon or spaces (a spreadsheet copy gives tabs). Blank lines and one header line of words are skipped.
 * Decimal commas are not read as numbers (they would be ambiguous with a comma separator).
 */
export function parsePastedReadings(text: string): { points: { t: number; a: number }[]; problems: PasteProblem[] } {
  const points: { t: number; a: number }[] = [];
  const problems: PasteProblem[] = [];
  const lines = text.split(/\r\n|\r|\n/);
  let seenData = false;
  lines.forEach((raw, i) => {
    const line = i + 1;
    const s = raw.trim();
    if (!s) return;
    const cells = s.split(/\t|,|;|\s+/).filter((c) => c !== '');
    const numeric = (c: string) => /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(c);
    if (!seenData && cells.length > 0 && !cells.some(numeric)) return; // a header line
    seenData = true;
    if (cells.length !== 2) {
      problems.push({ line, column: null, message: `Line ${line}: expected 2 values (time in s, absorbance), found ${cells.length}` });
      return;
    }
    const [tc, ac] = cells as [string, string];
    if (!numeric(tc)) return void problems.push({ line, column: 1, message: `Line ${line}, time: "${tc}" is not a number of seconds` });
    if (!numeric(ac)) return void problems.push({ line, column: 2, message: `Line ${line}, absorbance: "${ac}" is not a number` });
    const t = Number(tc);
    const prev = points[points.length - 1];
    if (prev && !(t > prev.t)) {
      problems.push({ line, column: 1, message: `Line ${line}, time: ${t} s is not after the previous reading (${prev.t} s)` });
      return;
    }
    points.push({ t, a: Number(ac) });
  });
  if (problems.length === 0 && points.length < 3) {
    problems.push({ line: lines.length, column: null, message: `At least 3 readings are needed; ${points.length} found` });
  }
  return { points, problems };
}

/* ---------------------------------------------------------------- protein */

export const proteinCurveModels = ['linear', 'quadratic'] as const;
export const proteinCurveModelSchema = z.enum(proteinCurveModels);

/** Standards and an unknown, read off the curve; the unknown's result becomes the specimen's protein. */
export const proteinCurveInputSchema = z.strictObject({
  method: z.string().trim().min(1, 'Name the protein method (e.g. BCA)').max(60, 'At most 60 characters').superRefine(plainText('Method')),
  model: proteinCurveModelSchema,
  standards: z
    .array(
      z.strictObject({
        concentrationMgPerMl: num('Standard concentration').min(0, 'Standard concentration cannot be negative'),
        absorbance: physicalNumber('absorbance', 'Standard absorbance'),
      }),
    )
    .min(3, 'Enter at least 3 standards')
    .max(40, 'At most 40 standards'),
  unknownAbsorbances: z.array(physicalNumber('absorbance', 'Unknown absorbance')).min(1, 'Enter at least one reading of the specimen').max(10, 'At most 10 readings'),
  dilutionFactor: num('Dilution factor').min(1, 'Dilution factor is at least 1 (1 = undiluted)').max(10_000, 'Dilution factor is at most 10 000'),
});
export type ProteinCurveInput = z.infer<typeof proteinCurveInputSchema>;

/** Recording a specimen's protein: from a standard curve, or a value measured elsewhere typed in with its source. */
export const saveProteinInputSchema = z.discriminatedUnion('kind', [
  proteinCurveInputSchema.extend({ kind: z.literal('curve'), ...version }).strict(),
  z.strictObject({
    kind: z.literal('direct'),
    proteinMgPerMl: physicalNumber('proteinMgPerMl', 'Protein'),
    proteinSource: z
      .string()
      .trim()
      .min(3, 'Say how the protein was measured')
      .max(200, 'At most 200 characters')
      .superRefine(plainText('Protein source')),
    ...version,
  }),
]);
export type SaveProteinInput = z.infer<typeof saveProteinInputSchema>;

export const proteinCurveResultSchema = z.object({
  model: proteinCurveModelSchema,
  c0: z.number().nullable(),
  c1: z.number().nullable(),
  c2: z.number().nullable(),
  r2: z.number().nullable(),
  usable: z.boolean(),
  lowestMgPerMl: z.number().nullable(),
  highestMgPerMl: z.number().nullable(),
  meanAbsorbance: z.number().nullable(),
  readMgPerMl: z.number().nullable(),
  /** Concentration of the undiluted homogenate; null when the unknown could not be read. */
  mgPerMl: z.number().nullable(),
  flags: z.array(flagSchema),
});
export type ProteinCurveResult = z.infer<typeof proteinCurveResultSchema>;

/** What specimens.proteinDetails holds when the protein came from a standard curve. */
export const proteinDetailsSchema = z.object({
  kind: z.literal('curve'),
  input: proteinCurveInputSchema,
  result: proteinCurveResultSchema,
  recordedAt: z.string(),
  recordedBy: z.string().nullable(),
});
export type ProteinDetails = z.infer<typeof proteinDetailsSchema>;

/* ---------------------------------------------------------------- uploads */

export const uploadSummarySchema = z.object({
  id: z.number().int(),
  caseId: z.number().int().nullable(),
  kind: z.string(),
  filename: z.string(),
  mimeType: z.string(),
  sizeBytes: z.number().int(),
  sha256: z.string(),
  uploadedBy: z.string().nullable(),
  createdAt: z.string(),
  measurementCount: z.number().int(),
});
export type UploadSummary = z.infer<typeof uploadSummarySchema>;

/* ---------------------------------------------------------------- plate import */

export const platePathlengthSchema = z.discriminatedUnion('mode', [
  z.strictObject({ mode: z.literal('given'), cm: physicalNumber('pathlengthCm', 'Pathlength') }),
  z.strictObject({
    mode: z.literal('fill'),
    volumeUl: positive('Fill volume').max(5000, 'Fill volume is at most 5000 µL'),
    wellAreaCm2: positive('Well area').max(10, 'Well area is at most 10 cm²'),
  }),
]);
export type PlatePathlengthInput = z.infer<typeof platePathlengthSchema>;

/** Identity of one well group on the upload screen: specimen label × assay × replicate. */
export function plateGroupId(g: { specimenRef: string; assay: string; replicate: number }): string {
  return `${g.specimenRef}|${g.assay}|${g.replicate}`;
}

/**
 * How to read an uploaded plate file: which map (a saved template or wells given here), which specimen of the
 * case each label of the map means, the conditions, and any windows moved by hand (by plateGroupId).
 */
export const plateImportPlanSchema = z
  .strictObject({
    plateMapId: z.number().int().positive().nullable(),
    wells: plateMapWellsSchema.nullable(),
    /** Map label → specimen id; a label left out is matched to the case's specimen of the same label. */
    specimens: z.record(z.string(), z.number().int().positive()),
    pathlength: platePathlengthSchema,
    reactionVolumeUl: positive('Reaction volume').max(5000, 'Reaction volume is at most 5000 µL'),
    sampleVolumeUl: positive('Sample volume').max(5000, 'Sample volume is at most 5000 µL'),
    windows: z.record(z.string(), rateWindowSchema),
  })
  .refine((p) => (p.plateMapId === null) !== (p.wells === null), {
    path: ['plateMapId'],
    message: 'Choose a saved plate map or lay out the wells, not both',
  })
  .refine(sampleWithinReaction, sampleWithinReactionIssue);
export type PlateImportPlan = z.infer<typeof plateImportPlanSchema>;

export const plateGroupPreviewSchema = z.object({
  id: z.string(),
  specimenRef: z.string(),
  specimenId: z.number().int(),
  specimenLabel: z.string(),
  assay: assayCodeSchema,
  replicate: z.number().int(),
  wells: z.object({ total: anyWellIdSchema, background: anyWellIdSchema.nullable(), blank: anyWellIdSchema.nullable() }),
  total: z.array(tracePointSchema),
  background: z.array(tracePointSchema).nullable(),
  blank: z.array(tracePointSchema).nullable(),
  result: calculationResultSchema,
  /** A measurement of this specimen, assay and replicate is already saved: saving would clash. */
  alreadySaved: z.boolean(),
});
export type PlateGroupPreview = z.infer<typeof plateGroupPreviewSchema>;

export const plateReplicateSummarySchema = z.object({
  specimenId: z.number().int(),
  specimenLabel: z.string(),
  assay: assayCodeSchema,
  n: z.number().int(),
  mean: z.number().nullable(),
  sd: z.number().nullable(),
  cvPct: z.number().nullable(),
  flags: z.array(flagSchema),
});
export type PlateReplicateSummary = z.infer<typeof plateReplicateSummarySchema>;

export const platePreviewSchema = z.object({
  filename: z.string(),
  sizeBytes: z.number().int(),
  sha256: z.string(),
  wavelengthNm: z.number().nullable(),
  metadata: z.record(z.string(), z.string()),
  pathlengthCm: z.number(),
  /** Wells in the file the map does not use, and other remarks that do not stop the import. */
  warnings: z.array(z.object({ row: z.number().int().nullable(), column: z.string().nullable(), message: z.string() })),
  groups: z.array(plateGroupPreviewSchema),
  summaries: z.array(plateReplicateSummarySchema),
});
export type PlatePreview = z.infer<typeof platePreviewSchema>;

export const plateImportResultSchema = z.object({
  upload: uploadSummarySchema,
  measurementIds: z.array(z.number().int()),
});
export type PlateImportResult = z.infer<typeof plateImportResultSchema>;

/* ---------------------------------------------------------------- saved plate maps */

export const storedPlateMapSchema = z.object({
  id: z.number().int(),
  name: z.string(),
  description: z.string(),
  wells: plateMapWellsSchema,
  createdBy: z.string().nullable(),
  version: z.number().int(),
  updatedAt: z.string(),
});
export type StoredPlateMap = z.infer<typeof storedPlateMapSchema>;

export const changePlateMapInputSchema = z.strictObject({
  name: z.string().trim().min(1, 'Name is required').max(120, 'Name is at most 120 characters').superRefine(plainText('Name')).optional(),
  description: z.string().trim().max(500, 'Description is at most 500 characters').superRefine(plainText('Description', true)).optional(),
  wells: plateMapWellsSchema.optional(),
  ...version,
});
export type ChangePlateMapInput = z.infer<typeof changePlateMapInputSchema>;

/* ---------------------------------------------------------------- the assay work of one case */

export const workupSpecimenSchema = z.object({
  id: z.number().int(),
  label: z.string(),
  type: z.string(),
  accepted: z.boolean(),
  rejectionReason: z.string().nullable(),
  proteinMgPerMl: z.number().nullable(),
  proteinSource: z.string().nullable(),
  proteinDetails: proteinDetailsSchema.nullable(),
  version: z.number().int(),
});
export type WorkupSpecimen = z.infer<typeof workupSpecimenSchema>;

/** Everything the assay-entry screen of one case needs. */
export const caseWorkupSchema = z.object({
  caseId: z.number().int(),
  accession: z.string(),
  patientName: z.string(),
  state: z.string(),
  version: z.number().int(),
  returnReason: z.string().nullable(),
  /** Measurements can be added or changed (received or in assay). */
  editable: z.boolean(),
  specimens: z.array(workupSpecimenSchema),
  measurements: z.array(measurementSchema),
  uploads: z.array(uploadSummarySchema),
});
export type CaseWorkup = z.infer<typeof caseWorkupSchema>;
