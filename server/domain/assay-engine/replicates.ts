import type { Flag } from '@/schemas/assay';
import { fmt } from './trace';

export interface ReplicateSummary {
  /** Replicates that gave a value. */
  n: number;
  mean: number | null;
  /** Sample SD (n − 1); null below 2 values. */
  sd: number | null;
  /** 100 × SD / mean; null when SD is null or the mean is 0. */
  cvPct: number | null;
  flags: Flag[];
}

/**
 * Mean, sample SD and CV% of replicate values. A replicate without a value (null: its own result was
 * flagged) is left out and named; a non-finite one stops the summary.
 */
export function summariseReplicates(
  values: readonly (number | null)[],
  cvLimitPct: number,
): ReplicateSummary {
  const flags: Flag[] = [];
  let n = 0;
  let sum = 0;
  for (let i = 0; i < values.length; i += 1) {
    const v = values[i];
    if (v === null || v === undefined) {
      flags.push({ code: 'MISSING_VALUE', message: `replicate ${i + 1} has no value and is left out` });
      continue;
    }
    if (!Number.isFinite(v)) {
      flags.push({ code: 'NON_FINITE', message: `replicate ${i + 1} is not a finite number` });
      return { n: 0, mean: null, sd: null, cvPct: null, flags };
    }
    n += 1;
    sum += v;
  }
  if (n === 0) {
    flags.push({ code: 'MISSING_VALUE', message: 'No replicate has a value' });
    return { n, mean: null, sd: null, cvPct: null, flags };
  }
  const mean = sum / n;
  if (n === 1) {
    flags.push({ code: 'SINGLE_REPLICATE', message: 'Only one replicate has a value: no SD or CV' });
    return { n, mean, sd: null, cvPct: null, flags };
  }
  let ss = 0;
  for (const v of values) {
    if (v === null || v === undefined) continue;
    ss += (v - mean) * (v - mean);
  }
  const sd = Math.sqrt(ss / (n - 1));
  const cvPct = mean !== 0 ? (100 * sd) / Math.abs(mean) : null;
  if (cvPct !== null && cvPct > cvLimitPct) {
    flags.push({
      code: 'HIGH_CV',
      message: `Replicate CV ${fmt(cvPct, 3)}% is above the laboratory limit of ${fmt(cvLimitPct, 3)}%`,
    });
  }
  return { n, mean, sd, cvPct, flags };
}
