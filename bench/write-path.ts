import path from 'node:path';
import type autocannon from 'autocannon';
import sqlite3 from 'sqlite3';
import { buildPatientInput, buildRegisterCaseInput } from '../tests/factories/cases';
import { load, loadNote, p50p95, percentile, type LoadResult } from './support/load';
import { signIn, startBenchServer } from './support/server';
import type { BenchResult } from './types';

/*
 * The write path under load, against the real server over a SQLite file:
 * 1. 20 writers registering patients (POST /api/patients) beside 20 readers of the case list, for 15 s.
 * 2. 50 mixed clients: 30 readers (case list, a search, one case), 10 registering a patient and a case,
 *    10 working a case up (patient, case, protein, then the seven assays as typed rates). 30 s by default;
 *    BENCH_MIXED_SECONDS=300 (npm run bench -- write --long) runs the five-minute version.
 * After each, the server is killed with SIGKILL and every write it had acknowledged is looked up in the file.
 */

const WRITE_S = Number(process.env.BENCH_SECONDS ?? 15);
const MIXED_S = Number(process.env.BENCH_MIXED_SECONDS ?? (process.argv.includes('--long') ? 300 : 30));
const GOAL_WRITE_P95 = 100;
const GOAL_READ_P95 = 50;
const CONTRACT_WRITE_P95 = 300;
const CONTRACT_READ_P95 = 150;
const ASSAYS = ['CS', 'CI', 'CII', 'CIII', 'CIV', 'CI+III', 'CII+III'] as const;

type Acked = { patients: number[]; cases: number[]; measurements: number[] };

function countPresent(file: string, table: string, ids: number[]): Promise<number> {
  if (ids.length === 0) return Promise.resolve(0);
  return new Promise((resolve, reject) => {
    const db = new sqlite3.Database(file, sqlite3.OPEN_READONLY, (err) => err && reject(err));
    let present = 0;
    const chunks = Array.from({ length: Math.ceil(ids.length / 500) }, (_, i) => ids.slice(i * 500, i * 500 + 500));
    db.serialize(() => {
      for (const chunk of chunks) {
        db.get(`SELECT COUNT(*) AS n FROM "${table}" WHERE id IN (${chunk.join(',')})`, (err, row: { n: number }) => {
          if (err) reject(err);
          else present += row.n;
        });
      }
      db.close((err) => (err ? reject(err) : resolve(present)));
    });
  });
}

async function verify(dbFile: string, acked: Acked): Promise<{ acknowledged: number; present: number }> {
  const [p, c, m] = await Promise.all([
    countPresent(dbFile, 'patients', acked.patients),
    countPresent(dbFile, 'cases', acked.cases),
    countPresent(dbFile, 'measurements', acked.measurements),
  ]);
  return { acknowledged: acked.patients.length + acked.cases.length + acked.measurements.length, present: p + c + m };
}

const json = (body: unknown) => JSON.stringify(body);
const idOf = (body: string) => (JSON.parse(body) as { id: number }).id;

type Context = Record<string, unknown> & { patientId?: number; caseId?: number; specimen?: { id: number; version: number } };

/** A patient registration whose acknowledged id is kept. */
function registerPatient(acked: Acked): autocannon.Request {
  return {
    method: 'POST',
    path: '/api/patients',
    setupRequest: (req) => ({ ...req, body: json(buildPatientInput()) }),
    onResponse: (status, body, ctx) => {
      if (status === 201) acked.patients.push(((ctx as Context).patientId = idOf(body)));
    },
  };
}

/** A case for the patient registered just before on this connection. */
function registerCase(acked: Acked, clinicianId: number): autocannon.Request {
  return {
    method: 'POST',
    path: '/api/cases',
    setupRequest: (req, ctx) => ({ ...req, body: json(buildRegisterCaseInput((ctx as Context).patientId!, clinicianId)) }),
    onResponse: (status, body, ctx) => {
      if (status !== 201) return;
      const context = ctx as Context;
      const c = JSON.parse(body) as { id: number; specimens: { id: number; version: number }[] };
      acked.cases.push((context.caseId = c.id));
      context.specimen = c.specimens[0];
    },
  };
}

