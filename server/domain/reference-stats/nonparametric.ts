import { binomialCdfTable } from './distributions';
import { ReferenceStatsInputError } from './errors';
import { percentileEp28, sortAscending, valueAtRank } from './quantiles';

/** CLSI EP28-A3c (2010) [confirmed]: nonparametric 2.5th/97.5th percentiles need at least 120 values. */
export const NONPARAMETRIC_MIN_N = 120;
const P_LOWER = 0.025;
const P_UPPER = 0.975;
/** EP28-A3c reports a 90% confidence interval for each limit [confirmed]. */
const CI_CONFIDENCE = 0.9;

export interface NonparametricCiRanks {
  /** Integer ranks [r1, r2] whose order statistics bound the 90% CI of the lower limit. */
  lowerCi: [number, number];
  /** The mirror-image ranks [n + 1 − r2, n + 1 − r1] for the upper limit. */
  upperCi: [number, number];
  /** P(r1 ≤ X < r2) for X ~ Binomial(n, 0.025): the exact coverage of each CI. */
  coverage: number;
}

/**
 * Ranks of the order statistics bounding the 90% CI of the 2.5th percentile.
 *
 * The order statistic x(r) lies at or below the true 2.5th percentile exactly when at least r of the n
 * values do, so with X ~ Binomial(n, 0.025), P(x(r1) ≤ ξ < x(r2)) = P(r1 ≤ X < r2). The pair chosen is
 * the conventional equal-tailed one: r1 is the largest rank with P(X < r1) ≤ 5% and r2 the smallest
 * with P(X ≥ r2) ≤ 5%, so coverage is at least 90% and neither tail exceeds 5%. For n = 120 this gives
 * 1–7 and, mirrored, 114–120, the EP28 table values as recalled [from memory]. The upper limit's CI
 * follows by symmetry (the 97.5th percentile with p = 0.975 mirrors the 2.5th).
 */
export function nonparametricCiRanks(n: number, confidence = CI_CONFIDENCE): NonparametricCiRanks {
  const tail = (1 - confidence) / 2;
  const cdf = binomialCdfTable(n, P_LOWER);
  const cdfAt = (k: number): number => (k < 0 ? 0 : (cdf[k] ?? 1));
  if (cdfAt(0) > tail) {
    throw new ReferenceStatsInputError(
      'values',
      `n = ${n} is too small for a ${Math.round(confidence * 100)}% confidence interval of the 2.5th percentile`,
    );
  }
  let r1 = 1;
  while (cdfAt(r1) <= tail) r1++; // now P(X < r1) ≤ tail < P(X < r1 + 1)
  let r2 = r1 + 1;
  while (1 - cdfAt(r2 - 1) > tail) r2++;
  return {
    lowerCi: [r1, r2],
    upperCi: [n + 1 - r2, n + 1 - r1],
    coverage: cdfAt(r2 - 1) - cdfAt(r1 - 1),
  };
}

export interface NonparametricInterval {
  n: number;
  lower: number;
  upper: number;
  lowerCi: [number, number];
  upperCi: [number, number];
  ranks: {
    lower: number;
    upper: number;
    lowerCi: [number, number];
    upperCi: [number, number];
    ciCoverage: number;
  };
}

/**
 * Nonparametric reference interval (CLSI EP28-A3c [confirmed]): limits at ranks 0.025(n + 1) and
 * 0.975(n + 1), interpolated between neighbouring order statistics; each with its 90% CI.
 */
export function nonparametricInterval(values: readonly number[]): NonparametricInterval {
  const n = values.length;
  if (n < NONPARAMETRIC_MIN_N) {
    throw new ReferenceStatsInputError(
      'values',
      `The nonparametric method needs at least ${NONPARAMETRIC_MIN_N} values (CLSI EP28-A3c); got ${n}. ` +
        'Use the robust method for smaller groups.',
    );
  }
  const sorted = sortAscending(values);
  const ci = nonparametricCiRanks(n);
  const orderStat = (rank: number): number => valueAtRank(sorted, rank);
  return {
    n,
    lower: percentileEp28(sorted, P_LOWER),
    upper: percentileEp28(sorted, P_UPPER),
    lowerCi: [orderStat(ci.lowerCi[0]), orderStat(ci.lowerCi[1])],
    upperCi: [orderStat(ci.upperCi[0]), orderStat(ci.upperCi[1])],
    ranks: {
      lower: P_LOWER * (n + 1),
      upper: P_UPPER * (n + 1),
      lowerCi: ci.lowerCi,
      upperCi: ci.upperCi,
      ciCoverage: ci.coverage,
    },
  };
}
