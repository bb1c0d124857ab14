import type { Express } from 'express';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { CaseDetail } from '@/schemas/case';
import type { Outbox, OutboxMessage } from '@/schemas/report';
import { loadConfig } from '../../server/config';
import { startLocalSmtpServer, type LocalSmtpServer } from '../../server/modules/mail/local-smtp';
import { createSmtpMailer, type Mailer } from '../../server/modules/mail/mailer';
import { noticesSettled } from '../../server/modules/mail/notices.service';
import { accountId, createCaseAwaitingReview } from '../factories/workup';
import { DEMO_PASSWORD, ORIGIN, makeTestApp, type TestApp } from '../setup/test-app';

/*
 * Report notices go out by SMTP (nodemailer) after the signature commits, to a local smtp-server stand-in that
 * keeps what it receives. What a notice may carry follows the product brief: the accession number and a
 * sign-in link, no patient data [common practice for result notifications by e-mail]; a failed delivery is
 * recorded and never undoes the signature.
 */

const config = loadConfig({ NODE_ENV: 'test', PORT: '3000', DEMO_PASSWORD });

let t: TestApp;
let smtp: LocalSmtpServer;
let mailer: Mailer;
let app: Express;

function agent(target: Express) {
  const a = request.agent(target);
  a.set('Origin', ORIGIN);
  return a;
}
async function signIn(target: Express, email: string) {
  const a = agent(target);
  const res = await a.post('/api/auth/login').send({ email, password: DEMO_PASSWORD });
  expect(res.status).toBe(200);
  return a;
}

/** Waits (bounded) until the outbox holds a message matching `match`. */
async function waitForMessage(admin: request.Agent, match: (m: OutboxMessage) => boolean): Promise<OutboxMessage> {
  const deadline = Date.now() + 10_000;
  for (;;) {
    await noticesSettled();
    const found = ((await admin.get('/api/outbox')).body as Outbox).messages.find(match);
    if (found) return found;
    if (Date.now() > deadline) throw new Error('no matching message reached the local SMTP server within 10 s');
    await new Promise((r) => setTimeout(r, 100));
  }
}

beforeAll(async () => {
  t = await makeTestApp();
  smtp = await startLocalSmtpServer(t.sequelize, 0);
  mailer = createSmtpMailer(config.mail, smtp.port);
  app = t.withOptions({ mailer });
});
afterAll(async () => {
  await noticesSettled();
  mailer.close();
  await smtp.close();
  await t.close();
});

describe('report notices', () => {
  let c: CaseDetail;
  let tech: request.Agent;
  let director: request.Agent;
  let admin: request.Agent;
  let clinicianId: number;

  beforeAll(async () => {
    [tech, director, admin] = await Promise.all([
      signIn(app, 'technologist@demo.test'),
      signIn(app, 'director@demo.test'),
      signIn(app, 'admin@demo.test'),
    ]);
    clinicianId = await accountId(admin, 'clinician@demo.test');
    c = await createCaseAwaitingReview(tech, { referringClinicianId: clinicianId });
  });

  it('when a case is signed, then a "report ready" notice reaches the referring clinician with the accession and a sign-in link and no patient data', async () => {
    const res = await director.post(`/api/cases/${c.id}/sign`).send({ password: DEMO_PASSWORD });
    expect(res.status).toBe(201);
    const msg = await waitForMessage(admin, (m) => m.subject.includes(c.accession));
    expect(msg.to).toContain('clinician@demo.test');
    expect(msg.to).not.toContain('clinician2@demo.test');
    expect(msg.subject).toMatch(/ready/i);
    expect(msg.text).toContain(c.accession);
    expect(msg.text).toContain(`${config.publicOrigin}/my-reports`);
    for (const personal of [c.patient.familyName, c.patient.givenName, c.patient.labPatientId, c.patient.dateOfBirth, c.clinicalIndication]) {
      expect(msg.text).not.toContain(personal);
      expect(msg.subject).not.toContain(personal);
    }
    const deliveries = ((await admin.get('/api/outbox')).body as Outbox).deliveries.filter((d) => d.reportId === res.body.report.id);
    expect(deliveries).toHaveLength(1);
    expect(deliveries[0]).toMatchObject({ status: 'sent', kind: 'report_ready', recipient: 'clinician@demo.test', messageId: msg.messageId });
  });

  it('when the report is corrected, then a "corrected report" notice follows, naming the version it replaces', async () => {
    const res = await director
      .post(`/api/cases/${c.id}/correct`)
      .send({ password: DEMO_PASSWORD, reason: 'Fixture correction.', changesSummary: 'Wording (fixture).' });
    expect(res.status).toBe(201);
    const msg = await waitForMessage(admin, (m) => m.subject.includes(c.accession) && /corrected/i.test(m.subject));
    expect(msg.to).toContain('clinician@demo.test');
    expect(msg.text).toMatch(/replaces version 1/);
    expect(msg.text).not.toContain(c.patient.familyName);
  });

  it('when someone other than an administrator opens the outbox, then 403', async () => {
    expect((await director.get('/api/outbox')).status).toBe(403);
    const clinician = await signIn(app, 'clinician@demo.test');
    expect((await clinician.get('/api/outbox')).status).toBe(403);
  });
});

describe('a mail server that is down', () => {
  it('when the notice cannot be delivered, then the signature stands and the failure is recorded', async () => {
    // A port that nothing listens on: start a stand-in, note its port, stop it.
    const gone = await startLocalSmtpServer(t.sequelize, 0);
    await gone.close();
    const deadMailer = createSmtpMailer(config.mail, gone.port);
    const broken = t.withOptions({ mailer: deadMailer });
    const [tech, director, admin] = await Promise.all([
      signIn(broken, 'technologist@demo.test'),
      signIn(broken, 'director@demo.test'),
      signIn(broken, 'admin@demo.test'),
    ]);
    const c = await createCaseAwaitingReview(tech, { referringClinicianId: await accountId(admin, 'clinician@demo.test') });
    const res = await director.post(`/api/cases/${c.id}/sign`).send({ password: DEMO_PASSWORD });
    expect(res.status).toBe(201);
    await noticesSettled();
    deadMailer.close();
    expect((await tech.get(`/api/cases/${c.id}`)).body.state).toBe('final');
    const delivery = ((await admin.get('/api/outbox')).body as Outbox).deliveries.find((d) => d.reportId === res.body.report.id);
    expect(delivery).toMatchObject({ status: 'failed', recipient: 'clinician@demo.test' });
    expect(delivery!.error).toMatch(/ECONNREFUSED|connect/i);
  });
});
