import { createHash } from 'node:crypto';
import { expect } from 'vitest';
import { buildPatientInput, buildRegisterCaseInput, buildSpecimenInput } from '../../factories/cases';
import { isolatedComplexI } from '../../factories/workup';
import { binary } from '../../setup/binary-body';
import { DEMO_PASSWORD } from '../../setup/test-app';
import { CI_RATES_ACTIVITY, ciRates, fixtures, nextSerial, ok } from './fixtures';
import { once, perCall, type Ctx, type Rows } from './harness';

/*
 * Patients, cases, specimens, assay work, plate files and maps, results, submission and runs: the laboratory's
 * (technologist and director). Statuses from docs/api.md ("Registry", "Assay work and results", "Runs"); where
 * the docs name none, a read or preview answers 200, a create 201, a change 200 and a delete 204 [common
 * practice for HTTP APIs, RFC 9110 §15.3].
 */

const sha256 = (b: Buffer) => createHash('sha256').update(b).digest('hex');
const ids = (items: { id: number }[]) => items.map((x) => x.id);

export function caseworkRows(ctx: Ctx): Rows {
  const fx = fixtures(ctx);
  const tech = () => ctx.as('technologist');

  const sharedPatient = once(() => fx.patient());
  const sharedCase = once(() => fx.receivedCase());
  const sharedMeasured = once(() => fx.measurement());
  const sharedUpload = once(() => fx.plateUpload());
  const sharedMap = once(() => fx.plateMap());
  const sharedAwaiting = once(() => fx.awaitingReview());
  const withProtein = once(() => fx.caseWithProtein());

  const patientFor = perCall(() => fx.patient());
  const caseFor = perCall(() => fx.receivedCase());
  const proteinCaseFor = perCall(() => fx.caseWithProtein());
  const measurementFor = perCall(() => fx.measurement());
  const mapFor = perCall(() => fx.plateMap());
  const readyFor = perCall(() => fx.caseWithAssays());
  const excludedFor = perCall(async () => {
    const m = await fx.measurement();
    const res = ok(await tech().post(`/api/measurements/${m.id}/exclude`).send({ reason: 'Bubble in the cuvette (matrix)', version: m.version }), 200, 'exclude');
    return { ...m, version: res.body.version as number };
  });

  /** The seeded demo runs (22 of them), read through the API. */
  const demoRuns = once(
    async () => ok(await tech().get('/api/runs?pageSize=100'), 200, 'runs').body.items as { id: number; runNumber: string; qcStatus: string; override: unknown }[],
  );

  return {
    'GET /api/patients/search': {
      status: 200,
      // A seeded demo patient (server/db/seed/demo-cases.ts: DEMO-0001, an invented person).
      call: async () => ({
        send: (c) => c.get('/api/patients/search?q=Quillfeather'),
        check: (res) => expect(res.body.items.map((p: { labPatientId: string }) => p.labPatientId)).toContain('DEMO-0001'),
      }),
    },
    'POST /api/patients': {
      status: 201,
      call: async () => {
        const input = buildPatientInput();
        return {
          send: (c) => c.post('/api/patients').send(input),
          check: (res) => expect(res.body).toMatchObject({ id: expect.any(Number), labPatientId: input.labPatientId }),
        };
      },
    },
    'GET /api/patients/:id': {
      status: 200,
      call: async () => {
        const p = await sharedPatient();
        return { send: (c) => c.get(`/api/patients/${p.id}`), check: (res) => expect(res.body).toMatchObject({ id: p.id, labPatientId: p.labPatientId }) };
      },
    },
    'PATCH /api/patients/:id': {
      status: 200,
      call: async (_caller, permitted) => {
        const p = await patientFor(permitted);
        return {
          send: (c) => c.patch(`/api/patients/${p.id}`).send({ givenName: 'Corrected', version: p.version }),
          check: (res) => expect(res.body).toMatchObject({ id: p.id, givenName: 'Corrected', version: p.version + 1 }),
        };
      },
    },
    'GET /api/cases': {
      status: 200,
      call: async () => ({
        send: (c) => c.get('/api/cases?q=DEMO-0001'),
        check: (res) => {
          expect(res.body.total).toBeGreaterThan(0);
          expect(res.body.items[0].patientName).toMatch(/Quillfeather/);
        },
      }),
    },
    'POST /api/cases': {
      status: 201,
      call: async (_caller, permitted) => {
        const p = await patientFor(permitted);
        const input = buildRegisterCaseInput(p.id, ctx.clinicianId());
        return {
          send: (c) => c.post('/api/cases').send(input),
          // Accession CR-YYYY-NNNNN (docs/api.md, "Registry").
          check: (res) => expect(res.body).toMatchObject({ id: expect.any(Number), accession: expect.stringMatching(/^CR-\d{4}-\d{5}$/), state: 'received' }),
        };
      },
    },
    'GET /api/cases/:id': {
      status: 200,
      call: async () => {
        const c0 = await sharedCase();
        return { send: (c) => c.get(`/api/cases/${c0.id}`), check: (res) => expect(res.body).toMatchObject({ id: c0.id, accession: c0.accession }) };
      },
    },
    'PATCH /api/cases/:id': {
      status: 200,
      call: async (_caller, permitted) => {
        const c0 = await caseFor(permitted);
        return {
          send: (c) => c.patch(`/api/cases/${c0.id}`).send({ priority: 'urgent', version: c0.version }),
          check: (res) => expect(res.body).toMatchObject({ id: c0.id, priority: 'urgent' }),
        };
      },
    },
    'POST /api/cases/:id/cancel': {
      status: 200,
      call: async (_caller, permitted) => {
        const c0 = await caseFor(permitted);
        return {
          send: (c) => c.post(`/api/cases/${c0.id}/cancel`).send({ reason: 'Referral withdrawn (matrix)', version: c0.version }),
          check: (res) => expect(res.body).toMatchObject({ id: c0.id, state: 'cancelled' }),
        };
      },
    },
    'GET /api/cases/:id/history': {
      status: 200,
      call: async () => {
        const c0 = await sharedCase();
        return {
          send: (c) => c.get(`/api/cases/${c0.id}/history`),
          check: (res) => expect(res.body.items.map((e: { action: string }) => e.action)).toContain('create'),
        };
      },
    },
    'POST /api/cases/:id/specimens': {
      status: 201,
      call: async (_caller, permitted) => {
        const c0 = await caseFor(permitted);
        const input = buildSpecimenInput({ type: 'liver', source: 'Liver, needle biopsy (matrix)' });
        return {
          send: (c) => c.post(`/api/cases/${c0.id}/specimens`).send(input),
          check: (res) => expect(res.body).toMatchObject({ id: expect.any(Number), type: 'liver', source: input.source }),
        };
      },
    },
    'PATCH /api/specimens/:id': {
      status: 200,
      call: async (_caller, permitted) => {
        const s = (await caseFor(permitted)).specimens[0]!;
        return {
          send: (c) => c.patch(`/api/specimens/${s.id}`).send({ wetWeightMg: 52, version: s.version }),
          check: (res) => expect(res.body).toMatchObject({ id: s.id, wetWeightMg: 52 }),
        };
      },
    },
    'GET /api/rejection-reasons': {
      status: 200,
      // The seeded starter list (server/db/seed/demo-cases.ts).
      call: async () => ({
        send: (c) => c.get('/api/rejection-reasons'),
        check: (res) => expect(JSON.stringify(res.body)).toContain('Thawed in transit'),
      }),
    },
    'POST /api/rejection-reasons': {
      status: 201,
      call: async () => {
        const text = `Container cracked on arrival (matrix ${nextSerial()})`;
        return { send: (c) => c.post('/api/rejection-reasons').send({ text }), check: (res) => expect(res.body).toMatchObject({ text }) };
      },
    },
    'GET /api/cases/:id/workup': {
      status: 200,
      call: async () => {
        const m = await sharedMeasured();
        return {
          send: (c) => c.get(`/api/cases/${m.caseId}/workup`),
          check: (res) => {
            expect(res.body).toMatchObject({ caseId: m.caseId, accession: m.accession, editable: true });
            expect(ids(res.body.measurements)).toContain(m.id);
          },
        };
      },
    },
    'GET /api/cases/:id/measurements': {
      status: 200,
      call: async () => {
        const m = await sharedMeasured();
        return { send: (c) => c.get(`/api/cases/${m.caseId}/measurements`), check: (res) => expect(ids(res.body.items)).toContain(m.id) };
      },
    },
    'POST /api/cases/:id/measurements/preview': {
      status: 200,
      call: async () => {
        const c0 = await withProtein();
        return {
          send: (c) => c.post(`/api/cases/${c0.caseId}/measurements/preview`).send({ ...ciRates(c0.specimenId) }),
          check: (res) => expect(res.body.result.activity).toBeCloseTo(CI_RATES_ACTIVITY, 1),
        };
      },
    },
    'POST /api/cases/:id/measurements': {
      status: 201,
      call: async (_caller, permitted) => {
        const c0 = await proteinCaseFor(permitted);
        return {
          send: (c) => c.post(`/api/cases/${c0.caseId}/measurements`).send(ciRates(c0.specimenId)),
          check: (res) => {
            expect(res.body).toMatchObject({ id: expect.any(Number), specimenId: c0.specimenId, assay: 'CI' });
            expect(res.body.activity).toBeCloseTo(CI_RATES_ACTIVITY, 1);
          },
        };
      },
    },
    'PUT /api/measurements/:id': {
      status: 200,
      call: async (_caller, permitted) => {
        const m = await measurementFor(permitted);
        // Total rate doubled to −0.0548: ΔA/min −0.0496, twice the activity [derived from the same factor].
        const { specimenId: _s, assay: _a, ...rates } = ciRates(m.specimenId);
        return {
          send: (c) => c.put(`/api/measurements/${m.id}`).send({ ...rates, totalRatePerMin: -0.0548, version: m.version }),
          check: (res) => {
            expect(res.body).toMatchObject({ id: m.id, version: m.version + 1 });
            expect(res.body.activity).toBeCloseTo(2 * CI_RATES_ACTIVITY, 1);
          },
        };
      },
    },
    'DELETE /api/measurements/:id': {
      status: 204,
      call: async (_caller, permitted) => {
        const m = await measurementFor(permitted);
        return {
          send: (c) => c.delete(`/api/measurements/${m.id}?version=${m.version}`),
          check: async () => expect(ids(ok(await tech().get(`/api/cases/${m.caseId}/measurements`), 200, 'list').body.items)).not.toContain(m.id),
        };
      },
    },
    'POST /api/measurements/:id/exclude': {
      status: 200,
      call: async (_caller, permitted) => {
        const m = await measurementFor(permitted);
        return {
          send: (c) => c.post(`/api/measurements/${m.id}/exclude`).send({ reason: 'Air bubble seen (matrix)', version: m.version }),
          check: (res) => expect(res.body).toMatchObject({ id: m.id, excluded: { reason: 'Air bubble seen (matrix)' } }),
        };
      },
    },
    'POST /api/measurements/:id/include': {
      status: 200,
      call: async (_caller, permitted) => {
        const m = await excludedFor(permitted);
        return {
          send: (c) => c.post(`/api/measurements/${m.id}/include`).send({ version: m.version }),
          check: (res) => expect(res.body).toMatchObject({ id: m.id, excluded: null }),
        };
      },
    },
    'POST /api/protein-curves/preview': {
      status: 200,
      // Standards on the line A = 0.05 + 0.5·c; the unknown 0.55 reads 1.0 mg/mL, ×2 dilution = 2.0 [derived].
      call: async () => ({
        send: (c) =>
          c.post('/api/protein-curves/preview').send({
            method: 'BCA (matrix)',
            model: 'linear',
            standards: [0, 0.5, 1, 1.5, 2].map((conc) => ({ concentrationMgPerMl: conc, absorbance: 0.05 + 0.5 * conc })),
            unknownAbsorbances: [0.55],
            dilutionFactor: 2,
          }),
        check: (res) => expect(res.body.mgPerMl).toBeCloseTo(2.0, 6),
      }),
    },
    'PUT /api/specimens/:id/protein': {
      status: 200,
      call: async (_caller, permitted) => {
        const s = (await caseFor(permitted)).specimens[0]!;
        return {
          send: (c) => c.put(`/api/specimens/${s.id}/protein`).send({ kind: 'direct', proteinMgPerMl: 3.5, proteinSource: 'BCA (matrix)', version: s.version }),
          check: (res) => expect(res.body).toMatchObject({ id: s.id, proteinMgPerMl: 3.5 }),
        };
      },
    },
    'POST /api/cases/:id/plate-uploads/preview': {
      status: 200,
      call: async () => {
        const c0 = await withProtein();
        return {
          send: (c) => fx.sendPlate(c, `/api/cases/${c0.caseId}/plate-uploads/preview`, fx.plateFile()),
          check: (res) => expect(res.body.groups.map((g: { specimenId: number }) => g.specimenId)).toEqual([c0.specimenId]),
        };
      },
    },
    'POST /api/cases/:id/plate-uploads': {
      status: 201,
      call: async (_caller, permitted) => {
        const c0 = await proteinCaseFor(permitted);
        const file = fx.plateFile();
        return {
          send: (c) => fx.sendPlate(c, `/api/cases/${c0.caseId}/plate-uploads`, file),
          check: (res) => {
            expect(res.body.upload.sha256).toBe(sha256(file));
            expect(res.body.measurementIds).toHaveLength(1);
          },
        };
      },
    },
    'GET /api/cases/:id/uploads': {
      status: 200,
      call: async () => {
        const u = await sharedUpload();
        return { send: (c) => c.get(`/api/cases/${u.caseId}/uploads`), check: (res) => expect(ids(res.body.items)).toContain(u.uploadId) };
      },
    },
    'GET /api/uploads/:id/download': {
      status: 200,
      call: async () => {
        const u = await sharedUpload();
        return { send: (c) => binary(c.get(`/api/uploads/${u.uploadId}/download`)), check: (res) => expect(sha256(res.body)).toBe(sha256(u.file)) };
      },
    },
    'GET /api/plate-maps': {
      status: 200,
      call: async () => {
        const m = await sharedMap();
        return { send: (c) => c.get('/api/plate-maps'), check: (res) => expect(ids(res.body.items)).toContain(m.id) };
      },
    },
    'GET /api/plate-maps/:id': {
      status: 200,
      call: async () => {
        const m = await sharedMap();
        return { send: (c) => c.get(`/api/plate-maps/${m.id}`), check: (res) => expect(res.body).toMatchObject({ id: m.id, wells: expect.any(Array) }) };
      },
    },
    'POST /api/plate-maps': {
      status: 201,
      call: async () => {
        const name = `Matrix layout ${nextSerial()}`;
        const wells = [{ well: 'B1', specimenRef: 'S1', assay: 'CS', role: 'total', replicate: 1 }];
        return { send: (c) => c.post('/api/plate-maps').send({ name, wells }), check: (res) => expect(res.body).toMatchObject({ id: expect.any(Number), name }) };
      },
    },
    'PATCH /api/plate-maps/:id': {
      status: 200,
      call: async (_caller, permitted) => {
        const m = await mapFor(permitted);
        return {
          send: (c) => c.patch(`/api/plate-maps/${m.id}`).send({ description: 'Edited (matrix)', version: m.version }),
          check: (res) => expect(res.body).toMatchObject({ id: m.id, description: 'Edited (matrix)', version: m.version + 1 }),
        };
      },
    },
    'DELETE /api/plate-maps/:id': {
      status: 204,
      call: async (_caller, permitted) => {
        const m = await mapFor(permitted);
        return {
          send: (c) => c.delete(`/api/plate-maps/${m.id}?version=${m.version}`),
          check: async () => expect((await tech().get(`/api/plate-maps/${m.id}`)).status).toBe(404),
        };
      },
    },
    'GET /api/cases/:id/results': {
      status: 200,
      call: async () => {
        const c0 = await sharedAwaiting();
        return {
          send: (c) => c.get(`/api/cases/${c0.id}/results`),
          // The factory's hand-worked CI activity, typed back through the published factor.
          check: (res) => {
            const ci = res.body.specimens[0].assays.find((a: { assay: string }) => a.assay === 'CI');
            expect(ci.activity.value).toBeCloseTo(isolatedComplexI.CI, 6);
          },
        };
      },
    },
    'POST /api/cases/:id/submit': {
      status: 200,
      call: async (_caller, permitted) => {
        const c0 = await readyFor(permitted);
        return {
          send: (c) => c.post(`/api/cases/${c0.id}/submit`).send({ version: c0.version }),
          check: async () => expect((await fx.caseOf(c0.id)).state).toBe('awaiting_review'),
        };
      },
    },
    'GET /api/runs': {
      status: 200,
      // The demo seed's 22 daily quality-control runs (server/db/seed/demo-runs.ts).
      call: async () => ({ send: (c) => c.get('/api/runs?pageSize=100'), check: (res) => expect(res.body.total).toBeGreaterThanOrEqual(22) }),
    },
    'GET /api/runs/open-specimens': {
      status: 200,
      call: async () => {
        const c0 = await withProtein();
        return {
          send: (c) => c.get('/api/runs/open-specimens'),
          check: (res) => expect(res.body.items.map((s: { specimenId: number }) => s.specimenId)).toContain(c0.specimenId),
        };
      },
    },
    'GET /api/runs/:id': {
      status: 200,
      call: async () => {
        const run = (await demoRuns())[0]!;
        return { send: (c) => c.get(`/api/runs/${run.id}`), check: (res) => expect(res.body).toMatchObject({ id: run.id, runNumber: run.runNumber }) };
      },
    },
    'POST /api/runs/preview': {
      status: 200,
      call: async () => {
        const c0 = await withProtein();
        return {
          send: (c) => fx.sendRun(c, '/api/runs/preview', c0.specimenId),
          check: (res) => expect(JSON.stringify(res.body.groups)).toContain(`"specimenId":${c0.specimenId}`),
        };
      },
    },
    'POST /api/runs': {
      status: 201,
      call: async (_caller, permitted) => {
        const c0 = await proteinCaseFor(permitted);
        return {
          send: (c) => fx.sendRun(c, '/api/runs', c0.specimenId),
          check: (res) => {
            expect(res.body.run.id).toEqual(expect.any(Number));
            expect(res.body.measurementIds).toHaveLength(1);
          },
        };
      },
    },
    'POST /api/runs/:id/override': {
      status: 200,
      // The demo's run rejected by 1-3s and never released (demo-runs.ts: run 16); one permitted caller, the director.
      call: async () => {
        const run = (await demoRuns()).find((r) => r.qcStatus === 'reject' && r.override === null)!;
        const reason = 'Control re-assayed from a fresh aliquot within limits (matrix)';
        return {
          send: (c) => c.post(`/api/runs/${run.id}/override`).send({ reason, password: DEMO_PASSWORD }),
          check: (res) => expect(JSON.stringify(res.body)).toContain(reason),
        };
      },
    },
  };
}

