import { linearRegression, linearRegressionLine, rSquared } from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import { defaultAssayDefinitions, type AssayDefinition, type FlagCode, type Trace } from '@/schemas/assay';
import type { AssayCode } from '@/schemas/common';
import { calculateActivity, calculateActivityFromRates } from '../../../../server/domain/assay-engine/engine';
import { isStraight, worstOutlier, type WindowShape } from '../../../../server/domain/assay-engine/linearity';
import { curveAbsorbance, fitProteinCurve, interpolateProtein } from '../../../../server/domain/assay-engine/protein';

/*
 * The engine's per-definition limits exactly at, just below and just above the limit. Typed rates keep the
 * arithmetic exact. Limits: near-zero slope 0.001 A/min, background share 70%, plausible ceiling per assay,
 * photometer linear range 0–2 A (defaults in src/schemas/assay.ts, each lab-set [common practice]).
 * Activity = |ΔA/min| × V_r·1000 / (ε·l·V_s·protein) (docs/domain.md §1 [derived]); with ε 20, l 1 cm,
 * V_r 1000 µL, V_s 50 µL and 1 mg/mL the factor is 10⁶ / (20 × 50) = 1000 exactly [derived by hand].
 */

const def = (code: AssayCode, over: Partial<AssayDefinition> = {}): AssayDefinition => ({
  ...defaultAssayDefinitions.find((d) => d.code === code)!,
  ...over,
});
const codes = (r: { flags: { code: FlagCode }[] }) => r.flags.map((f) => f.code);
const cuvette = { pathlengthCm: 1, reactionVolumeUl: 1000, sampleVolumeUl: 50, proteinMgPerMl: 1 };

const rates = (assay: AssayCode, total: number, background: number | null, definition = def(assay)) =>
  calculateActivityFromRates({ assay, ...cuvette, totalRatePerMin: total, backgroundRatePerMin: background }, definition);

describe('near-zero slope (|specific| below 0.001 A/min is flagged)', () => {
  it('exactly 0.001 is measurable; 0.000999 is flagged; 0.001001 is not', () => {
    // CIV subtracts nothing, so the specific slope is the total (falls: negative).
    expect(codes(rates('CIV', -0.001, null))).not.toContain('NEAR_ZERO');
    expect(codes(rates('CIV', -0.000999, null))).toContain('NEAR_ZERO');
    expect(codes(rates('CIV', -0.001001, null))).not.toContain('NEAR_ZERO');
  });

  it('the flag names the slope and the limit, and still gives the number', () => {
    const r = rates('CIV', -0.0005, null);
    expect(r.flags.find((f) => f.code === 'NEAR_ZERO')!.message).toBe(
      "Specific slope -0.0005 /min is within ±0.001 /min of zero, the laboratory's limit of a measurable rate",
    );
    expect(r.activity).not.toBeNull();
  });

  it('a specific slope of exactly 0 is near zero but not of the wrong sign', () => {
    const r = rates('CIV', 0, null);
    expect(codes(r)).toContain('NEAR_ZERO');
    expect(codes(r)).not.toContain('WRONG_SIGN');
    expect(r.activity).toBe(0);
  });

  it('the smallest slope of the wrong sign is refused', () => {
    const r = rates('CIV', 1e-12, null);
    expect(codes(r)).toContain('WRONG_SIGN');
    expect(r.activity).toBeNull();
  });
});

