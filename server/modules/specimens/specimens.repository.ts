import { Sequelize, type Transaction } from 'sequelize';
import type { RejectionReason, Specimen } from '@/schemas/case';
import { RejectionReasonModel, SpecimenModel } from './specimen.model';

export type SpecimenRow = Omit<Specimen, 'id' | 'version' | 'proteinMgPerMl' | 'proteinSource' | 'collectedAt' | 'receivedAt'> & {
  collectedAt: Date | null;
  receivedAt: Date;
};

function toSpecimen(row: SpecimenModel): Specimen {
  return {
    id: row.id,
    caseId: row.caseId,
    label: row.label,
    type: row.type as Specimen['type'],
    source: row.source,
    collectedAt: row.collectedAt ? row.collectedAt.toISOString() : null,
    receivedAt: row.receivedAt.toISOString(),
    transportCondition: row.transportCondition as Specimen['transportCondition'],
    wetWeightMg: row.wetWeightMg,
    accepted: row.accepted,
    rejectionReason: row.rejectionReason,
    proteinMgPerMl: row.proteinMgPerMl,
    proteinSource: row.proteinSource,
    version: row.version,
  };
}

export async function listSpecimensOfCase(caseId: number, transaction?: Transaction): Promise<Specimen[]> {
  const rows = await SpecimenModel.findAll({ where: { caseId }, order: [['id', 'ASC']], transaction });
  return rows.map(toSpecimen);
}

export async function findSpecimenById(id: number, transaction?: Transaction): Promise<Specimen | null> {
  const row = await SpecimenModel.findByPk(id, { transaction });
  return row ? toSpecimen(row) : null;
}

export async function insertSpecimen(data: SpecimenRow, transaction: Transaction): Promise<Specimen> {
  return toSpecimen(await SpecimenModel.create({ ...data, proteinMgPerMl: null, proteinSource: null, proteinDetails: null }, { transaction }));
}

export async function updateSpecimenIfVersion(
  id: number,
  expectedVersion: number,
  changes: Partial<Omit<SpecimenRow, 'caseId' | 'label' | 'type'>>,
  transaction: Transaction,
): Promise<boolean> {
  const [count] = await SpecimenModel.update(
    { ...changes, version: expectedVersion + 1 },
    { where: { id, version: expectedVersion }, transaction },
  );
  return count === 1;
}

/** The specimens' types and earliest receipt, for the case's denormalised list columns. */
export async function specimenSummaryOfCase(
  caseId: number,
  transaction: Transaction,
): Promise<{ types: string[]; earliestReceipt: Date | null }> {
  const rows = await SpecimenModel.findAll({ where: { caseId }, attributes: ['type', 'receivedAt'], transaction });
  const types = [...new Set(rows.map((r) => r.type))].sort();
  const times = rows.map((r) => r.receivedAt.getTime());
  return { types, earliestReceipt: times.length ? new Date(Math.min(...times)) : null };
}

/* ---------------------------------------------------------------- rejection reasons */

function toReason(row: RejectionReasonModel): RejectionReason {
  return { id: row.id, text: row.text, active: row.active };
}

export async function listActiveReasons(): Promise<RejectionReason[]> {
  const rows = await RejectionReasonModel.findAll({ where: { active: true }, order: [['text', 'ASC']] });
  return rows.map(toReason);
}

export async function findReasonByText(text: string, transaction?: Transaction): Promise<RejectionReason | null> {
  const row = await RejectionReasonModel.findOne({
    where: Sequelize.where(Sequelize.fn('lower', Sequelize.col('text')), text.toLowerCase()),
    transaction,
  });
  return row ? toReason(row) : null;
}

export async function insertReason(text: string, transaction: Transaction): Promise<RejectionReason> {
  return toReason(await RejectionReasonModel.create({ text }, { transaction }));
}
