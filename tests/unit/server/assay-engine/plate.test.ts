import { describe, expect, it } from 'vitest';
import { defaultAssayDefinitions, type AssayDefinition, type Trace } from '@/schemas/assay';
import type { AssayCode } from '@/schemas/common';
import type { MappedTraceGroup } from '@/schemas/plate';
import { calculatePlate } from '../../../../server/domain/assay-engine/plate';

const definitions = Object.fromEntries(defaultAssayDefinitions.map((d) => [d.code, d])) as Record<
  AssayCode,
  AssayDefinition
>;

function line(a0: number, slopePerMin: number, n = 30, dt = 10): Trace {
  return Array.from({ length: n }, (_, i) => ({ t: i * dt, a: a0 + (slopePerMin * i * dt) / 60 }));
}

const group = (replicate: number, slope: number): MappedTraceGroup => ({
  specimenRef: 'S1',
  assay: 'CS',
  replicate,
  wells: { total: `A${replicate}`, background: `B${replicate}` },
  total: line(0.1, slope),
  background: line(0.1, 0),
});

describe('calculatePlate', () => {
  it('when duplicate CS wells use a fill-derived pathlength, then each activity and their mean follow Beer–Lambert', () => {
    // Hand-computed [derived from docs/domain.md §1]: l = 0.2 cm³ / 0.32 cm² = 0.625 cm;
    // activity = 0.02 × 200 × 1000 / (13.6 × 0.625 × 10 × 1) = 47.0588 and 0.022 → 51.7647; mean 49.4118.
    const result = calculatePlate(
      [group(2, 0.022), group(1, 0.02)],
      {
        pathlength: { mode: 'fill', volumeUl: 200, wellAreaCm2: 0.32 },
        reactionVolumeUl: 200,
        sampleVolumeUl: 10,
        proteinMgPerMl: { S1: 1 },
      },
      definitions,
    );
    expect(result.pathlengthCm).toBeCloseTo(0.625, 12);
    expect(result.results).toHaveLength(1);
    const cs = result.results[0]!;
    expect(cs.replicates.map((r) => r.activity)).toEqual([
      expect.closeTo(47.0588, 3),
      expect.closeTo(51.7647, 3),
    ]);
    expect(cs.summary.mean).toBeCloseTo(49.4118, 3);
    // CV = 100 × SD / mean = 100 × 3.3275 / 49.4118 = 6.73% < 15% default limit [hand-computed].
    expect(cs.summary.cvPct).toBeCloseTo(6.734, 2);
    expect(cs.summary.flags).toEqual([]);
  });

  it('when one replicate is flagged with no activity, then the summary leaves it out and says so', () => {
    const result = calculatePlate(
      [group(1, 0.02), group(2, -0.02)],
      { pathlength: { mode: 'given', cm: 0.6 }, reactionVolumeUl: 200, sampleVolumeUl: 10, proteinMgPerMl: { S1: 1 } },
      definitions,
    );
    const cs = result.results[0]!;
    expect(cs.replicates[1]!.flags.map((f) => f.code)).toContain('WRONG_SIGN');
    expect(cs.summary.n).toBe(1);
    expect(cs.summary.flags.map((f) => f.code)).toEqual(['MISSING_VALUE', 'SINGLE_REPLICATE']);
  });

  it('when a specimen has no protein value, then the error names the specimen', () => {
    expect(() =>
      calculatePlate(
        [group(1, 0.02)],
        { pathlength: { mode: 'given', cm: 0.6 }, reactionVolumeUl: 200, sampleVolumeUl: 10, proteinMgPerMl: {} },
        definitions,
      ),
    ).toThrow(/proteinMgPerMl.*"S1"/);
  });
});
