import * as ss from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import { deriveInterval } from '../../../../server/domain/reference-stats/derive';
import { ReferenceStatsInputError } from '../../../../server/domain/reference-stats/errors';
import { nonparametricCiRanks, nonparametricInterval } from '../../../../server/domain/reference-stats/nonparametric';
import { screenDixonReed, screenTukey } from '../../../../server/domain/reference-stats/outliers';
import { meanTwoSdInterval, pctOfMeanInterval } from '../../../../server/domain/reference-stats/parametric';
import { percentileEp28, valueAtRank } from '../../../../server/domain/reference-stats/quantiles';
import { robustInterval } from '../../../../server/domain/reference-stats/robust';
import { verifyInterval } from '../../../../server/domain/reference-stats/verification';

/*
 * Every threshold of the reference-interval statistics exactly at, just below and just above its limit.
 * Each block names the source of the limit; where the limit is this product's own choice it says so.
 */

/** n evenly spread normal scores: symmetric, no outliers by any screen [derived from simple-statistics probit]. */
const normalScores = (n: number, centre = 50, sd = 8) =>
  Array.from({ length: n }, (_, i) => centre + sd * ss.probit((i + 0.5) / n));

function fieldOf(fn: () => unknown): string {
  try {
    fn();
  } catch (error) {
    expect(error).toBeInstanceOf(ReferenceStatsInputError);
    return (error as ReferenceStatsInputError).field;
  }
  throw new Error('expected a ReferenceStatsInputError');
}

describe('smallest group of each method', () => {
  it('nonparametric: 119 values refused, 120 and 121 accepted [confirmed: CLSI EP28-A3c, at least 120]', () => {
    expect(fieldOf(() => nonparametricInterval(normalScores(119)))).toBe('values');
    expect(() => nonparametricInterval(normalScores(119))).toThrow(/at least 120 values.*got 119/);
    expect(nonparametricInterval(normalScores(120)).n).toBe(120);
    expect(nonparametricInterval(normalScores(121)).n).toBe(121);
  });

  it('robust: 19 values refused, 20 and 21 accepted [our choice, documented: the 20 of EP28-A3c verification]', () => {
    expect(fieldOf(() => robustInterval(normalScores(19)))).toBe('values');
    expect(robustInterval(normalScores(20)).n).toBe(20);
    expect(robustInterval(normalScores(21)).n).toBe(21);
  });

  it('mean ± 2 SD: 9 values refused, 10 and 11 accepted [our choice, documented in parametric.ts]', () => {
    expect(fieldOf(() => meanTwoSdInterval(normalScores(9)))).toBe('values');
    expect(() => meanTwoSdInterval(normalScores(9))).toThrow(/at least 10 values; got 9/);
    // mean ± 2 × sample SD against simple-statistics [common practice].
    for (const n of [10, 11]) {
      const v = normalScores(n);
      const r = meanTwoSdInterval(v);
      expect(r.lower).toBeCloseTo(ss.mean(v) - 2 * ss.sampleStandardDeviation(v), 10);
      expect(r.upper).toBeCloseTo(ss.mean(v) + 2 * ss.sampleStandardDeviation(v), 10);
    }
  });

  it('% of control mean: 2 values refused, 3 and 4 accepted [our choice: the mean of three controls]', () => {
    expect(fieldOf(() => pctOfMeanInterval([10, 12]))).toBe('values');
    expect(() => pctOfMeanInterval([10, 12])).toThrow(/at least 3 values; got 2/);
    // 30% and 170% of the mean 11 → 3.3 and 18.7 [analytic].
    expect(pctOfMeanInterval([10, 11, 12]).lower).toBeCloseTo(3.3, 12);
    expect(pctOfMeanInterval([10, 11, 12, 11]).upper).toBeCloseTo(18.7, 12);
  });

  it('derive counts the values left after outlier exclusion against the same limits', () => {
    // Nine Gaussian scores plus one far value: Tukey removes it [from memory: fences at 1.5 IQR], leaving 9 < 10.
    const values = [...normalScores(9), 500];
    expect(() => deriveInterval({ method: 'mean2sd', outliers: 'tukey', values })).toThrow(
      /needs at least 10 values; 9 remain after excluding 1 outlier\(s\)\./,
    );
    // Without the screen all 10 count and the method runs.
    expect(deriveInterval({ method: 'mean2sd', outliers: 'none', values }).n).toBe(10);
    // A shortfall with nothing excluded says so plainly.
    expect(() => deriveInterval({ method: 'pct_of_mean', outliers: 'none', values: [1, 2] })).toThrow(
      /"?% of control mean"? method needs at least 3 values; 2 remain\.$/,
    );
  });
});

