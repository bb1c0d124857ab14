import { mean, sampleSd } from './descriptive';
import { ReferenceStatsInputError } from './errors';

/**
 * Smallest control group for mean ± 2 SD. Two values give an SD, but one computed from fewer than 10
 * moves by tens of percent between samples; 10 is our choice, documented, not a published figure.
 */
export const MEAN2SD_MIN_N = 10;
/** Smallest control group for "% of control mean": the mean of three controls; our choice. */
export const PCT_OF_MEAN_MIN_N = 3;
/**
 * Default "% of control mean" limits: 30% below, mirrored at 170% above. 30% is the edge the
 * recalled diagnostic criteria use for cell lines (domain.md §2, [from memory]); labs set their own.
 */
export const PCT_OF_MEAN_DEFAULTS = { pctLower: 30, pctUpper: 170 } as const;

export interface MeanSdInterval {
  n: number;
  lower: number;
  upper: number;
  mean: number;
  sd: number;
}

/** mean ± 2 × sample SD (n − 1) [common practice]; assumes a roughly Gaussian distribution. */
export function meanTwoSdInterval(values: readonly number[]): MeanSdInterval {
  const n = values.length;
  if (n < MEAN2SD_MIN_N) {
    throw new ReferenceStatsInputError(
      'values',
      `Mean ± 2 SD needs at least ${MEAN2SD_MIN_N} values; got ${n}. ` +
        'Use "% of control mean" for smaller control groups.',
    );
  }
  const m = mean(values);
  const sd = sampleSd(values) ?? 0;
  return { n, lower: m - 2 * sd, upper: m + 2 * sd, mean: m, sd };
}

export interface PctOfMeanOptions {
  /** Lower limit as a percentage of the control mean. */
  pctLower?: number;
  /** Upper limit as a percentage of the control mean. */
  pctUpper?: number;
}

export interface PctOfMeanInterval {
  n: number;
  lower: number;
  upper: number;
  mean: number;
  pctLower: number;
  pctUpper: number;
}

/** Limits as fixed percentages of the control mean [common practice for small control groups]. */
export function pctOfMeanInterval(
  values: readonly number[],
  options: PctOfMeanOptions = {},
): PctOfMeanInterval {
  const pctLower = options.pctLower ?? PCT_OF_MEAN_DEFAULTS.pctLower;
  const pctUpper = options.pctUpper ?? PCT_OF_MEAN_DEFAULTS.pctUpper;
  if (!Number.isFinite(pctLower) || pctLower < 0) {
    throw new ReferenceStatsInputError('pctLower', 'The lower percentage must be 0 or more');
  }
  if (!Number.isFinite(pctUpper) || !(pctUpper > pctLower)) {
    throw new ReferenceStatsInputError(
      'pctUpper',
      'The upper percentage must be a number greater than the lower percentage',
    );
  }
  const n = values.length;
  if (n < PCT_OF_MEAN_MIN_N) {
    throw new ReferenceStatsInputError(
      'values',
      `"% of control mean" needs at least ${PCT_OF_MEAN_MIN_N} values; got ${n}`,
    );
  }
  const m = mean(values);
  if (!(m > 0)) {
    throw new ReferenceStatsInputError(
      'values',
      'The control mean must be above zero to express limits as a percentage of it',
    );
  }
  return { n, lower: (m * pctLower) / 100, upper: (m * pctUpper) / 100, mean: m, pctLower, pctUpper };
}
