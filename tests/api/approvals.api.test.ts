import type request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { storedAssayDefinitionSchema, type StoredAssayDefinition } from '@/schemas/assay';
import { labProfileSchema } from '@/schemas/lab-profile';
import { storedIntervalSchema, type StoredInterval } from '@/schemas/reference-interval-api';
import type { ReportDetail } from '@/schemas/report';
import { findApplicableInterval } from '../../server/modules/reference-intervals/reference-intervals.service';
import { readPdf } from '../factories/pdf-text';
import { accountId, createCaseAwaitingReview, nearMeans } from '../factories/workup';
import { DEMO_PASSWORD, countRows, makeTestApp, type TestApp } from '../setup/test-app';
import { buildIntervalDraft } from '../factories/intervals';

/*
 * Separation of duties: a new reference-interval version or assay-definition version is approved by a director
 * other than the one who drafted it [common practice: ISO 15189:2022 §6.2 and CAP checklists ask that method and
 * reference-interval changes be reviewed and approved by an authorised person; four-eyes review is the general
 * control, from memory]. A single-director laboratory may allow self-approval, and the report then says so.
 * Drafts of reference intervals can be edited until approved; approved versions never change (comparisons point
 * at them) [derived from CLIA 42 CFR 493.1291(k): released results stay as released].
 */

type Agent = Awaited<ReturnType<TestApp['signedIn']>>;
let t: TestApp;
let director: Agent;
let director2: Agent;
let tech: Agent;
let admin: Agent;

beforeAll(async () => {
  t = await makeTestApp();
  [director, director2, tech, admin] = await Promise.all([
    t.signedIn('director'),
    t.signedIn('director2'),
    t.signedIn('technologist'),
    t.signedIn('admin'),
  ]);
});
afterAll(() => t.close());

/** A straight trace read every 10 s: a = a0 + (slopePerMin / 60) · t. */
const trace = (a0: number, slopePerMin: number) => Array.from({ length: 13 }, (_, i) => ({ t: i * 10, a: a0 + (slopePerMin / 60) * i * 10 }));

/** An invented complex III reading (absorbance at 550 nm rises as cytochrome c is reduced). */
const ciiiPreview = {
  assay: 'CIII',
  pathlengthCm: 1,
  reactionVolumeUl: 1000,
  sampleVolumeUl: 10,
  proteinMgPerMl: 4,
  total: trace(0.4, 0.05),
  background: trace(0.4, 0.01),
};

async function currentOf(code: string): Promise<StoredAssayDefinition> {
  const res = await director.get('/api/assay-definitions');
  expect(res.status).toBe(200);
  return storedAssayDefinitionSchema.parse((res.body.items as { definition: { code: string } }[]).find((d) => d.definition.code === code));
}

/** A new version of a definition with a changed ε, drafted by `by`. */
async function draftDefinition(by: Agent, code: string, epsilon: number, note = 'Laboratory re-check of ε (invented)') {
  const current = await currentOf(code);
  const { code: _c, version: _v, ...fields } = current.definition;
  return by
    .post(`/api/assay-definitions/${code}/versions`)
    .send({ definition: { ...fields, epsilonPerMmPerCm: epsilon, epsilonSource: 'Invented for a test' }, changeNote: note, basedOnVersion: current.definition.version });
}

/** The shared draft body (tests/factories/intervals.ts) as a CII lymphoblast set of this file's own. */
const intervalBody = (overrides: Record<string, unknown> = {}) =>
  buildIntervalDraft({ setName: 'Approval test set (fictitious)', assay: 'CII', specimenType: 'lymphoblasts', lower: 40, upper: 160, sd: 30, ...overrides });

async function draftInterval(by: Agent, overrides: Record<string, unknown> = {}): Promise<StoredInterval> {
  const res = await by.post('/api/reference-intervals').send(intervalBody(overrides));
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return storedIntervalSchema.parse(res.body);
}

async function auditActions(entity: string): Promise<{ action: string; note: string | null; before: unknown; after: unknown }[]> {
  const [rows] = await t.sequelize.query(`SELECT action, note, "before", "after" FROM audit_events WHERE entity = :entity ORDER BY id`, {
    replacements: { entity },
  });
  return (rows as { action: string; note: string | null; before: string | null; after: string | null }[]).map((r) => ({
    action: r.action,
    note: r.note,
    before: r.before ? JSON.parse(r.before) : null,
    after: r.after ? JSON.parse(r.after) : null,
  }));
}

