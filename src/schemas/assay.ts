import { z } from 'zod';
import {
  assayCodeSchema,
  measureSchema,
  specimenTypeSchema,
  type AssayCode,
  type Measure,
} from './common';

/*
 * Assay definitions, the single-assay calculation contract, result flags, the diagnostic-criteria rule
 * set and one invented demo interval set. Shared by the client and the server; the computations live in
 * server/domain/assay-engine.
 */

/* ----------------------------------------------------------------------------------------------
 * Assay definitions
 * -------------------------------------------------------------------------------------------- */

export const absorbanceDirections = ['rises', 'falls'] as const;
export const absorbanceDirectionSchema = z.enum(absorbanceDirections);
export type AbsorbanceDirection = z.infer<typeof absorbanceDirectionSchema>;

/** What the subtracted trace is: a parallel reading with the inhibitor, the baseline before the starting substrate, or nothing. */
export const backgroundKinds = ['inhibitor', 'baseline', 'none'] as const;
export const backgroundKindSchema = z.enum(backgroundKinds);
export type BackgroundKind = z.infer<typeof backgroundKindSchema>;

export const rateModels = ['linear', 'first_order'] as const;
export const rateModelSchema = z.enum(rateModels);
export type RateModel = z.infer<typeof rateModelSchema>;

const finite = (field: string) =>
  z.number({
    error: (iss) =>
      iss.input === undefined ? `${field} is required` : `${field} must be a finite number`,
  });

const positive = (field: string) => finite(field).positive(`${field} must be greater than 0`);

/** The fields of a definition; cross-field rules are added in assayDefinitionSchema below. */
export const assayDefinitionFieldsSchema = z
  .object({
    code: assayCodeSchema,
    version: z.number().int('version must be a whole number').positive('version starts at 1'),
    name: z.string().trim().min(1, 'name is required').max(120, 'name is at most 120 characters'),
    wavelengthNm: positive('wavelengthNm'),
    chromophore: z.string().trim().min(1, 'chromophore is required').max(80),
    /** Extinction coefficient in mM⁻¹·cm⁻¹; lab-set, stored with its source. */
    epsilonPerMmPerCm: positive('epsilonPerMmPerCm'),
    epsilonSource: z.string().trim().min(1, 'epsilonSource is required').max(500),
    direction: absorbanceDirectionSchema,
    background: backgroundKindSchema,
    /** What the background trace contains, e.g. "rotenone" or "before succinate"; empty when none. */
    backgroundNote: z.string().trim().max(200),
    rateModel: rateModelSchema,
    /** The automatic window is the longest early stretch whose r² reaches this value. */
    r2Threshold: finite('r2Threshold').min(0, 'r2Threshold is 0 to 1').max(1, 'r2Threshold is 0 to 1'),
    /** Fewest readings a fitted window may hold. */
    minPoints: z.number().int('minPoints must be a whole number').min(3, 'minPoints is at least 3'),
    /** Absorbance limits within which the instrument reads linearly. */
    linearRangeMin: finite('linearRangeMin'),
    linearRangeMax: finite('linearRangeMax'),
    /** |specific slope| below this (absorbance units per minute) is indistinguishable from zero. */
    nearZeroSlopePerMin: finite('nearZeroSlopePerMin').nonnegative(
      'nearZeroSlopePerMin cannot be negative',
    ),
    /** Replicate CV% above this flags the mean. */
    cvLimitPct: positive('cvLimitPct'),
  });

export const assayDefinitionSchema = assayDefinitionFieldsSchema
  .refine((d) => d.linearRangeMax > d.linearRangeMin, {
    path: ['linearRangeMax'],
    message: 'linearRangeMax must be above linearRangeMin',
  })
  .refine((d) => d.rateModel === 'linear' || d.code === 'CIV', {
    path: ['rateModel'],
    message: 'Only complex IV may use the first-order rate model',
  });
export type AssayDefinition = z.infer<typeof assayDefinitionSchema>;

