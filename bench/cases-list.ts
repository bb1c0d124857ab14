import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { performance } from 'node:perf_hooks';
import { pathToFileURL } from 'node:url';
import request from 'supertest';
import type { Sequelize, Transaction } from 'sequelize';
import type { CaseListQuery, CaseState } from '@/schemas/case';
import { specimenTypes } from '@/schemas/common';
import { createApp } from '../server/app';
import { loadConfig } from '../server/config';
import { migrate } from '../server/db/migrate';
import { initModels } from '../server/db/models';
import { hashPassword } from '../server/auth/password';
import { demoAccounts, demoLabProfile } from '../server/db/seed/demo';
import { openDatabase } from '../server/db/sequelize';
import { saveLabProfile } from '../server/modules/lab-profile/lab-profile.service';
import { insertUser } from '../server/modules/users/users.repository';
import { caseSearchText } from '../server/modules/cases/cases.repository';
import { listCases } from '../server/modules/cases/cases.service';
import { displayName, nameKeyOf } from '../server/modules/patients/patient-names';
import type { BenchResult } from './types';

/*
 * The case list at registry scale: 100 000 invented cases (35 000 patients) in a temporary SQLite file, then
 * the list service and GET /api/cases timed for the views people use most: the landing page, deep pages, each
 * filter, searches by accession, name and lab ID, sorts, and a combination. Server time only: the service call,
 * and the whole HTTP round trip through the Express app on loopback (supertest).
 */

const CASES = 100_000;
const PATIENTS = 35_000;
const CHUNK = 500;
const WARMUP = 5;
const RUNS = 40;
const HTTP_RUNS = 25;
const GOAL_P95_MS = 50;
const PASSWORD = 'bench-password-1';

