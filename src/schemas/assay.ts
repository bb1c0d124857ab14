import { z } from 'zod';
import {
  assayCodeSchema,
  measureSchema,
  plainText,
  specimenClassOf,
  specimenTypeSchema,
  type AssayCode,
  type Measure,
  type SpecimenType,
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

/*
 * Physical limits of a reading [common practice]: ranges that no real cuvette, plate well, pipette or
 * homogenate reaches, so a value outside them is a typing or unit mistake and is refused (400, naming the
 * field) before anything is computed or stored. They are deliberately wide; plausibility of the result is
 * judged separately, per assay definition.
 */
export const physicalLimits = {
  /** 0.1 mm micro-cells to 10 cm long-path cells. */
  pathlengthCm: { min: 0.01, max: 10, unit: 'cm' },
  /** A plate well's few µL to a 10 mL cell. */
  reactionVolumeUl: { min: 1, max: 10_000, unit: 'µL' },
  /** The smallest volume a pipette delivers to the reaction volume's ceiling. */
  sampleVolumeUl: { min: 0.1, max: 10_000, unit: 'µL' },
  /** Homogenate or mitochondrial protein; pure protein is about 1 300 mg/mL, no solution comes near 500. */
  proteinMgPerMl: { min: 0.001, max: 500, unit: 'mg/mL' },
  /** |ΔA/min|: no photometer follows a change of 10 absorbance units a minute. */
  ratePerMin: { min: -10, max: 10, unit: 'A/min' },
  /** Readings below −1 or above 10 absorbance units are not absorbances (photometers read up to about 4–6). */
  absorbance: { min: -1, max: 10, unit: 'A' },
  /** Reading times, seconds from the start of the recording, within a day either side. */
  timeS: { min: -86_400, max: 86_400, unit: 's' },
} as const;
export type PhysicalQuantity = keyof typeof physicalLimits;

/** A finite number within the physical limits of `quantity`, with messages that name `label`. */
export function physicalNumber(quantity: PhysicalQuantity, label: string) {
  const { min, max, unit } = physicalLimits[quantity];
  return finite(label)
    .min(min, `${label} must be at least ${min} ${unit}`)
    .max(max, `${label} must be at most ${max.toLocaleString('en-US')} ${unit}`);
}

/**
 * Limits that decide when a computed rate is trusted (docs/domain.md, "Rates"). Added in the second release;
 * definition versions stored before it are read with the defaults below (storedDefinitionData).
 */
const qualityLimitFields = {
  /** Largest estimated change of the rate across a window (%, from the quadratic term) that still counts as straight. */
  curvatureLimitPct: positive('curvatureLimitPct').max(50, 'curvatureLimitPct is at most 50'),
  /** How far into the trace (s) the automatic window may start, to step past a lag. 0 = always the first reading. */
  lagMaxS: finite('lagMaxS').min(0, 'lagMaxS cannot be negative').max(3600, 'lagMaxS is at most 3600 s'),
  /** A reading further than this many residual SDs from the fitted line is flagged. */
  outlierLimitSd: finite('outlierLimitSd').min(2, 'outlierLimitSd is at least 2').max(20, 'outlierLimitSd is at most 20'),
  /** Smallest residual SD (absorbance units) the outlier test assumes: the instrument's own noise. */
  readingNoiseFloor: positive('readingNoiseFloor').max(0.1, 'readingNoiseFloor is at most 0.1'),
  /** Background (inhibitor-insensitive or pre-substrate) rate above this % of the total rate is flagged. */
  maxBackgroundPct: positive('maxBackgroundPct').max(100, 'maxBackgroundPct is at most 100'),
  /** No-sample blank rate above this % of the total rate is flagged. */
  maxBlankPct: positive('maxBlankPct').max(100, 'maxBlankPct is at most 100'),
  /** Activities above this (nmol/min/mg) are not given: almost always a unit or entry mistake. */
  plausibleActivityMax: positive('plausibleActivityMax').max(1e6, 'plausibleActivityMax is at most 1 000 000'),
};

/** The fields of a definition; cross-field rules are added in assayDefinitionSchema below. */
export const assayDefinitionFieldsSchema = z
  .object({
    code: assayCodeSchema,
    version: z.number().int('version must be a whole number').positive('version starts at 1'),
    name: z.string().trim().min(1, 'name is required').max(120, 'name is at most 120 characters').superRefine(plainText('name')),
    wavelengthNm: finite('wavelengthNm').min(190, 'wavelengthNm is 190 to 1100 (a UV–visible photometer)').max(1100, 'wavelengthNm is 190 to 1100 (a UV–visible photometer)'),
    chromophore: z.string().trim().min(1, 'chromophore is required').max(80).superRefine(plainText('chromophore')),
    /** Extinction coefficient in mM⁻¹·cm⁻¹; lab-set, stored with its source. */
    epsilonPerMmPerCm: finite('epsilonPerMmPerCm')
      .min(0.1, 'epsilonPerMmPerCm is 0.1 to 1000 mM⁻¹·cm⁻¹ (every chromophore in use lies between about 1 and 200)')
      .max(1000, 'epsilonPerMmPerCm is 0.1 to 1000 mM⁻¹·cm⁻¹ (every chromophore in use lies between about 1 and 200)'),
    epsilonSource: z.string().trim().min(1, 'epsilonSource is required').max(500).superRefine(plainText('epsilonSource', true)),
    direction: absorbanceDirectionSchema,
    background: backgroundKindSchema,
    /** What the background trace contains, e.g. "rotenone" or "before succinate"; empty when none. */
    backgroundNote: z.string().trim().max(200).superRefine(plainText('backgroundNote', true)),
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
    ...qualityLimitFields,
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
  curvatureLimitPct: 5,
  lagMaxS: 120,
  outlierLimitSd: 4,
  readingNoiseFloor: 0.002,
  maxBackgroundPct: 70,
  maxBlankPct: 50,
} as const;

/*
 * Plausible activity ceilings, nmol/min/mg protein [common practice starting values, set by each laboratory]:
 * roughly ten times the highest activities reported for isolated mitochondria, so that a real sample never
 * reaches them and a rate typed in the wrong unit (×1000) always does.
 */
const plausibleActivityMax: Record<AssayCode, number> = {
  CI: 5000,
  CII: 5000,
  CIII: 20000,
  CIV: 20000,
  'CI+III': 5000,
  'CII+III': 5000,
  CS: 20000,
};

/**
 * A stored definition version as saved: versions from before the quality limits existed are read with the
 * defaults (they were computed without those checks; the defaults describe what applies to them now).
 */
export function storedDefinitionData(data: Record<string, unknown> & { code: AssayCode }): Record<string, unknown> {
  return { ...defaultLabSettings, plausibleActivityMax: plausibleActivityMax[data.code], ...data };
}

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
    plausibleActivityMax: plausibleActivityMax['CI'],
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
    plausibleActivityMax: plausibleActivityMax['CII'],
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
    plausibleActivityMax: plausibleActivityMax['CIII'],
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
    plausibleActivityMax: plausibleActivityMax['CIV'],
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
    plausibleActivityMax: plausibleActivityMax['CI+III'],
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
    plausibleActivityMax: plausibleActivityMax['CII+III'],
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
    plausibleActivityMax: plausibleActivityMax['CS'],
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
  /** The rate changes across the window by more than the definition's curvature limit (manual windows). */
  'CURVATURE',
  /** No stretch of the trace is straight enough for the automatic window; no activity is given. */
  'NO_LINEAR_WINDOW',
  /** The automatic window starts after a slower opening stretch (a lag), which is left out. */
  'LAG_EXCLUDED',
  /** One reading lies far off the fitted line (a bubble, a knock, a lid). */
  'OUTLIER_READING',
  /** The automatic window starts later than it could, to leave out a reading far off its neighbours. */
  'STRAY_READING_AVOIDED',
  /** The readings jump to another level part-way through the window, which moves the straight line's rate. */
  'LEVEL_JUMP',
  /** The automatic window keeps to one side of a jump in level, which would have moved its rate. */
  'JUMP_AVOIDED',
  /** Most of the total rate remains with the inhibitor (or before the substrate). */
  'HIGH_BACKGROUND_FRACTION',
  /** Most of the total rate is also in the no-sample blank. */
  'HIGH_BLANK_FRACTION',
  /** The activity is above the definition's plausible ceiling; no activity is given. */
  'IMPLAUSIBLE_ACTIVITY',
  /** An end-point absorbance A∞ was given to a definition that does not use it. */
  'A_INFINITY_UNUSED',
] as const;
export const flagCodeSchema = z.enum(flagCodes);
export type FlagCode = z.infer<typeof flagCodeSchema>;

/** Each flag in a few plain words, for tables and summaries; the full message says the numbers. */
export const flagTitles: Record<FlagCode, string> = {
  TOO_FEW_POINTS: 'Too few readings',
  TIME_NOT_INCREASING: 'Reading times out of order',
  NON_FINITE: 'A value is not a number',
  LOW_R2: 'Readings scatter around the line',
  OUT_OF_LINEAR_RANGE: "Absorbance outside the photometer's linear range",
  WRONG_SIGN: 'Rate runs the wrong way',
  NEAR_ZERO: 'Rate too small to measure',
  BACKGROUND_MATCHES_TOTAL: 'Background equals the total',
  NO_BACKGROUND: 'No background trace',
  FIRST_ORDER_NOT_COMPUTED: 'First-order constant not computed',
  PAST_END_POINT: 'Reading past the end point',
  HIGH_CV: 'Replicates disagree',
  SINGLE_REPLICATE: 'Single replicate',
  OUTSIDE_STANDARDS: 'Outside the protein standards',
  BAD_STANDARD_CURVE: 'Standard curve unusable',
  NO_DENOMINATOR: 'Ratio cannot be formed',
  NO_INTERVAL: 'No reference interval',
  BASIS_MISMATCH: 'Not comparable with the interval',
  MISSING_VALUE: 'A value is missing',
  CURVATURE: 'Window is curved',
  NO_LINEAR_WINDOW: 'No straight stretch: no rate given',
  LAG_EXCLUDED: 'Slow start left out',
  OUTLIER_READING: 'A stray reading',
  STRAY_READING_AVOIDED: 'Window moved past a stray reading',
  LEVEL_JUMP: 'Readings jump part-way',
  JUMP_AVOIDED: 'Window kept clear of a jump',
  HIGH_BACKGROUND_FRACTION: 'Background is most of the rate',
  HIGH_BLANK_FRACTION: 'Blank is most of the rate',
  IMPLAUSIBLE_ACTIVITY: 'Implausibly high: check units',
  A_INFINITY_UNUSED: 'End-point absorbance not used',
};

/** The distinct flags of a list in plain words, e.g. "Window is curved; A stray reading". */
export function flagSummary(flags: readonly { code: FlagCode }[]): string {
  return [...new Set(flags.map((f) => flagTitles[f.code]))].join('; ');
}

/** `values`: the numbers behind the flag (e.g. `{ lossPct: 27.4 }`), for tables and traceability. */
export const flagSchema = z.object({
  code: flagCodeSchema,
  message: z.string(),
  values: z.record(z.string(), z.number()).optional(),
});
export type Flag = z.infer<typeof flagSchema>;

/* ----------------------------------------------------------------------------------------------
 * Traces and the single-assay calculation contract
 * -------------------------------------------------------------------------------------------- */

/** One reading: t in seconds, a in absorbance units. */
export const tracePointSchema = z.strictObject({
  t: physicalNumber('timeS', 't'),
  a: physicalNumber('absorbance', 'a'),
});
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
  .strictObject({ fromS: physicalNumber('timeS', 'window.fromS'), toS: physicalNumber('timeS', 'window.toS') })
  .refine((w) => w.toS > w.fromS, { path: ['toS'], message: 'window.toS must be after window.fromS' });
export type RateWindow = z.infer<typeof rateWindowSchema>;

export const calculationRequestSchema = z
  .strictObject({
    assay: assayCodeSchema,
    pathlengthCm: physicalNumber('pathlengthCm', 'pathlengthCm'),
    reactionVolumeUl: physicalNumber('reactionVolumeUl', 'reactionVolumeUl'),
    sampleVolumeUl: physicalNumber('sampleVolumeUl', 'sampleVolumeUl'),
    proteinMgPerMl: physicalNumber('proteinMgPerMl', 'proteinMgPerMl'),
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
/**
 * k divided by the protein concentration in the reaction: (min⁻¹)/(mg/mL) = mL·min⁻¹·mg⁻¹. Independent of the
 * reaction volume; numerically "k per mg protein" only in a 1 mL reaction, which is why it is not labelled so.
 */
export const FIRST_ORDER_UNIT = 'mL·min⁻¹·mg⁻¹ (k per mg/mL protein in the reaction)' as const;

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
  /** k divided by the protein concentration in the reaction (mg/mL), in FIRST_ORDER_UNIT; equals k per mg only in a 1 mL reaction. */
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
  /**
   * Which value the thresholds are applied to: the activity relative to citrate synthase (`ratio_cs`, the
   * marker the pattern reads), relative to complex II, or the activity per mg protein. Other measures carry
   * no band. Compared, in every case, as % of the mean of that measure's reference interval.
   */
  appliesTo: measureSchema,
  /** Where the choice of `appliesTo` comes from, with its certainty tag; printed beside the bands. */
  appliesToSource: z.string().min(1),
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
  appliesTo: 'ratio_cs',
  appliesToSource:
    'The criteria compare an enzyme activity with the control mean (% of control mean); applying them to the activity relative to citrate synthase, which corrects for mitochondrial content, is common practice in respiratory-chain diagnostics [common practice; not stated as such in the criteria themselves, as recalled]',
  tissue: { majorBelowPct: 20, minorBelowPct: 30 },
  cellLine: { majorBelowPct: 30, minorBelowPct: 40 },
  multipleTissues: { majorBelowPct: 30, minorBelowPct: 40 },
};

/** The thresholds that apply to a specimen type: cell-line thresholds for cultured cells, tissue ones otherwise. */
export function criteriaRuleFor(
  specimenType: SpecimenType,
  criteria: DiagnosticCriteria = defaultDiagnosticCriteria,
): { majorBelowPct: number; minorBelowPct: number } {
  return specimenClassOf(specimenType) === 'cell_line' ? criteria.cellLine : criteria.tissue;
}

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

/** A saved version is a draft until a second director approves it; a draft can be withdrawn instead. */
export const assayDefinitionStatusSchema = z.enum(['draft', 'approved', 'withdrawn']);
export type AssayDefinitionStatus = z.infer<typeof assayDefinitionStatusSchema>;

export const storedAssayDefinitionSchema = z.object({
  id: z.number().int(),
  definition: assayDefinitionSchema,
  /** Only approved versions are used by calculations (the newest one). */
  status: assayDefinitionStatusSchema,
  changeNote: z.string().nullable(),
  /** Who drafted it (null: the published defaults). */
  createdBy: z.string().nullable(),
  createdById: z.number().int().nullable(),
  createdAt: z.string(),
  approvedBy: z.string().nullable(),
  approvedById: z.number().int().nullable(),
  approvedAt: z.string().nullable(),
  /** Approved by the director who drafted it (a single-director laboratory that allows it). */
  selfApproved: z.boolean(),
});
export type StoredAssayDefinition = z.infer<typeof storedAssayDefinitionSchema>;

/** GET /api/assay-definitions: the version in force of each assay, and the drafts awaiting approval. */
export const assayDefinitionListSchema = z.object({
  items: z.array(storedAssayDefinitionSchema),
  drafts: z.array(storedAssayDefinitionSchema),
});

/** A director's new version: every field of the definition except its code and number, plus why it changed. */
export const createAssayDefinitionVersionInputSchema = z.strictObject({
  definition: assayDefinitionFieldsSchema.omit({ code: true, version: true }).strict(),
  changeNote: z.string().trim().min(3, 'Say what changed and why').max(1000).superRefine(plainText('Change note', true)),
  /** The version the director was looking at; a newer one in between is a conflict. */
  basedOnVersion: z.number().int().positive(),
});
export type CreateAssayDefinitionVersionInput = z.infer<typeof createAssayDefinitionVersionInputSchema>;

/** POST /api/assay-definitions/:code/versions/:version/withdraw: why the draft is dropped. */
export const withdrawAssayDefinitionInputSchema = z.strictObject({
  reason: z.string().trim().min(3, 'Say why the draft is withdrawn').max(500).superRefine(plainText('Reason', true)),
});
export type WithdrawAssayDefinitionInput = z.infer<typeof withdrawAssayDefinitionInputSchema>;
