import type { Express } from 'express';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { CaseDetail } from '@/schemas/case';
import type { MailDelivery, Outbox, OutboxMessage } from '@/schemas/report';
import { loadConfig } from '../../server/config';
import { startLocalSmtpServer, type LocalSmtpServer } from '../../server/modules/mail/local-smtp';
import { createSmtpMailer, type Mailer } from '../../server/modules/mail/mailer';
import { createNoticeDelivery, DEFAULT_LEASE_MS } from '../../server/modules/mail/notice-worker';
import { accountId, createCaseAwaitingReview } from '../factories/workup';
import { DEMO_PASSWORD, ORIGIN, countRows, makeTestApp, type TestApp } from '../setup/test-app';
import { signedInAgent } from '../setup/http-agent';
import { startTestSmtpServer } from '../setup/test-smtp-server';

/*
 * Report notices: written to the durable outbox in the signing transaction, then delivered by the notice worker
 * over SMTP (nodemailer) to a local smtp-server stand-in that keeps what it receives. The worker runs here with
 * an injected clock, one run at a time, so nothing waits on real time. What a notice may carry follows the
 * product brief: the accession number and a sign-in link, no patient data [common practice for result
 * notifications by e-mail]. The retry schedule is the one docs/notices.md publishes.
 */

const config = loadConfig({ NODE_ENV: 'test', PORT: '3000', DEMO_PASSWORD });

let t: TestApp;
let smtp: LocalSmtpServer;
let mailer: Mailer;
let app: Express;
let clockAt = new Date();
const clock = () => clockAt;
/** Moves the injected clock to `ms` after the real now (rows are stamped with the real time when queued). */
const setClock = (ms: number) => (clockAt = new Date(Date.now() + ms));

const signIn = (target: Express, email: string) => signedInAgent(target, ORIGIN, email, DEMO_PASSWORD);

async function outbox(admin: request.Agent): Promise<Outbox> {
  const res = await admin.get('/api/outbox');
  expect(res.status).toBe(200);
  return res.body as Outbox;
}
async function noticeOf(admin: request.Agent, reportId: number): Promise<MailDelivery> {
  const found = (await outbox(admin)).deliveries.filter((d) => d.reportId === reportId);
  expect(found).toHaveLength(1);
  return found[0]!;
}
const messagesFor = async (admin: request.Agent, accession: string): Promise<OutboxMessage[]> =>
  (await outbox(admin)).messages.filter((m) => m.subject.includes(accession));

/** A port nothing listens on: start a stand-in, note its port, stop it. */
async function closedPort(): Promise<number> {
  const gone = await startLocalSmtpServer(t.sequelize, 0);
  await gone.close();
  return gone.port;
}

let tech: request.Agent;
let director: request.Agent;
let admin: request.Agent;
let clinicianId: number;

beforeAll(async () => {
  t = await makeTestApp();
  smtp = await startLocalSmtpServer(t.sequelize, 0);
  mailer = createSmtpMailer(config.mail, smtp.port);
  app = t.withOptions({ mailer });
  [tech, director, admin] = await Promise.all([
    signIn(app, 'technologist@demo.test'),
    signIn(app, 'director@demo.test'),
    signIn(app, 'admin@demo.test'),
  ]);
  clinicianId = await accountId(admin, 'clinician@demo.test');
});
afterAll(async () => {
  mailer.close();
  await smtp.close();
  await t.close();
});

async function signNewCase(): Promise<{ c: CaseDetail; reportId: number }> {
  const c = await createCaseAwaitingReview(tech, { referringClinicianId: clinicianId });
  const res = await director.post(`/api/cases/${c.id}/sign`).send({ password: DEMO_PASSWORD });
  expect(res.status).toBe(201);
  return { c, reportId: res.body.report.id as number };
}

