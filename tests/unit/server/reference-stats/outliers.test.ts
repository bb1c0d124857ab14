import fc from 'fast-check';
import * as ss from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import {
  screenDixonReed,
  screenOutliers,
  screenTukey,
  tukeyFences,
} from '../../../../server/domain/reference-stats/outliers';

describe('Tukey fences: Q1 − 1.5 IQR, Q3 + 1.5 IQR [from memory]', () => {
  it('on a hand-computed example excludes only the far value', () => {
    // n = 8, type-7 quartiles: Q1 at rank 2.75 → 4 + 0.75 × 1 = 4.75; Q3 at rank 6.25 → 8 + 0.25 × 1 = 8.25;
    // IQR 3.5; fences −0.5 and 13.5 → 30 goes, everything else stays.
    const fences = tukeyFences([30, 2, 4, 5, 6, 7, 8, 9]);
    expect(fences.q1).toBeCloseTo(4.75, 12);
    expect(fences.q3).toBeCloseTo(8.25, 12);
    expect(fences.lowerFence).toBeCloseTo(-0.5, 12);
    expect(fences.upperFence).toBeCloseTo(13.5, 12);
    expect(screenTukey([30, 2, 4, 5, 6, 7, 8, 9])).toEqual({ kept: [2, 4, 5, 6, 7, 8, 9], excluded: [30] });
  });

  it('keeps a value lying exactly on a fence and excludes one just beyond it', () => {
    // [from memory] Tukey (Exploratory Data Analysis, 1977): values beyond the inner fences are "outside", so a
    // value on a fence stays. Five values: Q1 and Q3 are the 2nd and 4th (4 and 6) by the linear-interpolation
    // quantile the test above checks against simple-statistics, so IQR 2 and fences 1 and 9, exact in binary.
    expect(screenTukey([1, 4, 5, 6, 9])).toEqual({ kept: [1, 4, 5, 6, 9], excluded: [] });
    expect(screenTukey([0.5, 4, 5, 6, 9.5])).toEqual({ kept: [4, 5, 6], excluded: [0.5, 9.5] });
  });
  it('leaves fewer than four values to the other screens: nothing excluded, all returned sorted', () => {
    // [common practice] quartiles of one to three values do not describe a spread, so Tukey's rule is not applied.
    expect(screenTukey([100, 1, 2])).toEqual({ kept: [1, 2, 100], excluded: [] });
  });
  it('excludes exactly what fences built from simple-statistics quantile and interquartileRange exclude', () => {
    // Integer data keep every quartile a multiple of 1/4, so both computations are exact.
    fc.assert(
      fc.property(fc.array(fc.integer({ min: -500, max: 500 }), { minLength: 4, maxLength: 150 }), (values) => {
        const q1 = ss.quantile(values, 0.25);
        const q3 = ss.quantile(values, 0.75);
        const iqr = ss.interquartileRange(values) ?? Number.NaN;
        const expected = values
          .filter((v) => v < q1 - 1.5 * iqr || v > q3 + 1.5 * iqr)
          .sort((a, b) => a - b);
        const { kept, excluded } = screenTukey(values);
        expect(excluded).toEqual(expected);
        expect(kept.length + excluded.length).toBe(values.length);
      }),
      { numRuns: 200 },
    );
  });
});

describe('Dixon/Reed: gap/range > 1/3 at either end, repeated [from memory]', () => {
  it('on a worked example excludes the single far value', () => {
    // 10 11 12 13 14 30: top gap 16, range 20 → 0.8 > 1/3 → 30 goes. Then 10..14: gaps 1, range 4 → 0.25.
    expect(screenDixonReed([12, 30, 10, 13, 11, 14])).toEqual({ kept: [10, 11, 12, 13, 14], excluded: [30] });
  });

  it('repeats: a low outlier hidden by a high one is found once the high one is gone', () => {
    // 1 10 11 12 13 14 30, range 29: low gap 9/29 = 0.31 (kept for now), high gap 16/29 = 0.55 → 30 goes.
    // 1 10 11 12 13 14, range 13: low gap 9/13 = 0.69 → 1 goes. 10..14 → 0.25 both ends, stop.
    expect(screenDixonReed([1, 10, 11, 12, 13, 14, 30])).toEqual({
      kept: [10, 11, 12, 13, 14],
      excluded: [1, 30],
    });
  });

  it('cannot see two outliers sitting together at one end (masking, a known limit of the rule)', () => {
    // 10..14 40 41: top gap 1/31 → nothing excluded although 40 and 41 are far out.
    expect(screenDixonReed([10, 11, 12, 13, 14, 40, 41]).excluded).toEqual([]);
  });

  it('keeps a value whose gap is exactly a third of the range (the rule is "greater than")', () => {
    // 0 1 2 3: gap 1, range 3 → 1/3, not more.
    expect(screenDixonReed([0, 1, 2, 3]).excluded).toEqual([]);
  });

  it('leaves fewer than four values untouched', () => {
    expect(screenDixonReed([1, 2, 100])).toEqual({ kept: [1, 2, 100], excluded: [] });
  });
});

describe('screenOutliers', () => {
  it('with rule "none" keeps every value', () => {
    expect(screenOutliers([3, 1, 200], 'none')).toEqual({ kept: [1, 3, 200], excluded: [] });
  });
});
