import { mean, sampleStandardDeviation } from 'simple-statistics';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { AssayDefinition } from '@/schemas/assay';
import type { AssayCode } from '@/schemas/common';
import { measurementSchema, type Measurement } from '@/schemas/measurement';
import { caseResultsSchema, type AssayResult, type CaseResults } from '@/schemas/results';
import { createCase } from '../factories/cases';
import { recordDirectProtein } from '../factories/measurements';
import { WORKUP_PROTEIN_MG_PER_ML, currentDefinitions, isolatedComplexI, ratesFor } from '../factories/workup';
import type { Agent } from '../setup/lab-staff';
import { readPdf } from '../factories/pdf-text';
import { DEMO_PASSWORD, countRows, makeTestApp, type TestApp } from '../setup/test-app';

/*
 * Leaving a replicate out instead of deleting it, and changing a saved measurement.
 *
 * Expected numbers never come from Cristae's own code: each replicate's activity is the value the typed rate was
 * worked back from with the Beer–Lambert relation of docs/domain.md §1 [derived], and the mean, sample SD and CV
 * of the replicates that still count come from simple-statistics, an independent library. Ratios are the
 * replicate means divided [derived, docs/domain.md §2: activities relative to CS and to CII].
 */

let t: TestApp;
let tech: Agent;
let director: Agent;
let clinician: Agent;
let admin: Agent;
let defs: Map<AssayCode, AssayDefinition>;
beforeAll(async () => {
  t = await makeTestApp();
  [tech, director, clinician, admin] = await Promise.all([
    t.signedIn('technologist'),
    t.signedIn('director'),
    t.signedIn('clinician'),
    t.signedIn('admin'),
  ]);
  defs = new Map((await currentDefinitions(tech)).map((d) => [d.code, d]));
});
afterAll(() => t.close());

/*
 * An invented muscle profile with complex I low against CS and CII (isolated complex I), where complex I and CS
 * each carry one wild replicate (a bubble in the cuvette, say). Counted, the wild complex I replicate lifts the
 * complex I mean near the usual control value (37) and hides the defect; left out, the defect shows.
 */
const CI_REPS = [6, 6.6, 120];
const CS_REPS = [150, 156, 400];

type Workup = { caseId: number; specimenId: number; byKey: Map<string, Measurement> };

async function workupWithWildReplicates(): Promise<Workup> {
  const c = await createCase(tech);
  const specimen = c.specimens[0]!;
  expect((await recordDirectProtein(tech, specimen, WORKUP_PROTEIN_MG_PER_ML, 'BCA assay (fixture)')).status).toBe(200);
  const byKey = new Map<string, Measurement>();
  const save = async (assay: AssayCode, value: number, replicate: number) => {
    const res = await tech.post(`/api/cases/${c.id}/measurements`).send(ratesFor(defs.get(assay)!, value, specimen.id, replicate));
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    byKey.set(`${assay}#${replicate}`, measurementSchema.parse(res.body));
  };
  for (const [assay, value] of Object.entries(isolatedComplexI) as [AssayCode, number][]) {
    const reps = assay === 'CI' ? CI_REPS : assay === 'CS' ? CS_REPS : [value];
    for (let i = 0; i < reps.length; i += 1) await save(assay, reps[i]!, i + 1);
  }
  return { caseId: c.id, specimenId: specimen.id, byKey };
}

async function results(caseId: number): Promise<CaseResults> {
  const res = await tech.get(`/api/cases/${caseId}/results`);
  expect(res.status).toBe(200);
  return caseResultsSchema.parse(res.body);
}

const assayOf = (r: CaseResults, assay: AssayCode): AssayResult => r.specimens[0]!.assays.find((a) => a.assay === assay)!;

/** Mean, sample SD and CV% by simple-statistics. */
function stats(values: number[]) {
  const m = mean(values);
  const sd = sampleStandardDeviation(values);
  return { mean: m, sd, cvPct: (100 * sd) / m };
}

function expectSummary(a: AssayResult, values: number[]) {
  const s = stats(values);
  expect(a.n).toBe(values.length);
  expect(a.mean!).toBeCloseTo(s.mean, 6);
  expect(a.sd!).toBeCloseTo(s.sd, 6);
  expect(a.cvPct!).toBeCloseTo(s.cvPct, 6);
}

function exclude(agent: Agent, m: { id: number; version: number }, reason: unknown) {
  return agent.post(`/api/measurements/${m.id}/exclude`).send({ reason, version: m.version });
}

async function auditOf(measurementId: number) {
  const res = await director.get(`/api/audit?entity=measurement&entityId=${measurementId}`);
  expect(res.status).toBe(200);
  return res.body.items as { action: string; before: Record<string, unknown> | null; after: Record<string, unknown> | null; note: string | null; actorEmail: string }[];
}

