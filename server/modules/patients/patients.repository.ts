import { Op, QueryTypes, Sequelize, type Transaction, type WhereOptions } from 'sequelize';
import type { Patient } from '@/schemas/case';
import { isPostgres } from '../../db/sequelize';
import { PatientModel } from './patient.model';

function toPatient(row: PatientModel): Patient {
  return {
    id: row.id,
    labPatientId: row.labPatientId,
    familyName: row.familyName,
    givenName: row.givenName,
    dateOfBirth: row.dateOfBirth,
    sex: row.sex as Patient['sex'],
    version: row.version,
  };
}

export async function findPatientById(id: number, transaction?: Transaction): Promise<Patient | null> {
  const row = await PatientModel.findByPk(id, { transaction });
  return row ? toPatient(row) : null;
}

/**
 * The patients a new or corrected registration could duplicate, in one query: the one holding this lab ID, and
 * every one registered under this folded name and date of birth (oldest registration first).
 */
export async function findPossibleDuplicates(
  candidate: { labPatientId: string; nameKey: string; dateOfBirth: string },
  transaction?: Transaction,
): Promise<{ byLabId: Patient | null; sameNameAndBirth: Patient[] }> {
  const { labPatientId, nameKey, dateOfBirth } = candidate;
  // Values bound, not spliced in (findAll would write them into the text): every registration sends this one text,
  // which SQLite keeps prepared (one trip through the thread pool instead of two, inside the write queue), and no
  // patient's name reaches an SQL log.
  const rows = await PatientModel.sequelize!.query(
    `SELECT * FROM patients WHERE "labPatientId" = $1 OR ("nameKey" = $2 AND "dateOfBirth" = $3) ORDER BY id ASC`,
    { bind: [labPatientId, nameKey, dateOfBirth], type: QueryTypes.SELECT, model: PatientModel, mapToModel: true, transaction },
  );
  const byLabId = rows.find((r) => r.labPatientId === labPatientId);
  return {
    byLabId: byLabId ? toPatient(byLabId) : null,
    sameNameAndBirth: rows.filter((r) => r.nameKey === nameKey && r.dateOfBirth === dateOfBirth).map(toPatient),
  };
}

/**
 * Patients whose lab ID, folded name or date of birth contains every token. Lab-ID prefix matches rank first,
 * then names, alphabetically.
 */
export async function searchPatients(tokens: string[], limit: number): Promise<Patient[]> {
  // SQLite's instr(text, fragment) is PostgreSQL's strpos(text, fragment): the position, 0 when absent.
  const position = isPostgres(PatientModel.sequelize!) ? 'strpos' : 'instr';
  const conditions: WhereOptions[] = tokens.map((t) => ({
    [Op.or]: [
      Sequelize.where(Sequelize.fn(position, Sequelize.col('nameKey'), t), Op.gt, 0),
      Sequelize.where(Sequelize.fn(position, Sequelize.fn('lower', Sequelize.col('labPatientId')), t), Op.gt, 0),
      Sequelize.where(Sequelize.fn(position, Sequelize.col('dateOfBirth'), t), Op.gt, 0),
    ],
  }));
  const first = tokens[0] ?? '';
  const rows = await PatientModel.findAll({
    where: conditions.length ? { [Op.and]: conditions } : {},
    order: [
      [Sequelize.literal(`CASE WHEN lower("labPatientId") LIKE ${PatientModel.sequelize!.escape(`${first}%`)} THEN 0 ELSE 1 END`), 'ASC'],
      ['nameKey', 'ASC'],
      ['id', 'ASC'],
    ],
    limit,
  });
  return rows.map(toPatient);
}

export async function insertPatient(
  data: Omit<Patient, 'id' | 'version'> & { nameKey: string },
  transaction: Transaction,
): Promise<Patient> {
  return toPatient(await PatientModel.create(data, { transaction }));
}

/** Updates a patient only if its version is still `expectedVersion`; false when another save got there first. */
export async function updatePatientIfVersion(
  id: number,
  expectedVersion: number,
  changes: Partial<Omit<Patient, 'id' | 'version'>> & { nameKey?: string },
  transaction: Transaction,
): Promise<boolean> {
  const [count] = await PatientModel.update(
    { ...changes, version: expectedVersion + 1 },
    { where: { id, version: expectedVersion }, transaction },
  );
  return count === 1;
}
