import { Op, QueryTypes, type Transaction } from 'sequelize';
import type { SpecimenType } from '@/schemas/common';
import type { CaseDetail, CaseListQuery, CaseState, CaseSummary, Patient, Priority } from '@/schemas/case';
import { AuditEventModel } from '../audit/audit.model';
import { displayName, foldText } from '../patients/patient-names';
import { findPatientById } from '../patients/patients.repository';
import { listSpecimensOfCase } from '../specimens/specimens.repository';
import { UserModel } from '../users/user.model';
import { preparedRead } from '../../db/prepared-read';
import { isPostgres } from '../../db/sequelize';
import { AccessionCounterModel, CaseModel } from './case.model';

/** The stored case, as services see it (dates as Date, list columns decoded). */
export type CaseRecord = {
  id: number;
  accession: string;
  patientId: number;
  referringClinicianId: number;
  clinicalIndication: string;
  priority: Priority;
  state: CaseState;
  cancelReason: string | null;
  returnReason: string | null;
  /** Set while a signed case is reopened for a correction (cleared when the corrected report is signed). */
  amendReason: string | null;
  amendedAt: Date | null;
  receivedAt: Date | null;
  specimenTypes: SpecimenType[];
  patientName: string;
  patternCode: string | null;
  createdById: number | null;
  version: number;
  createdAt: Date;
};

/** ",a,b," in the database; a plain array everywhere else. */
const encodeTypes = (types: readonly string[]) => `,${types.join(',')},`.replace(/^,,$/, ',');
const decodeTypes = (s: string) => s.split(',').filter(Boolean) as SpecimenType[];

function toRecord(row: CaseModel): CaseRecord {
  return {
    id: row.id,
    accession: row.accession,
    patientId: row.patientId,
    referringClinicianId: row.referringClinicianId,
    clinicalIndication: row.clinicalIndication,
    priority: row.priority as Priority,
    state: row.state as CaseState,
    cancelReason: row.cancelReason,
    returnReason: row.returnReason,
    amendReason: row.amendReason ?? null,
    amendedAt: row.amendedAt ?? null,
    receivedAt: row.receivedAt,
    specimenTypes: decodeTypes(row.specimenTypes),
    patientName: row.patientName,
    patternCode: row.patternCode,
    createdById: row.createdById,
    version: row.version,
    createdAt: row.createdAt,
  };
}

/** Lower-cased, accent-folded accession, patient name and lab ID: what the list's search box looks in. */
export function caseSearchText(accession: string, p: Pick<Patient, 'familyName' | 'givenName' | 'labPatientId'>): string {
  return foldText(`${accession} ${p.familyName} ${p.givenName} ${p.labPatientId}`).slice(0, 300);
}

/**
 * Takes the next number of the year's sequence: insert the year's counter at 1 or add one to it, then read it
 * back. Both run inside the caller's write transaction, which holds the write lock from its start (SQLite's, or
 * the advisory lock on PostgreSQL; the upsert also locks the counter's row), so no
 * other writer can take the same number, and the number commits (or rolls back) with the case that uses it.
 */
export async function allocateAccessionNumber(year: number, transaction: Transaction): Promise<number> {
  await AccessionCounterModel.sequelize!.query(
    `INSERT INTO accession_counters (year, last) VALUES (:year, 1) ON CONFLICT(year) DO UPDATE SET last = accession_counters.last + 1`,
    { replacements: { year }, transaction },
  );
  const row = await AccessionCounterModel.findByPk(year, { transaction });
  return row!.last;
}

export async function accessionCounter(year: number): Promise<number | null> {
  return (await AccessionCounterModel.findByPk(year))?.last ?? null;
}

