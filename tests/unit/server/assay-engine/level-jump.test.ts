import { describe, expect, it } from 'vitest';
import type { Flag, TracePoint } from '@/schemas/assay';
import { levelJump } from '../../../../server/domain/assay-engine/level-jump';
import { calculateActivity } from '../../../../server/domain/assay-engine/engine';
import { fitTrace } from '../../../../server/domain/assay-engine/rates';
import { cuvette, def, generator, labRateSettings } from './fixtures';

/*
 * A jump in level part-way through a window (level-jump.ts): the truths are analytic. For readings x_i = i·h
 * (i = 0 … n − 1) on a line of slope b, with every reading from i = k on raised by d, the least-squares slope is
 * b + d·Σ_{i≥k}(x_i − x̄)/Sxx, where Sxx = h²·n(n² − 1)/12 [derived by hand from the normal equations]; two parallel
 * lines, one before k and one after, fit the readings exactly, with slope b and gap d.
 */
const settings = labRateSettings;
const codes = (flags: Flag[]) => flags.map((f) => f.code);

/** n readings every `stepS` seconds on 1.2 + b·t, every reading from index k on moved by d. */
const jumped = (n: number, stepS: number, perMin: number, k: number, d: number): TracePoint[] =>
  Array.from({ length: n }, (_, i) => ({ t: i * stepS, a: 1.2 + (perMin * i * stepS) / 60 + (i >= k ? d : 0) }));

function fit(trace: TracePoint[], choice: Parameters<typeof fitTrace>[3] = { kind: 'auto' }) {
  const flags: Flag[] = [];
  const line = fitTrace(trace, 'total', settings, choice, { checkR2: true }, flags);
  return { line, flags };
}