describe('background share of the total rate (above 70% is flagged)', () => {
  // CI with rotenone: total −0.5, background −0.35 → 70% exactly [analytic: 0.35/0.5].
  it('exactly 70% no flag; 70.1% flagged; 69.9% no flag', () => {
    expect(codes(rates('CI', -0.5, -0.35))).not.toContain('HIGH_BACKGROUND_FRACTION');
    const high = rates('CI', -0.5, -0.3505);
    expect(codes(high)).toContain('HIGH_BACKGROUND_FRACTION');
    expect(high.flags.find((f) => f.code === 'HIGH_BACKGROUND_FRACTION')!.values!.backgroundPct).toBeCloseTo(70.1, 9);
    expect(codes(rates('CI', -0.5, -0.3495))).not.toContain('HIGH_BACKGROUND_FRACTION');
  });

  it('a background running the other way is no share of the total', () => {
    expect(codes(rates('CI', -0.5, 0.4))).not.toContain('HIGH_BACKGROUND_FRACTION');
  });

  it('the message says which inhibitor and how much of the total is left', () => {
    const f = rates('CI', -0.5, -0.4).flags.find((x) => x.code === 'HIGH_BACKGROUND_FRACTION')!;
    // 0.4 / 0.5 = 80% with rotenone; 20% is CI [analytic].
    expect(f.message).toMatch(/^The rate with rotenone \(inhibitor-insensitive\) is 80% of the total rate \(limit 70%\): only 20% is the CI activity/);
  });
});

describe('plausible activity ceiling (above it no activity is given)', () => {
  // ε 20 with the cuvette above: factor 1000, so 0.1 A/min is 100 nmol/min/mg exactly [derived by hand].
  const cs = (ceiling: number) => def('CS', { epsilonPerMmPerCm: 20, plausibleActivityMax: ceiling });
  it('activity exactly at the ceiling is given; a ceiling just below it refuses; just above gives it', () => {
    expect(rates('CS', 0.1, 0, cs(100)).activity).toBe(100);
    const refused = rates('CS', 0.1, 0, cs(99.99));
    expect(refused.activity).toBeNull();
    expect(codes(refused)).toContain('IMPLAUSIBLE_ACTIVITY');
    expect(refused.flags.find((f) => f.code === 'IMPLAUSIBLE_ACTIVITY')!.values).toEqual({ computed: 100, ceiling: 99.99 });
    expect(rates('CS', 0.1, 0, cs(100.01)).activity).toBe(100);
  });
});

describe('photometer linear range (readings outside 0–2 A are flagged)', () => {
  // A falling CIV line, one reading every 10 s for 2 min, starting at a chosen absorbance.
  const line = (a0: number): Trace => Array.from({ length: 13 }, (_, i) => ({ t: i * 10, a: a0 - 0.01 * i }));
  const civ = (total: Trace) =>
    calculateActivity({ assay: 'CIV', ...cuvette, total }, def('CIV'));
  it('a first reading of exactly 2 A is inside; 2.001 is outside; 1.999 is inside', () => {
    expect(codes(civ(line(2)))).not.toContain('OUT_OF_LINEAR_RANGE');
    expect(codes(civ(line(2.001)))).toContain('OUT_OF_LINEAR_RANGE');
    expect(codes(civ(line(1.999)))).not.toContain('OUT_OF_LINEAR_RANGE');
  });

  it('a last reading of exactly 0 A is inside; below 0 is outside', () => {
    expect(codes(civ(line(0.12)))).not.toContain('OUT_OF_LINEAR_RANGE');
    expect(codes(civ(line(0.119)))).toContain('OUT_OF_LINEAR_RANGE');
  });
});

describe('r² threshold of a chosen window (below it is flagged)', () => {
  // y = 0.5 − 0.01·i + 0.01·e_i with e = (1, −2, 0, 2, −1), which is orthogonal to 1 and to i, so
  // SSE = 10·10⁻⁴ and SST = (10 + 10)·10⁻⁴: r² = 1 − 10/20 = 0.5 [analytic]; simple-statistics agrees.
  const e = [1, -2, 0, 2, -1];
  const total: Trace = e.map((ei, i) => ({ t: i * 15, a: 0.5 - 0.01 * i + 0.01 * ei }));
  const run = (r2Threshold: number) =>
    calculateActivity({ assay: 'CIV', ...cuvette, total, window: { fromS: 0, toS: 60 } }, def('CIV', { r2Threshold }));

  it('the window r² is the analytic 0.5 (simple-statistics rSquared)', () => {
    const data = total.map((p) => [p.t, p.a]);
    const expected = rSquared(data, linearRegressionLine(linearRegression(data)));
    expect(expected).toBeCloseTo(0.5, 12);
    expect(run(0.9).r2).toBeCloseTo(expected, 12);
  });

  it('a threshold equal to the r² does not flag; just above flags; just below does not', () => {
    const r2 = run(0.9).r2!;
    expect(codes(run(r2))).not.toContain('LOW_R2');
    expect(codes(run(r2 + 1e-9))).toContain('LOW_R2');
    expect(codes(run(r2 - 1e-9))).not.toContain('LOW_R2');
  });
});