export async function insertCase(
  data: Omit<CaseRecord, 'id' | 'version' | 'createdAt' | 'cancelReason' | 'returnReason' | 'amendReason' | 'amendedAt' | 'patternCode'> & { searchText: string },
  transaction: Transaction,
): Promise<CaseRecord> {
  const row = await CaseModel.create(
    {
      ...data,
      specimenTypes: encodeTypes(data.specimenTypes),
      cancelReason: null,
      returnReason: null,
      patternCode: null,
      resultsSnapshot: null,
    },
    { transaction },
  );
  return toRecord(row);
}

export async function findCaseById(id: number, transaction?: Transaction): Promise<CaseRecord | null> {
  const row = await CaseModel.findByPk(id, { transaction });
  return row ? toRecord(row) : null;
}

/** Updates a case only if its version is still `expectedVersion`; false when another save got there first. */
export async function updateCaseIfVersion(
  id: number,
  expectedVersion: number,
  changes: Partial<Pick<CaseRecord, 'referringClinicianId' | 'clinicalIndication' | 'priority' | 'state' | 'cancelReason' | 'returnReason' | 'amendReason' | 'amendedAt'>>,
  transaction: Transaction,
): Promise<boolean> {
  const [count] = await CaseModel.update(
    { ...changes, version: expectedVersion + 1 },
    { where: { id, version: expectedVersion }, transaction },
  );
  return count === 1;
}

/**
 * Rewrites the list columns derived from the specimens. These are bookkeeping, not edits of the case, so the
 * case's version stays as it is (an open edit of the indication is not made stale by a new specimen).
 */
export async function setSpecimenColumns(
  caseId: number,
  types: readonly string[],
  earliestReceipt: Date | null,
  transaction: Transaction,
): Promise<void> {
  await CaseModel.update(
    { specimenTypes: encodeTypes(types), receivedAt: earliestReceipt },
    { where: { id: caseId }, transaction, silent: true },
  );
}

/** Copies a corrected patient's name and lab ID onto the list columns of their cases. */
export async function refreshPatientOnCases(patient: Patient, transaction: Transaction): Promise<void> {
  const rows = await CaseModel.findAll({ where: { patientId: patient.id }, attributes: ['id', 'accession'], transaction });
  for (const r of rows) {
    await CaseModel.update(
      { patientName: displayName(patient), searchText: caseSearchText(r.accession, patient) },
      { where: { id: r.id }, transaction, silent: true },
    );
  }
}

export async function findUserName(id: number, transaction?: Transaction): Promise<{ id: number; name: string; email: string; role: string; active: boolean } | null> {
  const u = await UserModel.findByPk(id, { attributes: ['id', 'name', 'email', 'role', 'active'], transaction });
  return u ? { id: u.id, name: u.name, email: u.email, role: u.role, active: u.active } : null;
}

export async function loadCaseDetail(id: number, transaction?: Transaction): Promise<CaseDetail | null> {
  const c = await findCaseById(id, transaction);
  if (!c) return null;
  const [patient, clinician, specimens] = await Promise.all([
    findPatientById(c.patientId, transaction),
    findUserName(c.referringClinicianId, transaction),
    listSpecimensOfCase(id, transaction),
  ]);
  return {
    id: c.id,
    accession: c.accession,
    state: c.state,
    priority: c.priority,
    clinicalIndication: c.clinicalIndication,
    patient: patient!,
    referringClinician: clinician
      ? { id: clinician.id, name: clinician.name, email: clinician.email }
      : { id: c.referringClinicianId, name: '(unknown account)', email: '' },
    specimens,
    cancelReason: c.cancelReason,
    returnReason: c.returnReason,
    amendReason: c.amendReason,
    amendedAt: c.amendedAt ? c.amendedAt.toISOString() : null,
    createdAt: c.createdAt.toISOString(),
    version: c.version,
    receivedAt: c.receivedAt ? c.receivedAt.toISOString() : null,
    patternCode: c.patternCode,
  };
}

/* ---------------------------------------------------------------- list */

export type CaseListFilter = Omit<CaseListQuery, 'q' | 'from' | 'to' | 'page' | 'pageSize'> & {
  tokens: string[];
  fromUtc?: Date;
  toUtc?: Date;
  limit: number;
  offset: number;
};