const DOMAIN_EPSILON_NOTE =
  'derived from the consensus-protocol calculation factor, factor = 1000 / (ε × mg protein) for a 1 mL, 1 cm cuvette (Medja et al., Mitochondrion 2009;9:331–339 [from memory]; Spinazzi et al., Nat Protoc 2012, doi:10.1038/nprot.2012.058)';

/** Lab settings every default starts with; each laboratory edits them in a new definition version. */
const defaultLabSettings = {
  // [common practice] starting values, to be set by each laboratory.
  r2Threshold: 0.99,
  minPoints: 5,
  linearRangeMin: 0,
  linearRangeMax: 2,
  nearZeroSlopePerMin: 0.001,
  cvLimitPct: 15,
} as const;

/** The seven published defaults (version 1), wavelengths and ε from docs/domain.md §1. */
export const defaultAssayDefinitions: readonly AssayDefinition[] = [
  {
    code: 'CI',
    version: 1,
    name: 'Complex I (NADH:ubiquinone oxidoreductase)',
    wavelengthNm: 340,
    chromophore: 'NADH',
    epsilonPerMmPerCm: 6.2,
    epsilonSource: `NADH at 340 nm, 6.2 mM⁻¹·cm⁻¹: ${DOMAIN_EPSILON_NOTE}; CI factor 4032.3 at 40 µg [derived]`,
    direction: 'falls',
    background: 'inhibitor',
    backgroundNote: 'rotenone',
    rateModel: 'linear',
    ...defaultLabSettings,
  },
  {
    code: 'CII',
    version: 1,
    name: 'Complex II (succinate:ubiquinone oxidoreductase, via DCPIP)',
    wavelengthNm: 600,
    chromophore: 'DCPIP',
    epsilonPerMmPerCm: 19.1,
    epsilonSource: `DCPIP at 600 nm, 19.1 mM⁻¹·cm⁻¹: ${DOMAIN_EPSILON_NOTE}; CII factor 1308.9 at 40 µg [derived]`,
    direction: 'falls',
    background: 'baseline',
    backgroundNote: 'baseline before succinate',
    rateModel: 'linear',
    ...defaultLabSettings,
  },
  {
    code: 'CIII',
    version: 1,
    name: 'Complex III (ubiquinol:cytochrome c reductase)',
    wavelengthNm: 550,
    chromophore: 'cytochrome c (reduced)',
    epsilonPerMmPerCm: 18.5,
    epsilonSource: `Cytochrome c at 550 nm, 18.5 mM⁻¹·cm⁻¹: ${DOMAIN_EPSILON_NOTE}; CIII factor 1801.8 at 30 µg [derived]`,
    direction: 'rises',
    background: 'inhibitor',
    backgroundNote: 'antimycin A',
    rateModel: 'linear',
    ...defaultLabSettings,
  },
  {
    code: 'CIV',
    version: 1,
    name: 'Complex IV (cytochrome c oxidase)',
    wavelengthNm: 550,
    chromophore: 'cytochrome c (reduced)',
    epsilonPerMmPerCm: 18.5,
    epsilonSource: `Cytochrome c at 550 nm, 18.5 mM⁻¹·cm⁻¹: ${DOMAIN_EPSILON_NOTE}; CIV factor 1351.4 at 40 µg [derived]`,
    direction: 'falls',
    background: 'none',
    backgroundNote: '',
    rateModel: 'linear',
    ...defaultLabSettings,
  },
  {
    code: 'CI+III',
    version: 1,
    name: 'Complex I+III (NADH:cytochrome c reductase)',
    wavelengthNm: 550,
    chromophore: 'cytochrome c (reduced)',
    epsilonPerMmPerCm: 18.5,
    epsilonSource: `Cytochrome c at 550 nm, 18.5 mM⁻¹·cm⁻¹: ${DOMAIN_EPSILON_NOTE}; CI+III factor 1351.4 at 40 µg [derived]`,
    direction: 'rises',
    background: 'inhibitor',
    backgroundNote: 'rotenone',
    rateModel: 'linear',
    ...defaultLabSettings,
  },
  {
    code: 'CII+III',
    version: 1,
    name: 'Complex II+III (succinate:cytochrome c reductase)',
    wavelengthNm: 550,
    chromophore: 'cytochrome c (reduced)',
    epsilonPerMmPerCm: 18.5,
    epsilonSource: `Cytochrome c at 550 nm, 18.5 mM⁻¹·cm⁻¹: ${DOMAIN_EPSILON_NOTE}; CII+III factor 1351.4 at 40 µg [derived]`,
    direction: 'rises',
    background: 'none',
    backgroundNote: '',
    rateModel: 'linear',
    ...defaultLabSettings,
  },
  {
    code: 'CS',
    version: 1,
    name: 'Citrate synthase',
    wavelengthNm: 412,
    chromophore: 'TNB (from DTNB)',
    epsilonPerMmPerCm: 13.6,
    epsilonSource: `TNB at 412 nm, 13.6 mM⁻¹·cm⁻¹ [confirmed independently]: ${DOMAIN_EPSILON_NOTE}; CS factor 1838.2 at 40 µg [derived]`,
    direction: 'rises',
    background: 'baseline',
    backgroundNote: 'baseline before oxaloacetate',
    rateModel: 'linear',
    ...defaultLabSettings,
  },
];