describe('excluding a replicate', () => {
  it('when a wild replicate is excluded, then mean, SD, CV, ratios and pattern follow the remaining replicates; included again, they come back', async () => {
    const w = await workupWithWildReplicates();
    const CII = isolatedComplexI.CII;

    // Every replicate counted.
    const before = await results(w.caseId);
    expectSummary(assayOf(before, 'CI'), CI_REPS);
    expectSummary(assayOf(before, 'CS'), CS_REPS);
    expect(assayOf(before, 'CI').ratioCs!.value!).toBeCloseTo(mean(CI_REPS) / mean(CS_REPS), 9);
    expect(assayOf(before, 'CI').ratioCii!.value!).toBeCloseTo(mean(CI_REPS) / CII, 9);
    // Counted, the wild CS replicate raises the CS mean (mean of 150, 156, 400 ≈ 235) and the complex I defect
    // is hidden behind it.
    expect(before.specimens[0]!.pattern!.code).toContain('raised_cs');
    expect(before.specimens[0]!.pattern!.code).not.toContain('isolated:CI');

    // The wild complex I and CS replicates left out, by a technologist and a director.
    const ci3 = w.byKey.get('CI#3')!;
    const cs3 = w.byKey.get('CS#3')!;
    const outCi = await exclude(tech, ci3, 'Air bubble in the cuvette: trace jumped at 40 s');
    expect(outCi.status, JSON.stringify(outCi.body)).toBe(200);
    const excludedCi = measurementSchema.parse(outCi.body);
    expect(excludedCi.excluded).toMatchObject({ reason: 'Air bubble in the cuvette: trace jumped at 40 s', by: expect.any(String) });
    expect(Date.parse(excludedCi.excluded!.at)).not.toBeNaN();
    expect(excludedCi.version).toBe(ci3.version + 1);
    expect((await exclude(director, cs3, 'Pipetting error noted in the bench log')).status).toBe(200);

    const after = await results(w.caseId);
    const ciAfter = assayOf(after, 'CI');
    expectSummary(ciAfter, CI_REPS.slice(0, 2));
    expectSummary(assayOf(after, 'CS'), CS_REPS.slice(0, 2));
    expect(ciAfter.ratioCs!.value!).toBeCloseTo(mean(CI_REPS.slice(0, 2)) / mean(CS_REPS.slice(0, 2)), 9);
    expect(ciAfter.ratioCii!.value!).toBeCloseTo(mean(CI_REPS.slice(0, 2)) / CII, 9);
    // CII against CS moves with the CS mean alone.
    expect(assayOf(after, 'CII').ratioCs!.value!).toBeCloseTo(CII / mean(CS_REPS.slice(0, 2)), 9);
    // The defect the wild replicate hid: the fixture is the isolated complex I profile.
    expect(after.specimens[0]!.pattern!.code).toBe('isolated:CI');
    expect(after.patternCode).toBe('isolated:CI');
    // Still listed, with its own value and the reason.
    const listed = ciAfter.replicates.find((r) => r.replicate === 3)!;
    expect(listed.activity!).toBeCloseTo(120, 6);
    expect(listed.excluded?.reason).toBe('Air bubble in the cuvette: trace jumped at 40 s');
    expect(ciAfter.replicates.filter((r) => !r.excluded)).toHaveLength(2);

    // The audit trail holds the reason, in the same write.
    const trail = await auditOf(ci3.id);
    expect(trail.find((e) => e.action === 'exclude')).toMatchObject({ note: 'Air bubble in the cuvette: trace jumped at 40 s', actorEmail: expect.stringContaining('@') });

    // Included again: back to every replicate.
    const back = await tech.post(`/api/measurements/${ci3.id}/include`).send({ version: excludedCi.version });
    expect(back.status).toBe(200);
    expect(measurementSchema.parse(back.body).excluded).toBeNull();
    const restored = await results(w.caseId);
    expectSummary(assayOf(restored, 'CI'), CI_REPS);
    expect(assayOf(restored, 'CI').ratioCs!.value!).toBeCloseTo(mean(CI_REPS) / mean(CS_REPS.slice(0, 2)), 9);
    expect((await auditOf(ci3.id)).some((e) => e.action === 'include' && /Air bubble/.test(e.note ?? ''))).toBe(true);
    // The case's history says it in words, with the reason.
    const history = (await tech.get(`/api/cases/${w.caseId}/history`)).body.items as { summary: string; note: string | null }[];
    expect(history).toEqual(
      expect.arrayContaining([
        expect.objectContaining({ summary: 'CI replicate 3 excluded from the results', note: 'Air bubble in the cuvette: trace jumped at 40 s' }),
        expect.objectContaining({ summary: 'CI replicate 3 counted again' }),
      ]),
    );
  });

  it('when the reason is missing or blank, then 400 names reason and nothing changes', async () => {
    const w = await workupWithWildReplicates();
    const m = w.byKey.get('CI#3')!;
    const events = await countRows(t.sequelize, 'audit_events');
    for (const reason of [undefined, '', '   ', 'ok']) {
      const res = await exclude(tech, m, reason);
      expect(res.status).toBe(400);
      expect(res.body.error.fields.reason).toMatch(/reason/i);
    }
    const now = measurementSchema.parse((await tech.get(`/api/cases/${w.caseId}/measurements`)).body.items.find((x: Measurement) => x.id === m.id));
    expect(now.excluded).toBeNull();
    expect(now.version).toBe(m.version);
    expect(await countRows(t.sequelize, 'audit_events')).toBe(events);
  });

  it('when two people exclude the same replicate at once from the same version, then one wins and the other gets 409 STALE_VERSION', async () => {
    const w = await workupWithWildReplicates();
    const m = w.byKey.get('CS#3')!;
    const answers = await Promise.all([exclude(tech, m, 'First reason given'), exclude(director, m, 'Second reason given')]);
    expect(answers.map((r) => r.status).sort()).toEqual([200, 409]);
    const lost = answers.find((r) => r.status === 409)!;
    expect(lost.body.error.code).toBe('STALE_VERSION');
    const won = answers.find((r) => r.status === 200)!;
    expect((await auditOf(m.id)).filter((e) => e.action === 'exclude')).toHaveLength(1);
    // A stale include is refused too.
    const stale = await tech.post(`/api/measurements/${m.id}/include`).send({ version: m.version });
    expect(stale.status).toBe(409);
    expect(stale.body.error.code).toBe('STALE_VERSION');
    expect(measurementSchema.parse(won.body).excluded).not.toBeNull();
  });

  it('when the case is awaiting review, then excluding or including gets 409 INVALID_STATE', async () => {
    const w = await workupWithWildReplicates();
    const m = w.byKey.get('CI#3')!;
    const c = (await tech.get(`/api/cases/${w.caseId}`)).body;
    expect((await tech.post(`/api/cases/${w.caseId}/submit`).send({ version: c.version })).status).toBe(200);
    const res = await exclude(tech, m, 'Too late for this');
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('INVALID_STATE');
    const inc = await tech.post(`/api/measurements/${m.id}/include`).send({ version: m.version });
    expect(inc.status).toBe(409);
    expect(inc.body.error.code).toBe('INVALID_STATE');
  });

  it('when a clinician or an administrator tries, then 403', async () => {
    const w = await workupWithWildReplicates();
    const m = w.byKey.get('CI#3')!;
    for (const agent of [clinician, admin]) {
      expect((await exclude(agent, m, 'Not my place')).status).toBe(403);
      expect((await agent.post(`/api/measurements/${m.id}/include`).send({ version: m.version })).status).toBe(403);
    }
  });
});

