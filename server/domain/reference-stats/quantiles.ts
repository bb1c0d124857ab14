/** Ascending copy; never sorts the caller's array. */
export function sortAscending(values: readonly number[]): number[] {
  return [...values].sort((a, b) => a - b);
}

function at(sorted: readonly number[], index: number): number {
  const v = sorted[index];
  if (v === undefined) throw new RangeError(`index ${index} outside 0..${sorted.length - 1}`);
  return v;
}

/**
 * Value at a 1-based, possibly fractional rank: linear interpolation between the neighbouring order
 * statistics, x(k) + (r − k)(x(k+1) − x(k)) with k = ⌊r⌋. Ranks outside 1..n clamp to the extremes.
 */
export function valueAtRank(sorted: readonly number[], rank: number): number {
  const n = sorted.length;
  if (n === 0) throw new RangeError('valueAtRank of no values');
  if (!Number.isFinite(rank)) throw new RangeError(`rank ${rank} is not finite`);
  if (rank <= 1) return at(sorted, 0);
  if (rank >= n) return at(sorted, n - 1);
  const k = Math.floor(rank);
  const low = at(sorted, k - 1);
  const frac = rank - k;
  return frac === 0 ? low : low + frac * (at(sorted, k) - low);
}

/**
 * Percentile by the rank rule of CLSI EP28-A3c: rank p(n + 1), interpolated (Hyndman–Fan type 6).
 * Used for the reference limits themselves.
 */
export function percentileEp28(sorted: readonly number[], p: number): number {
  return valueAtRank(sorted, p * (sorted.length + 1));
}

/**
 * Quantile with rank 1 + p(n − 1), interpolated (Hyndman–Fan type 7): the default of R, numpy and
 * spreadsheet QUARTILE.INC [common practice]. Used for Tukey's quartiles, where it keeps fences inside
 * the data for small n.
 */
export function quantileType7(sorted: readonly number[], p: number): number {
  return valueAtRank(sorted, 1 + p * (sorted.length - 1));
}

export function medianSorted(sorted: readonly number[]): number {
  return quantileType7(sorted, 0.5);
}
