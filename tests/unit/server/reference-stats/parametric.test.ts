import fc from 'fast-check';
import * as ss from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import { ReferenceStatsInputError } from '../../../../server/domain/reference-stats/errors';
import {
  MEAN2SD_MIN_N,
  meanTwoSdInterval,
  pctOfMeanInterval,
} from '../../../../server/domain/reference-stats/parametric';

describe('meanTwoSdInterval [common practice: mean ± 2 SD]', () => {
  it('equals simple-statistics mean ± 2 × sampleStandardDeviation', () => {
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: 0, max: 1000, noNaN: true }), { minLength: MEAN2SD_MIN_N, maxLength: 200 }),
        (values) => {
          const mean = ss.mean(values);
          const sd = ss.sampleStandardDeviation(values);
          const r = meanTwoSdInterval(values);
          expect(r.mean).toBeCloseTo(mean, 8);
          expect(r.sd).toBeCloseTo(sd, 8);
          expect(r.lower).toBeCloseTo(mean - 2 * sd, 8);
          expect(r.upper).toBeCloseTo(mean + 2 * sd, 8);
        },
      ),
      { numRuns: 100 },
    );
  });

  it('on a hand-computed set: 2, 4, 4, 4, 5, 5, 7, 9, 10, 10 → mean 6, SD √8 [derived]', () => {
    // Sum 60 → mean 6. Squared deviations: (2−6)² = 16, (4−6)² = 4 three times, (5−6)² = 1 twice,
    // (7−6)² = 1, (9−6)² = 9, (10−6)² = 16 twice → 16 + 12 + 2 + 1 + 9 + 32 = 72; SD = √(72/9) = √8.
    const r = meanTwoSdInterval([2, 4, 4, 4, 5, 5, 7, 9, 10, 10]);
    expect(r.mean).toBeCloseTo(6, 12);
    expect(r.sd).toBeCloseTo(Math.sqrt(8), 12);
    expect(r.lower).toBeCloseTo(6 - 2 * Math.sqrt(8), 12);
  });

  it('when fewer than 10 values are given, then it throws a typed error on the values field', () => {
    expect(() => meanTwoSdInterval([1, 2, 3, 4, 5, 6, 7, 8, 9])).toThrow(ReferenceStatsInputError);
    expect(() => meanTwoSdInterval([1, 2, 3, 4, 5, 6, 7, 8, 9])).toThrow(/at least 10 values; got 9/);
  });
});

describe('pctOfMeanInterval [common practice: % of control mean]', () => {
  it('by default puts the limits at 30% and 170% of the mean', () => {
    // Mean of 80, 100, 120 is 100 → 30 and 170.
    const r = pctOfMeanInterval([80, 100, 120]);
    expect(r.lower).toBeCloseTo(30, 12);
    expect(r.upper).toBeCloseTo(170, 12);
    expect(r.mean).toBeCloseTo(ss.mean([80, 100, 120]), 12);
  });

  it('uses the percentages the caller passes', () => {
    const r = pctOfMeanInterval([40, 50, 60, 50], { pctLower: 40, pctUpper: 200 });
    expect(r.lower).toBeCloseTo(20, 12);
    expect(r.upper).toBeCloseTo(100, 12);
  });

  it('rejects an upper percentage not above the lower one, naming pctUpper', () => {
    try {
      pctOfMeanInterval([1, 2, 3], { pctLower: 50, pctUpper: 50 });
      expect.unreachable();
    } catch (error) {
      expect(error).toBeInstanceOf(ReferenceStatsInputError);
      expect((error as ReferenceStatsInputError).field).toBe('pctUpper');
    }
  });

  it('rejects fewer than 3 values and a mean that is not above zero', () => {
    expect(() => pctOfMeanInterval([5, 6])).toThrow(/at least 3 values; got 2/);
    expect(() => pctOfMeanInterval([0, 0, 0])).toThrow(/mean must be above zero/);
  });
});
