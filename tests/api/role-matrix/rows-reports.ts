import { createHash } from 'node:crypto';
import { expect, it } from 'vitest';
import { loadConfig } from '../../../server/config';
import { createSmtpMailer } from '../../../server/modules/mail/mailer';
import { createNoticeDelivery } from '../../../server/modules/mail/notice-worker';
import { createCase } from '../../factories/cases';
import { binary } from '../../setup/binary-body';
import { DEMO_PASSWORD } from '../../setup/test-app';
import { startTestSmtpServer } from '../../setup/test-smtp-server';
import { fixtures, nextSerial, ok } from './fixtures';
import { once, perCall, type Ctx, type Rows } from './harness';

/*
 * Reports, review, signing, corrections and reopening; the mail outbox; cohorts and the research export. Statuses
 * from docs/api.md ("Reports, review and signing", "Mail", "Cohorts", "Registry export"): signing and correcting
 * answer 201, reopening 200, a saved search 201 and its deletion 204. A clinician reads the reports of the cases
 * they referred: the walk uses the demo clinician's own report; clinicianOwnReports() checks another's is 404.
 */

const sha256 = (b: Buffer) => createHash('sha256').update(b).digest('hex');
const config = loadConfig({ NODE_ENV: 'test', PORT: '3000', DEMO_PASSWORD });
/** The retry schedule docs/notices.md publishes, in seconds [common practice: doubling backoff with a ceiling]. */
const PUBLISHED_RETRY_DELAYS = [30, 60, 120, 240, 480, 960, 1920, 3600, 3600];