/* ----------------------------------------------------------------------------------------------
 * Flags: every result that is not a plain number says why, by code and in words
 * -------------------------------------------------------------------------------------------- */

export const flagCodes = [
  /** Fewer readings in the window than the fit or the lab's minimum needs. */
  'TOO_FEW_POINTS',
  /** Reading times are not strictly increasing. */
  'TIME_NOT_INCREASING',
  /** A time, absorbance or input value is NaN or infinite. */
  'NON_FINITE',
  /** r² of the fitted window is below the lab's threshold (trace or standard curve). */
  'LOW_R2',
  /** An absorbance in the window lies outside the instrument's linear range. */
  'OUT_OF_LINEAR_RANGE',
  /** The specific slope runs against the assay's expected direction; no activity is given. */
  'WRONG_SIGN',
  /** |specific slope| is below the lab's near-zero limit. */
  'NEAR_ZERO',
  /** The background trace is the same as the total trace, or gives the same slope. */
  'BACKGROUND_MATCHES_TOTAL',
  /** The definition subtracts a background trace, but none was given. */
  'NO_BACKGROUND',
  /** The definition asks for a first-order rate constant, but it could not be computed. */
  'FIRST_ORDER_NOT_COMPUTED',
  /** A reading sits at or beyond the fully oxidised end-point absorbance (A∞). */
  'PAST_END_POINT',
  /** Replicate CV% exceeds the lab's limit. */
  'HIGH_CV',
  /** Only one replicate: no SD or CV. */
  'SINGLE_REPLICATE',
  /** An unknown's absorbance falls outside the protein standards; no value is extrapolated. */
  'OUTSIDE_STANDARDS',
  /** Standard curve unusable: too few standards, or a quadratic that turns within the range. */
  'BAD_STANDARD_CURVE',
  /** A ratio's denominator is missing, zero or negative. */
  'NO_DENOMINATOR',
  /** No reference interval for this assay, measure, specimen type and age. */
  'NO_INTERVAL',
  /** A first-order value was offered to a linear-rate interval, or the reverse: never compared. */
  'BASIS_MISMATCH',
  /** A value needed for the calculation is missing. */
  'MISSING_VALUE',
] as const;
export const flagCodeSchema = z.enum(flagCodes);
export type FlagCode = z.infer<typeof flagCodeSchema>;

export const flagSchema = z.object({ code: flagCodeSchema, message: z.string() });
export type Flag = z.infer<typeof flagSchema>;

/* ----------------------------------------------------------------------------------------------
 * Traces and the single-assay calculation contract
 * -------------------------------------------------------------------------------------------- */

