import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { defaultAssayDefinitions, type AssayDefinition, type Trace } from '@/schemas/assay';
import type { AssayCode } from '@/schemas/common';
import {
  activityFactor,
  pathlengthFromFill,
  specificActivity,
} from '../../../../server/domain/assay-engine/activity';
import { calculateActivity } from '../../../../server/domain/assay-engine/engine';

const def = (code: AssayCode): AssayDefinition => defaultAssayDefinitions.find((d) => d.code === code)!;

/** 60 readings every 5 s on a straight line. */
function line(a0: number, slopePerMin: number, n = 60, dt = 5): Trace {
  return Array.from({ length: n }, (_, i) => ({ t: i * dt, a: a0 + (slopePerMin * i * dt) / 60 }));
}

describe('activity formula', () => {
  it('when CI falls 0.0248 /min specific in 1 mL, 1 cm with 40 µg protein, then activity is 100.0', () => {
    // Worked check [derived], docs/domain.md §1: 0.0248 × 4032.3 = 100.0 nmol/min/mg.
    // 40 µg in the cuvette = 20 µL of a 2 mg/mL homogenate; total −0.0298 /min, rotenone −0.0050 /min.
    const result = calculateActivity(
      {
        assay: 'CI',
        pathlengthCm: 1,
        reactionVolumeUl: 1000,
        sampleVolumeUl: 20,
        proteinMgPerMl: 2,
        total: line(0.9, -0.0298),
        background: line(0.9, -0.005),
      },
      def('CI'),
    );
    expect(result.slopeTotalPerMin).toBeCloseTo(-0.0298, 10);
    expect(result.slopeBackgroundPerMin).toBeCloseTo(-0.005, 10);
    expect(result.specificSlopePerMin).toBeCloseTo(-0.0248, 10);
    expect(result.activity).toBeCloseTo(100.0, 1);
    expect(result.unit).toBe('nmol/min/mg protein');
    expect(result.flags).toEqual([]);
  });

  it('when each default runs in a 1 mL, 1 cm cuvette, then the consensus calculation factors come back', () => {
    // Consensus-table factors, docs/domain.md §1 [derived]: factor = 1000 / (ε × mg protein).
    // Protein as given in that table: 40 µg, except CIII at 30 µg.
    const published: [AssayCode, number, number][] = [
      ['CI', 4032.3, 40],
      ['CII', 1308.9, 40],
      ['CIII', 1801.8, 30],
      ['CIV', 1351.4, 40],
      ['CI+III', 1351.4, 40],
      ['CII+III', 1351.4, 40],
      ['CS', 1838.2, 40],
    ];
    for (const [code, factor, micrograms] of published) {
      const d = def(code);
      const f = activityFactor({
        epsilonPerMmPerCm: d.epsilonPerMmPerCm,
        pathlengthCm: 1,
        reactionVolume: 1000,
        sampleVolume: micrograms / 2, // µL of a 2 mg/mL homogenate
        proteinMgPerMl: 2,
      });
      expect(f, code).toBeCloseTo(factor, 1);
    }
  });

  it('when a rising assay is computed, then the activity is positive and equals slope × factor', () => {
    // CS, +0.05 /min, 1 mL, 1 cm, 40 µg → 0.05 × 1838.2 = 91.9 nmol/min/mg [derived from the consensus factor].
    const result = calculateActivity(
      {
        assay: 'CS',
        pathlengthCm: 1,
        reactionVolumeUl: 1000,
        sampleVolumeUl: 20,
        proteinMgPerMl: 2,
        total: line(0.1, 0.05),
        background: line(0.1, 0),
      },
      def('CS'),
    );
    expect(result.activity).toBeCloseTo(91.91, 1);
  });

  it('when protein changes, then activity scales as 1/protein (property)', () => {
    // Beer–Lambert formula, docs/domain.md §1 [derived]: protein is in the denominator.
    fc.assert(
      fc.property(
        fc.double({ min: 0.05, max: 20, noNaN: true }),
        fc.double({ min: 1.1, max: 10, noNaN: true }),
        fc.double({ min: 0.005, max: 0.2, noNaN: true }),
        (protein, k, slope) => {
          const base = {
            assay: 'CIII' as const,
            pathlengthCm: 1,
            reactionVolumeUl: 1000,
            sampleVolumeUl: 10,
            total: line(0.2, slope),
            background: line(0.2, slope / 10),
          };
          const a1 = calculateActivity({ ...base, proteinMgPerMl: protein }, def('CIII')).activity!;
          const a2 = calculateActivity({ ...base, proteinMgPerMl: protein * k }, def('CIII')).activity!;
          expect(a1 / a2).toBeCloseTo(k, 9);
        },
      ),
    );
  });

  it('when the reaction volume changes, then activity scales linearly with it (property)', () => {
    // Beer–Lambert formula, docs/domain.md §1 [derived]: V_reaction is in the numerator.
    fc.assert(
      fc.property(
        fc.double({ min: 100, max: 3000, noNaN: true }),
        fc.double({ min: 0.1, max: 10, noNaN: true }),
        (volume, k) => {
          const base = {
            assay: 'CIV' as const,
            pathlengthCm: 1,
            sampleVolumeUl: 5,
            proteinMgPerMl: 1.5,
            total: line(0.9, -0.08),
          };
          const a1 = calculateActivity({ ...base, reactionVolumeUl: volume }, def('CIV')).activity!;
          const a2 = calculateActivity({ ...base, reactionVolumeUl: volume * k }, def('CIV')).activity!;
          expect(a2 / a1).toBeCloseTo(k, 9);
        },
      ),
    );
  });

  it('when specificActivity is given a slope of either sign, then it uses the magnitude', () => {
    // Formula uses |ΔA/min|, docs/domain.md §1 [derived].
    const inputs = { epsilonPerMmPerCm: 6.2, pathlengthCm: 1, reactionVolume: 1, sampleVolume: 0.02, proteinMgPerMl: 2 };
    expect(specificActivity(-0.0248, inputs)).toBeCloseTo(100.0, 1);
    expect(specificActivity(0.0248, inputs)).toBeCloseTo(100.0, 1);
  });
});

