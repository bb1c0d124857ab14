import * as ss from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import { ReferenceStatsInputError } from '../../../../server/domain/reference-stats/errors';
import {
  ROBUST_MIN_N,
  biweightLocation,
  biweightScale,
  robustInterval,
} from '../../../../server/domain/reference-stats/robust';

// The robust method is CLSI EP28-A3c's (after Horn PS, Pesce AJ, Copeland BE, Clin Chem 1998;44:622–631).
// Expected figures come from the EP28-A3c appendix example as reproduced by the public R package mcradds
// (kaigu1990/mcradds, tests/testthat/test-referenceInterval.R) [confirmed]; the rest are properties that
// follow from the definitions [derived], checked with simple-statistics.

/** Symmetric, Gaussian-shaped values: 100 + 15 · Φ⁻¹((i − 0.5)/n), by simple-statistics' probit. */
function gaussianScores(n: number, centre = 100, sd = 15): number[] {
  return Array.from({ length: n }, (_, i) => centre + sd * ss.probit((i + 0.5) / n));
}

/** CLSI EP28-A3c appendix example: 20 serum calcium values (mg/dL). */
const ep28Calcium = [
  8.9, 9.2, 9.4, 9.4, 9.5, 9.5, 9.5, 9.6, 9.6, 9.6, 9.6, 9.7, 9.7, 9.7, 9.7, 9.7, 9.8, 9.9, 9.9, 10.2,
];

// Invented, right-skewed and contaminated control values (no real subjects).
const skewed = [
  18.2, 19.5, 20.1, 21.4, 21.9, 22.3, 23.0, 23.8, 24.4, 25.1, 25.6, 26.2, 27.0, 27.9, 28.8, 30.1, 31.5,
  33.9, 36.4, 41.0, 55.0, 72.0,
];

describe('biweightLocation', () => {
  it('is equivariant: shifting and scaling the values shifts and scales the location [derived]', () => {
    const transformed = skewed.map((x) => 2.5 * x - 40);
    expect(biweightLocation(transformed, 3.7)).toBeCloseTo(2.5 * biweightLocation(skewed, 3.7) - 40, 9);
  });

  it('ignores a value beyond c scaled MADs entirely: moving it further changes nothing [derived: zero weight]', () => {
    const further = skewed.map((x) => (x === 72 ? 720 : x));
    expect(biweightLocation(further, 3.7)).toBeCloseTo(biweightLocation(skewed, 3.7), 12);
  });

  it('when the data are symmetric, then it equals the sample mean (simple-statistics mean)', () => {
    const values = gaussianScores(41);
    expect(biweightLocation(values)).toBeCloseTo(ss.mean(values), 9);
  });

  it('when one far outlier is added, then the location barely moves while the mean shifts', () => {
    const base = gaussianScores(40);
    const withOutlier = [...base, 400];
    const shiftLocation = Math.abs(biweightLocation(withOutlier) - biweightLocation(base));
    const shiftMean = Math.abs(ss.mean(withOutlier) - ss.mean(base));
    expect(shiftMean).toBeGreaterThan(7);
    expect(shiftLocation).toBeLessThan(1);
  });
});

describe('biweightScale', () => {
  it('with c = 205.6 about the median reduces to the sample SD for symmetric data [derived: weights ≈ 1 when u ≪ 1]', () => {
    // With u = (x − M)/(205.6 · MAD/0.6745) every (1 − u²) term is within 0.1% of 1, so the formula
    // becomes n Σ(x − M)² / (n(n − 1)), the sample variance when M is the mean.
    const values = gaussianScores(60);
    expect(biweightScale(values, 205.6)).toBeCloseTo(ss.sampleStandardDeviation(values), 1);
    expect(biweightScale(values, 205.6) / ss.sampleStandardDeviation(values)).toBeGreaterThan(0.995);
  });
});

describe('robustInterval', () => {
  it('on the EP28-A3c appendix calcium example gives 9.049545–10.199396 [confirmed: mcradds reproduction of the appendix]', () => {
    const r = robustInterval(ep28Calcium);
    expect(Math.abs(r.lower - 9.049545)).toBeLessThan(1e-5);
    expect(Math.abs(r.upper - 10.199396)).toBeLessThan(1e-5);
    // t(0.975, 19) = 2.093 [confirmed: standard Student t table].
    expect(r.t).toBeCloseTo(2.093, 3);
    expect(r.n).toBe(20);
  });

  it('on the appendix example the limits are symmetric about the biweight location [derived]', () => {
    const r = robustInterval(ep28Calcium);
    expect((r.lower + r.upper) / 2).toBeCloseTo(r.location, 12);
    expect(r.location).toBeGreaterThan(ss.min(ep28Calcium));
    expect(r.location).toBeLessThan(ss.max(ep28Calcium));
  });

  it('for Gaussian-shaped data comes close to the parametric prediction interval x̄ ± t·s·√(1 + 1/n) (simple-statistics)', () => {
    const values = gaussianScores(60);
    const mean = ss.mean(values);
    const sd = ss.sampleStandardDeviation(values);
    const r = robustInterval(values);
    const half = r.t * sd * Math.sqrt(1 + 1 / values.length);
    expect(r.lower).toBeCloseTo(mean - half, 0);
    expect(r.upper).toBeCloseTo(mean + half, 0);
  });

  it('when fewer than 20 values are given, then it throws a typed error on the values field', () => {
    expect(() => robustInterval(gaussianScores(ROBUST_MIN_N - 1))).toThrow(ReferenceStatsInputError);
    expect(() => robustInterval(gaussianScores(ROBUST_MIN_N - 1))).toThrow(/at least 20 values; got 19/);
  });

  it('when most values are identical, then it refuses with a message about the spread', () => {
    const values = [...Array.from({ length: 15 }, () => 50), 48, 49, 51, 52, 53, 54];
    expect(() => robustInterval(values)).toThrow(/cannot estimate their spread/);
  });
});