/** Deterministic noise (mulberry32), so every run builds the same registry. */
export function rng(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (s + 0x6d2b79f5) >>> 0;
    let t = s;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const FAMILY_A = ['Ash', 'Bram', 'Cope', 'Dun', 'Elm', 'Fern', 'Gale', 'Holl', 'Ivy', 'Juni', 'Kettle', 'Lark', 'Moss', 'Nettle', 'Oak', 'Penny', 'Quill', 'Rook', 'Sedge', 'Thistle', 'Umber', 'Vale', 'Wren', 'Yarrow'];
const FAMILY_B = ['by', 'combe', 'dale', 'feather', 'field', 'ford', 'grove', 'holt', 'hurst', 'ley', 'mere', 'more', 'stead', 'ton', 'well', 'wick', 'wood', 'worth'];
const GIVEN = ['Alba', 'Bastian', 'Clover', 'Dorian', 'Esme', 'Fenwick', 'Greer', 'Hollis', 'Isolde', 'Jasper', 'Kit', 'Linnea', 'Magnus', 'Nell', 'Orrin', 'Posy', 'Quentin', 'Rosalind', 'Silas', 'Tansy', 'Ulric', 'Vesper', 'Wilder', 'Xanthe', 'Yves', 'Zinnia'];

/** Pattern codes in the results module's form (findings joined by "+"), weighted towards normal. */
const PATTERN_CODES = [
  'normal', 'normal', 'normal', 'normal', 'isolated:CI', 'isolated:CIV', 'isolated:CIII', 'isolated:CII',
  'combined:CI,CIV', 'combined:CI,CIII,CIV', 'linked:CI+III', 'raised_cs', 'isolated:CI+raised_cs', 'insufficient',
];
export const pick = <T>(r: () => number, xs: readonly T[]): T => xs[Math.floor(r() * xs.length)]!;
/** Sequelize's SQLite date format, so bulk-inserted rows compare and sort like rows the app writes. */
export const sqlDate = (d: Date) => d.toISOString().replace('T', ' ').replace('Z', ' +00:00');

export async function bulkInsert(sequelize: Sequelize, transaction: Transaction, table: string, columns: string[], rows: unknown[][]): Promise<void> {
  const cols = columns.map((c) => `"${c}"`).join(', ');
  for (let i = 0; i < rows.length; i += CHUNK) {
    const values = rows
      .slice(i, i + CHUNK)
      .map((r) => `(${r.map((v) => sequelize.escape(v as string)).join(', ')})`)
      .join(',\n');
    await sequelize.query(`INSERT INTO ${table} (${cols}) VALUES ${values}`, { transaction });
  }
}

export async function seedRegistry(sequelize: Sequelize): Promise<{ sampleAccession: string; sampleLabId: string }> {
  const r = rng(20260301);
  const [[{ clin1, clin2 }]] = (await sequelize.query(
    `SELECT MIN(id) AS clin1, MAX(id) AS clin2 FROM users WHERE role = 'clinician'`,
  )) as [[{ clin1: number; clin2: number }], unknown];
  const [[{ maxPatient }]] = (await sequelize.query(`SELECT COALESCE(MAX(id), 0) AS maxPatient FROM patients`)) as [[{ maxPatient: number }], unknown];
  const now = Date.now();
  const created = sqlDate(new Date(now));

  const patients: { id: number; familyName: string; givenName: string; labPatientId: string }[] = [];
  const patientRows: unknown[][] = [];
  for (let i = 1; i <= PATIENTS; i++) {
    const familyName = `${pick(r, FAMILY_A)}${pick(r, FAMILY_B)}`;
    const givenName = pick(r, GIVEN);
    const labPatientId = `BENCH-${String(i).padStart(6, '0')}`;
    const year = 1950 + Math.floor(r() * 75);
    const dob = `${year}-${String(1 + Math.floor(r() * 12)).padStart(2, '0')}-${String(1 + Math.floor(r() * 28)).padStart(2, '0')}`;
    const p = { id: maxPatient + i, familyName, givenName, labPatientId };
    patients.push(p);
    patientRows.push([p.id, labPatientId, familyName, givenName, dob, r() < 0.5 ? 'female' : 'male', nameKeyOf(familyName, givenName), 0, created, created]);
  }

  const states: [CaseState, number][] = [['final', 0.72], ['corrected', 0.03], ['cancelled', 0.04], ['awaiting_review', 0.05], ['in_assay', 0.08], ['received', 0.08]];
  const drawState = () => {
    let x = r();
    for (const [s, w] of states) if ((x -= w) < 0) return s;
    return 'final' as CaseState;
  };
  // Ten years of receipts, oldest first, so accession numbers follow receipt order within each year.
  const span = 10 * 365 * 86_400_000;
  const times = Array.from({ length: CASES }, () => now - 86_400_000 - r() * span).sort((a, b) => a - b);
  // Continue each year's sequence after any case already registered.
  const [counters] = (await sequelize.query('SELECT year, last FROM accession_counters')) as [{ year: number; last: number }[], unknown];
  const perYear = new Map<number, number>(counters.map((c) => [c.year, c.last]));
  const caseRows: unknown[][] = [];
  let sampleAccession = '';
  let sampleLabId = '';
  times.forEach((t, i) => {
    const at = new Date(t);
    const year = at.getUTCFullYear();
    const n = (perYear.get(year) ?? 0) + 1;
    perYear.set(year, n);
    const accession = `CR-${year}-${String(n).padStart(5, '0')}`;
    const p = patients[Math.floor(r() * patients.length)]!;
    const state = drawState();
    const types = r() < 0.8 ? ['skeletal_muscle'] : r() < 0.5 ? [pick(r, specimenTypes)] : [...new Set(['skeletal_muscle', pick(r, specimenTypes)])].sort();
    const pattern = state === 'final' || state === 'corrected' ? pick(r, PATTERN_CODES) : null;
    if (i === Math.floor(CASES / 3)) {
      sampleAccession = accession;
      sampleLabId = p.labPatientId;
    }
    caseRows.push([
      accession, p.id, r() < 0.5 ? clin1 : clin2, 'Invented benchmark referral', r() < 0.1 ? 'urgent' : 'routine', state,
      state === 'cancelled' ? 'Invented cancellation' : null, sqlDate(at), `,${types.join(',')},`,
      caseSearchText(accession, p), displayName(p), pattern, 0, created, created,
    ]);
  });

  await sequelize.transaction(async (transaction) => {
    await bulkInsert(sequelize, transaction, 'patients', ['id', 'labPatientId', 'familyName', 'givenName', 'dateOfBirth', 'sex', 'nameKey', 'version', 'createdAt', 'updatedAt'], patientRows);
    await bulkInsert(
      sequelize,
      transaction,
      'cases',
      ['accession', 'patientId', 'referringClinicianId', 'clinicalIndication', 'priority', 'state', 'cancelReason', 'receivedAt', 'specimenTypes', 'searchText', 'patientName', 'patternCode', 'version', 'createdAt', 'updatedAt'],
      caseRows,
    );
    for (const [year, last] of perYear) {
      await sequelize.query(`INSERT INTO accession_counters (year, last) VALUES (${year}, ${last}) ON CONFLICT(year) DO UPDATE SET last = MAX(last, excluded.last)`, { transaction });
    }
  });
  return { sampleAccession, sampleLabId };
}

function percentile(sorted: number[], p: number): number {
  const idx = Math.min(sorted.length - 1, Math.max(0, Math.ceil((p / 100) * sorted.length) - 1));
  return sorted[idx]!;
}

export async function time(runs: number, fn: () => Promise<unknown>, warmup = WARMUP): Promise<{ p50: number; p95: number }> {
  for (let i = 0; i < warmup; i++) await fn();
  const ms: number[] = [];
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now();
    await fn();
    ms.push(performance.now() - t0);
  }
  ms.sort((a, b) => a - b);
  return { p50: percentile(ms, 50), p95: percentile(ms, 95) };
}