describe('a jump in level inside a window', () => {
  it('a line falling 0.06/min, read every 5 s for 180 s, 0.02 lower from 90 s on: the jump, its place and the rate either side', () => {
    // n = 37, h = 1/12 min, k = 18: Σ_{i≥18}(i − 18) = 171, Sxx = h²·37·1368/12 = h²·4218, so the line's slope is
    // −0.06 − 0.02·171·12/4218 = −0.06 − 0.0097297 = −0.0697297 per minute, (0.0697297 − 0.06)/0.0697297 = 13.953%
    // faster than the true −0.06 [derived by hand as above]. The parallel lines give −0.06 and a gap of −0.02 exactly.
    const jump = levelJump(jumped(37, 5, -0.06, 18, -0.02), 0, 36, settings);
    expect(jump).toMatchObject({ index: 18, t: 90 });
    expect(jump!.jump).toBeCloseTo(-0.02, 9);
    expect(jump!.ratePerMin).toBeCloseTo(-0.06, 9);
    expect(jump!.linePerMin).toBeCloseTo(-0.0697297, 6);
    expect(jump!.changePct).toBeCloseTo(13.953, 2);
  });

  it('a window of 17 readings with a ±0.002 ripple as noise, 0.01 lower from 50 s on, set by hand: flagged LEVEL_JUMP and nothing else', () => {
    // Window 0–80 s: n = 17, h = 1/12 min, k = 10: Σ_{i≥10}(i − 8) = 35, Sxx = h²·17·288/12 = h²·408, so the line's
    // slope is −0.06 − 0.01·35·12/408 = −0.0702941, 14.64% faster than −0.06 [derived by hand as above]; the ripple
    // (deterministic, ±0.002, the instrument's reading noise) moves these by a little. This window passed with no
    // flag at all before the jump check: the jump of five noise SDs is too small for the curvature tests.
    const trace = jumped(37, 5, -0.06, 10, -0.01).map((p, i) => ({ ...p, a: p.a + 0.002 * Math.sin(i * 2.1) }));
    const { line, flags } = fit(trace, { kind: 'manual', window: { fromS: 0, toS: 80 } });
    expect(codes(flags)).toEqual(['LEVEL_JUMP']);
    expect(Math.abs(line!.slopePerMin + 0.0702941)).toBeLessThan(0.003);
    const flag = flags[0]!;
    expect(flag.values?.t).toBe(50);
    expect(Math.abs(flag.values!.jump! + 0.01)).toBeLessThan(0.002);
    expect(Math.abs(flag.values!.ratePerMin! + 0.06)).toBeLessThan(0.003);
    expect(flag.values!.changePct!).toBeGreaterThan(5);
    expect(flag.values?.limitPct).toBe(5);
    expect(flag.message).toMatch(/^total trace between 0 and 80 s: from 50 s on the readings sit 0\.0\d+ lower than the line of those before/);
    expect(flag.message).toMatch(/% faster than the rate on either side, -0\.0\d+ per minute \(limit 5%\); set the window on one side of the jump/);
  });

  it('the automatic window over that trace keeps to the longer straight side of the jump, and says so', () => {
    // The automatic search alone gives 0–80 s (the jump makes that stretch look fastest). Before the jump: 0–45 s,
    // ten readings; from the jump on: 50–180 s, 27 readings, straight. The longer side is taken; its rate is the
    // line's −0.06 within the ripple's reach (under 0.002 per minute over 130 s [derived by hand: a ±0.002 ripple
    // moves a least-squares slope by at most 2·0.002 over the span, 0.0018 per minute]).
    const trace = jumped(37, 5, -0.06, 10, -0.01).map((p, i) => ({ ...p, a: p.a + 0.002 * Math.sin(i * 2.1) }));
    const { line, flags } = fit(trace);
    expect(codes(flags)).toEqual(['JUMP_AVOIDED']);
    expect(line).toMatchObject({ fromS: 50, toS: 180, points: 27 });
    expect(Math.abs(line!.slopePerMin + 0.06)).toBeLessThan(0.002);
    expect(flags[0]!.values).toMatchObject({ t: 50, fromS: 50, toS: 180 });
    expect(Math.abs(flags[0]!.values!.jump! + 0.01)).toBeLessThan(0.002);
    expect(flags[0]!.message).toMatch(/^total trace: from 50 s on the readings sit 0\.0\d+ lower .* over 0–80 s run \d+(\.\d+)?% faster than the rate on either side; the window is kept to 50–180 s, after the jump/);
  });

  it('a rise instead of a fall, and a jump up: the sign of the gap and the direction of the error follow', () => {
    // A line rising 0.1/min read every 10 s for 300 s (n = 31, h = 1/6 min), +0.03 from 100 s (k = 10):
    // Σ_{i≥10}(i − 15) = Σ_{j=−5}^{15} j = 105, Sxx = h²·31·960/12 = h²·2480, so the slope is 0.1 + 0.03·105·6/2480 =
    // 0.1 + 0.0076210 = 0.1076210, 7.08% faster [derived by hand].
    const trace = jumped(31, 10, 0.1, 10, 0.03);
    const jump = levelJump(trace, 0, 30, settings);
    expect(jump).toMatchObject({ index: 10, t: 100 });
    expect(jump!.jump).toBeCloseTo(0.03, 9);
    expect(jump!.linePerMin).toBeCloseTo(0.107621, 6);
    expect(jump!.changePct).toBeCloseTo((100 * 0.007621) / 0.107621, 2);
  });

  it('a jump too small to move the slope beyond the curvature limit is not flagged', () => {
    // The same rising line, +0.015 from 100 s: 0.1 + 0.015·105·6/2480 = 0.1038105, a 3.67% change: under the 5% limit.
    expect(levelJump(jumped(31, 10, 0.1, 10, 0.015), 0, 30, settings)).toBeNull();
    // And with the limit at 3%, it is [the same arithmetic].
    expect(levelJump(jumped(31, 10, 0.1, 10, 0.015), 0, 30, { ...settings, curvatureLimitPct: 3 })).not.toBeNull();
  });

  it('one raised reading is the outlier check’s, not a jump', () => {
    // +0.2 at 30 s (reading 4 of 31, every 10 s, falling 0.06/min, a ±0.002 ripple): it moves the line's slope by
    // 0.2·(3 − 15)·6/2480 = −0.0058 per minute, 9.7% [derived by hand as above], and two parallel lines split just
    // after it take it for a gap. Without it there is no gap, so it is not called a jump.
    const trace = jumped(31, 10, -0.06, 0, 0).map((p, i) => ({ ...p, a: p.a + 0.002 * Math.sin(i * 2.1) + (i === 3 ? 0.2 : 0) }));
    expect(levelJump(trace, 0, 30, settings)).toBeNull();
    // With no outlier limit the reading is not left out, and the split after it is taken for a jump.
    expect(levelJump(trace, 0, 30, { ...settings, outlierLimitSd: undefined })).toMatchObject({ index: 4, t: 40 });
  });

  it('a jump needs three readings on each side: one after a window’s second reading is not looked for', () => {
    // Six readings, jump after the second: no place with three readings before it.
    expect(levelJump(jumped(6, 10, -0.06, 2, -0.05), 0, 5, settings)).toBeNull();
    // Eight readings, jump after the fourth: found, and still there without the reading before it (the one furthest
    // off its neighbours' line, 0.05/2/√1.5 = 0.0204 against a limit of 4 × 0.002 [derived by hand]).
    expect(levelJump(jumped(8, 10, -0.06, 4, -0.05), 0, 7, settings)).toMatchObject({ index: 4, t: 40 });
  });

  it('a window of six readings with the stray-reading rule off: the one place, three either side, is tried', () => {
    // Readings 10–15 of a 31-reading line, 0.05 lower from reading 13 on; the trace's noise is its floor (one jump
    // hardly moves the median of 29 pseudo-residuals).
    expect(levelJump(jumped(31, 10, -0.06, 13, -0.05), 10, 15, { ...settings, outlierLimitSd: undefined })).toMatchObject({ index: 13, t: 130 });
  });

  it('a flat trace with a jump too small to give it a measurable slope: no rate to move, so no jump is named', () => {
    // 41 readings every 30 s (20 min), flat, 0.008 higher from 10 min on (k = 20): the line's slope is
    // 0.008·Σ_{i≥20}(i − 20)·2/(41·1680/12) = 0.008·210·2/5740 = 0.000585 per minute [derived by hand as above], under
    // the near-zero limit of 0.001; the gap itself is 0.008/(0.002·√(1/20 + 1/21 + …)) ≈ 3.6 SE, beyond noise.
    const flat = jumped(41, 30, 0, 20, 0.008);
    expect(levelJump(flat, 0, 40, settings)).toBeNull();
    // With a near-zero limit below that slope, the same jump moves "the rate" from 0 to 0.000585: named.
    expect(levelJump(flat, 0, 40, { ...settings, nearZeroSlopePerMin: 0.0001 })).toMatchObject({ index: 20, t: 600 });
  });
});

