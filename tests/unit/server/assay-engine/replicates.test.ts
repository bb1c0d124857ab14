import fc from 'fast-check';
import { mean, sampleStandardDeviation } from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import { summariseReplicates } from '../../../../server/domain/assay-engine/replicates';

describe('replicates', () => {
  it('when replicates are summarised, then mean, sample SD and CV match simple-statistics (property)', () => {
    // Reference: simple-statistics mean / sampleStandardDeviation (n − 1) (npm) [common practice];
    // CV% = 100 × SD / mean [common practice].
    fc.assert(
      fc.property(fc.array(fc.double({ min: 1, max: 500, noNaN: true }), { minLength: 2, maxLength: 8 }), (values) => {
        const s = summariseReplicates(values, 1000);
        expect(s.n).toBe(values.length);
        expect(s.mean).toBeCloseTo(mean(values), 9);
        expect(s.sd).toBeCloseTo(sampleStandardDeviation(values), 9);
        expect(s.cvPct).toBeCloseTo((100 * sampleStandardDeviation(values)) / mean(values), 9);
      }),
    );
  });

  it('HIGH_CV: when the CV exceeds the lab limit, then the summary is flagged', () => {
    // CV = SD/mean × 100 with the sample SD (n − 1) [common practice]; the limit is the laboratory's own per
    // assay definition [common practice] (reproducibility between laboratories averages 16%, Rodenburg 2013,
    // docs/domain.md §2 [confirmed], so no single value is universal).
    // 98, 102, 110: mean 103.33, SD 6.110 (n − 1), CV 5.91% [hand-computed].
    expect(summariseReplicates([98, 102, 110], 5).flags.map((f) => f.code)).toEqual(['HIGH_CV']);
    expect(summariseReplicates([98, 102, 110], 15).flags).toEqual([]);
    expect(summariseReplicates([98, 102, 110], 15).cvPct).toBeCloseTo(5.913, 3);
  });

  it('when a replicate has no value, then it is left out and named', () => {
    const s = summariseReplicates([100, null, 104], 15);
    expect(s.n).toBe(2);
    expect(s.mean).toBe(102);
    expect(s.flags.map((f) => f.message)).toEqual(['replicate 2 has no value and is left out']);
  });

  it('when only one value remains, then there is no SD and it is said', () => {
    const s = summariseReplicates([100], 15);
    expect(s.sd).toBeNull();
    expect(s.cvPct).toBeNull();
    expect(s.flags.map((f) => f.code)).toEqual(['SINGLE_REPLICATE']);
  });

  it('when a value is not finite, then the summary stops with NON_FINITE', () => {
    const s = summariseReplicates([100, Number.POSITIVE_INFINITY], 15);
    expect(s.mean).toBeNull();
    expect(s.flags.map((f) => f.code)).toEqual(['NON_FINITE']);
  });
});
