import { describe, expect, it } from 'vitest';
import { defaultAssayDefinitions, type AssayDefinition, type Trace } from '@/schemas/assay';
import type { AssayCode } from '@/schemas/common';
import { calculatePlate, type PlateGroup, type PlateSettings } from '../../../../server/domain/assay-engine/plate';

/*
 * A plate's set-up errors and grouping. Activities come from exact straight traces [analytic] and the
 * Beer–Lambert factor V_r·1000/(ε·l·V_s·protein) (IUPAC Gold Book [confirmed]); with V_r 200 µL, V_s 10 µL,
 * l 0.5 cm and 1 mg/mL: CS (ε 13.6) 0.02 A/min → 0.02·200·1000/(13.6·0.5·10) = 58.8235 [derived by hand];
 * CIV (ε 18.5) −0.03 A/min → 0.03·200·1000/(18.5·0.5·10) = 64.8649 [derived by hand].
 */
const definitions = Object.fromEntries(defaultAssayDefinitions.map((d) => [d.code, d])) as Record<AssayCode, AssayDefinition>;
const line = (a0: number, slopePerMin: number, n = 30, dt = 10): Trace =>
  Array.from({ length: n }, (_, i) => ({ t: i * dt, a: a0 + (slopePerMin * i * dt) / 60 }));
const settings = (over: Partial<PlateSettings> = {}): PlateSettings => ({
  pathlength: { mode: 'given', cm: 0.5 },
  reactionVolumeUl: 200,
  sampleVolumeUl: 10,
  proteinMgPerMl: { S1: 1, S2: 2 },
  ...over,
});
const cs = (specimenRef: string, replicate: number, slope = 0.02): PlateGroup => ({
  specimenRef,
  assay: 'CS',
  replicate,
  total: line(0.1, slope),
  background: line(0.1, 0),
});
const civ = (specimenRef: string, replicate: number, slope = -0.03): PlateGroup => ({
  specimenRef,
  assay: 'CIV',
  replicate,
  total: line(1.2, slope),
});

describe('set-up errors are refused, naming what is wrong', () => {
  it('a given pathlength that is 0, negative or not a number', () => {
    for (const cm of [0, -0.5, Number.NaN, Number.POSITIVE_INFINITY]) {
      expect(() => calculatePlate([cs('S1', 1)], settings({ pathlength: { mode: 'given', cm } }), definitions)).toThrow(
        `pathlength.cm must be a finite number greater than 0 (got ${String(cm)})`,
      );
    }
  });

  it('an assay without a definition', () => {
    const { CIV: _omit, ...rest } = definitions;
    expect(() => calculatePlate([civ('S1', 1)], settings(), rest)).toThrow('definitions: no assay definition for CIV');
  });

  it('a protein of 0, below 0 or not a number', () => {
    for (const p of [0, -1, Number.NaN]) {
      expect(() => calculatePlate([cs('S1', 1)], settings({ proteinMgPerMl: { S1: p } }), definitions)).toThrow(
        'proteinMgPerMl: no positive protein concentration for specimen "S1"',
      );
    }
  });
});

describe('grouping and order', () => {
  it('a given pathlength is used as given and reported so', () => {
    const r = calculatePlate([cs('S1', 1)], settings(), definitions);
    expect(r.pathlengthCm).toBe(0.5);
    expect(r.pathlengthMode).toBe('given');
    expect(r.results[0]!.replicates[0]!.activity).toBeCloseTo(58.8235, 3);
  });

  it('specimen × assay results in the order they first appear; replicates by number; each specimen its own protein', () => {
    const r = calculatePlate([civ('S2', 2), cs('S1', 2), civ('S2', 1), cs('S1', 1, 0.024)], settings(), definitions);
    expect(r.results.map((x) => [x.specimenRef, x.assay])).toEqual([
      ['S2', 'CIV'],
      ['S1', 'CS'],
    ]);
    const s2 = r.results[0]!;
    // S2 has 2 mg/mL: half the activity per mg of S1's set-up.
    expect(s2.replicates.map((x) => x.activity)).toEqual([expect.closeTo(64.8649 / 2, 3), expect.closeTo(64.8649 / 2, 3)]);
    const s1 = r.results[1]!;
    // Replicate 1 (0.024 A/min → 70.588) comes first although it was given last.
    expect(s1.replicates.map((x) => x.activity)).toEqual([expect.closeTo(70.5882, 3), expect.closeTo(58.8235, 3)]);
  });

  it('the same specimen in two assays gives two results; the same assay for two specimens too', () => {
    const r = calculatePlate([cs('S1', 1), civ('S1', 1), cs('S2', 1)], settings(), definitions);
    expect(r.results.map((x) => `${x.specimenRef}/${x.assay}`)).toEqual(['S1/CS', 'S1/CIV', 'S2/CS']);
  });

  it('the replicate CV limit is the assay definition’s', () => {
    // 0.02 and 0.03 A/min: CV = 100·SD/mean = 100·0.00707/0.025 = 28.3% [derived by hand] — above a 15% limit,
    // not above 30%.
    const groups = [cs('S1', 1, 0.02), cs('S1', 2, 0.03)];
    const strict = calculatePlate(groups, settings(), { ...definitions, CS: { ...definitions.CS, cvLimitPct: 15 } });
    expect(strict.results[0]!.summary.flags.map((f) => f.code)).toEqual(['HIGH_CV']);
    const loose = calculatePlate(groups, settings(), { ...definitions, CS: { ...definitions.CS, cvLimitPct: 30 } });
    expect(loose.results[0]!.summary.flags).toEqual([]);
  });
});

describe('per-assay windows, backgrounds and blanks', () => {
  it('a manual window applies to its assay only', () => {
    const r = calculatePlate([cs('S1', 1), civ('S1', 1)], settings({ windows: { CS: { fromS: 50, toS: 150 } } }), definitions);
    const csResult = r.results[0]!.replicates[0]!;
    expect(csResult.window).toEqual({ fromS: 50, toS: 150 });
    expect(csResult.windowAuto).toBe(false);
    const civResult = r.results[1]!.replicates[0]!;
    expect(civResult.windowAuto).toBe(true);
  });

  it('a background well is subtracted; without one the definition’s missing background is flagged', () => {
    const withBg = calculatePlate([{ ...cs('S1', 1), background: line(0.1, 0.005) }], settings(), definitions);
    expect(withBg.results[0]!.replicates[0]!.specificSlopePerMin).toBeCloseTo(0.015, 10);
    const { background: _none, ...bare } = cs('S1', 1);
    const noBg = calculatePlate([bare], settings(), definitions);
    expect(noBg.results[0]!.replicates[0]!.flags.map((f) => f.code)).toContain('NO_BACKGROUND');
  });

  it('a blank well is subtracted from the total when there is no background', () => {
    const r = calculatePlate([{ ...civ('S1', 1), blank: line(1.2, -0.01) }], settings(), definitions);
    const x = r.results[0]!.replicates[0]!;
    expect(x.slopeBlankPerMin).toBeCloseTo(-0.01, 10);
    expect(x.specificSlopePerMin).toBeCloseTo(-0.02, 10);
  });
});
