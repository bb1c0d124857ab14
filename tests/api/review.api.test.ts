import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { CaseDetail } from '@/schemas/case';
import type { ReviewCase, ReviewQueueItem } from '@/schemas/report';
import type { CaseResults } from '@/schemas/results';
import { accountId, createCaseAwaitingReview, nearMeans } from '../factories/workup';
import { DEMO_PASSWORD, makeTestApp, type TestApp } from '../setup/test-app';

/*
 * The director's review: the queue, the proposed interpretation, the working draft and the return to the
 * technologist. Percentages are worked by hand from the factory's activities and the demo interval means
 * (value / mean × 100 [derived]); the criterion bands follow the configured rule set (Bernier FP et al.,
 * Neurology 2002;59:1406–1411 [from memory]).
 */

type Agent = Awaited<ReturnType<TestApp['signedIn']>>;
let t: TestApp;
let tech: Agent;
let director: Agent;
let clinician: Agent;
let clinicianId: number;

beforeAll(async () => {
  t = await makeTestApp();
  tech = await t.signedIn('technologist');
  director = await t.signedIn('director');
  clinician = await t.signedIn('clinician');
  clinicianId = await accountId(await t.signedIn('admin'), 'clinician@demo.test');
});
afterAll(() => t.close());

describe('the review queue', () => {
  let routine: CaseDetail;
  let urgent: CaseDetail;
  beforeAll(async () => {
    // The routine case is submitted first, so it has waited longer; the urgent one still goes first.
    routine = await createCaseAwaitingReview(tech, { referringClinicianId: clinicianId });
    urgent = await createCaseAwaitingReview(tech, { referringClinicianId: clinicianId, overrides: { priority: 'urgent' } });
  });

  it('when the director opens the queue, then urgent cases come first, then the longest waiting, each with its pattern', async () => {
    const res = await director.get('/api/review');
    expect(res.status).toBe(200);
    const items = res.body.items as ReviewQueueItem[];
    const ids = items.map((i) => i.caseId);
    expect(ids.indexOf(urgent.id)).toBeLessThan(ids.indexOf(routine.id));
    const ranks = items.map((i) => (i.priority === 'urgent' ? 0 : 1));
    expect(ranks).toEqual([...ranks].sort((a, b) => a - b));
    for (const i of items.filter((x) => x.priority === 'routine')) expect(i.submittedAt).not.toBeNull();
    const routineSubmissions = items.filter((x) => x.priority === 'routine').map((x) => Date.parse(x.submittedAt!));
    expect(routineSubmissions).toEqual([...routineSubmissions].sort((a, b) => a - b));
    const mine = items.find((i) => i.caseId === routine.id)!;
    expect(mine.patternSummary).toMatch(/complex I/);
    expect(mine.submittedByName).toBe('Tamsin Oduya');
  });

  it('when a technologist or a clinician asks for the queue, then 403', async () => {
    expect((await tech.get('/api/review')).status).toBe(403);
    expect((await clinician.get('/api/review')).status).toBe(403);
  });

  it('when a case is signed, then it leaves the queue', async () => {
    const c = await createCaseAwaitingReview(tech, { referringClinicianId: clinicianId });
    expect(((await director.get('/api/review')).body.items as ReviewQueueItem[]).map((i) => i.caseId)).toContain(c.id);
    expect((await director.post(`/api/cases/${c.id}/sign`).send({ password: DEMO_PASSWORD })).status).toBe(201);
    expect(((await director.get('/api/review')).body.items as ReviewQueueItem[]).map((i) => i.caseId)).not.toContain(c.id);
  });
});

