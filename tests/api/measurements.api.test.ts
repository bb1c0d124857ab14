import { linearRegression } from 'simple-statistics';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { measurementSchema, type CreateMeasurementInput } from '@/schemas/measurement';
import { buildSpecimenInput, createCase } from '../factories/cases';
import { cuvette, recordDirectProtein } from '../factories/measurements';
import { makeAppWithLabStaff, type Agent } from '../setup/lab-staff';
import { countRows, type TestApp } from '../setup/test-app';

let t: TestApp;
let tech: Agent;
let director: Agent;
beforeAll(async () => {
  ({ t, tech, director } = await makeAppWithLabStaff());
});
afterAll(() => t.close());

// cuvette: 1 mL reaction, 1 cm, 10 µL of a 4 mg/mL homogenate: 40 µg protein in the cuvette, as in the domain worked check.

/** A received case with one accepted muscle specimen whose protein is recorded (typed in). */
async function caseWithProtein(proteinMgPerMl = 4) {
  const c = await createCase(tech);
  const specimen = c.specimens[0]!;
  const res = await recordDirectProtein(tech, specimen, proteinMgPerMl, 'BCA, read elsewhere (test)');
  expect(res.status).toBe(200);
  return { caseId: c.id, specimenId: specimen.id, specimenVersion: res.body.version as number };
}

function rates(specimenId: number, extra: Partial<CreateMeasurementInput> = {}): CreateMeasurementInput {
  return { mode: 'rates', specimenId, assay: 'CI', replicate: 1, ...cuvette, totalRatePerMin: -0.03, backgroundRatePerMin: -0.0052, ...extra } as CreateMeasurementInput;
}

const line = (a0: number, perMin: number, n = 30, dt = 10) => Array.from({ length: n }, (_, i) => ({ t: i * dt, a: a0 + (perMin * i * dt) / 60 }));

