import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { evaluateWestgard, WestgardInputError, type WestgardRun } from '../../../../server/domain/qc/westgard';

/*
 * Every sequence below is built from a rule's definition in Westgard JO, Barry PL, Hunt MR, Groth T. A multi-rule
 * Shewhart chart for quality control in clinical chemistry. Clin Chem 1981;27:493–501 ("the paper"), read with the
 * strict inequalities and the across-run reading that Cristae's contract (issue 12, POST /api/qc/evaluate) fixes.
 * Rule definitions: [from memory] of the paper; the strictness and reporting convention: [confirmed] contract text.
 *
 * Two levels, mean 100 and SD 10, so a value is 100 + 10·z and z = 2, 3, 1, 0 come out exact in binary floating
 * point (20/10, 30/10, 10/10, 0/10): the boundary cases test the inequality, not rounding.
 */
const levels = [
  { id: 'low', mean: 100, sd: 10 },
  { id: 'high', mean: 100, sd: 10 },
];
const v = (z: number) => 100 + 10 * z;
/** A run from z-scores per level; a level left out is a level the run lacks. */
const run = (id: number, zs: { low?: number; high?: number }): WestgardRun<number> => ({
  id,
  results: Object.fromEntries(Object.entries(zs).map(([k, z]) => [k, v(z)])),
});
const evaluate = (runs: WestgardRun<number>[], rules?: Parameters<typeof evaluateWestgard>[2]) =>
  evaluateWestgard(levels, runs, rules);
/** The rules that fired on each run, with their levels, as "rule:level,level". */
const fired = (runs: WestgardRun<number>[], rules?: Parameters<typeof evaluateWestgard>[2]) =>
  evaluate(runs, rules).map((r) => r.violations.map((x) => `${x.rule}:${x.levels.join(',')}`));

describe('1-2s: one control beyond 2 SD, a warning (the paper: 1-2s is the warning rule)', () => {
  it('fires above +2 and below −2 SD, and the run is only a warning', () => {
    // [from memory] the paper: 1-2s "warning" that starts inspection by the other rules; it never rejects.
    const out = evaluate([run(1, { low: 2.1, high: 0 }), run(2, { low: 0, high: -2.01 })]);
    expect(out.map((r) => r.status)).toEqual(['warn', 'warn']);
    expect(out.map((r) => r.violations)).toEqual([[{ rule: '1-2s', levels: ['low'] }], [{ rule: '1-2s', levels: ['high'] }]]);
  });
  it('does not fire at exactly ±2 SD (strict inequality)', () => {
    // [confirmed] contract: "some |z| > 2".
    expect(evaluate([run(1, { low: 2, high: -2 })])).toEqual([{ id: 1, status: 'accept', violations: [] }]);
  });
});

describe('1-3s: one control beyond 3 SD rejects', () => {
  it('fires above +3 and below −3 SD', () => {
    // [from memory] the paper: 1-3s rejects a run with one observation beyond mean ± 3 SD.
    expect(fired([run(1, { low: 3.5 }), run(2, { high: -3.01 })])).toEqual([
      ['1-2s:low', '1-3s:low'],
      ['1-2s:high', '1-3s:high'],
    ]);
    expect(evaluate([run(1, { low: 3.5 })])[0]!.status).toBe('reject');
  });
  it('does not fire at exactly 3 SD: that run only warns', () => {
    // [confirmed] contract: "some |z| > 3".
    const [r] = evaluate([run(1, { low: 3, high: -3 })]);
    expect(r!.violations.map((x) => x.rule)).not.toContain('1-3s');
  });
});

