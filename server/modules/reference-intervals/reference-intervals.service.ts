import type { Sequelize, Transaction } from 'sequelize';
import { ACTIVITY_UNIT, type ComparisonInterval } from '@/schemas/assay';
import type { AssayCode, Measure, SpecimenType } from '@/schemas/common';
import type { User } from '@/schemas/user';
import { findIntervalOrderingProblems } from '@/schemas/reference-interval';
import type {
  CreateIntervalBody,
  EditDraftBody,
  IntervalDerivation,
  RetireBody,
  StoredInterval,
} from '@/schemas/reference-interval-api';
import { AppError, badInput, forbidden, invalidState, notFound, staleVersion } from '../../lib/errors';
import { recordAudit } from '../audit/audit.service';
import { checkApprover, SELF_APPROVAL_NOTE } from '../lab-profile/lab-profile.service';
import { ageBandText, intervalKeyOf } from './interval-labels';
import * as repo from './reference-intervals.repository';
import { writeTransaction } from '../../db/write-transaction';

const AUDIT_ENTITY = 'reference-interval';

/** Calendar day (UTC) of an instant, as effective dates are stored. */
export function isoDay(at: Date): string {
  return at.toISOString().slice(0, 10);
}

// ---------------------------------------------------------------------------------------------
// Look-ups for other modules (comparisons, reports)

export interface IntervalLookup {
  assay: AssayCode;
  measure: Measure;
  specimenType: SpecimenType;
  /** Age at collection in years; null when unknown, which matches only all-age bands. */
  ageYears: number | null;
  /** The instant whose effective interval is wanted (collection or receipt time); compared by UTC day. */
  at: Date;
}

function ageInBand(i: StoredInterval, ageYears: number | null): boolean {
  const { minYears, maxYears } = i.ageBand;
  if (ageYears === null) return minYears === 0 && maxYears === null;
  return ageYears >= minYears && (maxYears === null || ageYears < maxYears);
}

/**
 * The approved interval version in effect on `at`'s day for this assay, measure, specimen type and age
 * (band [minYears, maxYears)). Retired and draft versions never apply. Approval keeps bands of one series
 * from overlapping in time, so at most one matches; should old data hold two, the narrower band wins,
 * then the higher version. Record the returned `id`, `version` and `label` with the comparison.
 */
export async function findApplicableInterval({
  assay,
  measure,
  specimenType,
  ageYears,
  at,
}: IntervalLookup): Promise<StoredInterval | null> {
  const candidates = (await repo.listEffectiveOn({ assay, measure, specimenType }, isoDay(at))).filter((i) =>
    ageInBand(i, ageYears),
  );
  const width = (i: StoredInterval) => (i.ageBand.maxYears ?? Number.POSITIVE_INFINITY) - i.ageBand.minYears;
  candidates.sort((a, b) => width(a) - width(b) || b.version - a.version);
  return candidates[0] ?? null;
}

/** Any version by id, whatever its status: a stored comparison reads back the version it used. */
export async function getIntervalById(id: number): Promise<StoredInterval | null> {
  return repo.findIntervalById(id);
}

/** The shape the assay engine's compareValue expects (server/domain/assay-engine/compare.ts). */
export function toComparisonInterval(s: StoredInterval): ComparisonInterval {
  return {
    id: String(s.id),
    setLabel: `${s.setName} · ${s.label}`,
    version: s.version,
    assay: s.assay,
    measure: s.measure,
    specimenType: s.specimenType,
    ageFromYears: s.ageBand.minYears === 0 ? null : s.ageBand.minYears,
    ageToYears: s.ageBand.maxYears,
    basis: s.basis,
    lower: s.lower,
    upper: s.upper,
    mean: s.mean,
    sd: s.sd !== null && s.sd > 0 ? s.sd : null,
    unit: s.unit,
    method: s.method,
  };
}

// ---------------------------------------------------------------------------------------------
// Reading

export async function listCurrentIntervals(actor: User, now: Date = new Date()): Promise<StoredInterval[]> {
  return repo.listCurrentIntervals(isoDay(now), actor.role === 'director');
}

export async function getInterval(id: number): Promise<StoredInterval> {
  const found = await repo.findIntervalById(id);
  if (!found) throw notFound('Reference interval', id);
  return found;
}

/** Every version of the key the interval belongs to, newest first. */
export async function listVersions(id: number): Promise<StoredInterval[]> {
  return repo.listVersionsOfKey((await getInterval(id)).intervalKey);
}