describe('curvature limit (a significant change larger than the limit is not straight)', () => {
  // The window's rate may change by at most the laboratory's limit, default 5% [common practice in kinetic-assay
  // software; docs/domain.md §5a]; only a statistically significant curvature counts.
  const shape = (changePct: number, significant: boolean): WindowShape => ({
    n: 10,
    slopePerMin: -0.05,
    slopeSePerMin: 0.001,
    startSlopePerMin: -0.05,
    changePct,
    curvatureT: significant ? 10 : 0.5,
    significant,
    r2: 0.999,
  });
  it('exactly 5% either way is straight; 5.001% is not; 4.999% is', () => {
    expect(isStraight(shape(-5, true), 5)).toBe(true);
    expect(isStraight(shape(5, true), 5)).toBe(true);
    expect(isStraight(shape(-5.001, true), 5)).toBe(false);
    expect(isStraight(shape(5.001, true), 5)).toBe(false);
    expect(isStraight(shape(-4.999, true), 5)).toBe(true);
  });

  it('a large change that is not significant is still straight', () => {
    expect(isStraight(shape(-40, false), 5)).toBe(true);
  });
});

describe('protein: dilution factor and the range of the standards', () => {
  // Never extrapolate beyond the standards [common practice for standard curves]; a dilution factor below 1
  // would be a concentration step, not a dilution [analytic]. Standards on A = 0.1 + 0.5·c exactly.
  const curve = fitProteinCurve(
    [0, 0.5, 1, 2].map((c) => ({ concentrationMgPerMl: c, absorbance: 0.1 + 0.5 * c })),
    'linear',
  );
  it('dilution exactly 1 accepted, 0.999 refused naming the field', () => {
    // 0.6 on A = 0.1 + 0.5c is 1 mg/mL [analytic].
    expect(interpolateProtein(curve, { absorbances: [0.6], dilutionFactor: 1 }).mgPerMl).toBeCloseTo(1, 10);
    const r = interpolateProtein(curve, { absorbances: [0.6], dilutionFactor: 0.999 });
    expect(r.mgPerMl).toBeNull();
    expect(r.flags).toEqual([{ code: 'NON_FINITE', message: 'dilutionFactor must be a finite number of at least 1 (got 0.999)' }]);
  });

  it('an unknown reading exactly at the highest or lowest standard is read; just beyond is refused', () => {
    const top = curveAbsorbance(curve, 2);
    const bottom = curveAbsorbance(curve, 0);
    expect(top).toBeCloseTo(1.1, 10);
    expect(interpolateProtein(curve, { absorbances: [top], dilutionFactor: 1 }).mgPerMl).toBeCloseTo(2, 9);
    expect(interpolateProtein(curve, { absorbances: [bottom], dilutionFactor: 1 }).mgPerMl).toBeCloseTo(0, 9);
    const above = interpolateProtein(curve, { absorbances: [top + 1e-9], dilutionFactor: 1 });
    expect(above.mgPerMl).toBeNull();
    expect(above.flags[0]!.message).toMatch(/^Absorbance 1\.1 is above the highest standard \(2 mg\/mL reads 1\.1\): dilute further/);
    const below = interpolateProtein(curve, { absorbances: [bottom - 1e-9], dilutionFactor: 1 });
    expect(below.flags[0]!.message).toMatch(/is below the lowest standard \(0 mg\/mL reads 0\.1\): dilute less/);
  });
});