const sortColumn: Record<NonNullable<CaseListQuery['sort']>, string> = {
  accession: 'accession',
  receivedAt: 'receivedAt',
  state: 'state',
  patientName: 'patientName',
  priority: 'priority',
};

/** The trigram index matches fragments of three or more characters; shorter ones are checked row by row. */
const TRIGRAM = 3;

/**
 * Above this many matches, the page is read by walking the sort column's index until the page is full, rather
 * than fetching every match and sorting it. SQLite's planner, without statistics, often picks the filter's
 * index instead; the count (needed anyway) tells which way is cheaper.
 */
const WALK_SORT_INDEX_ABOVE = 1500;

/** Sequelize's SQLite date text ("2026-03-04 09:30:00.000 +00:00") read back as an ISO instant. */
function isoFromSqlite(v: unknown): string | null {
  if (v == null) return null;
  if (v instanceof Date) return v.toISOString();
  const m = /^(\d{4}-\d{2}-\d{2}) (\d{2}:\d{2}:\d{2}(?:\.\d+)?) \+00:00$/.exec(String(v));
  // With milliseconds ("09:30:00.000", the usual text) it is already an ISO instant but for the "T" and the "Z".
  if (m?.[2]!.length === 12) return `${m[1]}T${m[2]}Z`;
  return new Date(m ? `${m[1]}T${m[2]}Z` : String(v)).toISOString();
}

type ListWhere = {
  sql: string;
  replacements: Record<string, unknown>;
  /** A count that can be read from one index alone, when that index is the only filter. */
  soleCount: string | null;
};