describe('a jump near the start, taken for a lag by the window search', () => {
  it('a fall of 0.06/min read every 5 s, 0.01 higher from 50 s: the readings before are the same rate at another level, so no lag is named', () => {
    // Noise-free: the jump up makes every window across it slower, so the search takes 50–80 s and the ten readings
    // before it for a lag "9.09% slower". Their own rate is the line's −0.06 per minute, as after it [by
    // construction]: a jump, not a lag. The longer side, 0–45 s (ten readings against seven), is kept, at exactly
    // −0.06; the straight line over 0–80 s would run 0.06 − 0.01·35·12/408 = 0.0497 per minute, 17.2% slower
    // [derived by hand as above, n = 17, k = 10].
    const { line, flags } = fit(jumped(17, 5, -0.06, 10, 0.01));
    expect(codes(flags)).toEqual(['JUMP_AVOIDED']);
    expect(line).toMatchObject({ fromS: 0, toS: 45, points: 10 });
    expect(line!.slopePerMin).toBeCloseTo(-0.06, 9);
    expect(flags[0]!.values?.jump).toBeCloseTo(0.01, 9);
    expect(flags[0]!.message).toBe(
      'total trace: from 50 s on the readings sit 0.01 higher (a jump: a bubble that stays, a knock, a lid), which would make the straight line over 0–80 s run 17.2% slower than the rate on either side; the window is kept to 0–45 s, before the jump, the longer straight stretch on one side of it',
    );
  });

  it('the same jump with a long trace after it: the side after is kept, and still no lag is named', () => {
    // 37 readings: ten before the jump, 27 from it on; the search takes 50–180 s after a "lag", which was the jump.
    const { line, flags } = fit(jumped(37, 5, -0.06, 10, 0.01));
    expect(codes(flags)).toEqual(['JUMP_AVOIDED']);
    expect(line).toMatchObject({ fromS: 50, toS: 180, points: 27 });
    expect(line!.slopePerMin).toBeCloseTo(-0.06, 9);
    expect(flags[0]!.message).toContain('the window is kept to 50–180 s, after the jump');
  });

  it('a real lag (flat, then falling) is still a lag: the two sides do not run at the same rate', () => {
    // Flat for 30 s, then falling 0.06/min, read every 5 s to 150 s, with the ripple: the readings before the window
    // run at 0, not at the window's rate [by construction].
    const trace = Array.from({ length: 31 }, (_, i) => ({ t: i * 5, a: 1.2 - (0.06 * Math.max(0, i * 5 - 30)) / 60 + 0.002 * Math.sin(i * 2.1) }));
    const { line, flags } = fit(trace);
    expect(codes(flags)).toEqual(['LAG_EXCLUDED']);
    // The window may take the lag's last readings while it stays straight within the curvature limit (5%): here
    // 20–150 s at −0.0587 per minute, 2% slow, as before the jump rule.
    expect(line!.fromS).toBeGreaterThanOrEqual(15);
    expect(Math.abs(line!.slopePerMin + 0.06)).toBeLessThan(0.05 * 0.06);
  });
});