describe('typed rates', () => {
  it('when a technologist saves CI rates on a received case, then the activity follows the published formula and the case is in assay', async () => {
    const { caseId, specimenId } = await caseWithProtein(4);
    const res = await tech.post(`/api/cases/${caseId}/measurements`).send(rates(specimenId));
    expect(res.status).toBe(201);
    const m = measurementSchema.parse(res.body);
    // Worked check [derived], docs/domain.md §1: 0.0248 ΔA/min × 4032.3 (CI, 40 µg in 1 mL, 1 cm) = 100.0.
    expect(m.activity).toBeCloseTo(100.0, 1);
    expect(m.inputMode).toBe('rates');
    expect(m.definitionVersion).toBe(1);
    expect((await tech.get(`/api/cases/${caseId}`)).body.state).toBe('in_assay');
    const audit = await director.get(`/api/audit?caseId=${caseId}`);
    expect(audit.body.items.map((e: { action: string; entity: string }) => `${e.action} ${e.entity}`)).toEqual(
      expect.arrayContaining(['create measurement', 'state-change case']),
    );
  });

  it('when the preview is asked for, then it answers the same number and stores nothing', async () => {
    const { caseId, specimenId } = await caseWithProtein(4);
    const before = await Promise.all(['measurements', 'audit_events'].map((x) => countRows(t.sequelize, x)));
    const res = await tech.post(`/api/cases/${caseId}/measurements/preview`).send(rates(specimenId));
    expect(res.status).toBe(200);
    expect(res.body.result.activity).toBeCloseTo(100.0, 1);
    expect(res.body.proteinMgPerMl).toBe(4);
    expect(await Promise.all(['measurements', 'audit_events'].map((x) => countRows(t.sequelize, x)))).toEqual(before);
    expect((await tech.get(`/api/cases/${caseId}`)).body.state).toBe('received');
  });

  it('when the rate runs the wrong way, then the measurement is saved with no activity and the WRONG_SIGN flag', async () => {
    const { caseId, specimenId } = await caseWithProtein();
    const res = await tech.post(`/api/cases/${caseId}/measurements`).send(rates(specimenId, { totalRatePerMin: 0.02, backgroundRatePerMin: 0 }));
    expect(res.status).toBe(201);
    expect(res.body.activity).toBeNull();
    expect(res.body.flags.map((f: { code: string }) => f.code)).toContain('WRONG_SIGN');
  });

  it('when the same replicate is saved twice, then the second gets 409 naming the replicate', async () => {
    const { caseId, specimenId } = await caseWithProtein();
    expect((await tech.post(`/api/cases/${caseId}/measurements`).send(rates(specimenId))).status).toBe(201);
    const again = await tech.post(`/api/cases/${caseId}/measurements`).send(rates(specimenId));
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe('CONFLICT');
    expect(again.body.error.fields.replicate).toMatch(/Replicate 1 of CI is already saved/);
  });

  it('when the sample volume exceeds the reaction volume, then 400 names sampleVolumeUl', async () => {
    const { caseId, specimenId } = await caseWithProtein();
    const res = await tech.post(`/api/cases/${caseId}/measurements`).send(rates(specimenId, { sampleVolumeUl: 2000 }));
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('VALIDATION_FAILED');
    expect(Object.keys(res.body.error.fields)).toContain('sampleVolumeUl');
  });

  it('when the specimen has no protein yet, then 400 names specimenId and asks for the protein first', async () => {
    const c = await createCase(tech);
    const res = await tech.post(`/api/cases/${c.id}/measurements`).send(rates(c.specimens[0]!.id));
    expect(res.status).toBe(400);
    expect(res.body.error.fields.specimenId).toMatch(/protein/);
  });

  it('when the specimen was rejected on receipt, then 400 says no assays are recorded on it', async () => {
    const c = await createCase(tech, { specimen: buildSpecimenInput({ accepted: false, rejectionReason: 'Thawed in transit' }) });
    const res = await tech.post(`/api/cases/${c.id}/measurements`).send(rates(c.specimens[0]!.id));
    expect(res.status).toBe(400);
    expect(res.body.error.fields.specimenId).toMatch(/rejected/);
  });

  it('when the specimen belongs to another case, then 400 names specimenId', async () => {
    const a = await caseWithProtein();
    const b = await caseWithProtein();
    const res = await tech.post(`/api/cases/${a.caseId}/measurements`).send(rates(b.specimenId));
    expect(res.status).toBe(400);
    expect(res.body.error.fields.specimenId).toMatch(/not a specimen of this case/);
  });

  it('when a clinician or an admin tries to enter a result, then 403', async () => {
    const { caseId, specimenId } = await caseWithProtein();
    for (const role of ['clinician', 'admin'] as const) {
      const res = await (await t.signedIn(role)).post(`/api/cases/${caseId}/measurements`).send(rates(specimenId));
      expect(res.status).toBe(403);
      expect(res.body.error.code).toBe('FORBIDDEN');
    }
  });
});

describe('pasted readings', () => {
  it('when readings are pasted with a manual window, then only the window is fitted', async () => {
    const { caseId, specimenId } = await caseWithProtein(4);
    // CIII rises [confirmed] consensus table. A straight early stretch (0.03/min) that flattens after 150 s.
    const total = line(0.2, 0.03, 30).map((p) => (p.t > 150 ? { t: p.t, a: 0.2 + (0.03 * 150) / 60 } : p));
    const body = { mode: 'traces', specimenId, assay: 'CIII', replicate: 1, ...cuvette, total, background: line(0.2, 0.002, 30), window: { fromS: 0, toS: 150 } };
    const res = await tech.post(`/api/cases/${caseId}/measurements`).send(body);
    expect(res.status).toBe(201);
    // activity = (0.03 − 0.002) × 1000 × 1000 / (18.5 × 1 × 10 × 4) [derived, docs/domain.md §1 formula]
    expect(res.body.activity).toBeCloseTo((0.028 * 1000 * 1000) / (18.5 * 1 * 10 * 4), 6);
    expect(res.body.result.window).toEqual({ fromS: 0, toS: 150 });
    expect(res.body.result.windowAuto).toBe(false);
  });

  it('when fewer than 3 readings are pasted, then 400 names the total readings', async () => {
    const { caseId, specimenId } = await caseWithProtein();
    const body = { mode: 'traces', specimenId, assay: 'CIV', replicate: 1, ...cuvette, total: line(0.9, -0.05, 2), background: null, window: null };
    const res = await tech.post(`/api/cases/${caseId}/measurements`).send(body);
    expect(res.status).toBe(400);
    expect(res.body.error.fields.total).toMatch(/at least 3 readings/);
  });
});