describe('assay-definition versions: draft, then a second director approves', () => {
  it('when a director drafts a new ε, then it is a draft that calculations ignore until another director approves it', async () => {
    const before = (await tech.post('/api/calculations/activity').send(ciiiPreview)).body;
    expect(before.definitionVersion).toBe(1);
    const oldEpsilon = (await currentOf('CIII')).definition.epsilonPerMmPerCm;

    const saved = await draftDefinition(director, 'CIII', 21.1);
    expect(saved.status, JSON.stringify(saved.body)).toBe(201);
    const draft = storedAssayDefinitionSchema.parse(saved.body);
    expect(draft).toMatchObject({ status: 'draft', createdBy: 'Dr Ilse Marchetti', approvedBy: null, selfApproved: false });
    expect(draft.definition.version).toBe(2);
    // Still version 1 in force: the list's current item and the calculation both.
    expect((await currentOf('CIII')).definition.version).toBe(1);
    expect((await tech.post('/api/calculations/activity').send(ciiiPreview)).body.definitionVersion).toBe(1);
    const list = await tech.get('/api/assay-definitions');
    expect(list.body.drafts.map((d: StoredAssayDefinition) => `${d.definition.code} v${d.definition.version}`)).toContain('CIII v2');

    // The drafter cannot approve it.
    const self = await director.post('/api/assay-definitions/CIII/versions/2/approve').send({});
    expect(self.status).toBe(403);
    expect(self.body.error.code).toBe('SECOND_DIRECTOR_REQUIRED');
    expect(self.body.error.message).toMatch(/another director must approve it/);
    expect((await tech.post('/api/calculations/activity').send(ciiiPreview)).body.definitionVersion).toBe(1);

    const approved = await director2.post('/api/assay-definitions/CIII/versions/2/approve').send({});
    expect(approved.status, JSON.stringify(approved.body)).toBe(200);
    expect(storedAssayDefinitionSchema.parse(approved.body)).toMatchObject({
      status: 'approved',
      approvedBy: 'Dr Octavian Brisk-Ferro',
      createdBy: 'Dr Ilse Marchetti',
      selfApproved: false,
    });
    const after = (await tech.post('/api/calculations/activity').send(ciiiPreview)).body;
    expect(after.definitionVersion).toBe(2);
    // Beer–Lambert (A = ε·c·l) [confirmed]: the same slope with a larger ε is a proportionally smaller activity.
    expect(after.activity).toBeCloseTo((before.activity * oldEpsilon) / 21.1, 6);
    const audit = await auditActions('assay-definition');
    expect(audit.map((a) => a.action)).toEqual(expect.arrayContaining(['draft-version', 'approve']));
  });

  it('when a draft is pending, then another draft is refused with 409 until it is withdrawn (with a reason), and it is never used', async () => {
    expect((await draftDefinition(director2, 'CII', 19.5)).status).toBe(201);
    const second = await draftDefinition(director, 'CII', 19.8);
    expect(second.status).toBe(409);
    expect(second.body.error.message).toMatch(/awaiting a second director/);

    const noReason = await director.post('/api/assay-definitions/CII/versions/2/withdraw').send({ reason: '' });
    expect(noReason.status).toBe(400);
    expect(noReason.body.error.fields).toHaveProperty('reason');
    const withdrawn = await director.post('/api/assay-definitions/CII/versions/2/withdraw').send({ reason: 'Typed the wrong ε' });
    expect(withdrawn.status).toBe(200);
    expect(withdrawn.body.status).toBe('withdrawn');
    // A withdrawn draft cannot be approved afterwards.
    const late = await director.post('/api/assay-definitions/CII/versions/2/approve').send({});
    expect(late.status).toBe(409);
    expect(late.body.error.code).toBe('INVALID_STATE');

    const next = await draftDefinition(director, 'CII', 19.8);
    expect(next.status).toBe(201);
    expect(next.body.definition.version).toBe(3);
    const versions = (await tech.get('/api/assay-definitions/CII/versions')).body.items as StoredAssayDefinition[];
    expect(versions.map((v) => [v.definition.version, v.status])).toEqual([
      [3, 'draft'],
      [2, 'withdrawn'],
      [1, 'approved'],
    ]);
    expect((await currentOf('CII')).definition.version).toBe(1);
  });

  it('when five approvals of one draft race, then exactly one succeeds and the rest get 409', async () => {
    expect((await draftDefinition(director, 'CS', 13.6)).status).toBe(201);
    const auditBefore = await countRows(t.sequelize, 'audit_events');
    const answers = await Promise.all(Array.from({ length: 5 }, () => director2.post('/api/assay-definitions/CS/versions/2/approve').send({})));
    const statuses = answers.map((a) => a.status).sort();
    expect(statuses).toEqual([200, 409, 409, 409, 409]);
    expect(await countRows(t.sequelize, 'audit_events')).toBe(auditBefore + 1);
  });

  it('when the version does not exist or a technologist approves, then 404 or 403', async () => {
    expect((await director2.post('/api/assay-definitions/CI/versions/99/approve').send({})).status).toBe(404);
    expect((await tech.post('/api/assay-definitions/CI/versions/1/approve').send({})).status).toBe(403);
    const badVersion = await director2.post('/api/assay-definitions/CI/versions/zero/approve').send({});
    expect(badVersion.status).toBe(400);
    expect(badVersion.body.error.fields).toHaveProperty('version');
  });
});