describe('2-2s: two controls beyond 2 SD on the same side', () => {
  it('fires for two levels of one run both above +2 SD, or both below −2 SD', () => {
    // [from memory] the paper: 2-2s across materials within a run.
    expect(fired([run(1, { low: 2.5, high: 2.2 }), run(2, { low: -2.2, high: -2.5 })])).toEqual([
      ['1-2s:low,high', '2-2s:low,high'],
      ['1-2s:low,high', '2-2s:low,high'],
    ]);
  });
  it('does not fire when one of the two sits exactly at 2 SD', () => {
    // [confirmed] contract: both z > 2.
    expect(fired([run(1, { low: 2.5, high: 2 })])).toEqual([['1-2s:low']]);
  });
  it('fires for one level in consecutive runs, reported on the run that completes it only', () => {
    // [from memory] the paper: 2-2s also applies to the last two results of one material (across runs).
    expect(fired([run(1, { low: 2.3, high: 0 }), run(2, { low: 2.4, high: 0.5 })])).toEqual([
      ['1-2s:low'],
      ['1-2s:low', '2-2s:low'],
    ]);
  });
  it('pairs a level with its previous result even when a run in between lacks that level', () => {
    // [confirmed] contract: "its previous result (the last earlier run that has that level)".
    expect(fired([run(1, { low: -2.5 }), run(2, { high: 0 }), run(3, { low: -2.1, high: 0 })])).toEqual([
      ['1-2s:low'],
      [],
      ['1-2s:low', '2-2s:low'],
    ]);
  });
  it('does not pair results on opposite sides, nor one at exactly 2 SD, across runs', () => {
    // [derived] from the definition: same side, both strictly beyond 2 SD.
    expect(fired([run(1, { low: 2.5 }), run(2, { low: -2.5 })])).toEqual([['1-2s:low'], ['1-2s:low']]);
    expect(fired([run(1, { low: 2 }), run(2, { low: 2.5 })])).toEqual([[], ['1-2s:low']]);
  });
  it('does not pair different levels across runs', () => {
    // [derived] "one level's result here and its previous result": low then high is two levels, two runs.
    expect(fired([run(1, { low: 2.5 }), run(2, { high: 2.5 })])).toEqual([['1-2s:low'], ['1-2s:high']]);
  });
});

describe('R-4s: range across levels in one run exceeds 4 SD', () => {
  it('fires when one level is above +2 SD and another below −2 SD in the same run', () => {
    // [from memory] the paper: R-4s, one control exceeds +2 SD and another −2 SD within the run.
    expect(fired([run(1, { low: 2.1, high: -2.1 })])).toEqual([['1-2s:low,high', 'R-4s:low,high']]);
  });
  it('does not fire when one of them sits exactly at −2 SD, nor across two runs', () => {
    // [confirmed] contract: "in this run one level z > 2 and another z < −2".
    expect(fired([run(1, { low: 2.5, high: -2 })])).toEqual([['1-2s:low']]);
    expect(fired([run(1, { low: 2.5, high: 0 }), run(2, { low: 0, high: -2.5 })])).toEqual([['1-2s:low'], ['1-2s:high']]);
  });
  it('lists the levels in the order they were given, whichever side each lies on', () => {
    // [common practice] a stable order (the order of the request's levels) so that one answer compares with the next;
    // here the level above +2 SD is the second one given.
    expect(fired([run(1, { low: -2.5, high: 2.5 })])).toEqual([['1-2s:low,high', 'R-4s:low,high']]);
  });
});

describe('4-1s: four consecutive results of one level beyond 1 SD on the same side', () => {
  const z = [1.5, 1.2, 1.1, 1.3, 1.4];
  it('fires on the fourth result and on each later one that keeps the streak', () => {
    // [from memory] the paper: 4-1s, four consecutive observations exceed mean + 1 SD (or mean − 1 SD).
    expect(fired(z.map((x, i) => run(i + 1, { low: x, high: 0 })))).toEqual([[], [], [], ['4-1s:low'], ['4-1s:low']]);
    expect(fired(z.map((x, i) => run(i + 1, { low: 0, high: -x })))).toEqual([[], [], [], ['4-1s:high'], ['4-1s:high']]);
  });
  it('is broken by a result at exactly 1 SD', () => {
    // [confirmed] contract: all z > 1.
    expect(fired([1.5, 1, 1.2, 1.3, 1.4].map((x, i) => run(i + 1, { low: x })))).toEqual([[], [], [], [], []]);
  });
  it('looks only at the last four: an earlier result within 1 SD does not stop a later streak of four', () => {
    // [from memory] the paper: 4-1s, four consecutive observations; [confirmed] contract: "the last four results".
    expect(fired([0.5, 1.5, 1.2, 1.1, 1.3].map((x, i) => run(i + 1, { low: x })))).toEqual([[], [], [], [], ['4-1s:low']]);
  });
  it('counts the results of the level only, skipping runs that lack it, and flags only runs that have it', () => {
    // [confirmed] contract: "one level's last four results (this one included)".
    const runs = [run(1, { low: 1.5 }), run(2, { high: 0 }), run(3, { low: 1.5 }), run(4, { low: 1.5 }), run(5, { high: 3.5 }), run(6, { low: 1.5 }), run(7, { high: 0 })];
    expect(fired(runs)).toEqual([[], [], [], [], ['1-2s:high', '1-3s:high'], ['4-1s:low'], []]);
  });
  it('does not mix levels: two levels beyond 1 SD twice each is not four results of one level', () => {
    // [derived] the contract's per-level reading.
    expect(fired([run(1, { low: 1.5, high: 1.5 }), run(2, { low: 1.5, high: 1.5 })])).toEqual([[], []]);
  });
});