/** A temporary SQLite file with the migrations, the invented staff and the laboratory profile (nothing else). */
export async function openRegistryDatabase(tag: string): Promise<{ dir: string; sequelize: Sequelize }> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), `cristae-bench-${tag}-`));
  const sequelize = await openDatabase(path.join(dir, 'registry.sqlite'));
  initModels(sequelize);
  await migrate(sequelize);
  // Only the invented staff and the laboratory profile: the list needs clinicians and a technologist to sign in.
  const passwordHash = await hashPassword(PASSWORD);
  await sequelize.transaction(async (transaction) => {
    for (const a of demoAccounts) await insertUser({ ...a, passwordHash }, transaction);
  });
  await saveLabProfile(sequelize, null, demoLabProfile);
  return { dir, sequelize };
}

/** The Express app over that database, and a supertest agent signed in as the demo technologist. */
export async function signedInAgent(sequelize: Sequelize) {
  const config = loadConfig({ NODE_ENV: 'test', PORT: '3000', DEMO_PASSWORD: PASSWORD });
  const app = createApp({ sequelize, config, loginAttemptsPerWindow: 1000 });
  const agent = request.agent(app);
  agent.set('Origin', 'http://localhost:3000');
  const login = await agent.post('/api/auth/login').send({ email: 'technologist@demo.test', password: PASSWORD });
  if (login.status !== 200) throw new Error(`sign-in failed: ${login.status}`);
  return agent;
}

