import type { PartitionCheckResult, PartitionGroupSummary } from '@/schemas/reference-interval';
import { assertFiniteValues, mean, sampleSd } from './descriptive';
import { ReferenceStatsInputError } from './errors';

/** One SD more than 1.5 times the other also calls for separate intervals [from memory]; configurable. */
export const SD_RATIO_LIMIT = 1.5;

/** n, mean and sample SD of one group's values, e.g. one age band. */
export function summarizeGroup(label: string, values: readonly number[]): PartitionGroupSummary {
  const field = `groups.${label}`;
  assertFiniteValues(values, field);
  if (values.length < 2) {
    throw new ReferenceStatsInputError(field, `Group "${label}" needs at least 2 values; got ${values.length}`);
  }
  return { label, n: values.length, mean: mean(values), sd: sampleSd(values) ?? 0 };
}

/**
 * Should two groups (e.g. age bands) get separate reference intervals? Harris EK & Boyd JC, Clin Chem
 * 1990;36:265–270 [confirmed]: z = |x̄₁ − x̄₂| / √(s₁²/n₁ + s₂²/n₂), partition when
 * z > 3·√((n₁ + n₂)/240); also when the larger SD exceeds 1.5 times the smaller [from memory].
 */
export function checkPartition(
  a: PartitionGroupSummary,
  b: PartitionGroupSummary,
  options: { sdRatioLimit?: number } = {},
): PartitionCheckResult {
  const sdRatioLimit = options.sdRatioLimit ?? SD_RATIO_LIMIT;
  for (const [key, g] of [
    ['a', a],
    ['b', b],
  ] as const) {
    if (!Number.isInteger(g.n) || g.n < 2) {
      throw new ReferenceStatsInputError(`${key}.n`, `Group "${g.label}" needs at least 2 values`);
    }
    if (!Number.isFinite(g.mean)) {
      throw new ReferenceStatsInputError(`${key}.mean`, `Group "${g.label}" has no finite mean`);
    }
    // A group whose values are all identical has no spread to compare; neither test is defined.
    if (!Number.isFinite(g.sd) || !(g.sd > 0)) {
      throw new ReferenceStatsInputError(
        `${key}.sd`,
        `Group "${g.label}" needs an SD above 0 (are all its values identical?)`,
      );
    }
  }
  const standardError = Math.sqrt(a.sd ** 2 / a.n + b.sd ** 2 / b.n);
  const z = Math.abs(a.mean - b.mean) / standardError;
  const zCritical = 3 * Math.sqrt((a.n + b.n) / 240);
  const larger = Math.max(a.sd, b.sd);
  const smaller = Math.min(a.sd, b.sd);
  const sdRatio = larger / smaller;

  const reasons: string[] = [];
  if (z > zCritical) {
    reasons.push(`the means differ: z = ${z.toFixed(2)} exceeds the critical ${zCritical.toFixed(2)}`);
  }
  if (sdRatio > sdRatioLimit) {
    const wider = a.sd >= b.sd ? a : b;
    reasons.push(
      `the SD of "${wider.label}" is ${sdRatio.toFixed(2)} times the other (limit ${sdRatioLimit})`,
    );
  }
  const decision = reasons.length > 0 ? 'partition' : 'combine';
  const reason =
    decision === 'partition'
      ? `Separate intervals: ${reasons.join('; ')}.`
      : `One interval: z = ${z.toFixed(2)} is within the critical ${zCritical.toFixed(2)} and the SD ratio ${sdRatio.toFixed(2)} is within ${sdRatioLimit}.`;
  return { groups: [a, b], z, zCritical, sdRatio, sdRatioLimit, decision, reason };
}