describe('reference-interval versions: a second director approves', () => {
  it('when the drafter approves, then 403 and nothing changes; when the second director approves, then it applies', async () => {
    const draft = await draftInterval(director);
    const rows = await countRows(t.sequelize, 'audit_events');
    const self = await director.post(`/api/reference-intervals/${draft.id}/approve`).send({ revision: draft.revision });
    expect(self.status).toBe(403);
    expect(self.body.error.code).toBe('SECOND_DIRECTOR_REQUIRED');
    expect(self.body.error.message).toMatch(/single director can allow self-approval in the laboratory profile/);
    expect((await director.get(`/api/reference-intervals/${draft.id}`)).body.status).toBe('draft');
    expect(await countRows(t.sequelize, 'audit_events')).toBe(rows);
    const at = new Date('2025-06-01T12:00:00Z');
    expect(await findApplicableInterval({ assay: 'CII', measure: 'activity', specimenType: 'lymphoblasts', ageYears: 5, at })).toBeNull();

    const ok = await director2.post(`/api/reference-intervals/${draft.id}/approve`).send({ revision: draft.revision });
    expect(ok.status, JSON.stringify(ok.body)).toBe(200);
    expect(ok.body).toMatchObject({ status: 'approved', approvedByName: 'Dr Octavian Brisk-Ferro', createdByName: 'Dr Ilse Marchetti' });
    expect((await findApplicableInterval({ assay: 'CII', measure: 'activity', specimenType: 'lymphoblasts', ageYears: 5, at }))?.id).toBe(draft.id);
  });
});

describe('editing a reference-interval draft before approval', () => {
  it('when the drafter edits the limits with the revision seen, then the draft changes and the audit keeps before and after', async () => {
    const draft = await draftInterval(director, { assay: 'CIII' });
    const res = await director
      .patch(`/api/reference-intervals/${draft.id}`)
      .send({ revision: draft.revision, lower: 45, upper: 170, mean: 105, sourceNote: 'Corrected the typed limits (invented)' });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const edited = storedIntervalSchema.parse(res.body);
    expect([edited.lower, edited.upper, edited.mean]).toEqual([45, 170, 105]);
    expect(edited.sourceNote).toBe('Corrected the typed limits (invented)');
    expect(edited.revision).toBe(draft.revision + 1);
    expect(edited.version).toBe(draft.version);
    expect(edited.status).toBe('draft');
    const update = (await auditActions('reference-interval')).filter((a) => a.action === 'update').at(-1)!;
    expect(update.before).toMatchObject({ lower: 40, upper: 160 });
    expect(update.after).toMatchObject({ lower: 45, upper: 170 });

    // The revision it was edited from is stale now.
    const stale = await director.patch(`/api/reference-intervals/${draft.id}`).send({ revision: draft.revision, n: 50 });
    expect(stale.status).toBe(409);
    expect(stale.body.error.code).toBe('STALE_VERSION');
  });

  it('when an edit is invalid, another director edits, or the series changes, then 400 or 403 and nothing is written', async () => {
    const draft = await draftInterval(director, { assay: 'CIV' });
    const auditRows = await countRows(t.sequelize, 'audit_events');
    const upsideDown = await director.patch(`/api/reference-intervals/${draft.id}`).send({ revision: draft.revision, lower: 300 });
    expect(upsideDown.status).toBe(400);
    expect(upsideDown.body.error.fields).toHaveProperty('upper');
    const otherAssay = await director.patch(`/api/reference-intervals/${draft.id}`).send({ revision: draft.revision, assay: 'CI' });
    expect(otherAssay.status).toBe(400);
    expect(otherAssay.body.error.fields).toHaveProperty('assay');
    const noRevision = await director.patch(`/api/reference-intervals/${draft.id}`).send({ lower: 41 });
    expect(noRevision.status).toBe(400);
    expect(noRevision.body.error.fields).toHaveProperty('revision');
    const other = await director2.patch(`/api/reference-intervals/${draft.id}`).send({ revision: draft.revision, lower: 41 });
    expect(other.status).toBe(403);
    expect(other.body.error.message).toMatch(/Only Dr Ilse Marchetti can edit this draft/);
    expect(await countRows(t.sequelize, 'audit_events')).toBe(auditRows);
    const unchanged = storedIntervalSchema.parse((await director.get(`/api/reference-intervals/${draft.id}`)).body);
    expect([unchanged.lower, unchanged.upper, unchanged.revision]).toEqual([40, 160, draft.revision]);
  });

  it('when an approved version is edited, then 409 and it keeps its numbers', async () => {
    const draft = await draftInterval(director, { assay: 'CS' });
    const approved = storedIntervalSchema.parse(
      (await director2.post(`/api/reference-intervals/${draft.id}/approve`).send({ revision: draft.revision })).body,
    );
    const res = await director.patch(`/api/reference-intervals/${approved.id}`).send({ revision: approved.revision, lower: 10 });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('INVALID_STATE');
    expect(res.body.error.message).toMatch(/only a draft can be edited/);
    expect((await director.get(`/api/reference-intervals/${approved.id}`)).body.lower).toBe(40);
  });
});