describe('10x: ten consecutive results of one level on the same side of the mean', () => {
  it('fires on the tenth result and on the eleventh, not on the ninth', () => {
    // [from memory] the paper: 10x-bar, ten consecutive observations on the same side of the mean.
    const runs = Array.from({ length: 11 }, (_, i) => run(i + 1, { low: 0.5, high: 0 }));
    const out = fired(runs);
    expect(out.slice(0, 9)).toEqual(Array.from({ length: 9 }, () => []));
    expect(out.slice(9)).toEqual([['10x:low'], ['10x:low']]);
  });
  it('below the mean too, and a result exactly on the mean breaks the streak', () => {
    // [confirmed] contract: all z > 0 or all z < 0.
    const below = Array.from({ length: 10 }, (_, i) => run(i + 1, { high: -0.3 }));
    expect(fired(below).at(-1)).toEqual(['10x:high']);
    const withZero = Array.from({ length: 10 }, (_, i) => run(i + 1, { high: i === 4 ? 0 : -0.3 }));
    expect(fired(withZero).at(-1)).toEqual([]);
  });
  it('spans runs that lack the level', () => {
    // [confirmed] contract: "one level's last ten results"; the runs without it neither count nor break.
    const runs: WestgardRun<number>[] = [];
    for (let i = 0; i < 10; i += 1) {
      runs.push(run(runs.length + 1, { low: 0.4 }));
      if (i % 3 === 0) runs.push(run(runs.length + 1, { high: -0.1 }));
    }
    // 14 runs: low in 10 of them, the tenth low in run 13; run 14 has the high level only.
    expect(runs).toHaveLength(14);
    const out = evaluate(runs);
    expect(out.filter((r) => r.violations.length > 0)).toEqual([
      { id: 13, status: 'reject', violations: [{ rule: '10x', levels: ['low'] }] },
    ]);
  });
});

describe('status and the laboratory rule selection', () => {
  const sequence = [run(1, { low: 2.5, high: 2.2 })];
  it('reject when a rule other than 1-2s fires, warn when 1-2s alone, accept when none', () => {
    // [confirmed] contract: status reject / warn / accept.
    expect(evaluate(sequence)[0]!.status).toBe('reject');
    expect(evaluate([run(1, { low: 2.5 })])[0]!.status).toBe('warn');
    expect(evaluate([run(1, { low: 0.5 })])[0]!.status).toBe('accept');
  });
  it('applies only the switched-on rules: without 2-2s the same run only warns; without 1-2s it passes', () => {
    // [common practice] laboratories choose their rule set by the assay's sigma; a rule switched off never fires.
    expect(evaluate(sequence, { rules: ['1-2s', '1-3s', 'R-4s'] })[0]).toEqual({
      id: 1,
      status: 'warn',
      violations: [{ rule: '1-2s', levels: ['low', 'high'] }],
    });
    expect(evaluate(sequence, { rules: ['1-3s', 'R-4s', '4-1s', '10x'] })[0]!.status).toBe('accept');
  });
});