describe('changing a saved measurement', () => {
  it('when two people save the same measurement, then the second (stale version) gets 409 STALE_VERSION and the first stays', async () => {
    const { caseId, specimenId } = await caseWithProtein(4);
    const created = measurementSchema.parse((await tech.post(`/api/cases/${caseId}/measurements`).send(rates(specimenId))).body);
    const change = (total: number) => ({ mode: 'rates', ...cuvette, totalRatePerMin: total, backgroundRatePerMin: -0.0052, version: created.version });
    const first = await tech.put(`/api/measurements/${created.id}`).send(change(-0.04));
    expect(first.status).toBe(200);
    const second = await director.put(`/api/measurements/${created.id}`).send(change(-0.05));
    expect(second.status).toBe(409);
    expect(second.body.error.code).toBe('STALE_VERSION');
    const list = await tech.get(`/api/cases/${caseId}/measurements`);
    const saved = list.body.items.find((m: { id: number }) => m.id === created.id);
    expect(saved.inputs.totalRatePerMin).toBe(-0.04);
    expect(saved.version).toBe(created.version + 1);
  });

  it('when a measurement is deleted with its version, then it is gone; with an old version, 409', async () => {
    const { caseId, specimenId } = await caseWithProtein();
    const m = measurementSchema.parse((await tech.post(`/api/cases/${caseId}/measurements`).send(rates(specimenId))).body);
    expect((await tech.delete(`/api/measurements/${m.id}?version=${m.version + 3}`)).status).toBe(409);
    expect((await tech.delete(`/api/measurements/${m.id}?version=${m.version}`)).status).toBe(204);
    expect((await tech.get(`/api/cases/${caseId}/measurements`)).body.items).toEqual([]);
  });

  it('when the mode is changed by an update, then 400 names mode', async () => {
    const { caseId, specimenId } = await caseWithProtein();
    const m = measurementSchema.parse((await tech.post(`/api/cases/${caseId}/measurements`).send(rates(specimenId))).body);
    const res = await tech.put(`/api/measurements/${m.id}`).send({ mode: 'plate', window: null, version: m.version });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.mode).toMatch(/typed rates/);
  });
});