/** LIKE's wildcards and escape character taken literally (PostgreSQL's default escape is the backslash). */
const likeFragment = (t: string) => `%${t.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;

/** The list's filters on PostgreSQL: a pg_trgm index serves LIKE '%fragment%', strpos() the partial indexes. */
function listWherePostgres(f: CaseListFilter): ListWhere {
  const and: string[] = [];
  const replacements: Record<string, unknown> = {};
  f.tokens.forEach((t, i) => {
    replacements[`t${i}`] = likeFragment(t);
    and.push(`c."searchText" LIKE :t${i}`);
  });
  if (f.state) {
    replacements.state = f.state;
    and.push('c.state = :state');
  }
  if (f.specimenType) {
    replacements.specimenType = `,${f.specimenType},`;
    and.push('strpos(c."specimenTypes", :specimenType) > 0');
  }
  if (f.pattern) {
    const column = f.pattern.includes(':') ? 'item' : 'kind';
    replacements.pattern = f.pattern;
    and.push(`c.id IN (SELECT "caseId" FROM case_patterns WHERE ${column} = :pattern)`);
  }
  if (f.fromUtc) {
    replacements.fromUtc = f.fromUtc;
    and.push('c."receivedAt" >= :fromUtc');
  }
  if (f.toUtc) {
    replacements.toUtc = f.toUtc;
    and.push('c."receivedAt" < :toUtc');
  }
  return { sql: and.length ? `WHERE ${and.join(' AND ')}` : '', replacements, soleCount: null };
}

function listWhere(f: CaseListFilter): ListWhere {
  if (isPostgres(CaseModel.sequelize!)) return listWherePostgres(f);
  const and: string[] = [];
  let soleCount: string | null = null;
  const replacements: Record<string, unknown> = {};
  const indexed = f.tokens.filter((t) => [...t].length >= TRIGRAM);
  // When the search box is used, its matches drive the query: the other terms get SQLite's unary "+", which
  // keeps the planner from starting at (say) every final case and probing the text index for each.
  const plus = indexed.length ? '+' : '';
  if (indexed.length) {
    // Each token quoted as an FTS5 string (doubling any quote); space-separated strings must all match.
    replacements.fts = indexed.map((t) => `"${t.replaceAll('"', '""')}"`).join(' ');
    and.push('c.id IN (SELECT rowid FROM cases_search WHERE cases_search MATCH :fts)');
    soleCount = 'SELECT COUNT(*) AS n FROM cases_search WHERE cases_search MATCH :fts';
  }
  // instr() rather than LIKE: no escaping of % and _, and it is faster on SQLite.
  f.tokens
    .filter((t) => [...t].length < TRIGRAM)
    .forEach((t, i) => {
      replacements[`t${i}`] = t;
      and.push(`instr(c."searchText", :t${i}) > 0`);
    });
  if (f.state) {
    replacements.state = f.state;
    and.push(`${plus}c.state = :state`);
  }
  if (f.specimenType) {
    // Written exactly as the partial indexes of migration 0003 are, so the planner can use them.
    replacements.specimenType = `,${f.specimenType},`;
    and.push(`instr(${plus}c."specimenTypes", :specimenType) > 0`);
  }
  if (f.pattern) {
    // Findings of the results module's pattern code, one row each (migration 0003): a kind ("isolated")
    // matches any of its findings, a full finding ("isolated:CI") only itself.
    if (f.pattern.includes(':')) {
      replacements.patternItem = f.pattern;
      and.push('c.id IN (SELECT "caseId" FROM case_patterns WHERE item = :patternItem)');
      soleCount = 'SELECT COUNT(DISTINCT "caseId") AS n FROM case_patterns WHERE item = :patternItem';
    } else {
      replacements.patternKind = f.pattern;
      and.push('c.id IN (SELECT "caseId" FROM case_patterns WHERE kind = :patternKind)');
      soleCount = 'SELECT COUNT(DISTINCT "caseId") AS n FROM case_patterns WHERE kind = :patternKind';
    }
  }
  if (f.fromUtc) {
    replacements.fromUtc = f.fromUtc;
    and.push(`${plus}c."receivedAt" >= :fromUtc`);
  }
  if (f.toUtc) {
    replacements.toUtc = f.toUtc;
    and.push(`${plus}c."receivedAt" < :toUtc`);
  }
  return { sql: and.length ? `WHERE ${and.join(' AND ')}` : '', replacements, soleCount: and.length === 1 ? soleCount : null };
}

/** Which index to walk for the page, when the matches are many (see WALK_SORT_INDEX_ABOVE). */
function sortIndexHint(f: CaseListFilter, total: number): string {
  if (total <= WALK_SORT_INDEX_ABOVE || isPostgres(CaseModel.sequelize!)) return '';
  const sort = f.sort ?? 'receivedAt';
  // With a state filter, the (state, receivedAt) index already yields rows in receipt order.
  if (sort === 'receivedAt' && !f.state) return 'INDEXED BY cases_received_at';
  if (sort === 'patientName') return 'INDEXED BY cases_patient_name';
  return '';
}

type ListRow = {
  id: number;
  accession: string;
  state: string;
  patientName: string;
  specimenTypes: string;
  receivedAt: unknown;
  priority: string;
  patternCode: string | null;
  clinicianName: string | null;
};

type PageRow = ListRow & { total?: number | string };

/**
 * Reads one page of the list; `total` is read in the same statement when given as a scalar subquery. The whole
 * list on PostgreSQL (no filter: the landing page) is a prepared statement, one of eight texts (sort × direction).
 */