describe('robust method warning below the nonparametric limit', () => {
  it('warns at n = 119 and not at n = 120 [confirmed: EP28-A3c, nonparametric needs 120]', () => {
    const warned = deriveInterval({ method: 'robust', outliers: 'none', values: normalScores(119) });
    expect(warned.warnings.join(' ')).toMatch(/n = 119 is below the 120/);
    const quiet = deriveInterval({ method: 'robust', outliers: 'none', values: normalScores(120) });
    expect(quiet.warnings).toEqual([]);
    expect(quiet.robust).not.toBeNull();
  });
});

describe('lower limit below zero for non-negative data', () => {
  // A negative lower limit for values that cannot be negative signals a skewed distribution [common practice].
  it('warns when mean − 2 SD falls below 0 and every value is ≥ 0, including a value of exactly 0', () => {
    const values = [0, 0.1, 0.2, 0.2, 0.3, 0.5, 1, 2, 4, 8];
    const r = deriveInterval({ method: 'mean2sd', outliers: 'none', values });
    expect(r.lower).toBeLessThan(0);
    expect(r.warnings.join(' ')).toMatch(/below zero/);
  });

  it('does not warn when one value is itself negative', () => {
    const values = [-0.01, 0.1, 0.2, 0.2, 0.3, 0.5, 1, 2, 4, 8];
    expect(deriveInterval({ method: 'mean2sd', outliers: 'none', values }).warnings).toEqual([]);
  });

  it('does not warn when the lower limit is exactly 0 (not below)', () => {
    // pct_of_mean with pctLower 0: limit 0 × mean = 0 exactly [analytic].
    const r = deriveInterval({ method: 'pct_of_mean', outliers: 'none', values: [1, 2, 3], pctLower: 0, pctUpper: 200 });
    expect(r.lower).toBe(0);
    expect(r.warnings).toEqual([]);
  });
});

describe('% of control mean: its percentage limits', () => {
  // Lower percentage 0 or more, upper above lower, mean above zero [analytic: a percentage of a non-positive
  // mean cannot be an interval].
  const v = [10, 20, 30];
  it('accepts pctLower exactly 0, refuses just below 0, naming pctLower', () => {
    expect(pctOfMeanInterval(v, { pctLower: 0 }).lower).toBe(0);
    expect(fieldOf(() => pctOfMeanInterval(v, { pctLower: -0.001 }))).toBe('pctLower');
    expect(fieldOf(() => pctOfMeanInterval(v, { pctLower: Number.NaN }))).toBe('pctLower');
  });

  it('refuses pctUpper equal to pctLower, accepts it just above', () => {
    expect(fieldOf(() => pctOfMeanInterval(v, { pctLower: 40, pctUpper: 40 }))).toBe('pctUpper');
    expect(fieldOf(() => pctOfMeanInterval(v, { pctLower: 40, pctUpper: Number.POSITIVE_INFINITY }))).toBe('pctUpper');
    // 40.001% of 20 = 8.0002 [analytic].
    expect(pctOfMeanInterval(v, { pctLower: 40, pctUpper: 40.001 }).upper).toBeCloseTo(8.0002, 10);
  });

  it('refuses a mean of exactly 0 or below, accepts a mean just above 0', () => {
    expect(fieldOf(() => pctOfMeanInterval([-1, 0, 1]))).toBe('values');
    expect(() => pctOfMeanInterval([-1, 0, 1])).toThrow(/above zero/);
    expect(fieldOf(() => pctOfMeanInterval([-3, -2, -1]))).toBe('values');
    // Mean 0.001: 30% of it is 0.0003 [analytic].
    expect(pctOfMeanInterval([0, 0.001, 0.002]).lower).toBeCloseTo(0.0003, 12);
  });
});