// ---------------------------------------------------------------------------------------------
// Overlap rules

type Period = { effectiveFrom: string; effectiveTo: string | null };
type Candidate = Period & {
  id?: number;
  intervalKey: string;
  ageMinYears: number;
  ageMaxYears: number | null;
};

function periodText(p: Period): string {
  return p.effectiveTo === null ? `from ${p.effectiveFrom}, open-ended` : `from ${p.effectiveFrom} until ${p.effectiveTo}`;
}

function periodsOverlap(a: Period, b: Period): boolean {
  // effectiveTo is exclusive; ISO dates compare as strings.
  return (b.effectiveTo === null || a.effectiveFrom < b.effectiveTo) && (a.effectiveTo === null || b.effectiveFrom < a.effectiveTo);
}

function bandsOverlap(a: { ageMinYears: number; ageMaxYears: number | null }, b: StoredInterval): boolean {
  const bMax = b.ageBand.maxYears ?? Number.POSITIVE_INFINITY;
  const aMax = a.ageMaxYears ?? Number.POSITIVE_INFINITY;
  return a.ageMinYears < bMax && b.ageBand.minYears < aMax;
}

/**
 * Checks a version against the approved ones of its series, and says which earlier version approval
 * will close. Only one case is not a conflict: the same key's open-ended version that started earlier,
 * which the new version ends on its own start date.
 */
function planApproval(c: Candidate, approved: StoredInterval[]): { close: StoredInterval | null } {
  let close: StoredInterval | null = null;
  for (const a of approved) {
    if (a.id === c.id || !bandsOverlap(c, a)) continue;
    const sameKey = a.intervalKey === c.intervalKey;
    if (sameKey && a.effectiveTo === null && a.effectiveFrom < c.effectiveFrom) {
      close = a;
      continue;
    }
    if (!periodsOverlap(c, a)) continue;
    if (sameKey) {
      const message =
        a.effectiveTo === null
          ? `Overlaps approved version ${a.version} (${a.label}), in effect ${periodText(a)}: start after ${a.effectiveFrom}`
          : `Overlaps approved version ${a.version} (${a.label}), in effect ${periodText(a)}: start on or after ${a.effectiveTo}`;
      throw new AppError('CONFLICT', `Effective dates overlap: ${message}`, { fields: { effectiveFrom: message } });
    }
    const message =
      `Age band ${ageBandText(c.ageMinYears, c.ageMaxYears)} overlaps the approved interval ${a.label} ` +
      `(${periodText(a)}); use the same band for a new version, or retire that interval first`;
    throw new AppError('CONFLICT', message, { fields: { ageBand: message } });
  }
  return { close };
}

function defaultUnit(measure: Measure): string {
  return measure === 'activity' ? ACTIVITY_UNIT : 'ratio';
}

// ---------------------------------------------------------------------------------------------
// Writing

export interface NewDraft {
  setName: string;
  assay: AssayCode;
  measure: Measure;
  specimenType: SpecimenType;
  ageBand: { label: string; minYears: number; maxYears: number | null };
  lower: number;
  upper: number;
  mean: number;
  sd: number | null;
  n: number;
  unit: string;
  method: StoredInterval['method'];
  sourceNote: string;
  effectiveFrom: string;
  effectiveTo: string | null;
  derivation: IntervalDerivation | null;
  uploadId: number | null;
}

/** Stores a draft as the next version of its key; dates that clash with an approved version are refused. */
export async function insertDraft(
  actor: User,
  d: NewDraft,
  transaction: Transaction,
  audit: { note?: string } = {},
): Promise<StoredInterval> {
  const keyParts = {
    assay: d.assay,
    measure: d.measure,
    specimenType: d.specimenType,
    ageMinYears: d.ageBand.minYears,
    ageMaxYears: d.ageBand.maxYears,
  };
  const intervalKey = intervalKeyOf(keyParts);
  const approved = await repo.listApprovedForSeries(d, transaction);
  planApproval({ ...keyParts, intervalKey, effectiveFrom: d.effectiveFrom, effectiveTo: d.effectiveTo }, approved);
  const version = (await repo.highestVersionOfKey(intervalKey, transaction)) + 1;
  const created = await repo.insertInterval(
    {
      intervalKey,
      version,
      status: 'draft',
      setName: d.setName,
      assay: d.assay,
      measure: d.measure,
      specimenType: d.specimenType,
      ageLabel: d.ageBand.label,
      ageMinYears: d.ageBand.minYears,
      ageMaxYears: d.ageBand.maxYears,
      lower: d.lower,
      upper: d.upper,
      mean: d.mean,
      sd: d.sd,
      n: d.n,
      unit: d.unit,
      basis: 'linear_rate',
      method: d.method,
      derivation: d.derivation,
      sourceNote: d.sourceNote,
      uploadId: d.uploadId,
      effectiveFrom: d.effectiveFrom,
      effectiveTo: d.effectiveTo,
      createdById: actor.id,
      approvedById: null,
      approvedAt: null,
    },
    transaction,
  );
  await recordAudit(
    actor,
    { action: 'create', entity: AUDIT_ENTITY, entityId: created.id, after: created, note: audit.note ?? null },
    transaction,
  );
  return created;
}