/** One reading: t in seconds, a in absorbance units. */
export const tracePointSchema = z.strictObject({ t: finite('t'), a: finite('a') });
export type TracePoint = z.infer<typeof tracePointSchema>;

export const traceSchema = z.array(tracePointSchema);
export type Trace = z.infer<typeof traceSchema>;

const traceWithMinimum = (field: string) =>
  z
    .array(tracePointSchema, {
      error: (iss) =>
        iss.input === undefined
          ? `${field} is required`
          : `${field} must be a list of {t, a} readings`,
    })
    .min(3, `${field} needs at least 3 readings`);

/** Both ends inclusive, in seconds. */
export const rateWindowSchema = z
  .strictObject({ fromS: finite('window.fromS'), toS: finite('window.toS') })
  .refine((w) => w.toS > w.fromS, { path: ['toS'], message: 'window.toS must be after window.fromS' });
export type RateWindow = z.infer<typeof rateWindowSchema>;

export const calculationRequestSchema = z
  .strictObject({
    assay: assayCodeSchema,
    pathlengthCm: positive('pathlengthCm'),
    reactionVolumeUl: positive('reactionVolumeUl'),
    sampleVolumeUl: positive('sampleVolumeUl'),
    proteinMgPerMl: positive('proteinMgPerMl'),
    total: traceWithMinimum('total'),
    background: traceWithMinimum('background').optional(),
    window: rateWindowSchema.optional(),
  })
  // Zod runs this even when a volume already failed its own check; say nothing more then.
  .refine((r) => !(r.sampleVolumeUl > 0 && r.reactionVolumeUl > 0) || r.sampleVolumeUl <= r.reactionVolumeUl, {
    path: ['sampleVolumeUl'],
    message: 'sampleVolumeUl cannot exceed reactionVolumeUl',
  });
export type CalculationRequest = z.infer<typeof calculationRequestSchema>;

/** A fitted straight line over a window, for plotting and traceability. */
export const fittedLineSchema = z.object({
  fromS: z.number(),
  toS: z.number(),
  aAtFrom: z.number(),
  aAtTo: z.number(),
  slopePerMin: z.number(),
  r2: z.number(),
  residualSd: z.number().nullable(),
  points: z.number().int(),
});
export type FittedLine = z.infer<typeof fittedLineSchema>;

export const ACTIVITY_UNIT = 'nmol/min/mg protein' as const;
export const FIRST_ORDER_UNIT = 'min⁻¹ per mg protein' as const;

/**
 * Complex IV as an apparent first-order rate constant. `basis: 'first_order_k'` marks it: it is never
 * compared with an interval built from linear rates.
 */
export const firstOrderResultSchema = z.object({
  basis: z.literal('first_order_k'),
  aInfinity: z.number(),
  /** Fitted k of ln|A − A∞| against t, min⁻¹, total trace (minus background k when given). */
  kPerMin: z.number().nullable(),
  kTotalPerMin: z.number().nullable(),
  kBackgroundPerMin: z.number().nullable(),
  r2: z.number().nullable(),
  /** k divided by the protein concentration in the reaction (mg/mL); equals k per mg in a 1 mL reaction. */
  kPerMg: z.number().nullable(),
  unit: z.literal(FIRST_ORDER_UNIT),
  window: rateWindowSchema.nullable(),
  flags: z.array(flagSchema),
});
export type FirstOrderResult = z.infer<typeof firstOrderResultSchema>;

