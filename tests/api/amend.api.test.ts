import { createHash } from 'node:crypto';
import type request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { CaseDetail } from '@/schemas/case';
import type { CaseReports, Outbox, ReportDetail } from '@/schemas/report';
import { readPdf } from '../factories/pdf-text';
import { accountId, createCaseAwaitingReview, isolatedComplexI, WORKUP_PROTEIN_MG_PER_ML } from '../factories/workup';
import { DEMO_PASSWORD, countRows, makeTestApp, type TestApp } from '../setup/test-app';

/*
 * Reopening a signed case and issuing a corrected report with new numbers, through the API.
 * The rule checked: CLIA 42 CFR 493.1291(k) [confirmed, docs/domain.md §5] — an error in a released report is
 * corrected, the corrected report is sent, and the original is kept. The second identity component of the
 * signature (password typed again) follows 21 CFR Part 11 §11.200(a) [from memory].
 * The PDFs are read back with pdfjs-dist (an independent reader) and hashed with node:crypto.
 * The changed numbers are worked out by hand from the Beer–Lambert relation of docs/domain.md §1 [derived]:
 * a specific activity is inversely proportional to the protein concentration, so doubling the protein from
 * 2 to 4 mg/mL halves every activity (CI 6 → 3, CS 150 → 75 nmol/min/mg) and leaves every ratio as it was.
 * Printed with three significant figures [common practice; docs/domain.md]: 6.00 → 3.00 and 150 → 75.0.
 */

type Agent = Awaited<ReturnType<TestApp['signedIn']>>;
let t: TestApp;
let tech: Agent;
let director: Agent;
let clinician: Agent;
let admin: Agent;
let clinicianId: number;

const sha256 = (b: Buffer | string) => createHash('sha256').update(b).digest('hex');
const REASON = 'Protein concentration was typed as 2 mg/mL; the BCA worksheet says 4 mg/mL (fixture).';

function binary(req: request.Test): request.Test {
  return req.buffer(true).parse((res, cb) => {
    const chunks: Buffer[] = [];
    res.on('data', (c: Buffer) => chunks.push(c));
    res.on('end', () => cb(null, Buffer.concat(chunks)));
  });
}

async function pdfOf(agent: Agent, reportId: number): Promise<Buffer> {
  const res = await binary(agent.get(`/api/reports/${reportId}/pdf`));
  expect(res.status).toBe(200);
  return res.body as Buffer;
}

async function caseOf(id: number): Promise<CaseDetail> {
  const res = await tech.get(`/api/cases/${id}`);
  expect(res.status).toBe(200);
  return res.body as CaseDetail;
}

async function reportsOf(id: number): Promise<ReportDetail[]> {
  const res = await tech.get(`/api/cases/${id}/reports`);
  expect(res.status).toBe(200);
  return res.body.items as ReportDetail[];
}

async function clinicianCard(id: number): Promise<CaseReports | undefined> {
  const res = await clinician.get('/api/reports/by-case');
  expect(res.status).toBe(200);
  return (res.body as CaseReports[]).find((g) => g.caseId === id);
}

async function signedCase(): Promise<{ c: CaseDetail; report: ReportDetail }> {
  const pending = await createCaseAwaitingReview(tech, { referringClinicianId: clinicianId, activities: isolatedComplexI });
  const res = await director.post(`/api/cases/${pending.id}/sign`).send({ password: DEMO_PASSWORD, version: pending.version });
  expect(res.status).toBe(201);
  return { c: await caseOf(pending.id), report: res.body.report as ReportDetail };
}

const amend = (agent: Agent, id: number, body: Record<string, unknown>) => agent.post(`/api/cases/${id}/amend`).send(body);

async function failedLogins(email: string): Promise<number> {
  const [rows] = await t.sequelize.query('SELECT "failedLogins" FROM users WHERE email = ?', { replacements: [email] });
  return (rows as { failedLogins: number }[])[0]!.failedLogins;
}

beforeAll(async () => {
  t = await makeTestApp();
  [tech, director, clinician, admin] = await Promise.all([
    t.signedIn('technologist'),
    t.signedIn('director'),
    t.signedIn('clinician'),
    t.signedIn('admin'),
  ]);
  clinicianId = await accountId(admin, 'clinician@demo.test');
});
afterAll(() => t.close());