describe('a jump in the background trace, whose slope is subtracted', () => {
  // Total: 1.2 − 0.06·t/min; background (the inhibitor-insensitive rate): 0.9 − 0.012·t/min, 0.01 lower from 90 s on;
  // both read every 5 s for 180 s with a ±0.002 ripple. The specific rate is −0.048 per minute. The background's
  // line over 0–180 s runs −0.012 − 0.01·171·12/4218 = −0.01686 per minute [derived by hand as above, n = 37,
  // k = 18], so the specific rate reads −0.0431 and the activity 43.1 against 48 (factor 1000, fixtures.ts): 10% low,
  // and the background trace was never checked for it.
  const ripple = (p: TracePoint, i: number) => ({ ...p, a: p.a + 0.002 * Math.sin(i * 2.1) });
  const total = jumped(37, 5, -0.06, 0, 0).map(ripple);
  const background = jumped(37, 5, -0.012, 18, -0.01).map((p, i) => ({ t: p.t, a: p.a - 0.3 + 0.002 * Math.sin(i * 1.7) }));

  it('is flagged LEVEL_JUMP on the background, by how much it moves the specific rate', () => {
    const r = calculateActivity({ assay: 'CI', ...cuvette, total, background }, def('CI'));
    const flag = r.flags.find((f) => f.code === 'LEVEL_JUMP');
    expect(flag?.message).toMatch(/^background trace between 0 and 180 s: from 90 s on the readings sit 0\.0\d+ lower than the line of those before/);
    expect(flag?.message).toMatch(/of the specific rate \(limit 5%\); set the window on one side of the jump, or repeat the background reading$/);
    expect(flag?.values?.t).toBe(90);
    expect(Math.abs(flag!.values!.jump! + 0.01)).toBeLessThan(0.002);
    // 0.00486 of 0.048 per minute: 10.1% [by hand above]; the ripple moves it by a little (11.1% measured).
    expect(flag!.values!.changePct!).toBeGreaterThan(8);
    expect(flag!.values!.changePct!).toBeLessThan(14);
    expect(r.activity).toBeLessThan(0.92 * 48);
  });

  it('a jump in a no-sample blank subtracted from the total is flagged the same way, and a blank that cancels is not judged', () => {
    // CIV subtracts no background; its blank (the same 0.01 jump at 90 s on −0.012 per minute) is subtracted from the
    // total: the same 10% move of the specific rate [as above].
    const r = calculateActivity({ assay: 'CIV', ...cuvette, total }, def('CIV'), { blank: background });
    expect(r.flags.find((f) => f.code === 'LEVEL_JUMP')?.message).toMatch(/^blank trace between 0 and 180 s: from 90 s on/);
    // With a background given, the blank is in both traces and cancels (T − B): its jump does not reach the rate.
    const both = calculateActivity({ assay: 'CI', ...cuvette, total, background: jumped(37, 5, -0.012, 0, 0) }, def('CI'), { blank: background });
    expect(both.flags.map((f) => f.code)).not.toContain('LEVEL_JUMP');
  });

  it('a background with no jump, or a jump too small to move the specific rate by 5%, is not flagged', () => {
    const clean = jumped(37, 5, -0.012, 0, 0).map((p, i) => ({ t: p.t, a: p.a - 0.3 + 0.002 * Math.sin(i * 1.7) }));
    expect(calculateActivity({ assay: 'CI', ...cuvette, total, background: clean }, def('CI')).flags.map((f) => f.code)).not.toContain('LEVEL_JUMP');
    // A jump of 0.004 moves the background's line by 0.004·0.4865 = 0.0019 per minute, 4.1% of 0.048 (noise-free).
    const small = jumped(37, 5, -0.012, 18, -0.004).map((p) => ({ t: p.t, a: p.a - 0.3 }));
    expect(calculateActivity({ assay: 'CI', ...cuvette, total, background: small }, def('CI')).flags.map((f) => f.code)).not.toContain('LEVEL_JUMP');
  });
});