function workup(acked: Acked, clinicianId: number): autocannon.Request[] {
  return [
    registerPatient(acked),
    registerCase(acked, clinicianId),
    {
      method: 'PUT',
      setupRequest: (req, ctx) => ({
        ...req,
        path: `/api/specimens/${(ctx as Context).specimen!.id}/protein`,
        body: json({ kind: 'direct', proteinMgPerMl: 4.2, proteinSource: 'Bench lab sheet', version: (ctx as Context).specimen!.version }),
      }),
    },
    ...ASSAYS.map(
      (assay): autocannon.Request => ({
        method: 'POST',
        setupRequest: (req, ctx) => ({
          ...req,
          path: `/api/cases/${(ctx as Context).caseId}/measurements`,
          body: json({
            mode: 'rates',
            specimenId: (ctx as Context).specimen!.id,
            assay,
            replicate: 1,
            pathlengthCm: 1,
            reactionVolumeUl: 1000,
            sampleVolumeUl: 10,
            totalRatePerMin: assay === 'CS' ? 0.09 : -0.035,
            backgroundRatePerMin: assay === 'CS' ? 0.001 : -0.004,
          }),
        }),
        onResponse: (status, body) => {
          if (status === 201) acked.measurements.push(idOf(body));
        },
      }),
    ),
  ];
}

