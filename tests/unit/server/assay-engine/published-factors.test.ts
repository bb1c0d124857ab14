import { describe, expect, it } from 'vitest';
import { defaultAssayDefinitions } from '@/schemas/assay';
import { specificActivity } from '../../../../server/domain/assay-engine/activity';
import { printedFactorAt40Ug, publishedFactorAt40Ug, typedRates } from '../../../factories/published-factors';

/*
 * The factories' hand-worked factors against the consensus table's printed ones (docs/domain.md §1 [confirmed]),
 * and the server's Beer–Lambert arithmetic against both: a rate of 1 A/min in 1 mL, 1 cm, 40 µg gives the factor.
 */
describe('published calculation factors at 40 µg protein', () => {
  for (const d of defaultAssayDefinitions) {
    it(`${d.code}: the hand-worked factor rounds to the printed ${printedFactorAt40Ug[d.code]}`, () => {
      expect(Math.round(publishedFactorAt40Ug[d.code] * 10) / 10).toBe(printedFactorAt40Ug[d.code]);
    });
    it(`${d.code}: 1 A/min in 1 mL, 1 cm with 10 µL of 4 mg/mL gives the printed factor to its one decimal`, () => {
      const activity = specificActivity(1, {
        reactionVolume: 1000,
        sampleVolume: 10,
        epsilonPerMmPerCm: d.epsilonPerMmPerCm,
        pathlengthCm: 1,
        proteinMgPerMl: 4,
      });
      expect(activity).toBeCloseTo(printedFactorAt40Ug[d.code], 0);
      expect(Math.abs(activity - printedFactorAt40Ug[d.code])).toBeLessThanOrEqual(0.05 + 1e-9);
    });
  }
  it('typed rates carry the direction the consensus table gives each assay (falls: CI, CII, CIV)', () => {
    for (const d of defaultAssayDefinitions) {
      expect(Math.sign(typedRates(d.code, 100).totalRatePerMin)).toBe(d.direction === 'falls' ? -1 : 1);
      expect(typedRates(d.code, 100).backgroundRatePerMin === null).toBe(d.background === 'none');
    }
  });
});
