import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { qcEvaluateResponseSchema, qcRuleSelectionSchema } from '@/schemas/qc';
import { countRows, makeTestApp, type TestApp } from '../setup/test-app';
import { signInAll } from '../setup/signed-in-agents';

/*
 * POST /api/qc/evaluate, the stateless Westgard evaluation (issue 12's contract [confirmed]), and the laboratory's
 * rule selection. Rule sequences after Westgard JO, Barry PL, Hunt MR, Groth T, Clin Chem 1981;27:493–501.
 */
type Agent = Awaited<ReturnType<TestApp['signedIn']>>;
let t: TestApp;
let tech: Agent;
let director: Agent;
let clinician: Agent;
let admin: Agent;

beforeAll(async () => {
  t = await makeTestApp();
  [tech, director, clinician, admin] = await signInAll(t, ['technologist', 'director', 'clinician', 'admin'] as const);
});
afterAll(() => t.close());

// Level ids as the contract shows them; mean 100 and SD 10 so z = 2 and 3 are exact.
const levels = [
  { id: 'L1', mean: 100, sd: 10 },
  { id: 'L2', mean: 250, sd: 25 },
];

describe('POST /api/qc/evaluate', () => {
  it('answers every run in order with its status and the rules its own results complete', async () => {
    const runs = [
      { id: 'r1', results: { L1: 100, L2: 250 } }, // accept
      { id: 'r2', results: { L1: 121 } }, // z 2.1: 1-2s warning only [from memory] the paper
      { id: 'r3', results: { L2: 250 } }, // lacks L1
      { id: 'r4', results: { L1: 125, L2: 250 } }, // L1 again beyond +2 SD: 2-2s across runs [confirmed] contract
      { id: 'r5', results: { L1: 121, L2: 195 } }, // L1 z +2.1, L2 z −2.2: R-4s, and 2-2s for L1 again
      { id: 'r6', results: { L1: 130, L2: 180 } }, // z exactly 3 is not 1-3s; L2 z −2.8
    ];
    const res = await tech.post('/api/qc/evaluate').send({ levels, runs });
    expect(res.status).toBe(200);
    const body = qcEvaluateResponseSchema.parse(res.body);
    expect(body.runs.map((r) => r.id)).toEqual(['r1', 'r2', 'r3', 'r4', 'r5', 'r6']);
    expect(body.runs.map((r) => r.status)).toEqual(['accept', 'warn', 'accept', 'reject', 'reject', 'reject']);
    expect(body.runs[3]!.violations).toEqual([
      { rule: '1-2s', levels: ['L1'] },
      { rule: '2-2s', levels: ['L1'] },
    ]);
    expect(body.runs[4]!.violations).toEqual([
      { rule: '1-2s', levels: ['L1', 'L2'] },
      { rule: '2-2s', levels: ['L1'] },
      { rule: 'R-4s', levels: ['L1', 'L2'] },
    ]);
    // r6: L1 z = 3 after 2.1 → 2-2s for L1; L2 −2.8 after −2.2 → 2-2s for L2; R-4s; no 1-3s at exactly 3;
    // L1's last four (2.1, 2.5, 2.1, 3) all above 1 SD → 4-1s (r5's last four began with z 0, so not there).
    expect(body.runs[5]!.violations).toEqual([
      { rule: '1-2s', levels: ['L1', 'L2'] },
      { rule: '2-2s', levels: ['L1', 'L2'] },
      { rule: 'R-4s', levels: ['L1', 'L2'] },
      { rule: '4-1s', levels: ['L1'] },
    ]);
  });

  it('accepts numeric ids and answers them as given; a rules list narrows the rules applied', async () => {
    const res = await director.post('/api/qc/evaluate').send({
      levels: [{ id: 7, mean: 0, sd: 1 }, { id: 8, mean: 0, sd: 1 }],
      runs: [{ id: 1, results: { '7': 2.5, '8': 2.5 } }],
      rules: ['1-2s', '1-3s'],
    });
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ runs: [{ id: 1, status: 'warn', violations: [{ rule: '1-2s', levels: [7, 8] }] }] });
  });

  it('refuses an SD of 0 or less, an unknown level and no runs with a 400 naming the field', async () => {
    const cases: [object, string][] = [
      [{ levels: [{ id: 'L1', mean: 100, sd: 0 }], runs: [{ id: 1, results: { L1: 100 } }] }, 'levels.0.sd'],
      [{ levels: [{ id: 'L1', mean: 100, sd: -2 }], runs: [{ id: 1, results: { L1: 100 } }] }, 'levels.0.sd'],
      [{ levels, runs: [{ id: 1, results: { L1: 100 } }, { id: 2, results: { L3: 1 } }] }, 'runs.1.results.L3'],
      [{ levels, runs: [] }, 'runs'],
    ];
    for (const [body, field] of cases) {
      const res = await tech.post('/api/qc/evaluate').send(body);
      expect(res.status, field).toBe(400);
      expect(res.body.error.code).toBe('VALIDATION_FAILED');
      expect(Object.keys(res.body.error.fields)).toContain(field);
    }
  });

  it('is for technologists and directors only', async () => {
    const body = { levels, runs: [{ id: 1, results: { L1: 100 } }] };
    expect((await clinician.post('/api/qc/evaluate').send(body)).status).toBe(403);
    expect((await admin.post('/api/qc/evaluate').send(body)).status).toBe(403);
    expect((await t.agent().post('/api/qc/evaluate').send(body)).status).toBe(401);
  });
});

describe('GET/PUT /api/qc/rules', () => {
  it('starts with every rule; a director narrows it, audited; a technologist may read but not change it', async () => {
    const initial = qcRuleSelectionSchema.parse((await tech.get('/api/qc/rules').expect(200)).body);
    expect(initial.rules).toEqual(['1-2s', '1-3s', '2-2s', 'R-4s', '4-1s', '10x']);

    expect((await tech.put('/api/qc/rules').send({ rules: ['1-3s'] })).status).toBe(403);
    const audits = await countRows(t.sequelize, 'audit_events');
    const saved = await director.put('/api/qc/rules').send({ rules: ['R-4s', '1-2s', '1-3s', '2-2s'] });
    expect(saved.status).toBe(200);
    expect(saved.body).toEqual({ rules: ['1-2s', '1-3s', '2-2s', 'R-4s'] });
    expect((await tech.get('/api/qc/rules')).body).toEqual({ rules: ['1-2s', '1-3s', '2-2s', 'R-4s'] });
    expect(await countRows(t.sequelize, 'audit_events')).toBe(audits + 1);
    const trail = await director.get('/api/audit').query({ entity: 'qc-rules' });
    expect(JSON.stringify(trail.body)).toContain('R-4s');
  });

  it('refuses a selection with no rejecting rule, an unknown rule or a repeat, naming the field, and keeps the old one', async () => {
    const before = (await director.get('/api/qc/rules')).body;
    for (const rules of [['1-2s'], [], ['1-3s', '5-1s'], ['1-3s', '1-3s']]) {
      const res = await director.put('/api/qc/rules').send({ rules });
      expect(res.status, JSON.stringify(rules)).toBe(400);
      expect(Object.keys(res.body.error.fields)[0]).toMatch(/^rules/);
    }
    expect((await director.get('/api/qc/rules')).body).toEqual(before);
  });
});