export function reportRows(ctx: Ctx): Rows {
  const fx = fixtures(ctx);
  const tech = () => ctx.as('technologist');
  const admin = () => ctx.as('admin');

  /** A report of a case the demo clinician referred, signed in this file. */
  const ownReport = once(() => fx.signedCase());
  const sharedAwaiting = once(() => fx.awaitingReview());
  /** A case the demo clinician referred, received and not yet reported. */
  const receivedForClinician = once(() => createCase(tech(), { referringClinicianId: ctx.clinicianId() }));
  const awaitingFor = perCall(() => fx.awaitingReview());
  const signedFor = perCall(() => fx.signedCase());

  /** A signed case whose notice the mail server refused for good (550): failed after one try, open to a resend. */
  const failedNoticeFor = perCall(async () => {
    const signed = await fx.signedCase();
    const smtp = await startTestSmtpServer();
    smtp.answer({ code: 550, text: 'No such mailbox here (fixture)' });
    const mailer = createSmtpMailer(config.mail, smtp.port);
    try {
      await createNoticeDelivery({ sequelize: ctx.t.sequelize, mailer, now: () => new Date(Date.now() + 1000) }).runOnce();
    } finally {
      mailer.close();
      await smtp.close();
    }
    const notice = (ok(await admin().get('/api/outbox'), 200, 'outbox').body.deliveries as { id: number; reportId: number; status: string }[]).find(
      (d) => d.reportId === signed.reportId,
    )!;
    expect(notice.status).toBe('failed');
    return notice;
  });

  const ownSearchFor = async (caller: string, permitted: boolean) => {
    const by = permitted ? ctx.as(caller as 'technologist') : tech();
    const name = `Matrix search ${nextSerial()}`;
    const res = ok(await by.post('/api/registry/saved-searches').send({ name, filters: { pattern: 'isolated' } }), 201, 'saved search');
    return { id: res.body.id as number, name };
  };

  return {
    'GET /api/reports': {
      status: 200,
      call: async () => {
        const r = await ownReport();
        return { send: (c) => c.get('/api/reports'), check: (res) => expect(res.body.map((x: { id: number }) => x.id)).toContain(r.reportId) };
      },
    },
    'GET /api/reports/by-case': {
      status: 200,
      call: async () => {
        const r = await ownReport();
        return { send: (c) => c.get('/api/reports/by-case'), check: (res) => expect(JSON.stringify(res.body)).toContain(`"caseId":${r.caseId}`) };
      },
    },
    'GET /api/reports/in-progress': {
      status: 200,
      call: async () => {
        const c0 = await receivedForClinician();
        return { send: (c) => c.get('/api/reports/in-progress'), check: (res) => expect(res.body.items.map((x: { caseId: number }) => x.caseId)).toContain(c0.id) };
      },
    },
    'GET /api/reports/:id': {
      status: 200,
      call: async () => {
        const r = await ownReport();
        return { send: (c) => c.get(`/api/reports/${r.reportId}`), check: (res) => expect(res.body).toMatchObject({ id: r.reportId, caseId: r.caseId, accession: r.accession }) };
      },
    },
    'GET /api/reports/:id/pdf': {
      status: 200,
      call: async () => {
        const r = await ownReport();
        return {
          send: (c) => binary(c.get(`/api/reports/${r.reportId}/pdf`)),
          // ETag: the SHA-256 of the stored bytes, hex, quoted (docs/api.md); computed here with node:crypto.
          check: (res) => {
            expect(res.headers['content-type']).toMatch(/^application\/pdf/);
            expect(res.body.subarray(0, 5).toString('latin1')).toBe('%PDF-');
            expect(res.headers.etag).toBe(`"${sha256(res.body)}"`);
          },
        };
      },
    },
    'GET /api/reports/:id/fhir': {
      status: 200,
      call: async () => {
        const r = await ownReport();
        return {
          send: (c) => binary(c.get(`/api/reports/${r.reportId}/fhir`)),
          check: (res) => {
            expect(res.headers['content-type']).toMatch(/^application\/fhir\+json/);
            const bundle = JSON.parse(res.body.toString('utf8'));
            expect(bundle).toMatchObject({ resourceType: 'Bundle', type: 'collection' });
            expect(JSON.stringify(bundle)).toContain(r.accession);
          },
        };
      },
    },
    'GET /api/cases/:id/reports': {
      status: 200,
      call: async () => {
        const r = await ownReport();
        return { send: (c) => c.get(`/api/cases/${r.caseId}/reports`), check: (res) => expect(res.body.items.map((x: { id: number }) => x.id)).toEqual([r.reportId]) };
      },
    },
    'POST /api/cases/:id/sign': {
      status: 201,
      call: async (_caller, permitted) => {
        const c0 = await awaitingFor(permitted);
        return {
          send: (c) => c.post(`/api/cases/${c0.id}/sign`).send({ password: DEMO_PASSWORD, version: c0.version }),
          check: (res) => expect(res.body).toMatchObject({ caseState: 'final', report: { caseId: c0.id, version: 1, status: 'final' } }),
        };
      },
    },
    'POST /api/cases/:id/correct': {
      status: 201,
      call: async (_caller, permitted) => {
        const s = await signedFor(permitted);
        return {
          send: (c) => c.post(`/api/cases/${s.caseId}/correct`).send({ password: DEMO_PASSWORD, reason: 'Interpretation reworded (matrix)', changesSummary: 'Wording only (matrix)' }),
          check: (res) => expect(res.body).toMatchObject({ caseState: 'corrected', report: { caseId: s.caseId, version: 2, status: 'corrected' } }),
        };
      },
    },
    'POST /api/cases/:id/amend': {
      status: 200,
      call: async (_caller, permitted) => {
        const s = await signedFor(permitted);
        const reason = 'Protein typed as 2 mg/mL; the worksheet says 4 (matrix)';
        return {
          send: (c) => c.post(`/api/cases/${s.caseId}/amend`).send({ reason, password: DEMO_PASSWORD }),
          check: (res) => expect(res.body).toMatchObject({ id: s.caseId, state: 'in_assay', amendReason: reason }),
        };
      },
    },
    'GET /api/review': {
      status: 200,
      call: async () => {
        const c0 = await sharedAwaiting();
        return { send: (c) => c.get('/api/review'), check: (res) => expect(res.body.items.map((x: { caseId: number }) => x.caseId)).toContain(c0.id) };
      },
    },
    'GET /api/review/:id': {
      status: 200,
      call: async () => {
        const c0 = await sharedAwaiting();
        return { send: (c) => c.get(`/api/review/${c0.id}`), check: (res) => expect(res.body).toMatchObject({ case: { id: c0.id }, state: 'awaiting_review' }) };
      },
    },
    'PUT /api/review/:id/draft': {
      status: 200,
      call: async (_caller, permitted) => {
        const c0 = await awaitingFor(permitted);
        const interpretation = 'Isolated complex I deficiency in muscle (matrix draft).';
        return { send: (c) => c.put(`/api/review/${c0.id}/draft`).send({ interpretation, version: null }), check: (res) => expect(res.body).toMatchObject({ interpretation }) };
      },
    },
    'POST /api/review/:id/return': {
      status: 200,
      call: async (_caller, permitted) => {
        const c0 = await awaitingFor(permitted);
        const reason = 'Repeat complex I in duplicate (matrix)';
        return {
          send: (c) => c.post(`/api/review/${c0.id}/return`).send({ reason, version: c0.version }),
          check: (res) => expect(res.body).toMatchObject({ id: c0.id, state: 'in_assay', returnReason: reason }),
        };
      },
    },
    'GET /api/outbox': {
      status: 200,
      call: async () => ({ send: (c) => c.get('/api/outbox'), check: (res) => expect(res.body.retryDelaysSeconds).toEqual(PUBLISHED_RETRY_DELAYS) }),
    },
    'POST /api/outbox/notices/:id/retry': {
      status: 200,
      call: async (_caller, permitted) => {
        const n = await failedNoticeFor(permitted);
        return { send: (c) => c.post(`/api/outbox/notices/${n.id}/retry`).send({}), check: (res) => expect(res.body).toMatchObject({ id: n.id, status: 'pending', attempts: 0 }) };
      },
    },
    'GET /api/registry/cohort': {
      status: 200,
      call: async () => {
        const r = await ownReport();
        return { send: (c) => c.get('/api/registry/cohort?pageSize=200'), check: (res) => expect(res.body.items.map((x: { reportId: number }) => x.reportId)).toContain(r.reportId) };
      },
    },
    'GET /api/registry/cohort/plots': {
      status: 200,
      call: async () => {
        await ownReport();
        return { send: (c) => c.get('/api/registry/cohort/plots'), check: (res) => expect(res.body.ratioToCs.length).toBeGreaterThan(0) };
      },
    },
    'GET /api/registry/saved-searches': {
      status: 200,
      // The caller's own searches only: one saved first by the caller (by the technologist for a refused caller).
      call: async (caller, permitted) => {
        const s = await ownSearchFor(caller, permitted);
        return { send: (c) => c.get('/api/registry/saved-searches'), check: (res) => expect(res.body.items.map((x: { id: number }) => x.id)).toContain(s.id) };
      },
    },
    'POST /api/registry/saved-searches': {
      status: 201,
      call: async () => {
        const name = `Matrix cohort ${nextSerial()}`;
        return {
          send: (c) => c.post('/api/registry/saved-searches').send({ name, filters: { pattern: 'combined' } }),
          check: (res) => expect(res.body).toMatchObject({ id: expect.any(Number), name, filters: { pattern: 'combined' } }),
        };
      },
    },
    'DELETE /api/registry/saved-searches/:id': {
      status: 204,
      call: async (caller, permitted) => {
        const s = await ownSearchFor(caller, permitted);
        return {
          send: (c) => c.delete(`/api/registry/saved-searches/${s.id}`),
          check: async () => expect((await ctx.as(caller as 'technologist').get('/api/registry/saved-searches')).body.items.map((x: { id: number }) => x.id)).not.toContain(s.id),
        };
      },
    },
    'GET /api/registry/export.csv': {
      status: 200,
      call: async () => {
        const r = await ownReport();
        return {
          send: (c) => binary(c.get('/api/registry/export.csv')),
          check: (res) => {
            expect(res.headers['content-type']).toMatch(/^text\/csv/);
            const text = res.body.toString('utf8');
            expect(text.split('\r\n')[0]).toMatch(/(^|,)accession(,|$)/);
            expect(text).toContain(r.accession);
          },
        };
      },
    },
  };
}