describe('changing and deleting a saved measurement', () => {
  it('when the rate and the replicate number change, then the activity is recomputed and the audit holds the changed values before and after', async () => {
    const w = await workupWithWildReplicates();
    const m = w.byKey.get('CI#3')!;
    const entry = ratesFor(defs.get('CI')!, 7.2, w.specimenId, 4);
    const { specimenId: _s, assay: _a, ...change } = entry;
    const res = await tech.put(`/api/measurements/${m.id}`).send({ ...change, version: m.version });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const after = measurementSchema.parse(res.body);
    expect(after.replicate).toBe(4);
    // 7.2 nmol/min/mg is what the new rate was worked back from [derived, docs/domain.md §1].
    expect(after.activity!).toBeCloseTo(7.2, 9);
    const update = (await auditOf(m.id)).find((e) => e.action === 'update')!;
    expect(update.before).toMatchObject({ replicate: 3, totalRatePerMin: m.inputs.mode === 'rates' ? m.inputs.totalRatePerMin : null });
    expect(update.after).toMatchObject({ replicate: 4, totalRatePerMin: change.totalRatePerMin });
    expect((update.before!.activity as number) / 120).toBeCloseTo(1, 9);
    // Values that did not change are not repeated.
    expect(update.before).not.toHaveProperty('pathlengthCm');
    expect(update.after).not.toHaveProperty('assay');
  });

  it('when the new replicate number is taken, then 409 names replicate and nothing changes', async () => {
    const w = await workupWithWildReplicates();
    const m = w.byKey.get('CI#3')!;
    const res = await tech.put(`/api/measurements/${m.id}`).send({
      mode: 'rates',
      pathlengthCm: m.inputs.pathlengthCm,
      reactionVolumeUl: m.inputs.reactionVolumeUl,
      sampleVolumeUl: m.inputs.sampleVolumeUl,
      totalRatePerMin: m.inputs.mode === 'rates' ? m.inputs.totalRatePerMin : 0,
      backgroundRatePerMin: m.inputs.mode === 'rates' ? m.inputs.backgroundRatePerMin : null,
      replicate: 1,
      version: m.version,
    });
    expect(res.status).toBe(409);
    expect(res.body.error.fields.replicate).toMatch(/Replicate 1 of CI is already saved/);
    const now = (await tech.get(`/api/cases/${w.caseId}/measurements`)).body.items.find((x: Measurement) => x.id === m.id);
    expect(now.replicate).toBe(3);
    expect(now.version).toBe(m.version);
  });

  it('when a measurement was part of a submission, then deleting it is refused (409, exclude instead) while one added after the return can go', async () => {
    const w = await workupWithWildReplicates();
    const c = (await tech.get(`/api/cases/${w.caseId}`)).body;
    expect((await tech.post(`/api/cases/${w.caseId}/submit`).send({ version: c.version })).status).toBe(200);
    const waiting = (await tech.get(`/api/cases/${w.caseId}`)).body;
    const returned = await director.post(`/api/review/${w.caseId}/return`).send({ reason: 'Check the complex I replicates', version: waiting.version });
    expect(returned.status, JSON.stringify(returned.body)).toBe(200);

    const old = measurementSchema.parse((await tech.get(`/api/cases/${w.caseId}/measurements`)).body.items.find((x: Measurement) => x.id === w.byKey.get('CI#3')!.id));
    expect(old.submittedAt).not.toBeNull();
    const rows = await countRows(t.sequelize, 'measurements');
    const refused = await tech.delete(`/api/measurements/${old.id}?version=${old.version}`);
    expect(refused.status).toBe(409);
    expect(refused.body.error.message).toMatch(/exclude it with a reason instead/);
    expect(await countRows(t.sequelize, 'measurements')).toBe(rows);
    expect((await exclude(tech, old, 'Air bubble in the cuvette')).status).toBe(200);

    const added = await tech.post(`/api/cases/${w.caseId}/measurements`).send(ratesFor(defs.get('CI')!, 6.3, w.specimenId, 5));
    expect(added.status).toBe(201);
    const fresh = measurementSchema.parse(added.body);
    expect(fresh.submittedAt).toBeNull();
    expect((await tech.delete(`/api/measurements/${fresh.id}?version=${fresh.version}`)).status).toBe(204);
  });
});