describe('a jump the window search cannot step round', () => {
  it('a lag, then a fall with a jump down near its end: refused, saying why, not that no stretch is straight', () => {
    // Flat to 30 s, then falling 0.1/min, 0.015 lower from 160 s, read every 5 s to 200 s. Each start's longest
    // straight window ends where the readings after it run faster (the lag's end, or the jump), so none is taken:
    // no rate is given [a safe refusal; docs/domain.md § 5a]. It used to say "no stretch of 41 or more readings is
    // straight", the whole trace's length, though the minimum is 5 and 30–155 s is straight.
    const trace = Array.from({ length: 41 }, (_, i) => ({ t: i * 5, a: 1 - (0.1 * Math.max(0, i * 5 - 30)) / 60 + (i >= 32 ? -0.015 : 0) }));
    const { line, flags } = fit(trace);
    expect(line).toBeNull();
    expect(codes(flags)).toEqual(['NO_LINEAR_WINDOW']);
    expect(flags[0]!.message).toBe(
      'total trace: every straight stretch (the first 0–35 s) is followed by readings that run faster, as at the end of a lag or where the readings jump to another level, so no initial rate can be read. No activity is given: read for longer, or set a window by hand (it will be flagged)',
    );
    expect(flags[0]!.values).toEqual({ fromS: 0, toS: 35 });
  });
});