describe('pathlengthFromFill', () => {
  it('when 200 µL fills a 96-well flat well, then the pathlength is about 0.55–0.6 cm', () => {
    // docs/domain.md §1 [from memory]: 200 µL in a 96-well flat well ≈ 0.55–0.6 cm. A 6.6 mm well
    // diameter (also from memory) gives π × 0.33² = 0.342 cm².
    const area = Math.PI * 0.33 * 0.33;
    const l = pathlengthFromFill(200, area);
    expect(l).toBeGreaterThan(0.55);
    expect(l).toBeLessThan(0.6);
  });

  it('when 1 mL fills 1 cm², then the pathlength is exactly 1 cm', () => {
    // Geometry [common practice]: 1 mL = 1 cm³, so 1 cm³ / 1 cm² = 1 cm.
    expect(pathlengthFromFill(1000, 1)).toBe(1);
  });

  it('when the volume or area is not positive, then the error names the field', () => {
    expect(() => pathlengthFromFill(0, 0.32)).toThrow(/volumeUl/);
    expect(() => pathlengthFromFill(200, -1)).toThrow(/wellAreaCm2/);
    expect(() => pathlengthFromFill(Number.NaN, 0.32)).toThrow(/volumeUl/);
    // [common practice] a well of area 0 holds no liquid column: the division by it must be refused, not answered
    // with Infinity.
    expect(() => pathlengthFromFill(200, 0)).toThrow(/wellAreaCm2/);
  });

  it('when the plate pathlength is used, then activity scales as 1/pathlength against a 1 cm cuvette', () => {
    // Beer–Lambert A = ε·c·l (IUPAC Gold Book B00626) [confirmed]: the same rate over a shorter path reads smaller.
    const l = pathlengthFromFill(200, 0.32);
    const base = { epsilonPerMmPerCm: 13.6, reactionVolume: 200, sampleVolume: 10, proteinMgPerMl: 1 };
    expect(activityFactor({ ...base, pathlengthCm: l }) / activityFactor({ ...base, pathlengthCm: 1 })).toBeCloseTo(1 / l, 12);
  });
});
