import { defaultAssayDefinitions, type AssayDefinition, type FlagCode, type Trace, type TracePoint } from '@/schemas/assay';
import type { AssayCode } from '@/schemas/common';
import type { WindowShape } from '../../../../server/domain/assay-engine/linearity';
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

/** Readings once a minute (t in seconds = 60·i), so slopes per reading are per minute. */
export const perMinute = (a: number[]): TracePoint[] => a.map((value, i) => ({ t: 60 * i, a: value }));

/** A whole-window shape handed in as straight (its quadratic not significant), so only the part tests decide. */
export const straightWhole = (n: number): WindowShape => ({
  n,
  slopePerMin: -0.5,
  slopeSePerMin: 0.1,
  startSlopePerMin: -0.5,
  changePct: 0,
  curvatureT: 0,
  significant: false,
  r2: 0.9,
});

/**
 * Gaussian noise from a fixed linear congruential generator (Numerical Recipes' constants 1664525 and 1013904223
 * [from memory]) through Box–Muller, so every run sees the same traces.
 */
export function generator(seed: number) {
  let state = seed;
  const uniform = () => {
    state = (state * 1664525 + 1013904223) % 4294967296;
    return state / 4294967296;
  };
  const gauss = () => Math.sqrt(-2 * Math.log(uniform() + 1e-12)) * Math.cos(2 * Math.PI * uniform());
  return { uniform, gauss };
}
