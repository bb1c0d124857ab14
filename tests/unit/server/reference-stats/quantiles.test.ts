import fc from 'fast-check';
import * as ss from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import {
  percentileEp28,
  quantileType7,
  sortAscending,
  valueAtRank,
} from '../../../../server/domain/reference-stats/quantiles';

const finiteValues = (minLength: number) =>
  fc.array(fc.double({ min: -1e6, max: 1e6, noNaN: true, noDefaultInfinity: true }), {
    minLength,
    maxLength: 300,
  });

describe('valueAtRank', () => {
  it('when the rank is fractional, then it interpolates linearly between neighbouring order statistics', () => {
    // Hand-computed on a small known list [derived: x(k) + (r − k)(x(k+1) − x(k))]:
    // rank 2.25 on 10, 20, 40, 80 → 20 + 0.25 × (40 − 20) = 25; rank 3.5 → 40 + 0.5 × 40 = 60.
    const sorted = [10, 20, 40, 80];
    expect(valueAtRank(sorted, 2.25)).toBeCloseTo(25, 12);
    expect(valueAtRank(sorted, 3.5)).toBeCloseTo(60, 12);
    expect(valueAtRank(sorted, 2)).toBe(20);
  });

  it('when the rank falls outside 1..n, then it clamps to the extremes', () => {
    // CLSI EP28-A3c ranks p(n + 1) [confirmed] fall below 1 or above n for small n; the nearest order statistic
    // is taken, never an extrapolation [common practice: R's quantile type 6 does the same].
    expect(valueAtRank([3, 5, 9], 0.2)).toBe(3);
    expect(valueAtRank([3, 5, 9], 3.9)).toBe(9);
  });
});

describe('percentileEp28 (rank p(n + 1), CLSI EP28-A3c [confirmed])', () => {
  it('when n = 39, then the 2.5th percentile sits exactly on rank 1 and the 97.5th on rank 39 [derived]', () => {
    // 0.025 × 40 = 1 and 0.975 × 40 = 39.
    const sorted = Array.from({ length: 39 }, (_, i) => (i + 1) * 2);
    expect(percentileEp28(sorted, 0.025)).toBe(2);
    expect(percentileEp28(sorted, 0.975)).toBe(78);
  });

  it('agrees with simple-statistics quantileSorted once the rank is converted to its (n − 1)p + 1 rule [derived]', () => {
    // simple-statistics interpolates at rank 1 + p'(n − 1) (type 7); the EP28 rank (n + 1)p is the same
    // interpolation at p' = ((n + 1)p − 1)/(n − 1), as long as that p' lies in [0, 1].
    fc.assert(
      fc.property(finiteValues(40), fc.double({ min: 0.025, max: 0.975, noNaN: true }), (values, p) => {
        const sorted = sortAscending(values);
        const n = sorted.length;
        const pPrime = ((n + 1) * p - 1) / (n - 1);
        fc.pre(pPrime >= 0 && pPrime <= 1);
        const expected = ss.quantileSorted(sorted, pPrime);
        expect(percentileEp28(sorted, p)).toBeCloseTo(expected, 6);
      }),
      { numRuns: 200 },
    );
  });
});

describe('quantileType7', () => {
  it('matches simple-statistics quantile (type 7) on arbitrary data', () => {
    fc.assert(
      fc.property(finiteValues(1), fc.double({ min: 0, max: 1, noNaN: true }), (values, p) => {
        expect(quantileType7(sortAscending(values), p)).toBeCloseTo(ss.quantile(values, p), 6);
      }),
      { numRuns: 200 },
    );
  });
});

describe('sortAscending', () => {
  it('when given an array, then it returns a sorted copy and leaves the input alone', () => {
    const input = [3, -1, 2];
    expect(sortAscending(input)).toEqual([-1, 2, 3]);
    expect(input).toEqual([3, -1, 2]);
  });
});