// Last: it turns self-approval on and puts new versions in force that later cases would use.
describe('a single-director laboratory that allows self-approval', () => {
  it('when the admin allows it, then the change is audited, the drafter may approve, and the report says so in its methods', async () => {
    const profile = labProfileSchema.parse((await admin.get('/api/lab-profile')).body);
    expect(profile.allowSelfApproval).toBe(false);
    const refused = await director.put('/api/lab-profile').send({ ...profile, allowSelfApproval: true });
    expect(refused.status).toBe(403);
    const badValue = await admin.put('/api/lab-profile').send({ ...profile, allowSelfApproval: 'yes' });
    expect(badValue.status).toBe(400);
    expect(badValue.body.error.fields).toHaveProperty('allowSelfApproval');
    const saved = await admin.put('/api/lab-profile').send({ ...profile, allowSelfApproval: true });
    expect(saved.status, JSON.stringify(saved.body)).toBe(200);
    expect(saved.body.allowSelfApproval).toBe(true);
    const change = (await auditActions('lab-profile')).at(-1)!;
    expect(change.before).toMatchObject({ allowSelfApproval: false });
    expect(change.after).toMatchObject({ allowSelfApproval: true });
    // Saving the profile without the field keeps the setting.
    const { allowSelfApproval: _omit, ...withoutField } = saved.body as Record<string, unknown>;
    expect((await admin.put('/api/lab-profile').send(withoutField)).body.allowSelfApproval).toBe(true);

    // A report signed before any self-approval says nothing about it.
    const clinicianId = await accountId(admin, 'clinician@demo.test');
    const before = await signAndRead(clinicianId);
    expect(before).not.toMatch(/Approval:/);

    // The director drafts and approves both a definition version and an interval version.
    expect((await draftDefinition(director, 'CI', 6.3)).status).toBe(201);
    const defApproved = await director.post('/api/assay-definitions/CI/versions/2/approve').send({});
    expect(defApproved.status, JSON.stringify(defApproved.body)).toBe(200);
    expect(defApproved.body).toMatchObject({ status: 'approved', selfApproved: true });
    const interval = await draftInterval(director, {
      assay: 'CI',
      measure: 'ratio_cs',
      specimenType: 'skeletal_muscle',
      lower: 0.1,
      upper: 0.4,
      mean: 0.25,
      sd: 0.07,
      effectiveFrom: '2025-06-01',
    });
    const intApproved = await director.post(`/api/reference-intervals/${interval.id}/approve`).send({ revision: interval.revision });
    expect(intApproved.status, JSON.stringify(intApproved.body)).toBe(200);
    const notes = (await auditActions('reference-interval')).filter((a) => a.action === 'approve').at(-1)!;
    expect(notes.note).toMatch(/Self-approved/);

    const text = await signAndRead(clinicianId);
    expect(text).toMatch(/Approval: Approved by the director who drafted it, as this single-director laboratory allows:/);
    expect(text).toContain('CI assay definition version 2');
    expect(text).toContain(`reference interval ${intApproved.body.label}`);
    expect(text).toContain('No second director reviewed these versions.');
  });
});

/** A near-normal workup signed by the director; the PDF's text read back with pdfjs-dist. */
async function signAndRead(clinicianId: number): Promise<string> {
  const c = await createCaseAwaitingReview(tech, { referringClinicianId: clinicianId, activities: nearMeans });
  const signed = await director.post(`/api/cases/${c.id}/sign`).send({ password: DEMO_PASSWORD, version: c.version });
  expect(signed.status, JSON.stringify(signed.body)).toBe(201);
  const report = signed.body.report as ReportDetail;
  const file = await director
    .get(`/api/reports/${report.id}/pdf`)
    .buffer(true)
    .parse((res: request.Response, cb: (err: Error | null, body: Buffer) => void) => {
      const chunks: Buffer[] = [];
      res.on('data', (chunk: Buffer) => chunks.push(chunk));
      res.on('end', () => cb(null, Buffer.concat(chunks)));
    });
  expect(file.status).toBe(200);
  return (await readPdf(file.body as Buffer)).flat;
}
