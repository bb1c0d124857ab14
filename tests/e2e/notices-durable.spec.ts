import request from 'supertest';
import type { BrowserContext } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { MailDelivery, Outbox } from '@/schemas/report';
import { accountId, createCaseAwaitingReview } from '../factories/workup';
import { signedInAgent } from '../setup/http-agent';
import { startTestSmtpServer, type TestSmtpServer } from '../setup/test-smtp-server';
import { launchBrowser, screenshot, signIn } from './support/browser';
import { startServer, type RunningServer } from './support/server';

/*
 * The fault the notices outbox exists for, on the real server process: the director signs several cases at once,
 * the process is killed with SIGKILL right after the answers (its notice worker held back by
 * NOTICE_WORKER_DELAY_MS, so nothing has been mailed yet), and a new process on the same database file must
 * deliver a notice for every signature it acknowledged — at least once — and show it as sent. The mail server
 * is a test-owned SMTP server (tests/setup/test-smtp-server.ts), so what reached it is counted outside
 * Cristae's database. Then the Sent e-mail page is looked at in Chromium with a notice waiting, one sent and
 * one refused, and the refused one is sent again.
 */

const PASSWORD = 'cristae-demo';
const SIGNINGS = 8;

let smtp: TestSmtpServer;
let server: RunningServer | null = null;
let browser: BrowserContext | null = null;
let dataDir = '';

const signedIn = (origin: string, email: string) => signedInAgent(origin, origin, email, PASSWORD);

// A short lease (stored with each claim), so that a notice left "sending" by a killed process is taken up again
// within the test rather than after the default 2 minutes.
const mailEnv = () => ({ SMTP_HOST: '127.0.0.1', SMTP_PORT: String(smtp.port), NOTICE_POLL_MS: '500', NOTICE_LEASE_MS: '5000' });
const reachedMailServer = (accession: string) => smtp.received.filter((m) => m.includes(accession)).length;

/** Polls the outbox until `done` holds (bounded); returns the last answer. No timing is asserted. */
async function outboxUntil(admin: request.Agent, done: (o: Outbox) => boolean, what: string): Promise<Outbox> {
  for (let i = 0; ; i += 1) {
    const res = await admin.get('/api/outbox');
    expect(res.status).toBe(200);
    const o = res.body as Outbox;
    if (done(o)) return o;
    if (i > 600) throw new Error(`${what}: not reached; outbox now ${JSON.stringify(o.deliveries.slice(0, 12))}`);
    await new Promise((r) => setTimeout(r, 250));
  }
}

beforeAll(async () => {
  smtp = await startTestSmtpServer();
});
afterAll(async () => {
  await browser?.close();
  await server?.stop();
  await smtp?.close();
});

