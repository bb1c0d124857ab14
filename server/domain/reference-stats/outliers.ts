import type { OutlierRule } from '@/schemas/reference-interval';
import { quantileType7, sortAscending } from './quantiles';

export interface OutlierScreen {
  /** Values kept, ascending. */
  kept: number[];
  /** Values excluded, ascending. */
  excluded: number[];
}

/** Tukey's fence multiplier [from memory]; lab-configurable. */
export const TUKEY_K = 1.5;
/** Dixon/Reed criterion: gap / range above one third [from memory]; lab-configurable. */
export const DIXON_REED_RATIO = 1 / 3;

export interface TukeyFences {
  q1: number;
  q3: number;
  iqr: number;
  lowerFence: number;
  upperFence: number;
}

/** Q1 − k·IQR and Q3 + k·IQR, quartiles by the type-7 rule (see quantiles.ts). */
export function tukeyFences(values: readonly number[], k: number = TUKEY_K): TukeyFences {
  const sorted = sortAscending(values);
  const q1 = quantileType7(sorted, 0.25);
  const q3 = quantileType7(sorted, 0.75);
  const iqr = q3 - q1;
  return { q1, q3, iqr, lowerFence: q1 - k * iqr, upperFence: q3 + k * iqr };
}

/**
 * One pass of Tukey's fences: values strictly beyond a fence are excluded. A single pass, not repeated,
 * because re-fencing a trimmed sample keeps eating into the tails of perfectly Gaussian data.
 */
export function screenTukey(values: readonly number[], k: number = TUKEY_K): OutlierScreen {
  const sorted = sortAscending(values);
  if (sorted.length < 4) return { kept: sorted, excluded: [] };
  const { lowerFence, upperFence } = tukeyFences(sorted, k);
  return {
    kept: sorted.filter((v) => v >= lowerFence && v <= upperFence),
    excluded: sorted.filter((v) => v < lowerFence || v > upperFence),
  };
}

/**
 * Dixon/Reed screen: an extreme value is an outlier when its gap to the next value exceeds a third of
 * the range [from memory]. Each round tests both ends of what is left, removes the end with the larger
 * gap/range ratio if it exceeds the criterion, and repeats; it stops when neither end qualifies. Removing
 * one value at a time matters: a far outlier at one end inflates the range and can hide one at the
 * other end until it is gone. Like the original rule it cannot see two outliers sitting together at the
 * same end (masking). Fewer than four values are returned untouched.
 */
export function screenDixonReed(
  values: readonly number[],
  ratio: number = DIXON_REED_RATIO,
): OutlierScreen {
  const kept = sortAscending(values);
  const excludedLow: number[] = [];
  const excludedHigh: number[] = [];
  for (;;) {
    const n = kept.length;
    // With three values one end always has gap/range ≥ 1/2, so the rule would always fire.
    if (n < 4) break;
    const first = kept[0] as number;
    const second = kept[1] as number;
    const last = kept[n - 1] as number;
    const beforeLast = kept[n - 2] as number;
    const range = last - first;
    if (range === 0) break;
    const lowRatio = (second - first) / range;
    const highRatio = (last - beforeLast) / range;
    if (lowRatio <= ratio && highRatio <= ratio) break;
    if (highRatio >= lowRatio) excludedHigh.unshift(kept.pop() as number);
    else excludedLow.push(kept.shift() as number);
  }
  return { kept, excluded: [...excludedLow, ...excludedHigh] };
}

export function screenOutliers(values: readonly number[], rule: OutlierRule): OutlierScreen {
  switch (rule) {
    case 'none':
      return { kept: sortAscending(values), excluded: [] };
    case 'tukey':
      return screenTukey(values);
    case 'dixon':
      return screenDixonReed(values);
  }
}
