import * as ss from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import { ReferenceStatsInputError } from '../../../../server/domain/reference-stats/errors';
import {
  ROBUST_MIN_N,
  biweightLocation,
  biweightScale,
  robustInterval,
} from '../../../../server/domain/reference-stats/robust';

// The robust method follows Horn PS, Pesce AJ, Copeland BE, Clin Chem 1998;44:622–631 [confirmed as the
// source]; the tuning constants 3.7 and 205.6, the MAD/0.6745 start and the limit formula are
// [from memory], as is everything these tests assume about them.

/** Symmetric, Gaussian-shaped values: 100 + 15 · Φ⁻¹((i − 0.5)/n), by simple-statistics' probit. */
function gaussianScores(n: number, centre = 100, sd = 15): number[] {
  return Array.from({ length: n }, (_, i) => centre + sd * ss.probit((i + 0.5) / n));
}

/** Independent biweight location: fixed 200 reweighting rounds from the median, simple-statistics helpers. */
function directBiweightLocation(values: number[], c: number): number {
  const median = ss.median(values);
  const s = ss.medianAbsoluteDeviation(values) / 0.6745;
  let t = median;
  for (let round = 0; round < 200; round++) {
    const weights = values.map((x) => {
      const u = (x - t) / (c * s);
      return Math.abs(u) < 1 ? (1 - u * u) ** 2 : 0;
    });
    t = ss.sum(values.map((x, i) => x * (weights[i] ?? 0))) / ss.sum(weights);
  }
  return t;
}

// Invented, right-skewed and contaminated control values (no real subjects).
const skewed = [
  18.2, 19.5, 20.1, 21.4, 21.9, 22.3, 23.0, 23.8, 24.4, 25.1, 25.6, 26.2, 27.0, 27.9, 28.8, 30.1, 31.5,
  33.9, 36.4, 41.0, 55.0, 72.0,
];

describe('biweightLocation', () => {
  it('matches a direct, independently written biweight computation on skewed data [from memory: c = 3.7]', () => {
    expect(biweightLocation(skewed, 3.7)).toBeCloseTo(directBiweightLocation(skewed, 3.7), 9);
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
  it('computes T ± t(0.975, n − 1)·√(S(205.6)² + S(3.7)²/n) as written out directly here [from memory: Horn 1998]', () => {
    const n = skewed.length;
    const median = ss.median(skewed);
    const s = ss.medianAbsoluteDeviation(skewed) / 0.6745;
    const scale = (c: number) => {
      let num = 0;
      let d = 0;
      for (const x of skewed) {
        const u = (x - median) / (c * s);
        if (Math.abs(u) >= 1) continue;
        num += (x - median) ** 2 * (1 - u * u) ** 4;
        d += (1 - u * u) * (1 - 5 * u * u);
      }
      return Math.sqrt((n * num) / (d * Math.max(1, d - 1)));
    };
    const location = directBiweightLocation(skewed, 3.7);

    const r = robustInterval(skewed);
    // t(0.975, 21) = 2.080 [from memory: standard Student t table]; the multiplier is checked here and
    // then reused so the limits can be compared to full precision.
    expect(r.t).toBeCloseTo(2.08, 3);
    const half = r.t * Math.sqrt(scale(205.6) ** 2 + scale(3.7) ** 2 / n);
    expect(r.location).toBeCloseTo(location, 8);
    expect(r.lower).toBeCloseTo(location - half, 8);
    expect(r.upper).toBeCloseTo(location + half, 8);
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