describe('report notices', () => {
  let c: CaseDetail;
  let reportId: number;

  it('when a case is signed, then its notice is waiting in the outbox before any worker has run, and nothing has been mailed', async () => {
    ({ c, reportId } = await signNewCase());
    const notice = await noticeOf(admin, reportId);
    expect(notice).toMatchObject({ status: 'pending', attempts: 0, kind: 'report_ready', recipient: 'clinician@demo.test', sentAt: null });
    expect(notice.nextAttemptAt).not.toBeNull();
    expect(await messagesFor(admin, c.accession)).toHaveLength(0);
  });

  it('when the worker runs, then the "report ready" notice reaches the referring clinician with the accession and a sign-in link and no patient data, and is marked sent', async () => {
    setClock(1000);
    const run = await createNoticeDelivery({ sequelize: t.sequelize, mailer, now: clock }).runOnce();
    expect(run.sent).toBeGreaterThanOrEqual(1);
    const [msg, ...more] = await messagesFor(admin, c.accession);
    expect(more).toHaveLength(0);
    expect(msg!.to).toContain('clinician@demo.test');
    expect(msg!.to).not.toContain('clinician2@demo.test');
    expect(msg!.subject).toMatch(/ready/i);
    expect(msg!.text).toContain(c.accession);
    expect(msg!.text).toContain(`${config.publicOrigin}/my-reports`);
    for (const personal of [c.patient.familyName, c.patient.givenName, c.patient.labPatientId, c.patient.dateOfBirth, c.clinicalIndication]) {
      expect(msg!.text).not.toContain(personal);
      expect(msg!.subject).not.toContain(personal);
    }
    const notice = await noticeOf(admin, reportId);
    expect(notice).toMatchObject({ status: 'sent', attempts: 1, lastError: null, messageId: msg!.messageId, sentAt: clockAt.toISOString() });
    // A second run finds nothing due: the notice goes once.
    expect(await createNoticeDelivery({ sequelize: t.sequelize, mailer, now: clock }).runOnce()).toEqual({ sent: 0, retrying: 0, failed: 0 });
  });

  it('when the report is corrected, then a "corrected report" notice follows, naming the version it replaces', async () => {
    const res = await director
      .post(`/api/cases/${c.id}/correct`)
      .send({ password: DEMO_PASSWORD, reason: 'Fixture correction.', changesSummary: 'Wording (fixture).' });
    expect(res.status).toBe(201);
    expect((await noticeOf(admin, res.body.report.id)).status).toBe('pending');
    setClock(1000);
    await createNoticeDelivery({ sequelize: t.sequelize, mailer, now: clock }).runOnce();
    const msg = (await messagesFor(admin, c.accession)).find((m) => /corrected/i.test(m.subject));
    expect(msg?.to).toContain('clinician@demo.test');
    expect(msg!.text).toMatch(/replaces version 1/);
    expect(msg!.text).not.toContain(c.patient.familyName);
  });

  it('when a signature is refused (wrong password, or a case already signed), then no notice is queued', async () => {
    const before = await countRows(t.sequelize, 'notice_outbox');
    const other = await createCaseAwaitingReview(tech, { referringClinicianId: clinicianId });
    expect((await director.post(`/api/cases/${other.id}/sign`).send({ password: 'not-the-password' })).status).toBe(401);
    expect((await director.post(`/api/cases/${c.id}/sign`).send({ password: DEMO_PASSWORD })).status).toBe(409);
    expect(await countRows(t.sequelize, 'notice_outbox')).toBe(before);
  });

  it('when several cases are signed at once and two workers run side by side, then every signed report has exactly one notice and one message', async () => {
    const cases = await Promise.all(Array.from({ length: 5 }, () => createCaseAwaitingReview(tech, { referringClinicianId: clinicianId })));
    const signed = await Promise.all(cases.map((x) => director.post(`/api/cases/${x.id}/sign`).send({ password: DEMO_PASSWORD })));
    expect(signed.map((r) => r.status)).toEqual([201, 201, 201, 201, 201]);
    setClock(1000);
    const runs = await Promise.all([
      createNoticeDelivery({ sequelize: t.sequelize, mailer, now: clock }).runOnce(),
      createNoticeDelivery({ sequelize: t.sequelize, mailer, now: clock }).runOnce(),
    ]);
    expect(runs[0]!.sent + runs[1]!.sent).toBe(5);
    for (const [i, r] of signed.entries()) {
      expect((await noticeOf(admin, r.body.report.id)).status).toBe('sent');
      expect(await messagesFor(admin, cases[i]!.accession)).toHaveLength(1);
    }
  });

  it('when someone other than an administrator opens the outbox or asks for a resend, then 403', async () => {
    expect((await director.get('/api/outbox')).status).toBe(403);
    expect((await director.post('/api/outbox/notices/1/retry').send({})).status).toBe(403);
    const clinician = await signIn(app, 'clinician@demo.test');
    expect((await clinician.get('/api/outbox')).status).toBe(403);
    expect((await tech.post('/api/outbox/notices/1/retry').send({})).status).toBe(403);
  });
});