describe('reopening a signed case and correcting its numbers', () => {
  let c: CaseDetail;
  let v1: ReportDetail;
  let v1Pdf: Buffer;
  let listedBefore: ReportDetail[];
  let v2: ReportDetail;
  let v2Pdf: Buffer;

  beforeAll(async () => {
    ({ c, report: v1 } = await signedCase());
    v1Pdf = await pdfOf(clinician, v1.id);
    listedBefore = await reportsOf(c.id);
  });

  it('when a technologist or a clinician asks to reopen it, then 403 and the case stays final', async () => {
    const audits = await countRows(t.sequelize, 'audit_events');
    expect((await amend(tech, c.id, { reason: REASON, password: DEMO_PASSWORD })).status).toBe(403);
    expect((await amend(clinician, c.id, { reason: REASON, password: DEMO_PASSWORD })).status).toBe(403);
    expect((await caseOf(c.id)).state).toBe('final');
    expect(await countRows(t.sequelize, 'audit_events')).toBe(audits);
  });

  it('when the reason is missing or blank, then 400 naming the reason, and nothing changes', async () => {
    const audits = await countRows(t.sequelize, 'audit_events');
    for (const body of [{ password: DEMO_PASSWORD }, { reason: '  ', password: DEMO_PASSWORD }]) {
      const res = await amend(director, c.id, body);
      expect(res.status).toBe(400);
      expect(res.body.error.fields).toHaveProperty('reason');
    }
    const noPassword = await amend(director, c.id, { reason: REASON });
    expect(noPassword.status).toBe(400);
    expect(noPassword.body.error.fields).toHaveProperty('password');
    expect(await caseOf(c.id)).toMatchObject({ state: 'final', version: c.version, amendReason: null });
    expect(await countRows(t.sequelize, 'audit_events')).toBe(audits);
  });

  it('when the password is wrong, then 401, it counts toward the lock-out, and nothing changes', async () => {
    const audits = await countRows(t.sequelize, 'audit_events');
    const failures = await failedLogins('director@demo.test');
    const res = await amend(director, c.id, { reason: REASON, password: 'not-the-password' });
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('BAD_CREDENTIALS');
    expect(await failedLogins('director@demo.test')).toBe(failures + 1);
    expect(await caseOf(c.id)).toMatchObject({ state: 'final', version: c.version, amendReason: null });
    expect(await countRows(t.sequelize, 'audit_events')).toBe(audits);
    expect(await reportsOf(c.id)).toEqual(listedBefore);
  });

  it('when the director reopens it with the password and a reason, then it is in assay, the signed report is listed and stored exactly as before', async () => {
    const res = await amend(director, c.id, { reason: REASON, password: DEMO_PASSWORD, version: c.version });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ id: c.id, state: 'in_assay', amendReason: REASON });
    expect(await failedLogins('director@demo.test')).toBe(0);
    const after = await caseOf(c.id);
    expect(after.state).toBe('in_assay');
    expect(after.amendedAt).not.toBeNull();
    // The contract: GET /api/cases/:id/reports lists the same signed reports as before the amend.
    expect(await reportsOf(c.id)).toEqual(listedBefore);
    const again = await pdfOf(tech, v1.id);
    expect(again.equals(v1Pdf)).toBe(true);
    expect(sha256(again)).toBe(v1.pdfSha256);
  });

  it('when the clinician looks while it is reopened, then version 1 is still readable, byte for byte, and marked as under amendment on screen', async () => {
    const card = await clinicianCard(c.id);
    expect(card?.underAmendment).toBe(true);
    expect(card?.reports.map((r) => [r.version, r.status])).toEqual([[1, 'final']]);
    const file = await pdfOf(clinician, v1.id);
    expect(sha256(file)).toBe(v1.pdfSha256);
    // The note belongs to the screen; the stored PDF never carries it.
    expect((await readPdf(file)).flat).not.toMatch(/amend/i);
  });

  it('when the reopening is audited, then the trail holds the state change and the amend, both with the reason', async () => {
    const res = await director.get(`/api/audit?caseId=${c.id}`);
    expect(res.status).toBe(200);
    const items = res.body.items as { action: string; entity: string; note: string | null; before: Record<string, unknown>; after: Record<string, unknown> }[];
    const move = items.find((e) => e.action === 'state-change' && e.after.state === 'in_assay');
    expect(move).toMatchObject({ note: REASON, before: { state: 'final' } });
    const amendEvent = items.find((e) => e.action === 'amend');
    expect(amendEvent).toMatchObject({ entity: 'report', note: REASON, before: { reportVersion: 1, pdfSha256: v1.pdfSha256 } });
    const history = (await tech.get(`/api/cases/${c.id}/history`)).body.items as { summary: string; note: string | null }[];
    expect(history).toContainEqual(expect.objectContaining({ summary: 'Signed version 1 reopened for amendment', note: REASON }));
    expect(history).toContainEqual(expect.objectContaining({ summary: 'Final → In assay', note: REASON }));
  });

  it('while reopened and not yet resubmitted, then a second reopening, a signature, a correction and a cancellation are refused with 409', async () => {
    const again = await amend(director, c.id, { reason: REASON, password: DEMO_PASSWORD });
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe('INVALID_STATE');
    const correct = await director
      .post(`/api/cases/${c.id}/correct`)
      .send({ password: DEMO_PASSWORD, reason: 'Fixture reason.', changesSummary: 'Fixture summary.' });
    expect(correct.status).toBe(409);
    const cancel = await tech.post(`/api/cases/${c.id}/cancel`).send({ reason: 'Fixture cancel.', version: (await caseOf(c.id)).version });
    expect(cancel.status).toBe(409);
    expect((await caseOf(c.id)).state).toBe('in_assay');
  });

  it('when the technologist enters the right protein and resubmits, then a first signature is refused: it must be signed as a correction', async () => {
    const open = await caseOf(c.id);
    const specimen = open.specimens[0]!;
    expect(specimen.proteinMgPerMl).toBe(WORKUP_PROTEIN_MG_PER_ML);
    const protein = await tech
      .put(`/api/specimens/${specimen.id}/protein`)
      .send({ kind: 'direct', proteinMgPerMl: 2 * WORKUP_PROTEIN_MG_PER_ML, proteinSource: 'BCA worksheet, re-read (fixture)', version: specimen.version });
    expect(protein.status).toBe(200);
    const live = await tech.get(`/api/cases/${c.id}/results`);
    const ci = live.body.specimens[0].assays.find((a: { assay: string }) => a.assay === 'CI');
    expect(ci.activity.value).toBeCloseTo(isolatedComplexI.CI / 2, 6);
    const submit = await tech.post(`/api/cases/${c.id}/submit`).send({ version: (await caseOf(c.id)).version });
    expect(submit.status).toBe(200);
    const reviewing = await caseOf(c.id);
    expect(reviewing).toMatchObject({ state: 'awaiting_review', amendReason: REASON });
    const first = await director.post(`/api/cases/${c.id}/sign`).send({ password: DEMO_PASSWORD });
    expect(first.status).toBe(409);
    expect(await reportsOf(c.id)).toEqual(listedBefore);
  });

  it('when the director signs the correction, then version 2 carries the new numbers, lists what changed from what to what, and supersedes version 1', async () => {
    const before = await countRows(t.sequelize, 'notice_outbox');
    const res = await director.post(`/api/cases/${c.id}/correct`).send({
      password: DEMO_PASSWORD,
      reason: REASON,
      changesSummary: 'Activities recalculated with the right protein concentration (fixture).',
    });
    expect(res.status).toBe(201);
    v2 = res.body.report as ReportDetail;
    expect(v2).toMatchObject({ version: 2, status: 'corrected', supersedesVersion: 1, correctionReason: REASON });
    expect(res.body.caseState).toBe('corrected');
    expect(await caseOf(c.id)).toMatchObject({ state: 'corrected', amendReason: null, amendedAt: null });

    const changed = (item: string) => v2.changedValues.find((v) => v.item === item);
    expect(changed('CI activity')).toMatchObject({ before: '6.00 nmol/min/mg protein', after: '3.00 nmol/min/mg protein' });
    expect(changed('CS activity')).toMatchObject({ before: '150 nmol/min/mg protein', after: '75.0 nmol/min/mg protein' });
    expect(changed('CS activity: compared with interval')).toMatchObject({ before: 'Within interval', after: 'Below interval' });
    // Ratios do not depend on the protein [derived], so none is listed as changed.
    expect(v2.changedValues.filter((v) => /ratio to/.test(v.item) && !/reference interval/.test(v.item))).toEqual([]);

    // The notice to the clinician is in the outbox, written with the signature.
    expect(await countRows(t.sequelize, 'notice_outbox')).toBe(before + 1);
    const outbox = (await admin.get('/api/outbox')).body as Outbox;
    expect(outbox.deliveries.find((d) => d.reportId === v2.id)).toMatchObject({ kind: 'report_corrected', recipient: 'clinician@demo.test' });
  });

  it('when the corrected PDF is read back, then it shows the new numbers and the changed values, and never the on-screen amendment note', async () => {
    v2Pdf = await pdfOf(clinician, v2.id);
    expect(sha256(v2Pdf)).toBe(v2.pdfSha256);
    const text = (await readPdf(v2Pdf)).flat;
    expect(text).toContain('Values changed since version 1');
    expect(text).toContain('CI activity 6.00 nmol/min/mg protein 3.00 nmol/min/mg protein');
    expect(text).toContain('CS activity 150 nmol/min/mg protein 75.0 nmol/min/mg protein');
    expect(text).toMatch(/corrected report/i);
    expect(text).not.toMatch(/being amended/i);
    const v1Text = (await readPdf(v1Pdf)).flat;
    expect(v1Text).not.toContain('3.00 nmol');
  });

  it('when the versions are listed afterwards, then version 1 is kept unchanged and marked superseded, and the clinician sees no amendment note', async () => {
    const list = await reportsOf(c.id);
    expect(list.map((r) => [r.version, r.status])).toEqual([
      [2, 'corrected'],
      [1, 'superseded'],
    ]);
    const old = list.find((r) => r.version === 1)!;
    expect(old).toMatchObject({ pdfSha256: v1.pdfSha256, documentSha256: v1.documentSha256, supersededByVersion: 2 });
    expect(sha256(await pdfOf(clinician, v1.id))).toBe(v1.pdfSha256);
    const card = await clinicianCard(c.id);
    expect(card?.underAmendment).toBe(false);
    expect(card?.reports[0]).toMatchObject({ version: 2, status: 'corrected' });
  });

  it('when the audit trail is read, then the correction names the reopening reason and the changed values', async () => {
    const items = (await director.get(`/api/audit?caseId=${c.id}`)).body.items as { action: string; after: Record<string, unknown> }[];
    const correctEvent = items.find((e) => e.action === 'correct');
    expect(correctEvent?.after).toMatchObject({ reopenedFor: REASON, version: 2, supersedes: 1, pdfSha256: v2.pdfSha256 });
    expect((correctEvent?.after.changedValues as unknown[]).length).toBe(v2.changedValues.length);
    const actions = items.map((e) => e.action);
    for (const step of ['sign', 'amend', 'correct']) expect(actions).toContain(step);
  });
});

