import { describe, expect, it } from 'vitest';
import {
  defaultAssayDefinitions,
  demoReferenceIntervals,
  type AssayDefinition,
  type Trace,
} from '@/schemas/assay';
import { compareValue, findInterval } from '../../../../server/domain/assay-engine/compare';
import { calculateActivity } from '../../../../server/domain/assay-engine/engine';
import { calculateFirstOrder } from '../../../../server/domain/assay-engine/first-order';

const civ: AssayDefinition = {
  ...defaultAssayDefinitions.find((d) => d.code === 'CIV')!,
  rateModel: 'first_order',
  version: 2,
};

/** A∞ + (A₀ − A∞)·e^(−k t), t in s, k per minute. */
function decay(a0: number, aInf: number, kPerMin: number, n = 60, dt = 5): Trace {
  return Array.from({ length: n }, (_, i) => ({
    t: i * dt,
    a: aInf + (a0 - aInf) * Math.exp((-kPerMin * i * dt) / 60),
  }));
}

const volumes = { reactionVolumeUl: 1000, sampleVolumeUl: 20, proteinMgPerMl: 2 };

describe('first-order rate constant', () => {
  it('when reduced cytochrome c decays exponentially, then k matches the two-point formula of the method', () => {
    // k = [ln(A₀ − A∞) − ln(Aₜ − A∞)] / t, docs/domain.md §1 (Wharton & Tzagoloff 1967 [from memory]).
    const aInf = 0.15;
    const trace = decay(0.95, aInf, 0.8);
    const first = trace[0]!;
    const last = trace[trace.length - 1]!;
    const twoPoint = (Math.log(first.a - aInf) - Math.log(last.a - aInf)) / ((last.t - first.t) / 60);
    const r = calculateFirstOrder({ total: trace, aInfinity: aInf, ...volumes }, civ);
    expect(r.kPerMin).toBeCloseTo(twoPoint, 10);
    expect(r.kPerMin).toBeCloseTo(0.8, 10);
    expect(r.r2).toBeCloseTo(1, 10);
    expect(r.flags).toEqual([]);
  });

  it('when k is divided by protein, then it is per mg/mL of protein in the reaction, labelled so', () => {
    // 20 µL of 2 mg/mL in 1 mL = 0.04 mg/mL in the cuvette (0.04 mg in 1 mL): 0.8 / 0.04 = 20 [derived].
    const r = calculateFirstOrder({ total: decay(0.95, 0.15, 0.8), aInfinity: 0.15, ...volumes }, civ);
    expect(r.kPerMg).toBeCloseTo(20, 8);
    // The unit names the concentration, not a mass: per mg only in a 1 mL reaction (issue: kPerMg label).
    expect(r.unit).toMatch(/^mL·min⁻¹·mg⁻¹/);
    expect(r.unit).toMatch(/per mg\/mL protein in the reaction/);
    expect(r.basis).toBe('first_order_k');
  });

  it('when a reading inside a manual window is past A∞, then PAST_END_POINT is flagged and no k is given', () => {
    const trace = decay(0.95, 0.15, 0.8);
    trace[20] = { t: trace[20]!.t, a: 0.14 };
    const r = calculateFirstOrder(
      { total: trace, aInfinity: 0.15, window: { fromS: 0, toS: 200 }, ...volumes },
      civ,
    );
    expect(r.flags.map((f) => f.code)).toEqual(['PAST_END_POINT']);
    expect(r.flags[0]!.message).toMatch(/reading 21/);
    expect(r.kPerMin).toBeNull();
  });

  it('when the automatic window meets a reading at A∞, then it stops before it', () => {
    const trace = decay(0.95, 0.15, 0.8);
    trace[40] = { t: trace[40]!.t, a: 0.15 };
    const r = calculateFirstOrder({ total: trace, aInfinity: 0.15, ...volumes }, civ);
    expect(r.kPerMin).toBeCloseTo(0.8, 8);
    expect(r.window!.toS).toBeLessThan(trace[40]!.t);
  });

  it('when the absorbance moves away from A∞, then k is not positive and WRONG_SIGN is flagged', () => {
    const rising = decay(0.5, 0.6, -0.2);
    const r = calculateFirstOrder({ total: rising, aInfinity: 0.6, ...volumes }, civ);
    expect(r.flags.map((f) => f.code)).toContain('WRONG_SIGN');
    expect(r.kPerMg).toBeNull();
  });

  it('when calculateActivity runs a first-order definition with A∞, then both results are given, each marked', () => {
    const trace = decay(0.95, 0.15, 0.8);
    const r = calculateActivity(
      { assay: 'CIV', pathlengthCm: 1, total: trace, ...volumes },
      civ,
      { aInfinity: 0.15 },
    );
    expect(r.basis).toBe('linear_rate');
    expect(r.firstOrder?.basis).toBe('first_order_k');
    expect(r.firstOrder?.kPerMin).toBeCloseTo(0.8, 8);
    expect(r.flags.map((f) => f.code)).not.toContain('FIRST_ORDER_NOT_COMPUTED');
  });

  it('when a k value meets an interval built from linear rates, then it is never compared', () => {
    // docs/domain.md §1: a k-based result must never be compared with an interval built from linear-rate data.
    const ctx = { specimenType: 'skeletal_muscle' as const, ageYears: 30 };
    const interval = findInterval(demoReferenceIntervals, 'CIV', 'activity', ctx, 'first_order_k');
    expect(interval?.basis).toBe('linear_rate');
    const c = compareValue({ assay: 'CIV', measure: 'activity', value: 20, basis: 'first_order_k' }, interval, ctx);
    expect(c.flags.map((f) => f.code)).toEqual(['BASIS_MISMATCH']);
    expect(c.position).toBeNull();
    expect(c.percentOfMean).toBeNull();
  });
});