describe('rank clamping and interpolation (CLSI EP28-A3c rank p(n + 1) [confirmed])', () => {
  // Ranks outside 1..n take the nearest extreme [common practice: R quantile type 6 does the same].
  const sorted = [10, 20, 40, 80];
  it('at rank exactly 1 and n the extremes; just inside them, interpolated', () => {
    expect(valueAtRank(sorted, 1)).toBe(10);
    expect(valueAtRank(sorted, 4)).toBe(80);
    // 10 + 0.01 × 10 = 10.1; 40 + 0.99 × 40 = 79.6 [analytic].
    expect(valueAtRank(sorted, 1.01)).toBeCloseTo(10.1, 12);
    expect(valueAtRank(sorted, 3.99)).toBeCloseTo(79.6, 12);
  });

  it('below 1 and above n clamped, never extrapolated', () => {
    expect(valueAtRank(sorted, 0.99)).toBe(10);
    expect(valueAtRank(sorted, -5)).toBe(10);
    expect(valueAtRank(sorted, 4.01)).toBe(80);
  });

  it('an integer rank inside the range is the order statistic itself', () => {
    expect(valueAtRank(sorted, 3)).toBe(40);
  });

  it('one value: every rank gives it; no values or a non-finite rank is refused', () => {
    expect(valueAtRank([7], 0.5)).toBe(7);
    expect(valueAtRank([7], 1)).toBe(7);
    expect(() => valueAtRank([], 1)).toThrow(RangeError);
    expect(() => valueAtRank(sorted, Number.NaN)).toThrow(/not finite/);
  });

  it('the 2.5th percentile of 38 values clamps to the minimum; of 40 it interpolates [derived: 0.025 × 39 = 0.975 < 1; 0.025 × 41 = 1.025]', () => {
    const x38 = Array.from({ length: 38 }, (_, i) => i + 1);
    expect(percentileEp28(x38, 0.025)).toBe(1);
    expect(percentileEp28(x38, 0.975)).toBe(38);
    const x40 = Array.from({ length: 40 }, (_, i) => i + 1);
    expect(percentileEp28(x40, 0.025)).toBeCloseTo(1.025, 12);
    expect(percentileEp28(x40, 0.975)).toBeCloseTo(39.975, 12);
  });
});