export default async function run(): Promise<BenchResult> {
  const { dir, sequelize } = await openRegistryDatabase('cases');
  try {
    const t0 = performance.now();
    const { sampleAccession, sampleLabId } = await seedRegistry(sequelize);
    const seedSeconds = (performance.now() - t0) / 1000;

    const thisYear = new Date().getUTCFullYear();
    const views: [string, CaseListQuery][] = [
      ['landing page (newest receipts first)', { page: 1, pageSize: 25 }],
      ['page 400 of 25', { page: 400, pageSize: 25 }],
      ['state = in assay', { state: 'in_assay', pageSize: 50 }],
      ['specimen type = liver', { specimenType: 'liver', pageSize: 50 }],
      ['pattern = any isolated deficiency', { pattern: 'isolated', pageSize: 50 }],
      ['pattern = isolated complex I', { pattern: 'isolated:CI', pageSize: 50 }],
      ['one month received', { from: `${thisYear - 3}-03-01`, to: `${thisYear - 3}-03-31`, pageSize: 50 }],
      ['search: accession', { q: sampleAccession }],
      ['search: lab ID', { q: sampleLabId }],
      ['search: part of a name', { q: 'quillfea' }],
      ['search: name, two words', { q: 'alba rookby' }],
      ['sort by patient name', { sort: 'patientName', dir: 'asc', pageSize: 50 }],
      ['sort by accession, descending', { sort: 'accession', dir: 'desc', pageSize: 50 }],
      ['state + type + dates + search', { state: 'final', specimenType: 'skeletal_muscle', from: `${thisYear - 6}-01-01`, to: `${thisYear - 1}-12-31`, q: 'wood' }],
    ];

    const rows: BenchResult['rows'] = [];
    for (const [label, q] of views) {
      const { p50, p95 } = await time(RUNS, () => listCases(q));
      rows.push({ metric: `service: ${label}`, value: `p50 ${p50.toFixed(1)} ms, p95 ${p95.toFixed(1)} ms`, goal: `p95 < ${GOAL_P95_MS} ms`, met: p95 < GOAL_P95_MS });
    }

    const agent = await signedInAgent(sequelize);
    const httpViews: [string, string][] = [
      ['GET /api/cases (landing page)', '/api/cases?page=1&pageSize=25'],
      ['GET /api/cases?state=received', '/api/cases?state=received&pageSize=50'],
      ['GET /api/cases?q=<accession>', `/api/cases?q=${encodeURIComponent(sampleAccession)}`],
      ['GET /api/cases?q=<name part>', '/api/cases?q=thistle&pageSize=50'],
      ['GET /api/cases, pageSize 200, sorted by name', '/api/cases?pageSize=200&sort=patientName'],
    ];
    for (const [label, url] of httpViews) {
      const check = await agent.get(url);
      if (check.status !== 200) throw new Error(`${url}: ${check.status}`);
      const { p50, p95 } = await time(HTTP_RUNS, () => agent.get(url));
      rows.push({ metric: `HTTP: ${label}`, value: `p50 ${p50.toFixed(1)} ms, p95 ${p95.toFixed(1)} ms`, goal: `p95 < ${GOAL_P95_MS} ms`, met: p95 < GOAL_P95_MS });
    }

    const [[{ n }]] = (await sequelize.query('SELECT COUNT(*) AS n FROM cases')) as [[{ n: number }], unknown];
    return {
      title: `Case list over ${n.toLocaleString('en-GB')} cases (SQLite file, WAL; ${WARMUP} warm-up calls, then ${RUNS} service / ${HTTP_RUNS} HTTP calls per view)`,
      rows,
      notes: `Seeding ${CASES.toLocaleString('en-GB')} cases and ${PATIENTS.toLocaleString('en-GB')} patients took ${seedSeconds.toFixed(1)} s (multi-row inserts, one transaction). Times include the total count on every call. HTTP times are the whole request through Express, session and JSON, on loopback.`,
    };
  } finally {
    await sequelize.close();
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

/** Runs a benchmark file on its own (`node --import tsx bench/<file>.ts`) and prints its figures. */
export async function runWhenMain(moduleUrl: string, bench: () => Promise<BenchResult>): Promise<void> {
  if (!process.argv[1] || moduleUrl !== pathToFileURL(process.argv[1]).href) return;
  const result = await bench();
  console.log(result.title);
  for (const r of result.rows) console.log(`${r.met ? ' ' : '!'} ${r.metric}: ${r.value} (goal ${r.goal})`);
  if (result.notes) console.log(result.notes);
}

await runWhenMain(import.meta.url, run);