describe('a mail server that cannot be reached', () => {
  it('when every try fails, then the worker waits 30 s, 1, 2, 4, 8, 16, 32 min, 1 h, 1 h between tries, then marks the notice not sent with the reason', async () => {
    const dead = createSmtpMailer(config.mail, await closedPort());
    const { reportId, c } = await signNewCase();
    // The published schedule (docs/notices.md), in seconds [common practice: doubling backoff with a ceiling].
    const published = [30, 60, 120, 240, 480, 960, 1920, 3600, 3600];
    const worker = createNoticeDelivery({ sequelize: t.sequelize, mailer: dead, now: clock });
    setClock(1000);
    let notice = await noticeOf(admin, reportId);
    for (let attempt = 1; attempt <= 10; attempt += 1) {
      const run = await worker.runOnce();
      notice = await noticeOf(admin, reportId);
      expect(notice.attempts).toBe(attempt);
      expect(notice.lastError).toMatch(/could not reach the mail server.*ECONNREFUSED/i);
      if (attempt === 10) break;
      expect(run.retrying).toBe(1);
      expect(notice.status).toBe('pending');
      const wait = (Date.parse(notice.nextAttemptAt!) - clockAt.getTime()) / 1000;
      expect(wait).toBe(published[attempt - 1]);
      // One millisecond early, nothing happens.
      clockAt = new Date(Date.parse(notice.nextAttemptAt!) - 1);
      expect(await worker.runOnce()).toEqual({ sent: 0, retrying: 0, failed: 0 });
      expect((await noticeOf(admin, reportId)).attempts).toBe(attempt);
      clockAt = new Date(Date.parse(notice.nextAttemptAt!));
    }
    expect(notice).toMatchObject({ status: 'failed', attempts: 10, nextAttemptAt: null, canRetry: true, sentAt: null });
    // The signature stands whatever happens to the notice.
    expect((await tech.get(`/api/cases/${c.id}`)).body.state).toBe('final');
    dead.close();

    // The administrator asks again, twice at the same moment: one request wins, the other is told why.
    const answers = await Promise.all([1, 2, 3].map(() => admin.post(`/api/outbox/notices/${notice.id}/retry`).send({})));
    expect(answers.map((a) => a.status).sort()).toEqual([200, 409, 409]);
    const ok = answers.find((a) => a.status === 200)!.body as MailDelivery;
    expect(ok).toMatchObject({ status: 'pending', attempts: 0 });
    for (const refused of answers.filter((a) => a.status === 409)) expect(refused.body.error.message).toMatch(/waiting to be sent/);
    const audit = await t.signedIn('director').then((d) => d.get('/api/audit?entity=notice'));
    expect((audit.body.items as { action: string; entityId: string }[]).filter((e) => e.entityId === String(notice.id))).toHaveLength(1);

    setClock(1000);
    await createNoticeDelivery({ sequelize: t.sequelize, mailer, now: clock }).runOnce();
    expect(await noticeOf(admin, reportId)).toMatchObject({ status: 'sent', attempts: 1 });
    expect(await messagesFor(admin, c.accession)).toHaveLength(1);
  });

  it('when a notice is not failed, then asking to send it again is 409; an unknown one is 404; a bad id is 400 naming id', async () => {
    const { reportId } = await signNewCase();
    const notice = await noticeOf(admin, reportId);
    const res = await admin.post(`/api/outbox/notices/${notice.id}/retry`).send({});
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('INVALID_STATE');
    expect((await admin.post('/api/outbox/notices/999999/retry').send({})).status).toBe(404);
    const bad = await admin.post('/api/outbox/notices/abc/retry').send({});
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields).toHaveProperty('id');
    setClock(1000);
    await createNoticeDelivery({ sequelize: t.sequelize, mailer, now: clock }).runOnce();
  });
});