describe('time between readings (at least 1 ms, times strictly increasing)', () => {
  // No photometer reads faster than 1 ms apart [our choice, documented in trace.ts].
  const civ = (times: number[]) =>
    calculateActivity(
      { assay: 'CIV', ...cuvette, total: times.map((t, i) => ({ t, a: 1 - 0.001 * i })) },
      def('CIV'),
    );
  const later = [10, 20, 30, 40, 50, 60];
  it('1 ms apart is accepted; 0.9 ms is refused as too fast; the same time twice as not increasing', () => {
    expect(codes(civ([0, 0.001, ...later]))).not.toContain('TIME_NOT_INCREASING');
    const fast = civ([0, 0.0009, ...later]);
    expect(fast.flags.find((f) => f.code === 'TIME_NOT_INCREASING')!.message).toBe(
      'total trace, reading 2: time 0.0009 s is less than 1 ms after the previous reading (0 s); no photometer reads that fast',
    );
    expect(fast.activity).toBeNull();
    const same = civ([0, 0, ...later]);
    expect(same.flags.find((f) => f.code === 'TIME_NOT_INCREASING')!.message).toBe(
      'total trace, reading 2: time 0 s is not after the previous reading (0 s); times must strictly increase',
    );
  });
});

describe('a stray reading (beyond 4 residual SDs of the line through the others)', () => {
  // Externally studentised residual [from memory: Belsley, Kuh & Welsch 1980]; the SD floored at the reading
  // noise, 0.002 A by default. Seven readings exactly on a line and one raised by `bump`: the others' SD is 0,
  // so the floor applies and the reading lies bump / 0.002 SDs off [analytic].
  const trace = (bump: number): Trace =>
    Array.from({ length: 8 }, (_, i) => ({ t: i * 10, a: 1 - 0.001 * i + (i === 4 ? bump : 0) }));
  it('3.99 SDs off is kept; 4.01 SDs off is named (reading 5)', () => {
    expect(worstOutlier(trace(0.00798), 0, 7, 4, 0.002)).toBeNull();
    const found = worstOutlier(trace(0.00802), 0, 7, 4, 0.002)!;
    expect(found.index).toBe(4);
    expect(found.sds).toBeCloseTo(4.01, 6);
    expect(found.deviation).toBeCloseTo(0.00802, 9);
  });

  it('fewer than 5 readings are never screened', () => {
    expect(worstOutlier(trace(0.5), 0, 3, 4, 0.002)).toBeNull();
    expect(worstOutlier(trace(0.5), 2, 6, 4, 0.002)?.index).toBe(4);
  });
});

describe('the laboratory minimum of readings in a chosen window (5 by default)', () => {
  const total: Trace = Array.from({ length: 12 }, (_, i) => ({ t: i * 10, a: 1 - 0.002 * i }));
  const run = (toS: number) =>
    calculateActivity({ assay: 'CIV', ...cuvette, total, window: { fromS: 0, toS } }, def('CIV'));
  it('5 readings pass; 4 are flagged but still fitted; 2 give no slope', () => {
    expect(codes(run(40))).not.toContain('TOO_FEW_POINTS');
    const four = run(30);
    expect(four.flags.find((f) => f.code === 'TOO_FEW_POINTS')!.message).toBe(
      'total trace has 4 readings between 0 and 30 s, fewer than the laboratory minimum of 5',
    );
    // 0.002 A per 10 s = 0.012 A/min [analytic].
    expect(four.specificSlopePerMin).toBeCloseTo(-0.012, 10);
    const two = run(10);
    expect(two.flags.find((f) => f.code === 'TOO_FEW_POINTS')!.message).toBe(
      'total trace has 2 readings between 0 and 10 s; at least 3 are needed for a slope',
    );
    expect(two.activity).toBeNull();
  });
});
