import { z } from 'zod';
import { diagnosticCriteriaSchema, flagSchema, patternKinds, valueBasisSchema } from './assay';
import { caseStateSchema } from './case';
import { assayCodeSchema, measureSchema, specimenTypeSchema, type AssayCode } from './common';
import { measurementExclusionSchema } from './measurement';
import { runQcStampSchema } from './run';

/*
 * The results of one case: every assay of every specimen with its replicates, ratios and comparisons with
 * the reference intervals, and the pattern read from them. Computed live while the case is in assay; frozen
 * into cases.resultsSnapshot when the technologist submits it for review, and read back from there afterwards.
 * The report prints from this shape.
 */

export const intervalPositionSchema = z.enum(['below', 'within', 'above']);
export const criteriaBandSchema = z.enum(['major', 'minor', 'not_met']);
export type CriteriaBandValue = z.infer<typeof criteriaBandSchema>;

export const intervalPositionLabels: Record<z.infer<typeof intervalPositionSchema>, string> = {
  below: 'Below',
  within: 'Within',
  above: 'Above',
};
export const criteriaBandLabels: Record<CriteriaBandValue, string> = {
  major: 'Major criterion',
  minor: 'Minor criterion',
  not_met: 'Not met',
};

/** The stored reference interval a comparison used, as it was at the time. */
export const usedIntervalSchema = z.object({
  id: z.number().int(),
  version: z.number().int(),
  /** The interval set's name and age band, e.g. "Muscle controls 2024 · 2–16 years". */
  label: z.string(),
  lower: z.number(),
  upper: z.number(),
  mean: z.number(),
  sd: z.number().nullable(),
  unit: z.string(),
  method: z.string(),
  basis: valueBasisSchema,
});
export type UsedInterval = z.infer<typeof usedIntervalSchema>;

/** One value (activity, X/CS or X/CII) against its interval. */
export const resultComparisonSchema = z.object({
  measure: measureSchema,
  value: z.number().nullable(),
  interval: usedIntervalSchema.nullable(),
  position: intervalPositionSchema.nullable(),
  percentOfMean: z.number().nullable(),
  zScore: z.number().nullable(),
  /**
   * Band of the diagnostic criteria (% of the reference mean, decided unrounded); null for citrate synthase,
   * for a measure the rule set does not apply to, or with no comparison.
   */
  band: criteriaBandSchema.nullable(),
  /** Why the band stands although the pattern shows no deficiency; absent in snapshots taken before it existed. */
  bandNote: z.string().nullable().optional(),
  flags: z.array(flagSchema),
});
export type ResultComparison = z.infer<typeof resultComparisonSchema>;

export const replicateResultSchema = z.object({
  measurementId: z.number().int(),
  replicate: z.number().int(),
  inputMode: z.enum(['rates', 'traces', 'plate']),
  activity: z.number().nullable(),
  specificSlopePerMin: z.number().nullable(),
  r2: z.number().nullable(),
  window: z.object({ fromS: z.number(), toS: z.number() }).nullable(),
  definitionId: z.number().int(),
  definitionVersion: z.number().int(),
  flags: z.array(flagSchema),
  /** Set when the replicate is left out of the mean, SD, CV, ratios and pattern; absent in older snapshots. */
  excluded: measurementExclusionSchema.nullable().optional(),
  /** The analytical run the replicate was read on and its quality-control release; null when not from a run. */
  run: runQcStampSchema.nullable().optional(),
});
export type ReplicateResult = z.infer<typeof replicateResultSchema>;

export const assayResultSchema = z.object({
  assay: assayCodeSchema,
  name: z.string(),
  unit: z.string(),
  replicates: z.array(replicateResultSchema),
  /** Replicates that gave a value and are not excluded, their mean, sample SD (n − 1) and CV%. */
  n: z.number().int(),
  mean: z.number().nullable(),
  sd: z.number().nullable(),
  cvPct: z.number().nullable(),
  /** The activity (the replicate mean) and the ratios to CS and CII where they apply; each may be null. */
  activity: resultComparisonSchema,
  ratioCs: resultComparisonSchema.nullable(),
  ratioCii: resultComparisonSchema.nullable(),
  /** Every flag of the replicates, the replicate summary and the comparisons, each message once. */
  flags: z.array(flagSchema),
});
export type AssayResult = z.infer<typeof assayResultSchema>;

