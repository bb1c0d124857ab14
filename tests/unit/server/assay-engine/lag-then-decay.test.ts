import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { TracePoint } from '@/schemas/assay';
import { curvedPart, findLinearWindow } from '../../../../server/domain/assay-engine/linearity';
import { fitTraceRange } from '../../../../server/domain/assay-engine/regression';

/*
 * A trace that stays flat for L seconds (a lag) and then falls as a first-order decay,
 * A(t) = A∞ + A1·e^(−k·(t − L)) for t ≥ L. Its analytic rate at any t ≥ L is −A1·k·e^(−k·(t − L)), the fastest
 * at t = L (any calculus text; domain.md § 5a [common practice]). The settings are the defaults every laboratory
 * starts from (minimum 5 readings, curvature limit 5%, lag search up to 120 s).
 *
 * The promise checked: a window the automatic search calls straight gives a rate within the curvature limit of
 * the true rate where the reaction in that window is fastest (at its start, or at the end of the lag when the
 * window reaches back into the lag), or no window is given at all. Before the halves check
 * (linearity.ts curvedPart), a window straddling the lag and the decay had a small quadratic term and an r² of
 * 0.99 and passed, while its slope was a third below the initial rate.
 */
const settings = { minPoints: 5, curvatureLimitPct: 5, lagMaxS: 120, nearZeroSlopePerMin: 0.001, readingNoiseFloor: 0.002 };

function lagThenDecay(o: { lagS: number; stepS: number; durationS: number; a1: number; aInf: number; k: number }): TracePoint[] {
  const points: TracePoint[] = [];
  for (let t = 0; t <= o.durationS + 1e-9; t += o.stepS) {
    points.push({ t, a: t < o.lagS ? o.aInf + o.a1 : o.aInf + o.a1 * Math.exp(-o.k * (t - o.lagS)) });
  }
  return points;
}

/** The analytic rate (absorbance per minute, as a positive number) at time t. */
const trueRatePerMin = (o: { lagS: number; a1: number; k: number }, t: number) =>
  t < o.lagS ? 0 : o.a1 * o.k * Math.exp(-o.k * (t - o.lagS)) * 60;

function check(o: Parameters<typeof lagThenDecay>[0], floor = settings.readingNoiseFloor) {
  const trace = lagThenDecay(o);
  const found = findLinearWindow(trace, { ...settings, readingNoiseFloor: floor });
  if (found.kind === 'none') return { found: false as const };
  const slope = Math.abs(fitTraceRange(trace, found.lo, found.hi).slope * 60);
  const fastestAt = Math.max(trace[found.lo]!.t, o.lagS);
  return { found: true as const, slope, truth: trueRatePerMin(o, fastestAt), fromS: trace[found.lo]!.t, toS: trace[found.hi]!.t };
}

/** Random lag-then-decay traces: any lag, reading interval and length, falling 0.05–2% per reading. */
const lagDecayFields = {
  lagS: fc.integer({ min: 0, max: 90 }),
  stepS: fc.constantFrom(2, 5, 10),
  durationS: fc.integer({ min: 120, max: 300 }),
  a1: fc.double({ min: 0.2, max: 1.5, noNaN: true }),
  aInf: fc.double({ min: 0, max: 0.3, noNaN: true }),
  fallPerReading: fc.double({ min: 0.0005, max: 0.02, noNaN: true }),
};

