import {
  deriveRequestSchema,
  type DeriveRequest,
  type DeriveResult,
  type IntervalMethod,
  type OutlierRule,
} from '@/schemas/reference-interval';
import { assertFiniteValues, mean, sampleSd } from './descriptive';
import { ReferenceStatsInputError } from './errors';
import { NONPARAMETRIC_MIN_N, nonparametricInterval } from './nonparametric';
import { screenOutliers } from './outliers';
import {
  MEAN2SD_MIN_N,
  PCT_OF_MEAN_MIN_N,
  meanTwoSdInterval,
  pctOfMeanInterval,
  type PctOfMeanOptions,
} from './parametric';
import { ROBUST_MIN_N, robustInterval } from './robust';

/** Fewest values (after outlier exclusion) each method accepts; see each method's file for why. */
export const MIN_VALUES: Record<IntervalMethod, number> = {
  nonparametric: NONPARAMETRIC_MIN_N,
  robust: ROBUST_MIN_N,
  mean2sd: MEAN2SD_MIN_N,
  pct_of_mean: PCT_OF_MEAN_MIN_N,
};

const METHOD_NAMES: Record<IntervalMethod, string> = {
  nonparametric: 'nonparametric',
  robust: 'robust',
  mean2sd: 'mean ± 2 SD',
  pct_of_mean: '% of control mean',
};

export interface DeriveIntervalInput extends PctOfMeanOptions {
  method: IntervalMethod;
  outliers: OutlierRule;
  values: readonly number[];
}

/**
 * Derives an interval by any of the four methods. `pctLower`/`pctUpper` apply to "pct_of_mean" only
 * (defaults 30 and 170, see parametric.ts). Throws ReferenceStatsInputError (field "values", → 400)
 * when too few values remain after outlier exclusion.
 */
export function deriveInterval(input: DeriveIntervalInput): DeriveResult {
  const { method, outliers } = input;
  assertFiniteValues(input.values);
  const { kept, excluded } = screenOutliers(input.values, outliers);
  const n = kept.length;
  const needed = MIN_VALUES[method];
  if (n < needed) {
    const after = excluded.length > 0 ? ` after excluding ${excluded.length} outlier(s)` : '';
    throw new ReferenceStatsInputError(
      'values',
      `The ${METHOD_NAMES[method]} method needs at least ${needed} values; ${n} remain${after}.`,
    );
  }

  const warnings: string[] = [];
  const base = {
    n,
    excluded,
    method,
    outliers,
    mean: mean(kept),
    sd: sampleSd(kept),
    lowerCi: null,
    upperCi: null,
    ranks: null,
    robust: null,
  };
  let result: DeriveResult;
  switch (method) {
    case 'nonparametric': {
      const r = nonparametricInterval(kept);
      result = { ...base, lower: r.lower, upper: r.upper, lowerCi: r.lowerCi, upperCi: r.upperCi, ranks: r.ranks, warnings };
      break;
    }
    case 'robust': {
      const r = robustInterval(kept);
      if (n < NONPARAMETRIC_MIN_N) {
        warnings.push(
          `Robust method (Horn, Pesce & Copeland 1998) used because n = ${n} is below the ${NONPARAMETRIC_MIN_N} ` +
            'the nonparametric method needs; it assumes a symmetric distribution, and no confidence intervals are given.',
        );
      }
      result = {
        ...base,
        lower: r.lower,
        upper: r.upper,
        robust: { location: r.location, spread: r.spread, locationSe: r.locationSe, t: r.t },
        warnings,
      };
      break;
    }
    case 'mean2sd': {
      const r = meanTwoSdInterval(kept);
      result = { ...base, lower: r.lower, upper: r.upper, warnings };
      break;
    }
    case 'pct_of_mean': {
      const r = pctOfMeanInterval(kept, input);
      result = { ...base, lower: r.lower, upper: r.upper, warnings };
      break;
    }
  }
  if (result.lower < 0 && kept.every((v) => v >= 0)) {
    warnings.push(
      'The lower limit is below zero although every value is 0 or more: the data are probably skewed. ' +
        'Consider a log transform or another method.',
    );
  }
  return result;
}

/**
 * POST /api/reference-intervals/derive. Parses the body again (cheap, and keeps direct callers honest):
 * a malformed body throws ZodError, too few values ReferenceStatsInputError; both map to 400.
 */
export function derive(request: DeriveRequest): DeriveResult {
  return deriveInterval(deriveRequestSchema.parse(request));
}