export const calculationResultSchema = z.object({
  assay: assayCodeSchema,
  definitionVersion: z.number().int().positive(),
  /** Signed, absorbance units per minute; null when the trace could not be fitted (see flags). */
  slopeTotalPerMin: z.number().nullable(),
  slopeBackgroundPerMin: z.number().nullable(),
  specificSlopePerMin: z.number().nullable(),
  /** Positive when the reaction ran the expected way; null with a flag otherwise. */
  activity: z.number().nullable(),
  unit: z.literal(ACTIVITY_UNIT),
  r2: z.number().nullable(),
  /** The window used; null only when no reading time could be read. */
  window: z.object({ fromS: z.number(), toS: z.number() }).nullable(),
  flags: z.array(flagSchema),
  // Extra fields for traceability and plotting.
  basis: z.literal('linear_rate'),
  windowAuto: z.boolean(),
  slopeBlankPerMin: z.number().nullable(),
  residualSd: z.number().nullable(),
  fitTotal: fittedLineSchema.nullable(),
  fitBackground: fittedLineSchema.nullable(),
  /** activity = |specificSlopePerMin| × factor. */
  factor: z.number(),
  inputs: z.object({
    epsilonPerMmPerCm: z.number(),
    epsilonSource: z.string(),
    pathlengthCm: z.number(),
    reactionVolumeUl: z.number(),
    sampleVolumeUl: z.number(),
    proteinMgPerMl: z.number(),
    direction: absorbanceDirectionSchema,
    backgroundKind: backgroundKindSchema,
    rateModel: rateModelSchema,
  }),
  firstOrder: firstOrderResultSchema.nullable(),
});
export type CalculationResult = z.infer<typeof calculationResultSchema>;

/* ----------------------------------------------------------------------------------------------
 * Reference comparison
 * -------------------------------------------------------------------------------------------- */

export const valueBases = ['linear_rate', 'first_order_k'] as const;
export const valueBasisSchema = z.enum(valueBases);
export type ValueBasis = z.infer<typeof valueBasisSchema>;

/** One reference interval as the comparison needs it; storage and versioning live elsewhere. */
export const comparisonIntervalSchema = z
  .object({
    /** Stable id or "set label vN" of the stored interval, shown with every comparison. */
    id: z.string().min(1),
    setLabel: z.string().min(1),
    version: z.number().int().positive(),
    assay: assayCodeSchema,
    measure: measureSchema,
    specimenType: specimenTypeSchema,
    /** Age band in years, lower bound inclusive, upper bound exclusive; null = open. */
    ageFromYears: z.number().nonnegative().nullable(),
    ageToYears: z.number().positive().nullable(),
    basis: valueBasisSchema,
    lower: z.number(),
    upper: z.number(),
    mean: z.number().positive('mean must be greater than 0'),
    sd: z.number().positive().nullable(),
    unit: z.string(),
    method: z.string(),
  })
  .refine((i) => i.upper > i.lower, { path: ['upper'], message: 'upper must be above lower' });
export type ComparisonInterval = z.infer<typeof comparisonIntervalSchema>;

export const intervalPositions = ['below', 'within', 'above'] as const;
export type IntervalPosition = (typeof intervalPositions)[number];

export const criteriaBands = ['major', 'minor', 'not_met'] as const;
export type CriteriaBand = (typeof criteriaBands)[number];

/** Enzyme thresholds as % of the control mean: below `major` → major; below `minor` → minor. */
export const diagnosticCriteriaSchema = z.object({
  id: z.string().min(1),
  citation: z.string().min(1),
  tissue: z.object({ majorBelowPct: z.number().positive(), minorBelowPct: z.number().positive() }),
  cellLine: z.object({ majorBelowPct: z.number().positive(), minorBelowPct: z.number().positive() }),
  /** Same complex in two or more tissues; judged by the director across specimens, not per value. */
  multipleTissues: z.object({
    majorBelowPct: z.number().positive(),
    minorBelowPct: z.number().positive(),
  }),
});
export type DiagnosticCriteria = z.infer<typeof diagnosticCriteriaSchema>;

/** Bernier et al. 2002 enzyme thresholds, as recalled in docs/domain.md §2 [from memory]. */
export const defaultDiagnosticCriteria: DiagnosticCriteria = {
  id: 'bernier-2002-enzyme',
  citation:
    'Bernier FP et al., "Diagnostic criteria for respiratory chain disorders in adults and children", Neurology 2002;59:1406–1411 [from memory; a director-approved, configurable rule set]',
  tissue: { majorBelowPct: 20, minorBelowPct: 30 },
  cellLine: { majorBelowPct: 30, minorBelowPct: 40 },
  multipleTissues: { majorBelowPct: 30, minorBelowPct: 40 },
};

