import { Op, type Transaction, type WhereOptions } from 'sequelize';
import type { AssayCode, Measure, SpecimenType } from '@/schemas/common';
import type { ReferenceIntervalStatus } from '@/schemas/reference-interval';
import type { ControlUploadSummary, IntervalDerivation, StoredInterval } from '@/schemas/reference-interval-api';
import { UploadModel } from '../uploads/upload.model';
import { findUserById } from '../users/users.repository';
import { ReferenceIntervalModel } from './reference-interval.model';
import { intervalLabel } from './interval-labels';

/** The columns a new version is written with. */
export type IntervalRow = {
  intervalKey: string;
  version: number;
  status: ReferenceIntervalStatus;
  setName: string;
  assay: AssayCode;
  measure: Measure;
  specimenType: SpecimenType;
  ageLabel: string;
  ageMinYears: number;
  ageMaxYears: number | null;
  lower: number;
  upper: number;
  mean: number;
  sd: number | null;
  n: number;
  unit: string;
  basis: StoredInterval['basis'];
  method: StoredInterval['method'];
  derivation: IntervalDerivation | null;
  sourceNote: string;
  uploadId: number | null;
  effectiveFrom: string;
  effectiveTo: string | null;
  createdById: number | null;
  approvedById: number | null;
  approvedAt: Date | null;
};

/** Resolves user ids to names once per call, so a list of intervals costs one lookup per person. */
async function nameLookup(ids: (number | null)[], transaction?: Transaction): Promise<Map<number, string>> {
  const distinct = [...new Set(ids.filter((id): id is number => id !== null))];
  const users = await Promise.all(distinct.map((id) => findUserById(id, transaction)));
  return new Map(users.filter((u) => u !== null).map((u) => [u.id, u.name]));
}

async function uploadLookup(
  ids: (number | null)[],
  transaction?: Transaction,
): Promise<Map<number, { id: number; filename: string; sha256: string }>> {
  const distinct = [...new Set(ids.filter((id): id is number => id !== null))];
  if (distinct.length === 0) return new Map();
  const rows = await UploadModel.findAll({
    where: { id: distinct },
    attributes: ['id', 'filename', 'sha256'],
    transaction,
  });
  return new Map(rows.map((r) => [r.id, { id: r.id, filename: r.filename, sha256: r.sha256 }]));
}

async function toStored(rows: ReferenceIntervalModel[], transaction?: Transaction): Promise<StoredInterval[]> {
  const names = await nameLookup(
    rows.flatMap((r) => [r.createdById, r.approvedById, r.retiredById]),
    transaction,
  );
  const uploads = await uploadLookup(
    rows.map((r) => r.uploadId),
    transaction,
  );
  const name = (id: number | null) => (id === null ? null : (names.get(id) ?? null));
  return rows.map((r) => ({
    id: r.id,
    version: r.version,
    status: r.status,
    revision: r.revision,
    intervalKey: r.intervalKey,
    label: intervalLabel(r),
    setName: r.setName,
    assay: r.assay,
    measure: r.measure,
    specimenType: r.specimenType,
    ageBand: { label: r.ageLabel, minYears: r.ageMinYears, maxYears: r.ageMaxYears },
    lower: r.lower,
    upper: r.upper,
    mean: r.mean,
    sd: r.sd,
    n: r.n,
    unit: r.unit,
    basis: r.basis,
    method: r.method,
    derivation: r.derivation ? (JSON.parse(r.derivation) as IntervalDerivation) : null,
    sourceNote: r.sourceNote,
    upload: r.uploadId === null ? null : (uploads.get(r.uploadId) ?? null),
    effectiveFrom: r.effectiveFrom,
    effectiveTo: r.effectiveTo,
    approvedBy: r.approvedById,
    approvedByName: name(r.approvedById),
    approvedAt: r.approvedAt ? r.approvedAt.toISOString() : null,
    createdBy: r.createdById,
    createdByName: name(r.createdById),
    createdAt: r.createdAt.toISOString(),
    retiredBy: r.retiredById,
    retiredByName: name(r.retiredById),
    retiredAt: r.retiredAt ? r.retiredAt.toISOString() : null,
    retireReason: r.retireReason,
  }));
}

const displayOrder: [string, 'ASC' | 'DESC'][] = [
  ['specimenType', 'ASC'],
  ['assay', 'ASC'],
  ['measure', 'ASC'],
  ['ageMinYears', 'ASC'],
  ['version', 'DESC'],
];

export async function findIntervalById(id: number, transaction?: Transaction): Promise<StoredInterval | null> {
  const row = await ReferenceIntervalModel.findByPk(id, { transaction });
  return row ? ((await toStored([row], transaction))[0] ?? null) : null;
}

export async function listIntervals(
  where: WhereOptions<ReferenceIntervalModel>,
  transaction?: Transaction,
): Promise<StoredInterval[]> {
  const rows = await ReferenceIntervalModel.findAll({ where, order: displayOrder, transaction });
  return toStored(rows, transaction);
}

/** Approved versions that have not ended by `today` (current or scheduled), plus drafts if asked. */
export async function listCurrentIntervals(today: string, withDrafts: boolean): Promise<StoredInterval[]> {
  const approved = {
    status: 'approved' as const,
    [Op.or]: [{ effectiveTo: null }, { effectiveTo: { [Op.gt]: today } }],
  };
  return listIntervals(withDrafts ? { [Op.or]: [approved, { status: 'draft' }] } : approved);
}