async function listPage(f: CaseListFilter, where: ListWhere, hint: string, totalSql = ''): Promise<PageRow[]> {
  const dir = f.dir ?? (f.sort && f.sort !== 'receivedAt' ? 'asc' : 'desc');
  const direction = dir === 'asc' ? 'ASC' : 'DESC';
  const column = sortColumn[f.sort ?? 'receivedAt'];
  const sequelize = CaseModel.sequelize!;
  const prepared = !where.sql && isPostgres(sequelize);
  const sql = `SELECT c.id, c.accession, c.state, c."patientName", c."specimenTypes", c."receivedAt", c.priority, c."patternCode",
            u.name AS "clinicianName"${totalSql}
       FROM cases c ${hint}
       LEFT JOIN users u ON u.id = c."referringClinicianId"
       ${where.sql}
      ORDER BY c."${column}" ${direction}, c.id ${direction}
      LIMIT ${prepared ? '$1 OFFSET $2' : ':limit OFFSET :offset'}`;
  if (prepared) return preparedRead<PageRow>(sequelize, sql, [f.limit, f.offset]);
  return (await sequelize.query(sql, {
    replacements: { ...where.replacements, limit: f.limit, offset: f.offset },
    type: QueryTypes.SELECT,
  })) as PageRow[];
}

async function countMatches(where: ListWhere): Promise<number> {
  const [{ n }] = (await CaseModel.sequelize!.query(where.soleCount ?? `SELECT COUNT(*) AS n FROM cases c ${where.sql}`, {
    replacements: where.replacements,
    type: QueryTypes.SELECT,
  })) as [{ n: number | string }];
  return Number(n); // PostgreSQL answers a bigint, as a string
}

export async function listCaseSummaries(f: CaseListFilter): Promise<{ items: CaseSummary[]; total: number }> {
  const where = listWhere(f);
  let rows: ListRow[];
  let total: number;
  if (!where.sql) {
    // The whole list (the landing page, the most frequent call): its sort column's index serves the page without
    // a hint, so the count comes in the same statement, one trip to the database instead of two. A page past
    // the end has no row to carry the count, which is then read on its own.
    const page = await listPage(f, where, '', ', (SELECT COUNT(*) FROM cases) AS total');
    rows = page;
    total = page.length ? Number(page[0]!.total) : await countMatches(where);
  } else {
    total = await countMatches(where);
    rows = total === 0 || f.offset >= total ? [] : await listPage(f, where, sortIndexHint(f, total));
  }
  return {
    items: rows.map((r) => ({
      id: r.id,
      accession: r.accession,
      state: r.state as CaseState,
      patientName: r.patientName,
      specimenTypes: decodeTypes(r.specimenTypes),
      receivedAt: isoFromSqlite(r.receivedAt),
      priority: r.priority as Priority,
      patternCode: r.patternCode,
      referringClinicianName: r.clinicianName,
    })),
    total,
  };
}

/* ---------------------------------------------------------------- history */

export type StoredAuditEvent = {
  id: number;
  at: Date;
  actorId: number | null;
  actorEmail: string | null;
  actorName: string | null;
  action: string;
  entity: string;
  entityId: string | null;
  before: unknown;
  after: unknown;
  note: string | null;
};

/** The case's own events, plus those of its patient's record (kept once, on the patient). Newest first. */
export async function listCaseAuditEvents(caseId: number, patientId: number, limit = 1000): Promise<StoredAuditEvent[]> {
  const rows = await AuditEventModel.findAll({
    where: { [Op.or]: [{ caseId }, { entity: 'patient', entityId: String(patientId) }] },
    order: [['id', 'DESC']],
    limit,
  });
  const actorIds = [...new Set(rows.map((r) => r.actorId).filter((x): x is number => x != null))];
  const actors = actorIds.length ? await UserModel.findAll({ where: { id: actorIds }, attributes: ['id', 'name'] }) : [];
  const names = new Map(actors.map((u) => [u.id, u.name]));
  const parse = (s: string | null) => (s == null ? null : (JSON.parse(s) as unknown));
  return rows.map((r) => ({
    id: r.id,
    at: r.at,
    actorId: r.actorId,
    actorEmail: r.actorEmail,
    actorName: r.actorId != null ? (names.get(r.actorId) ?? null) : null,
    action: r.action,
    entity: r.entity,
    entityId: r.entityId,
    before: parse(r.before),
    after: parse(r.after),
    note: r.note,
  }));
}