export const patternKinds = [
  'normal',
  'isolated_deficiency',
  'combined_deficiency',
  'linked_activity_low',
  'raised_cs',
  'insufficient_data',
] as const;
export type PatternKind = (typeof patternKinds)[number];

/* ----------------------------------------------------------------------------------------------
 * Demo interval set (invented)
 * -------------------------------------------------------------------------------------------- */

export const DEMO_INTERVAL_SET_LABEL = 'DEMO — invented values, not for clinical use';

type DemoRow = [assay: AssayCode, measure: Measure, mean: number, sd: number];

// Invented numbers, shaped only to be plausible for skeletal muscle; intervals are mean ± 2 SD.
const demoRows: DemoRow[] = [
  ['CS', 'activity', 150, 30],
  ['CI', 'activity', 37, 9],
  ['CII', 'activity', 30, 7],
  ['CIII', 'activity', 120, 30],
  ['CIV', 'activity', 180, 45],
  ['CI+III', 'activity', 45, 12],
  ['CII+III', 'activity', 40, 10],
  ['CI', 'ratio_cs', 0.25, 0.05],
  ['CII', 'ratio_cs', 0.2, 0.04],
  ['CIII', 'ratio_cs', 0.8, 0.16],
  ['CIV', 'ratio_cs', 1.2, 0.25],
  ['CI+III', 'ratio_cs', 0.3, 0.07],
  ['CII+III', 'ratio_cs', 0.27, 0.06],
  ['CI', 'ratio_cii', 1.25, 0.3],
  ['CIII', 'ratio_cii', 4, 1],
  ['CIV', 'ratio_cii', 6, 1.5],
];

const round6 = (x: number) => Math.round(x * 1e6) / 1e6;

/**
 * One invented interval set for skeletal muscle, all ages, so results can be compared before interval
 * management exists. Ratios to CII are given for complexes I, III and IV.
 */
export const demoReferenceIntervals: readonly ComparisonInterval[] = demoRows.map(
  ([assay, measure, mean, sd]) => ({
    id: `demo-muscle-v1:${assay}:${measure}`,
    setLabel: DEMO_INTERVAL_SET_LABEL,
    version: 1,
    assay,
    measure,
    specimenType: 'skeletal_muscle',
    ageFromYears: null,
    ageToYears: null,
    basis: 'linear_rate',
    lower: round6(mean - 2 * sd),
    upper: round6(mean + 2 * sd),
    mean,
    sd,
    unit: measure === 'activity' ? ACTIVITY_UNIT : 'ratio',
    method: 'mean ± 2 SD of invented demo values',
  }),
);

/* ----------------------------------------------------------------------------------------------
 * Stored definition versions (the API's view of the assay_definitions table)
 * -------------------------------------------------------------------------------------------- */

export const storedAssayDefinitionSchema = z.object({
  id: z.number().int(),
  definition: assayDefinitionSchema,
  changeNote: z.string().nullable(),
  createdBy: z.string().nullable(),
  createdAt: z.string(),
});
export type StoredAssayDefinition = z.infer<typeof storedAssayDefinitionSchema>;

/** A director's new version: every field of the definition except its code and number, plus why it changed. */
export const createAssayDefinitionVersionInputSchema = z.strictObject({
  definition: assayDefinitionFieldsSchema.omit({ code: true, version: true }).strict(),
  changeNote: z.string().trim().min(3, 'Say what changed and why').max(1000),
  /** The version the director was looking at; a newer one in between is a conflict. */
  basedOnVersion: z.number().int().positive(),
});
export type CreateAssayDefinitionVersionInput = z.infer<typeof createAssayDefinitionVersionInputSchema>;