describe('verification: at most 10% outside, limits inclusive', () => {
  // CLSI EP28-A3c [confirmed: 20 samples; from memory: ≤ 2 outside, else 20 more]; 10% for other counts [derived].
  const inside = (n: number) => Array.from({ length: n }, (_, i) => 10 + (i % 10));
  const withOutside = (n: number, k: number) => [...inside(n - k), ...Array.from({ length: k }, (_, i) => (i % 2 ? 0 : 50))];

  it('a value exactly on a limit is inside; the next representable value beyond is outside', () => {
    const r = verifyInterval({ lower: 10, upper: 19, values: [...inside(18), 10, 19] });
    expect(r.firstRound.outside).toBe(0);
    const beyond = verifyInterval({ lower: 10, upper: 19, values: [...inside(18), 9.999999, 19.000001] });
    expect(beyond.firstRound.below).toBe(1);
    expect(beyond.firstRound.above).toBe(1);
  });

  it('20 values: 2 outside verified, 3 not', () => {
    expect(verifyInterval({ lower: 10, upper: 19, values: withOutside(20, 2) }).decision).toBe('verified');
    const r = verifyInterval({ lower: 10, upper: 19, values: withOutside(20, 3) });
    expect(r.decision).toBe('test_more');
    expect(r.message).toBe('Not yet verified: 3 of 20 outside (at most 2 allowed). Test 20 more local values.');
  });

  it('allowed count rounds down: 29 values allow 2, 30 allow 3, 39 allow 3, 40 allow 4 [derived: ⌊10% · n⌋]', () => {
    const allowed = (n: number) => verifyInterval({ lower: 10, upper: 19, values: inside(n) }).firstRound.allowedOutside;
    expect(allowed(20)).toBe(2);
    expect(allowed(29)).toBe(2);
    expect(allowed(30)).toBe(3);
    expect(allowed(39)).toBe(3);
    expect(allowed(40)).toBe(4);
  });

  it('19 values refused, naming the field; a second set of 19 refused, naming additionalValues', () => {
    expect(fieldOf(() => verifyInterval({ lower: 10, upper: 19, values: inside(19) }))).toBe('values');
    expect(
      fieldOf(() => verifyInterval({ lower: 10, upper: 19, values: withOutside(20, 3), additionalValues: inside(19) })),
    ).toBe('additionalValues');
  });

  it('limits: upper equal to lower refused, upper just above accepted; a non-finite lower refused', () => {
    expect(fieldOf(() => verifyInterval({ lower: 10, upper: 10, values: inside(20) }))).toBe('upper');
    expect(fieldOf(() => verifyInterval({ lower: Number.NaN, upper: 10, values: inside(20) }))).toBe('lower');
    expect(fieldOf(() => verifyInterval({ lower: 0, upper: Number.POSITIVE_INFINITY, values: inside(20) }))).toBe('upper');
    // Every value 10 sits on both limits of [10, 10.000001]: inside.
    expect(verifyInterval({ lower: 10, upper: 10.000001, values: Array(20).fill(10) }).decision).toBe('verified');
  });

  it('the second set: 2 of 20 outside verified with its own message; 3 of 20 not verified', () => {
    const first = withOutside(20, 5);
    const ok = verifyInterval({ lower: 10, upper: 19, values: first, additionalValues: withOutside(20, 2) });
    expect(ok.decision).toBe('verified');
    expect(ok.message).toBe('Verified on the second set: 2 of 20 outside (at most 2 allowed).');
    const bad = verifyInterval({ lower: 10, upper: 19, values: first, additionalValues: withOutside(20, 3) });
    expect(bad.decision).toBe('not_verified');
    expect(bad.message).toMatch(/^Not verified: first set 5 of 20 outside \(at most 2 allowed\), second set 3 of 20 outside/);
    expect(bad.secondRound?.outside).toBe(3);
  });

  it('a first set that passes gives no second round, whatever else is sent', () => {
    const r = verifyInterval({ lower: 10, upper: 19, values: inside(20), additionalValues: withOutside(20, 10) });
    expect(r.decision).toBe('verified');
    expect(r.secondRound).toBeNull();
    expect(r.message).toBe('Verified: 0 of 20 outside (at most 2 allowed).');
  });
});

describe('outlier screens at their limits', () => {
  it('Dixon/Reed: a gap just above a third of the range excluded, exactly a third kept [from memory: gap/range > 1/3]', () => {
    // 0, 1, 2, 3, then a top value: gap/range = (x − 3)/x. x = 4.5 → 1.5/4.5 = 1/3 exactly; x = 4.51 → 0.3348.
    expect(screenDixonReed([0, 1, 2, 3, 4.5]).excluded).toEqual([]);
    expect(screenDixonReed([0, 1, 2, 3, 4.51]).excluded).toEqual([4.51]);
    // Mirror image at the low end: −1.51 is excluded, −1.5 kept.
    expect(screenDixonReed([-1.5, 0, 1, 2, 3]).excluded).toEqual([]);
    expect(screenDixonReed([-1.51, 0, 1, 2, 3]).excluded).toEqual([-1.51]);
  });

  it('Dixon/Reed: four values can lose one; with three left it stops [from memory: the rule needs n ≥ 4]', () => {
    // 0, 1, 2, 10: gap 8 of range 10 > 1/3 → 10 out; 0, 1, 2 is then never screened.
    expect(screenDixonReed([0, 1, 2, 10])).toEqual({ kept: [0, 1, 2], excluded: [10] });
    // 0, 0.1, 5, 5.1, 20 → 20 out (15/20); then 0, 0.1, 5, 5.1: both gaps 0.1/5.1 small → stop.
    expect(screenDixonReed([0, 0.1, 5, 5.1, 20])).toEqual({ kept: [0, 0.1, 5, 5.1], excluded: [20] });
  });

  it('Dixon/Reed: when both ends qualify equally, one value is removed per round and the result is symmetric', () => {
    // −10, 0, 0.5, 1, 11: low gap 10/21, high gap 10/21 — equal. Both are outliers by the rule; after the first
    // goes the other's gap is 10/11 or 10/10.5, still beyond 1/3, so both end up excluded.
    const r = screenDixonReed([-10, 0, 0.5, 1, 11]);
    expect(r.excluded).toEqual([-10, 11]);
    expect(r.kept).toEqual([0, 0.5, 1]);
  });

  it('Dixon/Reed: identical values (range 0) are all kept', () => {
    expect(screenDixonReed([4, 4, 4, 4, 4])).toEqual({ kept: [4, 4, 4, 4, 4], excluded: [] });
  });

  it('Tukey: a value exactly on the upper fence kept, just beyond excluded [from memory: beyond Q3 + 1.5 IQR]', () => {
    // 1..8 and a top value x. Type-7 quartiles of 1..8 alone are not needed: simple-statistics gives the fences
    // of the full sample; we place x on them by bisection-free arithmetic on a sample where x does not move Q3.
    const base = [1, 2, 3, 4, 5, 6, 7, 8];
    const sample = [...base, 100];
    const q1 = ss.quantile(sample, 0.25);
    const q3 = ss.quantile(sample, 0.75);
    const fence = q3 + 1.5 * (q3 - q1); // simple-statistics quantile (type 7) [common practice]
    expect(screenTukey([...base, fence]).excluded).toEqual([]);
    expect(screenTukey([...base, fence + 1e-9]).excluded).toEqual([fence + 1e-9]);
  });
});