describe('automatic window on a lag followed by a first-order decay', () => {
  it('30 s flat, then k = 0.01/s from 1.2 read every 5 s to 150 s: the straddling window 20–110 s (a third low) is no longer taken', () => {
    // The initial rate after the lag is 1.2 × 0.01 × 60 = 0.72 per minute [derived]; the old choice, 20–110 s,
    // gave 0.4846 per minute (seen in the rate check, 2 December 2026), 33% low with only a lag flag.
    // 0.01/s falls by more than 5% within any five readings after the lag (20 s: e^(−0.2) = 0.82), so no
    // straight stretch exists and none may be given.
    const o = { lagS: 30, stepS: 5, durationS: 150, a1: 1.2, aInf: 0, k: 0.01 };
    expect(check(o)).toEqual({ found: false });
    // The refusal describes where the trace bends: the five readings from the end of the lag, 30–50 s, whose
    // straight line runs e^(−0.1) ≈ 0.905 of the rate at 30 s at their middle, about 9% slower [derived].
    const trace = lagThenDecay(o);
    const refused = findLinearWindow(trace, settings);
    expect([trace[refused.lo]!.t, trace[refused.hi]!.t]).toEqual([30, 50]);
    expect(refused.shape.changePct).toBeLessThan(-5);
    expect(refused.shape.changePct).toBeGreaterThan(-12);
  });

  it('a slow decay after a lag (k = 0.0005/s): a window is found and its rate is within 8% of the initial rate (see the property below)', () => {
    const o = { lagS: 30, stepS: 5, durationS: 300, a1: 1, aInf: 0.2, k: 0.0005 };
    const r = check(o);
    expect(r.found).toBe(true);
    if (!r.found) return;
    expect(r.slope).toBeGreaterThanOrEqual(0.92 * r.truth);
    expect(r.slope).toBeLessThanOrEqual(1.0001 * r.truth);
  });

  it('for any lag, reading interval, length and rate constant read at under 2% per reading, a window that is given is at most 8% below the fastest true rate inside it', () => {
    fc.assert(
      fc.property(
        fc.record(lagDecayFields),
        ({ fallPerReading, ...rest }) => {
          const o = { ...rest, k: fallPerReading / rest.stepS };
          // The traces are exact, so no reading noise is assumed (floor 0): with the default floor of 0.002 a
          // bend smaller than that noise cannot be told from it.
          const r = check(o, 0);
          fc.pre(r.found);
          if (!r.found) return;
          // 8% = the 5% limit, at which a first-order decay's straight line is 5.1% below its initial rate
          // [derived: the decay e^(−u) read over u = 0…0.105, any number of readings, gives a quadratic
          // start-to-line change of 5% and a line 0.949 of the initial rate]; and the part of a reading interval of lag that a window starting on the lag's last
          // reading holds when the reaction starts between two readings. The worst seen over 3,000 random
          // traces of this kind was 7.6% (2 December 2026; 9.6% before the halves and thirds tests).
          expect(r.slope).toBeGreaterThanOrEqual(0.92 * r.truth);
          expect(r.slope).toBeLessThanOrEqual(1.005 * r.truth);
        },
      ),
      { numRuns: 400, seed: 20261202 },
    );
  });
});