describe('the proposed interpretation', () => {
  it('when complex I is low against CS and CII, then the proposal states its percentages of the reference means and its band', async () => {
    const c = await createCaseAwaitingReview(tech, { referringClinicianId: clinicianId });
    const review = (await director.get(`/api/review/${c.id}`)).body as ReviewCase;
    const results = (await tech.get(`/api/cases/${c.id}/results`)).body as CaseResults;
    const ci = results.specimens[0]!.assays.find((a) => a.assay === 'CI')!;
    // Worked by hand from the factory's invented activities (CI 6, CS 150, CII 30) and the invented demo interval
    // means the test laboratory approves (CI/CS 0.25, CI/CII 1.25; src/schemas/assay.ts demo rows):
    // CI/CS = 6/150 = 0.04 → 0.04/0.25 = 16 %; CI/CII = 6/30 = 0.2 → 0.2/1.25 = 16 % [derived].
    expect(ci.ratioCs!.interval!.mean).toBe(0.25);
    expect(ci.ratioCii!.interval!.mean).toBe(1.25);
    expect(review.proposal.interpretation.match(/16% of the reference mean/g)).toHaveLength(2);
    // 16 % is under 20 % of the control mean: the major-criterion band (Bernier et al. 2002 [from memory]).
    expect(review.proposal.interpretation).toContain('major-criterion band');
    expect(review.proposal.interpretation).not.toContain('minor-criterion band');
    expect(review.proposal.interpretation).toMatch(/Complex I activity: relative to citrate synthase/);
    // Careful wording: it describes measurements and never names a disease or a diagnosis.
    expect(review.proposal.interpretation).not.toMatch(/diagnos(is|ed) (of|with)|\bdisease\b|confirms?/i);
    expect(review.proposal.patternSummary).toMatch(/complex I/);
    expect(review.case.id).toBe(c.id);
    expect(review.reportedSpecimenId).toBe(c.specimens[0]!.id);
  });

  it('when every ratio is near its reference mean, then the proposal says they are within their intervals and names no band', async () => {
    const c = await createCaseAwaitingReview(tech, { referringClinicianId: clinicianId, activities: nearMeans });
    const review = (await director.get(`/api/review/${c.id}`)).body as ReviewCase;
    expect(review.proposal.interpretation).toMatch(/within their reference intervals/);
    expect(review.proposal.interpretation).not.toMatch(/criterion band/);
  });

  it('when the case does not exist, then 404', async () => {
    expect((await director.get('/api/review/999999')).status).toBe(404);
  });
});

describe('the working draft', () => {
  let c: CaseDetail;
  beforeAll(async () => {
    c = await createCaseAwaitingReview(tech, { referringClinicianId: clinicianId });
  });

  it('when the director saves a draft twice, then each save bumps its version and a save from an older version gets 409', async () => {
    const first = await director.put(`/api/review/${c.id}/draft`).send({ interpretation: 'First working text of the fixture.', version: null });
    expect(first.status).toBe(200);
    expect(first.body).toMatchObject({ version: 0, updatedByName: 'Dr Ilse Marchetti' });
    const second = await director.put(`/api/review/${c.id}/draft`).send({ interpretation: 'Second working text of the fixture case.', version: 0 });
    expect(second.status).toBe(200);
    expect(second.body.version).toBe(1);
    const stale = await director.put(`/api/review/${c.id}/draft`).send({ interpretation: 'Lost update.', version: 0 });
    expect(stale.status).toBe(409);
    expect(stale.body.error.code).toBe('STALE_VERSION');
    const again = await director.put(`/api/review/${c.id}/draft`).send({ interpretation: 'Also lost.', version: null });
    expect(again.status).toBe(409);
    expect(((await director.get(`/api/review/${c.id}`)).body as ReviewCase).draft?.interpretation).toBe('Second working text of the fixture case.');
  });

  it('when the director signs without sending text, then the saved draft is what is signed', async () => {
    const res = await director.post(`/api/cases/${c.id}/sign`).send({ password: DEMO_PASSWORD });
    expect(res.status).toBe(201);
    expect(res.body.report.interpretation).toBe('Second working text of the fixture case.');
  });

  it('when the case is no longer awaiting review, then the draft cannot be saved (409)', async () => {
    const res = await director.put(`/api/review/${c.id}/draft`).send({ interpretation: 'Too late to be saved.', version: 1 });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('INVALID_STATE');
  });
});

describe('returning a case to the technologist', () => {
  it('when the director returns a case with a reason, then it is back in assay with the reason, and cannot be returned twice', async () => {
    const c = await createCaseAwaitingReview(tech, { referringClinicianId: clinicianId });
    const reason = 'Complex IV duplicate differs by 30%; please repeat (fixture).';
    const res = await director.post(`/api/review/${c.id}/return`).send({ reason, version: c.version });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ state: 'in_assay', returnReason: reason });
    const again = await director.post(`/api/review/${c.id}/return`).send({ reason, version: res.body.version });
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe('INVALID_STATE');
    const history = await director.get(`/api/audit?caseId=${c.id}`);
    expect(JSON.stringify(history.body)).toContain(reason);
  });

  it('when no reason is given, then 400 names the field; a technologist cannot return a case (403)', async () => {
    const c = await createCaseAwaitingReview(tech, { referringClinicianId: clinicianId });
    const res = await director.post(`/api/review/${c.id}/return`).send({ reason: '', version: c.version });
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toHaveProperty('reason');
    expect((await tech.post(`/api/review/${c.id}/return`).send({ reason: 'Because.', version: c.version })).status).toBe(403);
  });
});