/** A draft typed in by a director, e.g. an interval adopted from a publication or another laboratory. */
function requirePositiveMean(mean: number): void {
  if (!(mean > 0)) {
    throw new AppError('VALIDATION_FAILED', 'The mean must be above 0 (results are reported as % of it)', {
      fields: { mean: 'Must be above 0' },
    });
  }
}

export async function createDraft(sequelize: Sequelize, actor: User, body: CreateIntervalBody): Promise<StoredInterval> {
  requirePositiveMean(body.mean);
  return writeTransaction(sequelize, (transaction) =>
    insertDraft(
      actor,
      {
        ...body,
        unit: body.unit ?? defaultUnit(body.measure),
        derivation: null,
        uploadId: null,
      },
      transaction,
    ),
  );
}

/** The fields of a draft that an edit may change; the series (assay, measure, specimen type, age limits) stays. */
const SERIES_FIELDS = ['assay', 'measure', 'specimenType'] as const;
const NUMBER_FIELDS = ['lower', 'upper', 'mean', 'sd', 'n'] as const;

/**
 * Changes a draft before approval. Only the director who drafted it edits it (another director approves or
 * retires it, so the approver never approves their own numbers); approved and retired versions never change,
 * because comparisons already point at them. A derived draft whose numbers are typed over loses its derivation
 * (the control file it started from stays named), and the audit keeps the before and after.
 */
export async function editDraft(sequelize: Sequelize, actor: User, id: number, body: EditDraftBody): Promise<StoredInterval> {
  return writeTransaction(sequelize, async (transaction) => {
    const current = await repo.findIntervalById(id, transaction);
    if (!current) throw notFound('Reference interval', id);
    if (current.status !== 'draft') {
      throw invalidState(
        `Version ${current.version} is ${current.status}; only a draft can be edited. Draft a new version to change it.`,
      );
    }
    if (current.createdBy !== null && current.createdBy !== actor.id) {
      throw forbidden(`Only ${current.createdByName ?? 'the director who drafted it'} can edit this draft; you can approve or retire it`);
    }
    if (current.revision !== body.revision) throw staleVersion('reference interval');
    const fields: Record<string, string> = {};
    for (const f of SERIES_FIELDS) {
      if (body[f] !== undefined && body[f] !== current[f]) fields[f] = 'A draft keeps its series; start a new draft for another one';
    }
    if (body.ageBand && (body.ageBand.minYears !== current.ageBand.minYears || body.ageBand.maxYears !== current.ageBand.maxYears)) {
      fields.ageBand = 'A draft keeps its age limits; start a new draft for another age band';
    }
    if (Object.keys(fields).length > 0) throw badInput(fields, 'A draft keeps its assay, measure, specimen type and age limits');
    const merged = {
      lower: body.lower ?? current.lower,
      upper: body.upper ?? current.upper,
      mean: body.mean ?? current.mean,
      sd: body.sd === undefined ? current.sd : body.sd,
      n: body.n ?? current.n,
      effectiveFrom: body.effectiveFrom ?? current.effectiveFrom,
      effectiveTo: body.effectiveTo === undefined ? current.effectiveTo : body.effectiveTo,
    };
    const problems = findIntervalOrderingProblems(merged);
    if (problems.length > 0) throw badInput(Object.fromEntries(problems.map((p) => [p.path, p.message])));
    requirePositiveMean(merged.mean);
    planApproval(
      {
        id: current.id,
        intervalKey: current.intervalKey,
        ageMinYears: current.ageBand.minYears,
        ageMaxYears: current.ageBand.maxYears,
        effectiveFrom: merged.effectiveFrom,
        effectiveTo: merged.effectiveTo,
      },
      await repo.listApprovedForSeries(current, transaction),
    );
    const numbersChanged = NUMBER_FIELDS.some((f) => merged[f] !== current[f]);
    const ok = await repo.updateIntervalIfRevision(
      id,
      body.revision,
      {
        ...merged,
        setName: body.setName ?? current.setName,
        ageLabel: body.ageBand?.label ?? current.ageBand.label,
        unit: body.unit ?? current.unit,
        method: body.method ?? current.method,
        sourceNote: body.sourceNote ?? current.sourceNote,
        ...(numbersChanged && current.derivation ? { derivation: null } : {}),
      },
      transaction,
    );
    if (!ok) throw staleVersion('reference interval');
    const after = (await repo.findIntervalById(id, transaction))!;
    await recordAudit(actor, { action: 'update', entity: AUDIT_ENTITY, entityId: id, before: current, after }, transaction);
    return after;
  });
}

