import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { CaseDetail } from '@/schemas/case';
import { inProgressListSchema, type InProgressCase } from '@/schemas/report';
import { createCase } from '../factories/cases';
import { accountId, createCaseAwaitingReview } from '../factories/workup';
import type { Agent } from '../setup/lab-staff';
import { signInAll } from '../setup/signed-in-agents';
import { DEMO_PASSWORD, makeTestApp, type TestApp } from '../setup/test-app';

/*
 * GET /api/reports/in-progress: a referring clinician sees their own cases that are not reported yet, with the
 * state in words and nothing of the results. Release of results only to authorised persons: CLIA 42 CFR
 * 493.1291(f) [confirmed, docs/domain.md §5]; unsigned results are not released at all [common practice].
 */

let t: TestApp;
let tech: Agent;
let director: Agent;
let clinician: Agent;
let clinician2: Agent;
let admin: Agent;
let received: CaseDetail;
let awaiting: CaseDetail;
let returned: CaseDetail;
let otherClinicians: CaseDetail;

const DRAFT_MARK = 'Draft sentence QX-7731 with 12.345 units';
const RETURN_MARK = 'Return note RV-5520 for the bench';

async function listOf(agent: Agent): Promise<InProgressCase[]> {
  const res = await agent.get('/api/reports/in-progress');
  expect(res.status).toBe(200);
  return inProgressListSchema.parse(res.body).items;
}

beforeAll(async () => {
  t = await makeTestApp();
  [tech, director, clinician, clinician2, admin] = await signInAll(t, ['technologist', 'director', 'clinician', 'clinician2', 'admin']);
  const clinicianId = await accountId(admin, 'clinician@demo.test');
  const clinician2Id = await accountId(admin, 'clinician2@demo.test');
  received = await createCase(tech, { referringClinicianId: clinicianId });
  awaiting = await createCaseAwaitingReview(tech, { referringClinicianId: clinicianId });
  const draft = await director.put(`/api/review/${awaiting.id}/draft`).send({ interpretation: DRAFT_MARK, version: null });
  expect(draft.status).toBe(200);
  returned = await createCaseAwaitingReview(tech, { referringClinicianId: clinicianId });
  const back = await director.post(`/api/review/${returned.id}/return`).send({ reason: RETURN_MARK, version: returned.version });
  expect(back.status).toBe(200);
  otherClinicians = await createCase(tech, { referringClinicianId: clinician2Id });
});
afterAll(() => t.close());

describe('the clinician’s cases in progress', () => {
  it('lists their own unreported cases with the state in plain words and receipt date, newest first', async () => {
    const items = await listOf(clinician);
    const mine = new Map(items.map((i) => [i.caseId, i]));
    expect(mine.get(received.id)).toMatchObject({ accession: received.accession, state: 'received', specimenTypes: ['skeletal_muscle'] });
    expect(mine.get(awaiting.id)).toMatchObject({ accession: awaiting.accession, state: 'awaiting_review' });
    expect(mine.get(returned.id)).toMatchObject({ accession: returned.accession, state: 'in_assay' });
    expect(mine.get(received.id)!.patientName).toBe(`${received.patient.familyName}, ${received.patient.givenName}`);
    expect(mine.get(received.id)!.receivedAt).toBe(new Date(received.specimens[0]!.receivedAt).toISOString());
    const times = items.map((i) => Date.parse(i.receivedAt ?? '1970-01-01'));
    expect([...times].sort((a, b) => b - a)).toEqual(times);
  });

  it('carries no result, draft, return note or other laboratory detail (the schema is strict)', async () => {
    const res = await clinician.get('/api/reports/in-progress');
    const body = JSON.stringify(res.body);
    expect(body).not.toContain('QX-7731');
    expect(body).not.toContain('RV-5520');
    for (const key of ['results', 'activity', 'interpretation', 'patternCode', 'returnReason', 'measurements', 'clinicalIndication']) {
      expect(body).not.toContain(`"${key}"`);
    }
    // .strict() refuses any key beyond caseId, accession, patientName, specimenTypes, state, receivedAt.
    expect(() => inProgressListSchema.parse(res.body)).not.toThrow();
  });

  it('never shows another clinician’s case, and the other clinician sees none of these', async () => {
    const mine = (await listOf(clinician)).map((i) => i.caseId);
    expect(mine).not.toContain(otherClinicians.id);
    const theirs = await listOf(clinician2);
    const theirIds = theirs.map((i) => i.caseId);
    expect(theirIds).toContain(otherClinicians.id);
    for (const id of [received.id, awaiting.id, returned.id]) expect(theirIds).not.toContain(id);
    // Every row of either list is a case that clinician referred (read back through the laboratory's API).
    const clinician2Id = await accountId(admin, 'clinician2@demo.test');
    for (const item of theirs) {
      const c = await tech.get(`/api/cases/${item.caseId}`);
      expect(c.body.referringClinician.id).toBe(clinician2Id);
    }
  });

  it('refuses laboratory staff and administrators (403) and anyone signed out (401)', async () => {
    for (const agent of [tech, director, admin]) expect((await agent.get('/api/reports/in-progress')).status).toBe(403);
    expect((await t.agent().get('/api/reports/in-progress')).status).toBe(401);
  });

  it('a signed case leaves the list and appears among the reports', async () => {
    const current = await tech.get(`/api/cases/${awaiting.id}`);
    const signed = await director
      .post(`/api/cases/${awaiting.id}/sign`)
      .send({ password: DEMO_PASSWORD, interpretation: 'Signed fixture interpretation.', version: current.body.version });
    expect(signed.status).toBe(201);
    expect((await listOf(clinician)).map((i) => i.caseId)).not.toContain(awaiting.id);
    const reports = await clinician.get('/api/reports/by-case');
    expect((reports.body as { caseId: number }[]).map((g) => g.caseId)).toContain(awaiting.id);
  });

  it('a signed case reopened for amendment stays among the reports, not in this list', async () => {
    const amend = await director.post(`/api/cases/${awaiting.id}/amend`).send({ reason: 'Protein concentration mistyped', password: DEMO_PASSWORD });
    expect(amend.status).toBe(200);
    expect((await tech.get(`/api/cases/${awaiting.id}`)).body.state).toBe('in_assay');
    expect((await listOf(clinician)).map((i) => i.caseId)).not.toContain(awaiting.id);
  });

  it('a cancelled case is not listed', async () => {
    const current = await tech.get(`/api/cases/${received.id}`);
    const res = await tech.post(`/api/cases/${received.id}/cancel`).send({ reason: 'Duplicate request', version: current.body.version });
    expect(res.status).toBe(200);
    expect((await listOf(clinician)).map((i) => i.caseId)).not.toContain(received.id);
  });
});
