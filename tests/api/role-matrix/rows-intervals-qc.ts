import { createHash } from 'node:crypto';
import { mean as ssMean, sampleStandardDeviation } from 'simple-statistics';
import { expect } from 'vitest';
import { assayCodes, type AssayCode } from '@/schemas/common';
import { westgardRules } from '@/schemas/qc';
import { buildIntervalDraft } from '../../factories/intervals';
import { binary } from '../../setup/binary-body';
import { nextSerial, ok } from './fixtures';
import { once, perCall, type Ctx, type Rows } from './harness';

/*
 * Reference intervals and their control data; quality control, control materials and targets. Statuses from
 * docs/api.md ("Reference intervals", "Quality control"); where the docs name none, a read or a calculation
 * answers 200, a create 201 and a change 200 [common practice for HTTP APIs, RFC 9110 §15.3].
 */

const sha256 = (b: Buffer | string) => createHash('sha256').update(b).digest('hex');
const measures = ['activity', 'ratio_cs', 'ratio_cii'] as const;
const range = (from: number, to: number) => Array.from({ length: to - from + 1 }, (_, i) => from + i);

export function intervalAndQcRows(ctx: Ctx): Rows {
  const director = () => ctx.as('director');

  /** A typed-in interval (invented numbers) for one key, from 1 February 2026. */
  const draftBody = (key: { assay: AssayCode; measure: (typeof measures)[number]; specimenType: string }) =>
    buildIntervalDraft({ ...key, setName: 'Matrix set (fictitious)', effectiveFrom: '2026-02-01' });

  let keySerial = 0;
  /** A stored draft for a key of its own (specimen type "other", a new assay × measure each time), by `who`. */
  async function intervalDraft(who: 'director' | 'director2') {
    const k = keySerial++;
    const body = draftBody({
      assay: assayCodes[k % assayCodes.length]!,
      measure: measures[Math.floor(k / assayCodes.length) % measures.length]!,
      specimenType: 'other',
    });
    const res = ok(await ctx.as(who).post('/api/reference-intervals').send(body), 201, 'interval draft');
    return { id: res.body.id as number, revision: res.body.revision as number, body };
  }

  /** The seeded demo control file and an approved demo interval (server/db/seed/demo-intervals.ts). */
  const demoFile = once(async () => {
    const list = ok(await director().get('/api/reference-intervals/controls'), 200, 'controls').body.items as { id: number; filename: string; sha256: string }[];
    return list.find((u) => u.filename.includes('DEMO'))!;
  });
  const demoInterval = once(async () => (ok(await director().get('/api/reference-intervals'), 200, 'intervals').body.items as { id: number; status: string }[]).find((i) => i.status === 'approved')!);
  /** The demo's level-1 pooled homogenate with 22 runs of CS and CI results (server/db/seed/demo-runs.ts). */
  const demoMaterial = once(async () => {
    const items = ok(await director().get('/api/control-materials'), 200, 'materials').body.items as { id: number; lot: string; level: string }[];
    return items.find((m) => m.lot === 'FH-PMH-2609' && m.level.startsWith('Level 1'))!;
  });

  async function material() {
    const n = nextSerial();
    const res = ok(
      await director().post('/api/control-materials').send({ name: 'Matrix homogenate pool (fictitious)', lot: `MX-${n}`, level: 'Level 1', expiresOn: '2030-12-31' }),
      201,
      'material',
    );
    return { id: res.body.id as number, version: res.body.version as number };
  }

  const ownDraftFor = perCall(() => intervalDraft('director'));
  const otherDraftFor = perCall(() => intervalDraft('director2'));
  const materialFor = perCall(material);
  const targetDraftFor = perCall(async () => {
    const m = await material();
    const res = ok(await ctx.as('director2').post(`/api/control-materials/${m.id}/targets`).send({ assayCode: 'CS', mean: 120, sd: 6 }), 201, 'target');
    return { id: res.body.id as number };
  });

  const demoSelection = { specimenType: 'skeletal_muscle', assay: 'CI', measure: 'activity', ageBand: { label: 'Children', minYears: 0, maxYears: 16 }, outliers: 'none' };

  return {
    'GET /api/reference-intervals': {
      status: 200,
      call: async () => {
        const i = await demoInterval();
        return { send: (c) => c.get('/api/reference-intervals'), check: (res) => expect(res.body.items.map((x: { id: number }) => x.id)).toContain(i.id) };
      },
    },
    'POST /api/reference-intervals': {
      status: 201,
      call: async () => {
        const body = draftBody({ assay: 'CS', measure: 'activity', specimenType: 'lymphoblasts' });
        return { send: (c) => c.post('/api/reference-intervals').send(body), check: (res) => expect(res.body).toMatchObject({ status: 'draft', assay: 'CS', specimenType: 'lymphoblasts', lower: 50, upper: 150 }) };
      },
    },
    'POST /api/reference-intervals/derive': {
      status: 200,
      // mean ± 2 SD of 1…20, against simple-statistics [common practice for mean ± 2 SD].
      call: async () => {
        const values = range(1, 20);
        return {
          send: (c) => c.post('/api/reference-intervals/derive').send({ method: 'mean2sd', outliers: 'none', values }),
          check: (res) => {
            expect(res.body.n).toBe(20);
            expect(res.body.lower).toBeCloseTo(ssMean(values) - 2 * sampleStandardDeviation(values), 8);
            expect(res.body.upper).toBeCloseTo(ssMean(values) + 2 * sampleStandardDeviation(values), 8);
          },
        };
      },
    },
    'POST /api/reference-intervals/verify': {
      status: 200,
      // 20 local values all inside the interval: verified (CLSI EP28-A3c transference: at most 2 of 20 outside [from memory]).
      call: async () => ({
        send: (c) => c.post('/api/reference-intervals/verify').send({ lower: 10, upper: 30, values: range(11, 30).map((v) => v - 0.5) }),
        check: (res) => expect(res.body.decision).toBe('verified'),
      }),
    },
    'POST /api/reference-intervals/partition': {
      status: 200,
      // Two groups 40 units apart with a spread of 0.9: far past Harris & Boyd's z* limit (Clin Chem 1990;36:265 [from memory]).
      call: async () => {
        const a = range(0, 59).map((i) => 10 + (i % 10) * 0.1);
        const b = range(0, 59).map((i) => 50 + (i % 10) * 0.1);
        return {
          send: (c) => c.post('/api/reference-intervals/partition').send({ groups: [{ label: 'children', values: a }, { label: 'adults', values: b }] }),
          check: (res) => expect(res.body.decision).toBe('partition'),
        };
      },
    },
    'GET /api/reference-intervals/controls': {
      status: 200,
      call: async () => {
        const f = await demoFile();
        return { send: (c) => c.get('/api/reference-intervals/controls'), check: (res) => expect(res.body.items.map((x: { id: number }) => x.id)).toContain(f.id) };
      },
    },
    'POST /api/reference-intervals/controls': {
      status: 201,
      call: async () => {
        const n = nextSerial();
        const csv = `control_id,specimen_type,age_years,CI (nmol/min/mg),CS (nmol/min/mg)\n${range(1, 12)
          .map((i) => `mx${n}-${i},skeletal_muscle,${i + 20},${30 + i},${140 + i}`)
          .join('\n')}\n`;
        return {
          send: (c) => c.post('/api/reference-intervals/controls').attach('file', Buffer.from(csv, 'utf8'), `matrix-${n}.csv`),
          check: (res) => {
            expect(res.body.sha256).toBe(sha256(csv));
            expect(res.body.data.rowCount).toBe(12);
          },
        };
      },
    },
    'GET /api/reference-intervals/controls/:id': {
      status: 200,
      call: async () => {
        const f = await demoFile();
        return { send: (c) => c.get(`/api/reference-intervals/controls/${f.id}`), check: (res) => expect(res.body).toMatchObject({ id: f.id, sha256: f.sha256 }) };
      },
    },
    'GET /api/reference-intervals/controls/:id/file': {
      status: 200,
      call: async () => {
        const f = await demoFile();
        return { send: (c) => binary(c.get(`/api/reference-intervals/controls/${f.id}/file`)), check: (res) => expect(sha256(res.body)).toBe(f.sha256) };
      },
    },
    'POST /api/reference-intervals/controls/:id/preview': {
      status: 200,
      call: async () => {
        const f = await demoFile();
        return {
          send: (c) => c.post(`/api/reference-intervals/controls/${f.id}/preview`).send({ ...demoSelection, method: 'mean2sd' }),
          check: (res) => {
            expect(res.body.result.n).toBeGreaterThan(30);
            expect(res.body.values).toHaveLength(res.body.result.n);
          },
        };
      },
    },
    'POST /api/reference-intervals/controls/:id/draft': {
      status: 201,
      call: async () => {
        const f = await demoFile();
        return {
          send: (c) =>
            c.post(`/api/reference-intervals/controls/${f.id}/draft`).send({
              ...demoSelection,
              assay: 'CIV',
              ageBand: { label: 'All ages', minYears: 0, maxYears: null },
              method: 'mean2sd',
              setName: 'Muscle (derived, matrix)',
              effectiveFrom: '2026-03-01',
              effectiveTo: null,
            }),
          check: (res) => expect(res.body).toMatchObject({ status: 'draft', assay: 'CIV', method: 'mean2sd', upload: { id: f.id } }),
        };
      },
    },
    'GET /api/reference-intervals/:id': {
      status: 200,
      call: async () => {
        const i = await demoInterval();
        return { send: (c) => c.get(`/api/reference-intervals/${i.id}`), check: (res) => expect(res.body).toMatchObject({ id: i.id, status: 'approved' }) };
      },
    },
    'GET /api/reference-intervals/:id/history': {
      status: 200,
      call: async () => {
        const i = await demoInterval();
        return { send: (c) => c.get(`/api/reference-intervals/${i.id}/history`), check: (res) => expect(res.body.items.map((x: { id: number }) => x.id)).toContain(i.id) };
      },
    },
    'PATCH /api/reference-intervals/:id': {
      status: 200,
      // Edited by the director who drafted it.
      call: async (_caller, permitted) => {
        const d = await ownDraftFor(permitted);
        return {
          send: (c) => c.patch(`/api/reference-intervals/${d.id}`).send({ revision: d.revision, sourceNote: 'Edited before approval (matrix)' }),
          check: (res) => expect(res.body).toMatchObject({ id: d.id, sourceNote: 'Edited before approval (matrix)', revision: d.revision + 1 }),
        };
      },
    },
    'POST /api/reference-intervals/:id/approve': {
      status: 200,
      // Drafted by the second director; approved by the demo director (separation of duties).
      call: async (_caller, permitted) => {
        const d = await otherDraftFor(permitted);
        return {
          send: (c) => c.post(`/api/reference-intervals/${d.id}/approve`).send({ revision: d.revision }),
          check: (res) => expect(res.body).toMatchObject({ id: d.id, status: 'approved' }),
        };
      },
    },
    'POST /api/reference-intervals/:id/retire': {
      status: 200,
      call: async (_caller, permitted) => {
        const d = await ownDraftFor(permitted);
        return {
          send: (c) => c.post(`/api/reference-intervals/${d.id}/retire`).send({ revision: d.revision, reason: 'Typed against the wrong key (matrix)' }),
          check: (res) => expect(res.body).toMatchObject({ id: d.id, status: 'retired', retireReason: 'Typed against the wrong key (matrix)' }),
        };
      },
    },
    'POST /api/qc/evaluate': {
      status: 200,
      // One control at z = (125 − 100)/10 = 2.5: beyond 2 SD, within 3 SD: 1-2s alone, a warning (Westgard 1981 [confirmed: docs/api.md]).
      call: async () => ({
        send: (c) => c.post('/api/qc/evaluate').send({ levels: [{ id: 'L1', mean: 100, sd: 10 }], runs: [{ id: 'r1', results: { L1: 125 } }] }),
        check: (res) => expect(res.body.runs).toEqual([{ id: 'r1', status: 'warn', violations: [{ rule: '1-2s', levels: ['L1'] }] }]),
      }),
    },
    'GET /api/qc/rules': {
      status: 200,
      call: async () => ({ send: (c) => c.get('/api/qc/rules'), check: (res) => expect([...res.body.rules].sort()).toEqual([...westgardRules].sort()) }),
    },
    'PUT /api/qc/rules': {
      status: 200,
      // All six rules again, so the laboratory's setting is what it was.
      call: async () => ({
        send: (c) => c.put('/api/qc/rules').send({ rules: [...westgardRules] }),
        check: (res) => expect([...res.body.rules].sort()).toEqual([...westgardRules].sort()),
      }),
    },
    'GET /api/control-materials': {
      status: 200,
      call: async () => {
        const m = await demoMaterial();
        return { send: (c) => c.get('/api/control-materials'), check: (res) => expect(res.body.items.map((x: { id: number }) => x.id)).toContain(m.id) };
      },
    },
    'POST /api/control-materials': {
      status: 201,
      call: async () => {
        const lot = `MXN-${nextSerial()}`;
        return {
          send: (c) => c.post('/api/control-materials').send({ name: 'Matrix pool (fictitious)', lot, level: 'Level 2', expiresOn: '2030-06-30' }),
          check: (res) => expect(res.body).toMatchObject({ id: expect.any(Number), lot, level: 'Level 2', version: 0 }),
        };
      },
    },
    'GET /api/control-materials/:id': {
      status: 200,
      call: async () => {
        const m = await demoMaterial();
        // Director-entered CS and CI targets, approved by the second director (demo-runs.ts).
        return {
          send: (c) => c.get(`/api/control-materials/${m.id}`),
          check: (res) => {
            expect(res.body.id).toBe(m.id);
            expect(res.body.targets.filter((x: { status: string }) => x.status === 'approved').map((x: { assayCode: string }) => x.assayCode).sort()).toEqual(['CI', 'CS']);
          },
        };
      },
    },
    'PATCH /api/control-materials/:id': {
      status: 200,
      call: async (_caller, permitted) => {
        const m = await materialFor(permitted);
        return {
          send: (c) => c.patch(`/api/control-materials/${m.id}`).send({ version: m.version, description: 'Aliquoted again (matrix)' }),
          check: (res) => expect(res.body).toMatchObject({ id: m.id, description: 'Aliquoted again (matrix)', version: m.version + 1 }),
        };
      },
    },
    'GET /api/control-materials/:id/chart': {
      status: 200,
      call: async () => {
        const m = await demoMaterial();
        return {
          send: (c) => c.get(`/api/control-materials/${m.id}/chart?assay=CI`),
          // One CI result of this level on each of the demo's 22 runs.
          check: (res) => expect(res.body.points).toHaveLength(22),
        };
      },
    },
    'POST /api/control-materials/:id/targets': {
      status: 201,
      call: async (_caller, permitted) => {
        const m = await materialFor(permitted);
        return {
          send: (c) => c.post(`/api/control-materials/${m.id}/targets`).send({ assayCode: 'CI', mean: 30, sd: 2, note: 'From the lot sheet (matrix)' }),
          check: (res) => expect(res.body).toMatchObject({ id: expect.any(Number), status: 'draft', assayCode: 'CI', mean: 30, sd: 2 }),
        };
      },
    },
    'POST /api/control-materials/:id/targets/establish': {
      status: 201,
      // Mean and sample SD (n − 1) of the first 20 CS results in run order, against simple-statistics.
      call: async () => {
        const m = await demoMaterial();
        const chart = ok(await director().get(`/api/control-materials/${m.id}/chart?assay=CS`), 200, 'chart').body;
        const first20 = (chart.points as { value: number }[]).slice(0, 20).map((r) => r.value);
        return {
          send: (c) => c.post(`/api/control-materials/${m.id}/targets/establish`).send({ assayCode: 'CS' }),
          check: (res) => {
            expect(res.body).toMatchObject({ status: 'draft', assayCode: 'CS' });
            expect(res.body.mean).toBeCloseTo(ssMean(first20), 6);
            expect(res.body.sd).toBeCloseTo(sampleStandardDeviation(first20), 6);
          },
        };
      },
    },
    'POST /api/control-targets/:id/approve': {
      status: 200,
      call: async (_caller, permitted) => {
        const d = await targetDraftFor(permitted);
        return { send: (c) => c.post(`/api/control-targets/${d.id}/approve`).send({}), check: (res) => expect(res.body).toMatchObject({ id: d.id, status: 'approved' }) };
      },
    },
  };

}
