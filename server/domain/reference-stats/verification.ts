import {
  minVerificationValues,
  type VerificationRequest,
  type VerificationResult,
  type VerificationRound,
} from '@/schemas/reference-interval';
import { assertFiniteValues } from './descriptive';
import { ReferenceStatsInputError } from './errors';

/**
 * Share of local values allowed outside an adopted interval: 2 of 20 (CLSI EP28-A3c, 20 samples
 * [confirmed], ≤ 2 outside [from memory]). For other counts the same 10% is applied, rounded down,
 * so 40 values in one set may have 4 outside [derived from 2/20].
 */
export const VERIFICATION_ALLOWED_FRACTION = 0.1;

function countRound(lower: number, upper: number, values: readonly number[]): VerificationRound {
  // The limits belong to the interval: a value equal to a limit is inside.
  const below = values.filter((v) => v < lower).length;
  const above = values.filter((v) => v > upper).length;
  const outside = below + above;
  const allowedOutside = Math.floor(values.length * VERIFICATION_ALLOWED_FRACTION + 1e-9);
  return { n: values.length, below, above, outside, allowedOutside, passed: outside <= allowedOutside };
}

function checkSet(values: readonly number[], field: 'values' | 'additionalValues'): void {
  assertFiniteValues(values, field);
  if (values.length < minVerificationValues) {
    throw new ReferenceStatsInputError(
      field,
      `Verification needs at least ${minVerificationValues} local values; got ${values.length}`,
    );
  }
}

/**
 * Verifies an interval taken from elsewhere with local reference values. The first set passes with at
 * most 10% outside (2 of 20). If it fails, a second, new set of at least 20 is judged on its own by
 * the same rule [from memory, EP28-A3c's "test 20 more"]: the failed first set is not pooled in, since a
 * bad first draw (say 5 of 20) would otherwise doom any second set. Failing twice means the interval
 * does not transfer: derive a local one or look for an analytical difference.
 */
export function verifyInterval(request: VerificationRequest): VerificationResult {
  const { lower, upper, values, additionalValues } = request;
  if (!Number.isFinite(lower)) throw new ReferenceStatsInputError('lower', 'The lower limit must be a number');
  if (!Number.isFinite(upper) || !(upper > lower)) {
    throw new ReferenceStatsInputError('upper', 'The upper limit must be greater than the lower limit');
  }
  checkSet(values, 'values');
  const firstRound = countRound(lower, upper, values);
  const describe = (r: VerificationRound): string => `${r.outside} of ${r.n} outside (at most ${r.allowedOutside} allowed)`;

  if (firstRound.passed) {
    return {
      decision: 'verified',
      firstRound,
      secondRound: null,
      message: `Verified: ${describe(firstRound)}.`,
    };
  }
  if (additionalValues === undefined) {
    return {
      decision: 'test_more',
      firstRound,
      secondRound: null,
      message: `Not yet verified: ${describe(firstRound)}. Test ${minVerificationValues} more local values.`,
    };
  }
  checkSet(additionalValues, 'additionalValues');
  const secondRound = countRound(lower, upper, additionalValues);
  return secondRound.passed
    ? {
        decision: 'verified',
        firstRound,
        secondRound,
        message: `Verified on the second set: ${describe(secondRound)}.`,
      }
    : {
        decision: 'not_verified',
        firstRound,
        secondRound,
        message:
          `Not verified: first set ${describe(firstRound)}, second set ${describe(secondRound)}. ` +
          'Derive a local interval or look for an analytical or population difference.',
      };
}