describe('automatic window on a lag followed by a first-order decay, with one bubble', () => {
  /*
   * A bubble reads as one reading well above its neighbours. In the middle of a slowing window it straightens
   * the window's quadratic and its halves, so a window a third to a half below the initial rate passed with only
   * an outlier flag (the rate check, 2 December 2026: 60 s flat, then 0.8·e^(−0.01·(t − 60)) read every 10 s,
   * +0.08 at 150 s gave −0.199 per minute over 110–190 s against −0.48 at 60 s, 59% low). The promise: the bubble
   * never makes a bent stretch pass, so the window given, read on the same trace without the bubble, keeps the
   * 8% promise above; a window of the laboratory's minimum that holds the bubble is not taken (four good readings
   * are fewer than the minimum of five).
   */
  const withBubble = (trace: TracePoint[], at: number, size: number) => trace.map((p, i) => (i === at ? { t: p.t, a: p.a + size } : p));

  it('the trace of the rate check: no window, as without the bubble (every five readings after the lag fall by more than 5%)', () => {
    const o = { lagS: 60, stepS: 10, durationS: 300, a1: 0.8, aInf: 0.2, k: 0.01 };
    const clean = lagThenDecay(o);
    expect(findLinearWindow(clean, { ...settings, outlierLimitSd: 4 }).kind).toBe('none');
    for (const atS of [110, 130, 150, 170]) {
      const found = findLinearWindow(withBubble(clean, atS / 10, 0.08), { ...settings, outlierLimitSd: 4 });
      expect({ atS, kind: found.kind }).toEqual({ atS, kind: 'none' });
    }
  });

  it('a bubble inside a short lag does not make the lag the rate window (it once gave a rising rate for a falling trace)', () => {
    // 11 s flat at 1.0, then 0.2 + 0.8·e^(−0.002·(t − 11)) read every 2 s to 120 s, +0.05 at 10 s. The initial rate is
    // 0.8 × 0.002 × 60 = 0.096 per minute [analytic]. Before, the window was 2–12 s, in the lag, at +0.12 per minute:
    // the bubble gave the flat readings a slope, so that stretch looked as fast as the reaction.
    const o = { lagS: 11, stepS: 2, durationS: 120, a1: 0.8, aInf: 0.2, k: 0.002 };
    const trace = withBubble(lagThenDecay(o), 5, 0.05);
    const found = findLinearWindow(trace, { ...settings, outlierLimitSd: 4 });
    expect(found.kind).toBe('found');
    if (found.kind !== 'found') return;
    expect(trace[found.lo]!.t).toBeGreaterThanOrEqual(12);
    // The lag's own rate is that of its flat readings without the bubble: 0 up to the window's first reading, which
    // the reaction has just left (a small fall), so the lag runs well over 90% slower [derived]; with the bubble it
    // came out "−11.6% slower" (a lag faster than the reaction).
    expect(found.lag?.slowerPct).toBeGreaterThan(90);
    const slope = fitTraceRange(trace, found.lo, found.hi).slope * 60;
    expect(slope).toBeLessThan(-0.92 * 0.096);
    expect(slope).toBeGreaterThan(-0.096);
  });

  it('a straight trace with a bubble still gets a long window', () => {
    // A line falling 0.1 per minute, read every 10 s for 5 minutes, +0.08 at 150 s: straight without the bubble, so
    // leaving the bubble out must not cost the window. Windows may start up to 120 s (lagMaxS), so every window
    // reaching past 150 s holds the bubble, and the windows without it are shorter: the earliest window is kept,
    // and the bubble is the outlier check's to flag (rates.ts).
    const line = Array.from({ length: 31 }, (_, i) => ({ t: 10 * i, a: 1 - (0.1 * 10 * i) / 60 }));
    const found = findLinearWindow(withBubble(line, 15, 0.08), { ...settings, outlierLimitSd: 4 });
    expect(found.kind).toBe('found');
    expect(found.lo).toBe(0);
    expect(found.hi - found.lo + 1).toBeGreaterThanOrEqual(16);
  });

  it('a noisy straight trace with a bubble near its start: the short window holding the bubble gives way to a longer one without it', () => {
    // A = 1.2 − 0.06·t/min read every 2 s for 180 s, with a fixed ±0.003 zig-zag as reading noise, +0.12 at 2 s
    // (40 noise SDs). The earliest straight window, 0–12 s, holds the bubble and its slope is several times the
    // true rate (seen: 4.6× in a random trial, 3 December 2026); a window of the same rate from 4 s on holds none.
    const trace = Array.from({ length: 91 }, (_, i) => ({ t: 2 * i, a: 1.2 - (0.06 * 2 * i) / 60 + (i % 2 === 0 ? 0.003 : -0.003) + (i === 1 ? 0.12 : 0) }));
    const found = findLinearWindow(trace, { ...settings, outlierLimitSd: 4 });
    expect(found.kind).toBe('found');
    if (found.kind !== 'found') return;
    expect(found.lo).toBeGreaterThanOrEqual(2);
    // Not a lag: the readings left out run at the same rate; the bubble is named as the reason.
    expect(found.lag).toBeNull();
    expect(found.avoided).toMatchObject({ index: 1, t: 2, fromS: 0, toS: trace[found.lo]!.t, readings: found.lo });
    // The zig-zag moves a least-squares slope by 6·0.003/(n + 1) over the window's span, at most 2·0.003 [derived by
    // hand for an alternating ±e on n evenly spaced readings]; over 60 s or more that is under 0.006 per minute.
    expect(found.hi - found.lo).toBeGreaterThanOrEqual(30);
    expect(Math.abs(fitTraceRange(trace, found.lo, found.hi).slope * 60 + 0.06)).toBeLessThan(0.006);
  });

  it('for any such trace and one bubble of 0.03–0.1 at any inner reading, the window given is straight (within 7%) on the trace without the bubble and its rate within 8%', () => {
    fc.assert(
      fc.property(
        fc.record({
          ...lagDecayFields,
          bubble: fc.double({ min: 0.03, max: 0.1, noNaN: true }),
          place: fc.double({ min: 0, max: 1, noNaN: true }),
        }),
        ({ fallPerReading, bubble, place, ...rest }) => {
          const o = { ...rest, k: fallPerReading / rest.stepS };
          // A rate of at least ten times the near-zero slope (0.001 per minute): below that the whole reaction is
          // smaller than the rounding of a photometer and one bubble outweighs it many times over.
          fc.pre(trueRatePerMin(o, o.lagS) >= 0.01);
          const clean = lagThenDecay(o);
          // Any inner reading, in the lag or after it. Before the give-way rule (a window holding a bubble gives way to a
          // longer one of the same rate), a bubble on the second reading of a long lag left the lag's opening as the only
          // straight stretch in 18 of 1,869 such traces; with it none of 1,874 (3 December 2026).
          const at = 1 + Math.floor(place * (clean.length - 2));
          const found = findLinearWindow(withBubble(clean, at, bubble), { ...settings, readingNoiseFloor: 0, outlierLimitSd: 4 });
          fc.pre(found.kind === 'found');
          if (found.kind !== 'found') return;
          // Judged at 7% rather than 5%: the bubble moves the trace's noise figure (a median) by a few percent, which
          // can tip the significance of a window bent just past 5% (seen: −6.0% on a 2-s trace). Before the rule the
          // first failure came after 84 traces, a window bent past 7%; with it 3,000 passed (3 December 2026; 1,000 are run). The rate
          // keeps the 8% promise of the bubble-free property above (worst seen 0.9245 of the truth, as without it).
          expect(curvedPart(clean, found.lo, found.hi, { ...settings, readingNoiseFloor: 0, curvatureLimitPct: 7 })).toBeNull();
          const slope = Math.abs(fitTraceRange(clean, found.lo, found.hi).slope * 60);
          const truth = trueRatePerMin(o, Math.max(clean[found.lo]!.t, o.lagS));
          expect(slope).toBeGreaterThanOrEqual(0.92 * truth);
          expect(slope).toBeLessThanOrEqual(1.005 * truth);
        },
      ),
      { numRuns: 1000, seed: 20261203 },
    );
  });
});