/**
 * Approves a draft: checks its dates against the approved versions again (another draft may have been
 * approved meanwhile), ends the same key's open-ended earlier version on the new start date, and records
 * the approver and time. Versions are never edited otherwise, so a stored comparison stays true.
 */
export async function approveInterval(
  sequelize: Sequelize,
  actor: User,
  id: number,
  revision: number,
  now: Date = new Date(),
): Promise<StoredInterval> {
  return writeTransaction(sequelize, async (transaction) => {
    const current = await repo.findIntervalById(id, transaction);
    if (!current) throw notFound('Reference interval', id);
    if (current.status !== 'draft') {
      throw invalidState(`Version ${current.version} is ${current.status}; only a draft can be approved`);
    }
    if (current.revision !== revision) throw staleVersion('reference interval');
    const { selfApproved } = await checkApprover(actor, current.createdBy, current.label, transaction);
    const approved = await repo.listApprovedForSeries(current, transaction);
    const { close } = planApproval(
      {
        id: current.id,
        intervalKey: current.intervalKey,
        ageMinYears: current.ageBand.minYears,
        ageMaxYears: current.ageBand.maxYears,
        effectiveFrom: current.effectiveFrom,
        effectiveTo: current.effectiveTo,
      },
      approved,
    );
    if (close) {
      const ok = await repo.updateIntervalIfRevision(
        close.id,
        close.revision,
        { effectiveTo: current.effectiveFrom },
        transaction,
      );
      if (!ok) throw staleVersion('reference interval');
      await recordAudit(
        actor,
        {
          action: 'close',
          entity: AUDIT_ENTITY,
          entityId: close.id,
          before: { effectiveTo: close.effectiveTo },
          after: { effectiveTo: current.effectiveFrom },
          note: `Superseded by version ${current.version} (id ${current.id})`,
        },
        transaction,
      );
    }
    const ok = await repo.updateIntervalIfRevision(
      id,
      revision,
      { status: 'approved', approvedById: actor.id, approvedAt: now },
      transaction,
    );
    if (!ok) throw staleVersion('reference interval');
    const after = (await repo.findIntervalById(id, transaction))!;
    await recordAudit(
      actor,
      {
        action: 'approve',
        entity: AUDIT_ENTITY,
        entityId: id,
        before: { status: current.status },
        after,
        note: selfApproved ? SELF_APPROVAL_NOTE : null,
      },
      transaction,
    );
    return after;
  });
}

/**
 * Withdraws a draft or an approved version. It stays readable (comparisons that used it keep pointing at
 * it) but no longer applies to new comparisons.
 */
export async function retireInterval(
  sequelize: Sequelize,
  actor: User,
  id: number,
  body: RetireBody,
  now: Date = new Date(),
): Promise<StoredInterval> {
  return writeTransaction(sequelize, async (transaction) => {
    const current = await repo.findIntervalById(id, transaction);
    if (!current) throw notFound('Reference interval', id);
    if (current.status === 'retired') throw invalidState(`Version ${current.version} is already retired`);
    const ok = await repo.updateIntervalIfRevision(
      id,
      body.revision,
      { status: 'retired', retiredById: actor.id, retiredAt: now, retireReason: body.reason },
      transaction,
    );
    if (!ok) throw staleVersion('reference interval');
    const after = (await repo.findIntervalById(id, transaction))!;
    await recordAudit(
      actor,
      { action: 'retire', entity: AUDIT_ENTITY, entityId: id, before: { status: current.status }, after, note: body.reason },
      transaction,
    );
    return after;
  });
}
