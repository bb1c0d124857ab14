import { defaultAssayDefinitions, type AssayDefinition, type FlagCode, type Trace } from '@/schemas/assay';
import type { AssayCode } from '@/schemas/common';
import type { RateSettings } from '../../../../server/domain/assay-engine/rates';

/*
 * Inputs shared by the engine's tests (inputs only: every expected value stays in the test that checks it).
 */

/** The default laboratory settings of src/schemas/assay.ts, written out so a change there does not move the tests. */
export const labRateSettings: RateSettings = {
  r2Threshold: 0.99,
  minPoints: 5,
  linearRangeMin: 0,
  linearRangeMax: 2,
  curvatureLimitPct: 5,
  lagMaxS: 120,
  outlierLimitSd: 4,
  readingNoiseFloor: 0.002,
  nearZeroSlopePerMin: 0.001,
};

/**
 * A default definition with ε 20 (set here): with l 1 cm, V_r 1000 µL, V_s 50 µL and 1 mg/mL (`cuvette`) the factor
 * is 10⁶ / (20 × 50) = 1000 exactly [derived by hand from activity = |ΔA/min| × V_r·1000 / (ε·l·V_s·protein)].
 */
export const def = (code: AssayCode, over: Partial<AssayDefinition> = {}): AssayDefinition => ({
  ...defaultAssayDefinitions.find((d) => d.code === code)!,
  epsilonPerMmPerCm: 20,
  ...over,
});
export const cuvette = { pathlengthCm: 1, reactionVolumeUl: 1000, sampleVolumeUl: 50, proteinMgPerMl: 1 };
export const codes = (r: { flags: { code: FlagCode }[] }) => r.flags.map((f) => f.code);
/** 13 readings every 10 s on a straight line of the given slope per minute. */
export const line = (a0: number, slopePerMin: number, n = 13): Trace =>
  Array.from({ length: n }, (_, i) => ({ t: i * 10, a: a0 + (slopePerMin * i * 10) / 60 }));
