import * as ss from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import { ZodError } from 'zod';
import { deriveRequestSchema, deriveResultSchema } from '@/schemas/reference-interval';
import { derive, deriveInterval } from '../../../../server/domain/reference-stats/derive';
import { ReferenceStatsInputError } from '../../../../server/domain/reference-stats/errors';

const oneTo = (n: number) => Array.from({ length: n }, (_, i) => i + 1);
/** Symmetric, Gaussian-shaped invented values: 50 + 8 · Φ⁻¹((i − 0.5)/n). */
const gaussianScores = (n: number) => Array.from({ length: n }, (_, i) => 50 + 8 * ss.probit((i + 0.5) / n));

function caught(fn: () => unknown): unknown {
  try {
    fn();
  } catch (error) {
    return error;
  }
  return undefined;
}

describe('derive (POST /api/reference-intervals/derive contract)', () => {
  it('returns the contract fields, n counting values after exclusion, for nonparametric + Tukey', () => {
    // 1..120 plus 1000. Type-7 quartiles of the 121 values: ranks 31 and 91 → 31 and 91, IQR 60,
    // fences −59 and 181 → only 1000 goes. Then EP28 ranks 3.025 / 117.975 and CI ranks 1–7 / 114–120
    // [from memory: EP28-A3c table] on 1..120.
    const result = derive({ method: 'nonparametric', outliers: 'tukey', values: [1000, ...oneTo(120)] });
    expect(deriveResultSchema.parse(result)).toEqual(result);
    expect(result).toMatchObject({ n: 120, excluded: [1000], lowerCi: [1, 7], upperCi: [114, 120], warnings: [] });
    expect(result.lower).toBeCloseTo(3.025, 12);
    expect(result.upper).toBeCloseTo(117.975, 12);
  });

  it('when outlier exclusion leaves fewer than 120 values, then nonparametric throws a typed 400 error on values', () => {
    // 1..119 plus eleven 1000s: Q1 = 33.25, Q3 = 97.75 (type 7), upper fence 194.5 → the 1000s go, 119 remain.
    const error = caught(() =>
      derive({ method: 'nonparametric', outliers: 'tukey', values: [...oneTo(119), ...Array(11).fill(1000)] }),
    );
    expect(error).toBeInstanceOf(ReferenceStatsInputError);
    const e = error as ReferenceStatsInputError;
    expect(e.status).toBe(400);
    expect(e.fieldErrors).toEqual({ values: [e.message] });
    expect(e.message).toMatch(/at least 120 values; 119 remain after excluding 11 outlier/);
  });

  it('when the robust method is used with n < 120, then it warns and gives no confidence intervals', () => {
    // Nonparametric limits need ≥ 120 values (CLSI EP28-A3c [confirmed]); below that the robust method of Horn,
    // Pesce & Copeland (Clin Chem 1998;44:622–631 [confirmed]) is used, flagged as such, without the
    // order-statistic CIs [derived: the binomial CI ranks exist only from n = 120 in this product's rule].
    const result = derive({ method: 'robust', outliers: 'none', values: gaussianScores(40) });
    expect(result.n).toBe(40);
    expect(result.lowerCi).toBeNull();
    expect(result.upperCi).toBeNull();
    expect(result.warnings).toHaveLength(1);
    expect(result.warnings[0]).toMatch(/Robust method .* because n = 40 is below the 120/);
    // Symmetric data: the biweight location is the mean (simple-statistics), and limits are symmetric about it.
    expect(result.robust?.location).toBeCloseTo(ss.mean(gaussianScores(40)), 9);
    expect((result.lower + result.upper) / 2).toBeCloseTo(ss.mean(gaussianScores(40)), 9);
  });

  it('mean ± 2 SD after Dixon exclusion matches simple-statistics on the kept values', () => {
    // Dixon/Reed [from memory] removes 95: gap 95 − 60 = 35 over range 95 − 41 = 54 → 0.65 > 1/3.
    const kept = [41, 44, 47, 49, 50, 52, 53, 55, 57, 60];
    const result = derive({ method: 'mean2sd', outliers: 'dixon', values: [...kept, 95] });
    expect(result.excluded).toEqual([95]);
    expect(result.n).toBe(10);
    expect(result.lower).toBeCloseTo(ss.mean(kept) - 2 * ss.sampleStandardDeviation(kept), 10);
    expect(result.upper).toBeCloseTo(ss.mean(kept) + 2 * ss.sampleStandardDeviation(kept), 10);
    expect(result.sd).toBeCloseTo(ss.sampleStandardDeviation(kept), 10);
  });

  it('warns when a limit falls below zero for values that are all 0 or more', () => {
    // An activity cannot be negative, so a lower limit under 0 from mean − 2 SD on skewed data is a sign the
    // method does not fit (mean ± 2 SD on small control groups, docs/domain.md §3 [common practice]).
    const skewed = [1, 1, 1, 2, 2, 2, 3, 3, 5, 8, 13, 21];
    const result = derive({ method: 'mean2sd', outliers: 'none', values: skewed });
    expect(result.lower).toBeLessThan(0);
    expect(result.warnings.join(' ')).toMatch(/below zero/);
  });

  it('refuses a body outside the contract with a ZodError (→ 400)', () => {
    const body = { method: 'pct_of_mean', outliers: 'none', values: [1, 2, 3] };
    expect(caught(() => derive(body as never))).toBeInstanceOf(ZodError);
    expect(deriveRequestSchema.safeParse({ method: 'robust', outliers: 'none', values: [1], extra: 1 }).success).toBe(false);
  });
});

describe('deriveInterval (all four methods)', () => {
  it('derives "% of control mean" with caller-chosen percentages', () => {
    // Mean of 8, 10, 12 is 10 → 40% and 160%.
    const r = deriveInterval({ method: 'pct_of_mean', outliers: 'none', values: [8, 10, 12], pctLower: 40, pctUpper: 160 });
    expect(r.lower).toBeCloseTo(4, 12);
    expect(r.upper).toBeCloseTo(16, 12);
    expect(r.method).toBe('pct_of_mean');
  });

  it('refuses non-finite values, naming the position', () => {
    expect(() => deriveInterval({ method: 'pct_of_mean', outliers: 'none', values: [1, Number.NaN, 3] })).toThrow(
      /Value 2 is not a finite number/,
    );
  });
});