describe('protein from a standard curve', () => {
  // Invented standards on A = 0.06 + 0.52·c with small invented scatter.
  const standards = [
    { concentrationMgPerMl: 0, absorbance: 0.061 },
    { concentrationMgPerMl: 0.25, absorbance: 0.188 },
    { concentrationMgPerMl: 0.5, absorbance: 0.318 },
    { concentrationMgPerMl: 1, absorbance: 0.582 },
    { concentrationMgPerMl: 1.5, absorbance: 0.838 },
    { concentrationMgPerMl: 2, absorbance: 1.099 },
  ];
  const curve = { kind: 'curve', method: 'BCA', model: 'linear', standards, unknownAbsorbances: [0.44, 0.452], dilutionFactor: 10 };

  it('when standards and an unknown are saved, then protein = (Ā − intercept) / slope × dilution and the curve is kept', async () => {
    const c = await createCase(tech);
    const s = c.specimens[0]!;
    const res = await tech.put(`/api/specimens/${s.id}/protein`).send({ ...curve, version: s.version });
    expect(res.status).toBe(200);
    // Reference: least-squares line by simple-statistics (npm) [common practice], read back and × dilution.
    const { m, b } = linearRegression(standards.map((x) => [x.concentrationMgPerMl, x.absorbance]));
    const expected = ((0.446 - b) / m) * 10;
    expect(res.body.proteinMgPerMl).toBeCloseTo(expected, 9);
    expect(res.body.proteinDetails.kind).toBe('curve');
    expect(res.body.proteinDetails.input.standards).toHaveLength(6);
    expect(res.body.proteinSource).toMatch(/BCA, linear standard curve of 6 standards/);
    expect(res.body.version).toBe(s.version + 1);
    const workup = await tech.get(`/api/cases/${c.id}/workup`);
    expect(workup.body.specimens[0].proteinDetails.result.mgPerMl).toBeCloseTo(expected, 9);
  });

  it('when the same specimen is saved twice from the same version, then the second gets 409 STALE_VERSION', async () => {
    const c = await createCase(tech);
    const s = c.specimens[0]!;
    expect((await tech.put(`/api/specimens/${s.id}/protein`).send({ ...curve, version: s.version })).status).toBe(200);
    const stale = await tech.put(`/api/specimens/${s.id}/protein`).send({ ...curve, dilutionFactor: 20, version: s.version });
    expect(stale.status).toBe(409);
    expect(stale.body.error.code).toBe('STALE_VERSION');
  });

  it('when the unknown reads above the highest standard, then 400 names unknownAbsorbances and nothing is saved', async () => {
    const c = await createCase(tech);
    const s = c.specimens[0]!;
    const res = await tech.put(`/api/specimens/${s.id}/protein`).send({ ...curve, unknownAbsorbances: [1.6], version: s.version });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.unknownAbsorbances).toMatch(/above the highest standard/);
    expect((await tech.get(`/api/cases/${c.id}`)).body.specimens[0].proteinMgPerMl).toBeNull();
  });

  it('when the preview is asked for, then it answers the curve and the value without storing', async () => {
    const before = await countRows(t.sequelize, 'audit_events');
    const { kind: _k, ...input } = curve;
    const res = await tech.post('/api/protein-curves/preview').send(input);
    expect(res.status).toBe(200);
    expect(res.body.usable).toBe(true);
    expect(res.body.r2).toBeGreaterThan(0.99);
    expect(await countRows(t.sequelize, 'audit_events')).toBe(before);
  });

  it('when the protein changes after assays were saved, then each activity is recomputed in inverse proportion', async () => {
    const { caseId, specimenId, specimenVersion } = await caseWithProtein(4);
    const m = measurementSchema.parse((await tech.post(`/api/cases/${caseId}/measurements`).send(rates(specimenId))).body);
    const res = await tech.put(`/api/specimens/${specimenId}/protein`).send({ kind: 'direct', proteinMgPerMl: 5, proteinSource: 'Re-read (test)', version: specimenVersion });
    expect(res.status).toBe(200);
    const after = (await tech.get(`/api/cases/${caseId}/measurements`)).body.items[0];
    // activity ∝ 1 / protein [derived, docs/domain.md §1 formula]
    expect(after.activity).toBeCloseTo((m.activity! * 4) / 5, 9);
    expect(after.version).toBe(m.version + 1);
  });
});

describe('after submission for review', () => {
  it('when results are submitted, then adding, changing or deleting a measurement, or the protein, gets 409 INVALID_STATE', async () => {
    const { caseId, specimenId, specimenVersion } = await caseWithProtein(4);
    const m = measurementSchema.parse((await tech.post(`/api/cases/${caseId}/measurements`).send(rates(specimenId))).body);
    const detail = (await tech.get(`/api/cases/${caseId}`)).body;
    expect((await tech.post(`/api/cases/${caseId}/submit`).send({ version: detail.version })).status).toBe(200);

    const add = await tech.post(`/api/cases/${caseId}/measurements`).send(rates(specimenId, { replicate: 2 }));
    const change = await tech.put(`/api/measurements/${m.id}`).send({ mode: 'rates', ...cuvette, totalRatePerMin: -0.05, backgroundRatePerMin: 0, version: m.version });
    const remove = await tech.delete(`/api/measurements/${m.id}?version=${m.version}`);
    const protein = await tech.put(`/api/specimens/${specimenId}/protein`).send({ kind: 'direct', proteinMgPerMl: 3, proteinSource: 'late change', version: specimenVersion });
    for (const res of [add, change, remove, protein]) {
      expect(res.status).toBe(409);
      expect(res.body.error.code).toBe('INVALID_STATE');
    }
  });
});