describe('jumps against noise', () => {
  it('1,000 noisy straight traces with no jump: a jump is named in at most 2% of them, and their rate is still right', () => {
    // α = 0.01 shared among the places tried (Bonferroni) bounds the false alarms of one window at 1% when the noise
    // is known [common practice]; the noise is read off each trace, so a little more is allowed. Measured on
    // 3 December 2026: 6 of 1,000, each kept to a side of 9–13 readings within 2.9 standard errors.
    const { uniform, gauss } = generator(11);
    let flagged = 0;
    for (let k = 0; k < 1000; k += 1) {
      const sd = 0.002 + 0.004 * uniform();
      const step = [2, 5, 10][k % 3]!;
      const perMin = -(0.02 + 0.3 * uniform());
      const trace = Array.from({ length: Math.floor(180 / step) + 1 }, (_, i) => ({ t: i * step, a: 1.2 + (perMin * i * step) / 60 + sd * gauss() }));
      const { line, flags } = fit(trace);
      if (codes(flags).some((c) => c === 'LEVEL_JUMP' || c === 'JUMP_AVOIDED')) {
        flagged += 1;
        // A window kept to one side of a jump that is not there is shorter, and still right: within 4 standard errors
        // of a least-squares slope over its readings, sd/√Sxx with Sxx = n(n² − 1)/12·(step/60)² [textbook].
        const n = line!.points;
        const se = sd / Math.sqrt(((n * (n * n - 1)) / 12) * (step / 60) ** 2);
        expect(Math.abs(line!.slopePerMin - perMin)).toBeLessThan(4 * se);
      }
    }
    expect(flagged).toBeLessThanOrEqual(20);
  });

  // Lines with one jump (0.01–0.04: 5–20 noise SDs) or two or three raised readings, at every place, three rates,
  // read every 5 or 10 s for 300 s, with a ±0.002 deterministic ripple as noise. Measured on 3 December 2026: without
  // the jump check 38 automatic rates were more than 10% off with no flag at all (jumps of 0.01–0.02 inside windows of
  // 10–26 readings) and 876 were more than 10% off; with it, 2 silent (a jump of 0.01 three readings into a window of
  // ten, below the check's reach) and 255 off, each part's count below. Any flag but the three that only describe
  // where the window lies counts as a flag. One test per part, so each stays well inside a test's time under
  // mutation testing's instrumentation.
  it.each([
    { stepS: 5, kind: 'step', silentAtMost: 0, offAtMost: 48 },
    { stepS: 5, kind: 'pair', silentAtMost: 0, offAtMost: 6 },
    { stepS: 5, kind: 'triple', silentAtMost: 0, offAtMost: 82 },
    { stepS: 10, kind: 'step', silentAtMost: 2, offAtMost: 29 },
    { stepS: 10, kind: 'pair', silentAtMost: 0, offAtMost: 33 },
    { stepS: 10, kind: 'triple', silentAtMost: 0, offAtMost: 57 },
  ] as const)('read every $stepS s, a $kind at every place: at most $silentAtMost more than 10% off with no flag, $offAtMost off at all', ({ stepS, kind, silentAtMost, offAtMost }) => {
    let silent = 0;
    let off = 0;
    for (const perMin of [-0.02, -0.06, -0.15])
      for (const size of [-0.04, -0.02, -0.01, 0.01, 0.02, 0.04])
        for (let at = 1; at < 300 / stepS - 2; at += 1) {
          const trace = Array.from({ length: 300 / stepS + 1 }, (_, i) => {
            const raised = kind === 'step' ? i >= at : kind === 'pair' ? i === at || i === at + 1 : i >= at && i <= at + 2;
            return { t: i * stepS, a: 1 + (perMin * i * stepS) / 60 + 0.002 * Math.sin(i * 2.1) + (raised ? size : 0) };
          });
          const { line, flags } = fit(trace);
          if (!line) continue;
          const quiet = codes(flags).every((c) => c === 'LAG_EXCLUDED' || c === 'STRAY_READING_AVOIDED' || c === 'JUMP_AVOIDED');
          if (Math.abs(line.slopePerMin - perMin) / Math.abs(perMin) > 0.1) {
            off += 1;
            if (quiet) silent += 1;
          }
        }
    expect(silent).toBeLessThanOrEqual(silentAtMost);
    expect(off).toBeLessThanOrEqual(offAtMost);
  });
});