describe('refusals and races', () => {
  it('when a case awaiting review (never signed) is reopened, then 409 INVALID_STATE and nothing changes', async () => {
    const pending = await createCaseAwaitingReview(tech, { referringClinicianId: clinicianId });
    const res = await amend(director, pending.id, { reason: REASON, password: DEMO_PASSWORD });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('INVALID_STATE');
    expect(await caseOf(pending.id)).toMatchObject({ state: 'awaiting_review', version: pending.version });
  });

  it('when a case does not exist, then 404', async () => {
    expect((await amend(director, 999999, { reason: REASON, password: DEMO_PASSWORD })).status).toBe(404);
  });

  it('when the director reopens the same signed case twice at once, then exactly one succeeds and the other gets 409', async () => {
    const { c } = await signedCase();
    const answers = await Promise.all([1, 2, 3].map(() => amend(director, c.id, { reason: REASON, password: DEMO_PASSWORD })));
    expect(answers.map((a) => a.status).sort()).toEqual([200, 409, 409]);
    const [rows] = await t.sequelize.query(`SELECT COUNT(*) AS n FROM audit_events WHERE "caseId" = ? AND action = 'amend'`, { replacements: [c.id] });
    expect((rows as { n: number }[])[0]!.n).toBe(1);
  });

  it('when a reopened case is resubmitted unchanged and corrected, then the wording may change and no value is listed as changed', async () => {
    const { c } = await signedCase();
    expect((await amend(director, c.id, { reason: 'Re-check requested by the director (fixture).', password: DEMO_PASSWORD })).status).toBe(200);
    expect((await tech.post(`/api/cases/${c.id}/submit`).send({ version: (await caseOf(c.id)).version })).status).toBe(200);
    const res = await director
      .post(`/api/cases/${c.id}/correct`)
      .send({ password: DEMO_PASSWORD, reason: 'Re-checked, numbers confirmed (fixture).', changesSummary: 'No value changed (fixture).' });
    expect(res.status).toBe(201);
    expect(res.body.report.changedValues).toEqual([]);
    expect((await readPdf(await pdfOf(tech, res.body.report.id))).flat).not.toContain('Values changed since');
  });
});