/** A supertest response body as a Buffer (PDFs come back binary). */
function binary(req: ReturnType<Agent['get']>) {
  return req.buffer(true).parse((res, cb) => {
    const chunks: Buffer[] = [];
    res.on('data', (c: Buffer) => chunks.push(c));
    res.on('end', () => cb(null, Buffer.concat(chunks)));
  });
}

describe('the signed report', () => {
  it('when a replicate was excluded, then the methods section of the PDF lists it with assay, replicate, value, reason and who excluded it', async () => {
    const w = await workupWithWildReplicates();
    const ci3 = w.byKey.get('CI#3')!;
    const reason = 'Air bubble in the cuvette: trace jumped at 40 s';
    expect((await exclude(tech, ci3, reason)).status).toBe(200);
    const techName = (await tech.get('/api/auth/me')).body.user.name as string;
    const c = (await tech.get(`/api/cases/${w.caseId}`)).body;
    expect((await tech.post(`/api/cases/${w.caseId}/submit`).send({ version: c.version })).status).toBe(200);
    const signed = await director.post(`/api/cases/${w.caseId}/sign`).send({ password: DEMO_PASSWORD });
    expect(signed.status, JSON.stringify(signed.body)).toBe(201);

    const file = await binary(director.get(`/api/reports/${signed.body.report.id}/pdf`));
    expect(file.status).toBe(200);
    // Read back with pdfjs-dist, an independent PDF reader.
    const pdf = await readPdf(file.body as Buffer);
    const methodsAt = pdf.flat.indexOf('Methods and traceability');
    expect(methodsAt).toBeGreaterThan(-1);
    const methods = pdf.flat.slice(methodsAt);
    expect(methods).toContain('Replicates excluded from the results');
    expect(methods).toMatch(
      new RegExp(`Excluded replicate: CI, replicate 3, 120(\\.0+)? nmol/min/mg protein: ${reason} \\(excluded by ${techName}\\)`),
    );
    // The replicates that count: complex I replicates 1 and 2 only, nothing else excluded.
    expect(methods.match(/Excluded replicate:/g)).toHaveLength(1);
  });
});