describe('notices after a kill -9 between signing and sending', () => {
  const acknowledged: { reportId: number; accession: string }[] = [];
  let clinicianId = 0;

  it('when the director signs several cases at once and the process is killed right after the answers, then nothing has been mailed yet', async () => {
    server = await startServer({ ...mailEnv(), NOTICE_WORKER_DELAY_MS: '600000' });
    dataDir = server.dataDir;
    const [tech, director, admin] = await Promise.all([
      signedIn(server.origin, 'technologist@demo.test'),
      signedIn(server.origin, 'director@demo.test'),
      signedIn(server.origin, 'admin@demo.test'),
    ]);
    clinicianId = await accountId(admin, 'clinician@demo.test');
    const cases = [];
    for (let i = 0; i < SIGNINGS; i += 1) cases.push(await createCaseAwaitingReview(tech, { referringClinicianId: clinicianId }));

    const answers = await Promise.all(
      cases.map((c) =>
        director
          .post(`/api/cases/${c.id}/sign`)
          .send({ password: PASSWORD })
          .then((res) => ({ c, res })),
      ),
    );
    await server.kill();
    server = null;
    for (const { c, res } of answers) {
      expect(res.status).toBe(201);
      acknowledged.push({ reportId: res.body.report.id as number, accession: c.accession });
    }
    expect(acknowledged).toHaveLength(SIGNINGS);
    for (const a of acknowledged) expect(reachedMailServer(a.accession)).toBe(0);
  });

  it('when the server starts again on the same database, then every acknowledged signature gets its notice, at least once, shown as sent', async () => {
    server = await startServer(mailEnv(), { dataDir });
    const admin = await signedIn(server.origin, 'admin@demo.test');
    const ids = new Set(acknowledged.map((a) => a.reportId));
    const o = await outboxUntil(
      admin,
      (x) => x.deliveries.filter((d) => ids.has(d.reportId ?? -1) && d.status === 'sent').length === SIGNINGS,
      'every acknowledged notice sent',
    );
    for (const a of acknowledged) {
      const rows = o.deliveries.filter((d) => d.reportId === a.reportId);
      // One notice per signed report: the outbox row was written with the signature, once.
      expect(rows).toHaveLength(1);
      expect(rows[0]).toMatchObject({ status: 'sent', kind: 'report_ready', recipient: 'clinician@demo.test' });
      expect(reachedMailServer(a.accession)).toBeGreaterThanOrEqual(1);
    }
    // The demo reports signed at seeding were held back by the same kill, and go out too.
    const demo = o.deliveries.filter((d) => !ids.has(d.reportId ?? -1));
    expect(demo.length).toBeGreaterThan(0);
    expect(demo.every((d) => d.status === 'sent' || d.status === 'failed')).toBe(true);
  });

  it('when the worker is running and the process is killed in the middle of parallel signings, then after a restart every acknowledged signature has its notice and every stored signature has exactly one', async () => {
    // Keep the server from test 2 (same database), worker running at full speed.
    const running = server!;
    const [tech, director] = await Promise.all([
      signedIn(running.origin, 'technologist@demo.test'),
      signedIn(running.origin, 'director@demo.test'),
    ]);
    const cases = [];
    for (let i = 0; i < SIGNINGS; i += 1) cases.push(await createCaseAwaitingReview(tech, { referringClinicianId: clinicianId }));
    const acked: { reportId: number; accession: string }[] = [];
    let killed: Promise<void> | null = null;
    await Promise.all(
      cases.map((c) =>
        director
          .post(`/api/cases/${c.id}/sign`)
          .send({ password: PASSWORD })
          .then(
            (res) => {
              if (res.status === 201) acked.push({ reportId: res.body.report.id as number, accession: c.accession });
              // Killed as soon as half the answers are in: the rest are cut off wherever they are.
              if (acked.length >= SIGNINGS / 2) killed ??= running.kill();
            },
            () => undefined,
          ),
      ),
    );
    await (killed ?? running.kill());
    expect(acked.length).toBeGreaterThanOrEqual(SIGNINGS / 2);

    server = await startServer(mailEnv(), { dataDir });
    const [admin, lab] = await Promise.all([signedIn(server.origin, 'admin@demo.test'), signedIn(server.origin, 'technologist@demo.test')]);
    const ackedIds = new Set(acked.map((a) => a.reportId));
    const o = await outboxUntil(
      admin,
      (x) => x.deliveries.filter((d) => ackedIds.has(d.reportId ?? -1) && d.status === 'sent').length === acked.length,
      'every acknowledged notice sent after the second kill',
    );
    for (const a of acked) expect(reachedMailServer(a.accession)).toBeGreaterThanOrEqual(1);
    // Whatever the kill cut off: a case that ended up signed has exactly one notice; one that did not has none.
    for (const c of cases) {
      const reports = ((await lab.get(`/api/cases/${c.id}/reports`)).body as { items: { id: number }[] }).items;
      const notices = o.deliveries.filter((d) => d.accession === c.accession);
      expect(notices).toHaveLength(reports.length);
      if (reports.length) expect(notices[0]!.reportId).toBe(reports[0]!.id);
    }
    const stored = cases.filter((c) => o.deliveries.some((d) => d.accession === c.accession)).length;
    const twice = cases.filter((c) => reachedMailServer(c.accession) > 1).length;
    console.info(`kill mid-signing: ${acked.length} acknowledged, ${stored} stored, ${twice} mailed more than once`);
  });

  it('when the mail server is busy for one clinician and refuses another, then the Sent e-mail page shows waiting, sent and not sent with the reasons, and a refused notice can be sent again', async () => {
    const origin = server!.origin;
    const [tech, director, admin] = await Promise.all([
      signedIn(origin, 'technologist@demo.test'),
      signedIn(origin, 'director@demo.test'),
      signedIn(origin, 'admin@demo.test'),
    ]);
    const clinician2Id = await accountId(admin, 'clinician2@demo.test');
    let refuseSecond = true;
    smtp.answer((rcpt) => {
      if (rcpt === 'clinician2@demo.test') return refuseSecond ? { code: 550, text: 'Mailbox unavailable (test mail server)' } : null;
      return { code: 451, text: 'Busy, try again later (test mail server)' };
    });
    const busy = await createCaseAwaitingReview(tech, { referringClinicianId: clinicianId });
    const refused = await createCaseAwaitingReview(tech, { referringClinicianId: clinician2Id });
    for (const c of [busy, refused]) expect((await director.post(`/api/cases/${c.id}/sign`).send({ password: PASSWORD })).status).toBe(201);
    const find = (o: Outbox, accession: string) => o.deliveries.find((d) => d.accession === accession);
    const o = await outboxUntil(
      admin,
      (x) => find(x, busy.accession)?.attempts === 1 && find(x, busy.accession)?.status === 'pending' && find(x, refused.accession)?.status === 'failed',
      'one notice waiting, one refused',
    );
    const waiting = find(o, busy.accession)!;
    expect(waiting.lastError).toMatch(/try later.*451/);
    expect(waiting.nextAttemptAt).not.toBeNull();
    const notSent: MailDelivery = find(o, refused.accession)!;
    expect(notSent.lastError).toMatch(/refused the message for good.*550/);

    browser = await launchBrowser();
    const page = await browser.newPage();
    await signIn(page, origin, 'admin@demo.test');
    await page.goto(`${origin}/admin/outbox`);
    const table = page.getByRole('table', { name: 'Notices' });
    const rowOf = (accession: string) => table.getByRole('row').filter({ hasText: accession });
    await rowOf(busy.accession).getByText('Will try again').waitFor();
    await rowOf(refused.accession).getByText('Not sent').waitFor();
    await expect(rowOf(refused.accession).textContent()).resolves.toContain('Mailbox unavailable');
    await rowOf(acknowledged[0]!.accession).getByText('Sent', { exact: true }).waitFor();
    await screenshot(page, 'notices-1-waiting-sent-not-sent');

    refuseSecond = false;
    await rowOf(refused.accession).getByRole('button', { name: /Send the notice for .* again/ }).click();
    await rowOf(refused.accession).getByText('Sent', { exact: true }).waitFor({ timeout: 30_000 });
    expect(reachedMailServer(refused.accession)).toBe(1);
    await screenshot(page, 'notices-2-sent-again');
    await page.close();
  });
});