describe('input the evaluation refuses', () => {
  it('names the field: an SD of 0 or below, an unknown level, no runs', () => {
    const failure = (f: () => unknown) => {
      try {
        f();
      } catch (e) {
        return e instanceof WestgardInputError ? e.field : 'other';
      }
      return 'none';
    };
    expect(failure(() => evaluateWestgard([{ id: 'a', mean: 1, sd: 0 }], [{ id: 1, results: { a: 1 } }]))).toBe('levels.0.sd');
    expect(failure(() => evaluateWestgard([{ id: 'a', mean: 1, sd: -1 }], [{ id: 1, results: {} }]))).toBe('levels.0.sd');
    expect(failure(() => evaluateWestgard([{ id: 'a', mean: 1, sd: 1 }], [{ id: 1, results: { b: 1 } }]))).toBe('runs.0.results.b');
    expect(failure(() => evaluateWestgard([{ id: 'a', mean: 1, sd: 1 }], []))).toBe('runs');
  });

  it('names the field for a mean or a result that is not a finite number and for a level listed twice', () => {
    // [common practice] bad input gets an error that names the offending field (docs/testing.md); NaN and ±Infinity
    // are not numbers a z-score can be computed from.
    const refusal = (f: () => unknown) => {
      try {
        f();
      } catch (e) {
        return e instanceof WestgardInputError ? { field: e.field, name: e.name, said: e.message.length > 0 } : 'other';
      }
      return 'none';
    };
    const said = (field: string) => ({ field, name: 'WestgardInputError', said: true });
    const one = [{ id: 1, results: { a: 1 } }];
    expect(refusal(() => evaluateWestgard([{ id: 'a', mean: Number.NaN, sd: 1 }], one))).toEqual(said('levels.0.mean'));
    expect(refusal(() => evaluateWestgard([{ id: 'a', mean: Infinity, sd: 1 }], one))).toEqual(said('levels.0.mean'));
    expect(refusal(() => evaluateWestgard([{ id: 'a', mean: 1, sd: Infinity }], one))).toEqual(said('levels.0.sd'));
    const twice = [
      { id: 'a', mean: 1, sd: 1 },
      { id: 'a', mean: 2, sd: 1 },
    ];
    expect(refusal(() => evaluateWestgard(twice, one))).toEqual(said('levels.1.id'));
    const a = [{ id: 'a', mean: 1, sd: 1 }];
    expect(refusal(() => evaluateWestgard(a, [{ id: 1, results: { a: Number.NaN } }]))).toEqual(said('runs.0.results.a'));
    expect(refusal(() => evaluateWestgard(a, [{ id: 1, results: { a: 1 } }, { id: 2, results: { a: -Infinity } }]))).toEqual(
      said('runs.1.results.a'),
    );
    expect(refusal(() => evaluateWestgard(a, [{ id: 1, results: { b: 1 } }]))).toEqual(said('runs.0.results.b'));
    expect(refusal(() => evaluateWestgard(a, []))).toEqual(said('runs'));
  });
});

describe('properties', () => {
  // Runs of z-scores in ±4 SD, some lacking a level; mean 0 and SD 1, so a value is its z and mirroring is exact.
  const unit = [
    { id: 'low', mean: 0, sd: 1 },
    { id: 'high', mean: 0, sd: 1 },
  ];
  const evaluate = (runs: WestgardRun<number>[]) => evaluateWestgard(unit, runs);
  const zArb = fc.option(fc.double({ min: -4, max: 4, noNaN: true }), { nil: undefined });
  const runsArb = fc.array(fc.record({ low: zArb, high: zArb }), { minLength: 1, maxLength: 25 }).map((rows) =>
    rows.map((r, i) => ({ id: i + 1, results: Object.fromEntries(Object.entries(r).filter(([, z]) => z !== undefined)) as Record<string, number> })),
  );

  it('status is reject exactly when some rule other than 1-2s fired, warn exactly when only 1-2s did', () => {
    // [confirmed] contract: the status definition.
    fc.assert(
      fc.property(runsArb, (runs) => {
        for (const r of evaluate(runs)) {
          const rules = r.violations.map((x) => x.rule);
          expect(r.status === 'reject').toBe(rules.some((x) => x !== '1-2s'));
          expect(r.status === 'warn').toBe(rules.length > 0 && rules.every((x) => x === '1-2s'));
        }
      }),
    );
  });

  it('mirroring every result about the mean fires the same rules on the same levels', () => {
    // [derived] each rule in the paper is defined symmetrically (above +k SD or below −k SD).
    fc.assert(
      fc.property(runsArb, (runs) => {
        const mirrored = runs.map((r) => ({
          id: r.id,
          results: Object.fromEntries(Object.entries(r.results).map(([k, x]) => [k, -x])),
        }));
        expect(evaluate(mirrored)).toEqual(evaluate(runs));
      }),
    );
  });

  it('a run that lacks every level fires nothing, and 1-2s fires exactly when some |z| > 2', () => {
    // [confirmed] contract: "a rule is reported on every run whose own results complete it"; 1-2s definition.
    fc.assert(
      fc.property(runsArb, (runs) => {
        const withEmpty = [...runs, { id: runs.length + 1, results: {} }];
        const out = evaluate(withEmpty);
        expect(out.at(-1)).toEqual({ id: runs.length + 1, status: 'accept', violations: [] });
        out.slice(0, -1).forEach((r, i) => {
          const beyond = Object.values(runs[i]!.results).some((x) => Math.abs(x) > 2);
          expect(r.violations.some((x) => x.rule === '1-2s')).toBe(beyond);
        });
      }),
    );
  });
});