export async function listVersionsOfKey(intervalKey: string, transaction?: Transaction): Promise<StoredInterval[]> {
  const rows = await ReferenceIntervalModel.findAll({
    where: { intervalKey },
    order: [['version', 'DESC']],
    transaction,
  });
  return toStored(rows, transaction);
}

/** Approved rows of one assay × measure × specimen type, in any age band; the overlap checks read these. */
export async function listApprovedForSeries(
  s: { assay: AssayCode; measure: Measure; specimenType: SpecimenType },
  transaction?: Transaction,
): Promise<StoredInterval[]> {
  return listIntervals(
    { assay: s.assay, measure: s.measure, specimenType: s.specimenType, status: 'approved' },
    transaction,
  );
}

export async function highestVersionOfKey(intervalKey: string, transaction?: Transaction): Promise<number> {
  const max = await ReferenceIntervalModel.max<number | null, ReferenceIntervalModel>('version', {
    where: { intervalKey },
    transaction,
  });
  return typeof max === 'number' ? max : 0;
}

/** Approved rows effective on `day` for this assay, measure and specimen type. */
export async function listEffectiveOn(
  s: { assay: AssayCode; measure: Measure; specimenType: SpecimenType },
  day: string,
): Promise<StoredInterval[]> {
  return listIntervals({
    assay: s.assay,
    measure: s.measure,
    specimenType: s.specimenType,
    status: 'approved',
    effectiveFrom: { [Op.lte]: day },
    [Op.or]: [{ effectiveTo: null }, { effectiveTo: { [Op.gt]: day } }],
  });
}

export async function insertInterval(row: IntervalRow, transaction: Transaction): Promise<StoredInterval> {
  const created = await ReferenceIntervalModel.create(
    {
      ...row,
      derivation: row.derivation ? JSON.stringify(row.derivation) : null,
      retiredById: null,
      retiredAt: null,
      retireReason: null,
    },
    { transaction },
  );
  return (await toStored([created], transaction))[0]!;
}

type Changes = Partial<
  Pick<
    ReferenceIntervalModel,
    | 'status'
    | 'effectiveTo'
    | 'approvedById'
    | 'approvedAt'
    | 'retiredById'
    | 'retiredAt'
    | 'retireReason'
    // A draft's own fields, while it is one (see editDraft); the derivation only ever goes (null).
    | 'setName'
    | 'ageLabel'
    | 'lower'
    | 'upper'
    | 'mean'
    | 'sd'
    | 'n'
    | 'unit'
    | 'method'
    | 'sourceNote'
    | 'effectiveFrom'
    | 'derivation'
  >
>;

/** Changes a row only if its revision is still `expectedRevision`; false when someone else got there first. */
export async function updateIntervalIfRevision(
  id: number,
  expectedRevision: number,
  changes: Changes,
  transaction: Transaction,
): Promise<boolean> {
  const [count] = await ReferenceIntervalModel.update(
    { ...changes, revision: expectedRevision + 1 },
    { where: { id, revision: expectedRevision }, transaction },
  );
  return count === 1;
}

export async function countIntervals(): Promise<number> {
  return ReferenceIntervalModel.count();
}

// ---------------------------------------------------------------------------------------------
// Control-data files (rows of the shared uploads table with kind "controls" and no case)

export const CONTROLS_KIND = 'controls';

async function toUploadSummaries(rows: UploadModel[]): Promise<ControlUploadSummary[]> {
  const names = await nameLookup(rows.map((r) => r.uploadedById));
  return rows.map((r) => ({
    id: r.id,
    filename: r.filename,
    sizeBytes: r.sizeBytes,
    sha256: r.sha256,
    uploadedBy: r.uploadedById,
    uploadedByName: r.uploadedById === null ? null : (names.get(r.uploadedById) ?? null),
    createdAt: r.createdAt.toISOString(),
  }));
}

const summaryAttributes = ['id', 'filename', 'sizeBytes', 'sha256', 'uploadedById', 'createdAt'] as const;

export async function listControlUploads(): Promise<ControlUploadSummary[]> {
  const rows = await UploadModel.findAll({
    where: { kind: CONTROLS_KIND, caseId: null },
    attributes: [...summaryAttributes],
    order: [['id', 'DESC']],
  });
  return toUploadSummaries(rows);
}

export async function findControlUpload(
  id: number,
): Promise<{ summary: ControlUploadSummary; content: Buffer; mimeType: string } | null> {
  const row = await UploadModel.findOne({ where: { id, kind: CONTROLS_KIND, caseId: null } });
  if (!row) return null;
  const [summary] = await toUploadSummaries([row]);
  return { summary: summary!, content: Buffer.from(row.content), mimeType: row.mimeType };
}

export async function findControlUploadBySha(sha256: string): Promise<ControlUploadSummary | null> {
  const row = await UploadModel.findOne({
    where: { kind: CONTROLS_KIND, caseId: null, sha256 },
    attributes: [...summaryAttributes],
  });
  return row ? ((await toUploadSummaries([row]))[0] ?? null) : null;
}

export async function insertControlUpload(
  file: { filename: string; mimeType: string; content: Buffer; sha256: string; uploadedById: number | null },
  transaction: Transaction,
): Promise<number> {
  const row = await UploadModel.create(
    {
      caseId: null,
      kind: CONTROLS_KIND,
      filename: file.filename,
      mimeType: file.mimeType,
      sizeBytes: file.content.length,
      sha256: file.sha256,
      content: file.content,
      uploadedById: file.uploadedById,
    },
    { transaction },
  );
  return row.id;
}