export default async function run(): Promise<BenchResult> {
  const rows: BenchResult['rows'] = [];
  const notes: string[] = [];
  const acked: Acked = { patients: [], cases: [], measurements: [] };

  // 1. 20 writers + 20 readers.
  let server = await startBenchServer();
  const dbFile = path.join(server.dataDir, 'cristae.sqlite');
  let writes: LoadResult;
  let reads: LoadResult;
  let cpuMs: number;
  try {
    const cookie = await signIn(server.origin, 'technologist@demo.test');
    const headers = { 'content-type': 'application/json', origin: server.origin, cookie };
    await load({ url: `${server.origin}/api/cases`, connections: 4, durationS: 2, headers });
    const cpuBefore = server.cpuMs();
    [writes, reads] = await Promise.all([
      load({ url: server.origin, connections: 20, durationS: WRITE_S, headers, requests: [registerPatient(acked)] }),
      load({ url: `${server.origin}/api/cases`, connections: 20, durationS: WRITE_S, headers }),
    ]);
    cpuMs = server.cpuMs() - cpuBefore;
  } finally {
    await server.kill();
  }
  const first = await verify(dbFile, acked);
  const wP95 = percentile(writes.latencies, 95);
  const rP95 = percentile(reads.latencies, 95);
  rows.push(
    { metric: '20 writers: POST /api/patients', value: `${p50p95(writes)}; ${writes.perSecond} writes/s; ${writes.errors} errors`, goal: `p95 < ${GOAL_WRITE_P95} ms (contract < ${CONTRACT_WRITE_P95} ms), no errors`, met: wP95 < GOAL_WRITE_P95 && writes.errors === 0 },
    { metric: '20 readers beside them: GET /api/cases', value: `${p50p95(reads)}; ${reads.perSecond} reads/s; ${reads.errors} errors`, goal: `p95 < ${GOAL_READ_P95} ms (contract < ${CONTRACT_READ_P95} ms), no errors`, met: rP95 < GOAL_READ_P95 && reads.errors === 0 },
    { metric: 'acknowledged writes present after SIGKILL', value: `${first.present} of ${first.acknowledged}`, goal: 'all', met: first.present === first.acknowledged && first.acknowledged > 0 },
  );

  // Closed-loop clients wait for each answer before sending the next, so with one event loop doing most of the
  // work, the mean answer time of 40 clients cannot fall below about 40 × the CPU each answer costs.
  const answered = writes.latencies.length + reads.latencies.length;
  const cpuPerAnswer = cpuMs / answered;
  notes.push(
    `Server CPU (all threads) per answer while 20 writers and 20 readers ran: ${cpuPerAnswer.toFixed(2)} ms (${answered} answers). ` +
      `With 40 clients that each wait for their answer, the mean answer time of all 40 cannot fall below about 40 × that = ${(40 * cpuPerAnswer).toFixed(0)} ms ` +
      `while one event loop does most of the work, against p95 goals of ${GOAL_WRITE_P95} ms for writes and ${GOAL_READ_P95} ms for reads at once: ` +
      'the CPU an answer costs on the machine of the day decides how close the goal can come.',
  );

  // 2. 50 mixed clients on the same file, after a restart.
  server = await startBenchServer({ dataDir: server.dataDir });
  const before = { ...acked, patients: [...acked.patients] };
  const mixedAcked: Acked = { patients: [], cases: [], measurements: [] };
  let readers: LoadResult;
  let registrars: LoadResult;
  let workups: LoadResult;
  try {
    const cookie = await signIn(server.origin, 'technologist@demo.test');
    const headers = { 'content-type': 'application/json', origin: server.origin, cookie };
    const clinicians = (await (await fetch(`${server.origin}/api/clinicians`, { headers })).json()) as { items: { id: number }[] };
    const clinicianId = clinicians.items[0]!.id;
    const someCase = ((await (await fetch(`${server.origin}/api/cases`, { headers })).json()) as { items: { id: number }[] }).items[0]!.id;
    [readers, registrars, workups] = await Promise.all([
      load({
        url: server.origin,
        connections: 30,
        durationS: MIXED_S,
        headers,
        requests: [{ method: 'GET', path: '/api/cases' }, { method: 'GET', path: '/api/cases?q=Fixturson' }, { method: 'GET', path: `/api/cases/${someCase}` }],
      }),
      load({ url: server.origin, connections: 10, durationS: MIXED_S, headers, requests: [registerPatient(mixedAcked), registerCase(mixedAcked, clinicianId)] }),
      load({ url: server.origin, connections: 10, durationS: MIXED_S, headers, requests: workup(mixedAcked, clinicianId) }),
    ]);
  } finally {
    await server.kill();
  }
  const second = await verify(dbFile, mixedAcked);
  const stillThere = await verify(dbFile, before);
  const mixedWrites = { ...registrars, latencies: [...registrars.latencies, ...workups.latencies].sort((a, b) => a - b), errors: registrars.errors + workups.errors };
  rows.push(
    { metric: `50 mixed clients for ${MIXED_S} s: 30 readers`, value: `${p50p95(readers)}; ${readers.perSecond} req/s; ${readers.errors} errors`, goal: 'no errors', met: readers.errors === 0 },
    {
      metric: '… 20 writers (registering cases; working cases up: protein, seven assays)',
      value: `${p50p95(mixedWrites)}; ${Math.round(mixedWrites.latencies.length / MIXED_S)} writes/s; ${mixedWrites.errors} errors`,
      goal: 'no errors',
      met: mixedWrites.errors === 0,
    },
    { metric: '… acknowledged writes present after SIGKILL', value: `${second.present} of ${second.acknowledged} (and ${stillThere.present} of ${stillThere.acknowledged} from step 1)`, goal: 'all', met: second.present === second.acknowledged && stillThere.present === stillThere.acknowledged },
  );
  notes.push(
    `Statuses — writers: ${JSON.stringify(writes.statuses)}; readers: ${JSON.stringify(reads.statuses)}; mixed readers ${JSON.stringify(readers.statuses)}, registrars ${JSON.stringify(registrars.statuses)}, work-ups ${JSON.stringify(workups.statuses)}.`,
    `Server: ${server.kind}. Writes are one at a time in arrival order; those waiting together commit as one IMMEDIATE transaction (group commit, each answered only after that commit; server/db/write-transaction.ts), on reused connections with synchronous=NORMAL under WAL, a cached PRAGMA table_info and statements kept prepared per connection (server/db/sqlite-connections.ts); while writes wait, one API read at a time is worked on (server/lib/read-gate.ts). ` +
      'Acknowledged = answered 201/200 with the new row\'s id; present = found by id in the database file after the server was killed with SIGKILL. ' +
      `The mixed run lasted ${MIXED_S} s (30 s unless BENCH_MIXED_SECONDS is set; \`npm run bench -- write-path --long\` runs five minutes).`,
  );
  return {
    title: `Write path: 20 writers + 20 readers for ${WRITE_S} s, then 50 mixed clients for ${MIXED_S} s (SQLite file, autocannon, loopback)`,
    rows,
    notes: `${notes.join(' ')} ${loadNote()}`,
  };
}
