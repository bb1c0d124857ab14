import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { defaultAssayDefinitions, type AssayDefinition, type FlagCode, type Trace } from '@/schemas/assay';
import type { AssayCode } from '@/schemas/common';
import { calculateActivity, calculateActivityFromRates, type RatesRequest } from '../../../../server/domain/assay-engine/engine';

const def = (code: AssayCode): AssayDefinition => defaultAssayDefinitions.find((d) => d.code === code)!;
const codes = (r: { flags: { code: FlagCode }[] }) => r.flags.map((f) => f.code);

// 1 mL reaction, 1 cm cuvette, 10 µL of a 4 mg/mL homogenate = 40 µg protein in the cuvette.
const cuvette40ug = { pathlengthCm: 1, reactionVolumeUl: 1000, sampleVolumeUl: 10, proteinMgPerMl: 4 };

function rates(assay: AssayCode, total: number, background: number | null, extra: Partial<RatesRequest> = {}): RatesRequest {
  return { assay, ...cuvette40ug, totalRatePerMin: total, backgroundRatePerMin: background, ...extra };
}

describe('activity from typed rates', () => {
  it('when CI rates leave a specific ΔA/min of 0.0248 with 40 µg in 1 mL, then the activity is 100 nmol/min/mg', () => {
    // Worked check [derived], docs/domain.md §1: 0.0248 × 4032.3 = 100.0 nmol·min⁻¹·mg⁻¹.
    const r = calculateActivityFromRates(rates('CI', -0.03, -0.0052), def('CI'));
    expect(r.specificSlopePerMin).toBeCloseTo(-0.0248, 10);
    expect(r.activity).toBeCloseTo(100.0, 1);
    expect(r.factor).toBeCloseTo(4032.3, 1);
    expect(r.flags).toEqual([]);
  });

  it.each([
    // Consensus-table calculation factors at 40 µg in 1 mL [derived], docs/domain.md §1.
    ['CS', 1838.2, 0.05],
    ['CII', 1308.9, -0.03],
    ['CIV', 1351.4, -0.06],
  ] as const)('when %s is typed, then activity = |ΔA/min| × the consensus factor %s', (assay, factor, slope) => {
    const background = def(assay).background === 'none' ? null : 0;
    const r = calculateActivityFromRates(rates(assay, slope, background), def(assay));
    expect(r.activity! / Math.abs(slope)).toBeCloseTo(factor, 0);
  });

  it('when the specific rate runs against the assay direction, then no activity is given and WRONG_SIGN says why', () => {
    // CI follows NADH oxidation: absorbance at 340 nm falls [confirmed] consensus table.
    const r = calculateActivityFromRates(rates('CI', 0.02, 0.001), def('CI'));
    expect(r.activity).toBeNull();
    expect(codes(r)).toContain('WRONG_SIGN');
  });

  it('when the specific rate is within the near-zero limit, then a number is given with NEAR_ZERO', () => {
    // Specific rate = total − background (docs/domain.md §1 consensus table [confirmed]): 0.0105 − 0.0100 =
    // 0.0005 A/min [derived], under the definition's near-zero limit. A rate that small is given but flagged,
    // its limit set by the laboratory per assay [common practice].
    const r = calculateActivityFromRates(rates('CI', -0.0105, -0.0100), def('CI'));
    expect(r.activity).not.toBeNull();
    // 0.0100 / 0.0105 = 95% of the total stays with rotenone, above the default 70% limit, so that is said too.
    expect(codes(r)).toEqual(['NEAR_ZERO', 'HIGH_BACKGROUND_FRACTION']);
  });

  it('when the background rate equals the total rate, then BACKGROUND_MATCHES_TOTAL is flagged', () => {
    const r = calculateActivityFromRates(rates('CIII', 0.02, 0.02), def('CIII'));
    expect(codes(r)).toContain('BACKGROUND_MATCHES_TOTAL');
  });

  it('when the definition subtracts a background and none is typed, then NO_BACKGROUND; complex IV subtracts nothing', () => {
    expect(codes(calculateActivityFromRates(rates('CI', -0.03, null), def('CI')))).toContain('NO_BACKGROUND');
    expect(codes(calculateActivityFromRates(rates('CIV', -0.06, null), def('CIV')))).not.toContain('NO_BACKGROUND');
  });

  it('when a rate is not finite, then no activity and NON_FINITE', () => {
    const r = calculateActivityFromRates(rates('CS', Number.NaN, 0), def('CS'));
    expect(r.activity).toBeNull();
    expect(codes(r)).toContain('NON_FINITE');
  });

  it('when the request names another assay than the definition, then it throws naming the field', () => {
    expect(() => calculateActivityFromRates(rates('CI', -0.03, 0), def('CS'))).toThrow(/assay/);
  });

  it('for exactly linear traces, typed rates give the same activity as the fitted traces (same formula, no fit)', () => {
    // Consistency with calculateActivity: on noise-free straight lines the least-squares slope is the line's slope.
    const line = (a0: number, perMin: number): Trace => Array.from({ length: 30 }, (_, i) => ({ t: i * 10, a: a0 + (perMin * i * 10) / 60 }));
    fc.assert(
      fc.property(fc.double({ min: 0.005, max: 0.2, noNaN: true }), fc.double({ min: 0, max: 0.004, noNaN: true }), (total, bg) => {
        const fromRates = calculateActivityFromRates(rates('CIII', total, bg), def('CIII'));
        const fromTraces = calculateActivity(
          { assay: 'CIII', ...cuvette40ug, total: line(0.2, total), background: line(0.2, bg), window: { fromS: 0, toS: 290 } },
          def('CIII'),
        );
        expect(fromRates.activity).toBeCloseTo(fromTraces.activity!, 6);
      }),
      { numRuns: 50 },
    );
  });
});
