import { ReferenceStatsInputError } from './errors';

/** Throws when any value is not a finite number; `field` names the request field. */
export function assertFiniteValues(values: readonly number[], field = 'values'): void {
  const bad = values.findIndex((v) => typeof v !== 'number' || !Number.isFinite(v));
  if (bad !== -1) {
    throw new ReferenceStatsInputError(field, `Value ${bad + 1} is not a finite number`);
  }
}

export function sum(values: readonly number[]): number {
  // Kahan summation: reference values can mix large and small magnitudes.
  let total = 0;
  let carry = 0;
  for (const v of values) {
    const y = v - carry;
    const t = total + y;
    carry = t - total - y;
    total = t;
  }
  return total;
}

export function mean(values: readonly number[]): number {
  if (values.length === 0) throw new RangeError('mean of no values');
  return sum(values) / values.length;
}

/** Sample standard deviation with the n − 1 denominator; null below two values. */
export function sampleSd(values: readonly number[]): number | null {
  if (values.length < 2) return null;
  const m = mean(values);
  return Math.sqrt(sum(values.map((v) => (v - m) ** 2)) / (values.length - 1));
}