describe('smallest n that has a 90% confidence interval of the 2.5th percentile', () => {
  // The CI's lower rank cannot go below 1, so it exists only when P(X = 0) = 0.975ⁿ ≤ 5% for X ~ Bin(n, 0.025):
  // 0.975¹¹⁸ = 0.0504 > 0.05, 0.975¹¹⁹ = 0.0492 ≤ 0.05 [derived by hand; simple-statistics binomial below].
  it('n = 118 has none and is refused on "values"; n = 119 has ranks 1–7 [derived]', () => {
    expect(ss.binomialDistribution(118, 0.025)![0]).toBeGreaterThan(0.05);
    expect(ss.binomialDistribution(119, 0.025)![0]).toBeLessThanOrEqual(0.05);
    expect(fieldOf(() => nonparametricCiRanks(118))).toBe('values');
    expect(() => nonparametricCiRanks(118)).toThrow('n = 118 is too small for a 90% confidence interval of the 2.5th percentile');
    const r = nonparametricCiRanks(119);
    expect(r.lowerCi[0]).toBe(1);
    expect(r.upperCi[1]).toBe(119);
  });

  it('nonparametricInterval reports the CI order statistics and ranks of 1..120 [from memory: EP28-A3c 1–7, 114–120]', () => {
    const r = nonparametricInterval(Array.from({ length: 120 }, (_, i) => 120 - i));
    expect(r.lowerCi).toEqual([1, 7]);
    expect(r.upperCi).toEqual([114, 120]);
    expect(r.ranks.lower).toBeCloseTo(3.025, 12);
    expect(r.ranks.upper).toBeCloseTo(117.975, 12);
  });
});

describe('descriptive statistics', () => {
  it('the mean of ten 0.1 values is 0.1: compensated summation [from memory: Kahan 1965] where a plain loop gives 0.0999…', () => {
    const tenths = Array(10).fill(0.1);
    // The plain left-to-right sum is 0.9999999999999999 in IEEE doubles [analytic].
    expect(tenths.reduce((a, b) => a + b, 0)).not.toBe(1);
    expect(deriveInterval({ method: 'pct_of_mean', outliers: 'none', values: tenths, pctLower: 50, pctUpper: 150 }).mean).toBe(0.1);
  });

  it('a non-finite value is refused naming its position (1-based)', () => {
    expect(() => deriveInterval({ method: 'pct_of_mean', outliers: 'none', values: [1, 2, Number.NaN] })).toThrow(
      'Value 3 is not a finite number',
    );
    expect(fieldOf(() => deriveInterval({ method: 'pct_of_mean', outliers: 'none', values: [Number.POSITIVE_INFINITY, 1, 2] }))).toBe('values');
  });
});