export const evidenceLineSchema = z.object({
  assay: assayCodeSchema,
  measure: measureSchema,
  value: z.number(),
  intervalId: z.number().int(),
  intervalVersion: z.number().int(),
  intervalLabel: z.string(),
  lower: z.number(),
  upper: z.number(),
  mean: z.number(),
  position: intervalPositionSchema,
  percentOfMean: z.number(),
  band: criteriaBandSchema.nullable(),
  text: z.string(),
});

export const patternFindingSchema = z.object({
  kind: z.enum(patternKinds),
  label: z.string(),
  complexes: z.array(assayCodeSchema),
  evidence: z.array(evidenceLineSchema),
});
export type PatternFindingResult = z.infer<typeof patternFindingSchema>;

export const patternResultSchema = z.object({
  /** Short code for lists and filters: see patternCodeOf. */
  code: z.string(),
  headline: z.string(),
  findings: z.array(patternFindingSchema),
  notes: z.array(z.string()),
  criteriaCitation: z.string(),
  /** The rule set the bands were decided with; absent in snapshots taken before it was recorded (then the default). */
  criteria: diagnosticCriteriaSchema.optional(),
});
export type PatternResult = z.infer<typeof patternResultSchema>;

export const specimenResultSchema = z.object({
  specimenId: z.number().int(),
  label: z.string(),
  type: specimenTypeSchema,
  accepted: z.boolean(),
  rejectionReason: z.string().nullable(),
  collectedAt: z.string().nullable(),
  receivedAt: z.string(),
  /** Age at collection (or at receipt when the collection time is not known), in years. */
  ageYears: z.number().nullable(),
  proteinMgPerMl: z.number().nullable(),
  proteinSource: z.string().nullable(),
  assays: z.array(assayResultSchema),
  /** Null for a rejected specimen or one without any measurement. */
  pattern: patternResultSchema.nullable(),
});
export type SpecimenResult = z.infer<typeof specimenResultSchema>;

export const caseResultsSchema = z.object({
  caseId: z.number().int(),
  accession: z.string(),
  state: caseStateSchema,
  /** The case's current version (send it back to submit) and the director's reason when it was returned. */
  caseVersion: z.number().int(),
  returnReason: z.string().nullable(),
  /** True when read back from the snapshot taken at submission; false when computed just now. */
  frozen: z.boolean(),
  computedAt: z.string(),
  /** Case-level pattern code (the specimens' codes, distinct, joined by "; "); null with nothing to read. */
  patternCode: z.string().nullable(),
  specimens: z.array(specimenResultSchema),
  /** The assay definition versions the measurements were computed with. */
  definitions: z.array(z.object({ assay: assayCodeSchema, id: z.number().int(), version: z.number().int() })),
  /** Reference intervals are looked up as in force on this date (YYYY-MM-DD). */
  intervalsAsOf: z.string(),
});
export type CaseResults = z.infer<typeof caseResultsSchema>;

export const submitCaseInputSchema = z.object({ version: z.number().int().min(0) }).strict();
export type SubmitCaseInput = z.infer<typeof submitCaseInputSchema>;

/* ---------------------------------------------------------------- pattern codes */

/**
 * Short pattern codes, stored in cases.patternCode for the list filter:
 *   normal · isolated:CI · combined:CI,CIV · linked:CI+III · raised_cs · insufficient
 * A specimen with two findings (e.g. an isolated defect and raised CS) joins them with "+":
 * "isolated:CI+raised_cs". A case with several specimens joins the distinct codes with "; ".
 */
export function patternCodeOf(findings: readonly { kind: (typeof patternKinds)[number]; complexes: readonly AssayCode[] }[]): string {
  const parts = findings.map((f) => {
    switch (f.kind) {
      case 'normal':
        return 'normal';
      case 'isolated_deficiency':
        return `isolated:${f.complexes.join(',')}`;
      case 'combined_deficiency':
        return `combined:${f.complexes.join(',')}`;
      case 'linked_activity_low':
        return `linked:${f.complexes.join(',')}`;
      case 'raised_cs':
        return 'raised_cs';
      case 'insufficient_data':
        return 'insufficient';
    }
  });
  return parts.join('+');
}