describe('a mail server that answers busy or refuses', () => {
  // SMTP reply classes: 4yz is a transient negative completion, 5yz a permanent one (RFC 5321 §4.2.1) [from memory].
  it('when the server says 451 (try later), then the notice waits and goes through once the server accepts', async () => {
    const picky = await startTestSmtpServer();
    const m = createSmtpMailer(config.mail, picky.port);
    const { reportId, c } = await signNewCase();
    const worker = createNoticeDelivery({ sequelize: t.sequelize, mailer: m, now: clock });
    picky.answer({ code: 451, text: 'Local problem, try again later (fixture)' });
    setClock(1000);
    expect(await worker.runOnce()).toMatchObject({ retrying: 1 });
    const waiting = await noticeOf(admin, reportId);
    expect(waiting).toMatchObject({ status: 'pending', attempts: 1 });
    expect(waiting.lastError).toMatch(/try later.*451/i);
    picky.answer(null);
    clockAt = new Date(Date.parse(waiting.nextAttemptAt!));
    expect(await worker.runOnce()).toMatchObject({ sent: 1 });
    expect(await noticeOf(admin, reportId)).toMatchObject({ status: 'sent', attempts: 2, lastError: null });
    expect(picky.received).toHaveLength(1);
    expect(picky.received[0]).toContain(c.accession);
    m.close();
    await picky.close();
  });

  it('when the server says 550 (refused for good), then the notice is marked not sent after one try, with the reply as the reason', async () => {
    const picky = await startTestSmtpServer();
    const m = createSmtpMailer(config.mail, picky.port);
    const { reportId } = await signNewCase();
    picky.answer({ code: 550, text: 'No such mailbox here (fixture)' });
    setClock(1000);
    expect(await createNoticeDelivery({ sequelize: t.sequelize, mailer: m, now: clock }).runOnce()).toMatchObject({ failed: 1 });
    const notice = await noticeOf(admin, reportId);
    expect(notice).toMatchObject({ status: 'failed', attempts: 1, canRetry: true });
    expect(notice.lastError).toMatch(/refused the message for good.*550/i);
    expect(picky.received).toHaveLength(0);
    m.close();
    await picky.close();
  });
});

describe('a process that stops while sending', () => {
  it('when a try is cut short, then the notice is taken up again once its lease runs out, and the late answer of the stopped try changes nothing', async () => {
    const { reportId, c } = await signNewCase();
    // The "stopped" process: its send never answers until the test says so.
    let release: (err: Error) => void = () => {};
    const hanging: Mailer = {
      kind: 'smtp',
      from: config.mail.from,
      send: () => new Promise((_resolve, reject) => (release = reject)),
      close: () => {},
    };
    setClock(1000);
    const start = clockAt.getTime();
    const stopped = createNoticeDelivery({ sequelize: t.sequelize, mailer: hanging, now: clock }).runOnce();
    let notice = await noticeOf(admin, reportId);
    for (let i = 0; notice.status !== 'sending' && i < 200; i += 1) {
      await new Promise((r) => setImmediate(r));
      notice = await noticeOf(admin, reportId);
    }
    expect(notice).toMatchObject({ status: 'sending', attempts: 1 });

    const restarted = createNoticeDelivery({ sequelize: t.sequelize, mailer, now: clock });
    clockAt = new Date(start + DEFAULT_LEASE_MS - 1);
    expect(await restarted.runOnce()).toEqual({ sent: 0, retrying: 0, failed: 0 });
    clockAt = new Date(start + DEFAULT_LEASE_MS);
    expect(await restarted.runOnce()).toMatchObject({ sent: 1 });
    expect(await noticeOf(admin, reportId)).toMatchObject({ status: 'sent', attempts: 2 });

    release(new Error('connection reset (fixture)'));
    await stopped;
    expect(await noticeOf(admin, reportId)).toMatchObject({ status: 'sent', attempts: 2, lastError: null });
    expect(await messagesFor(admin, c.accession)).toHaveLength(1);
  });
});