/**
 * A clinician reads the reports of the cases they referred, and nothing else: another clinician's report answers
 * 404 as if it did not exist (docs/api.md, "Who reads which report"), and lists leave it out.
 */
export function clinicianOwnReports(ctx: Ctx): void {
  const fx = fixtures(ctx);
  const mine = once(() => fx.signedCase(ctx.clinicianId()));
  const theirs = once(() => fx.signedCase(ctx.clinician2Id()));

  it.each(['', '/pdf', '/fhir'])("when a clinician asks for another clinician's report%s, then 404 NOT_FOUND", async (tail) => {
    const other = await theirs();
    const res = await ctx.as('clinician').get(`/api/reports/${other.reportId}${tail}`);
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe('NOT_FOUND');
    // The clinician who referred it reads it.
    expect((await binary(ctx.as('clinician2').get(`/api/reports/${other.reportId}${tail}`))).status).toBe(200);
  });

  it("when a clinician lists reports, then their own referral is there and another clinician's is not", async () => {
    const [own, other] = [await mine(), await theirs()];
    for (const path of ['/api/reports', '/api/reports/by-case']) {
      const text = JSON.stringify(ok(await ctx.as('clinician').get(path), 200, path).body);
      expect(text).toContain(own.accession);
      expect(text).not.toContain(other.accession);
    }
  });
}
