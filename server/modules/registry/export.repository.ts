import { Op, QueryTypes, type Sequelize } from 'sequelize';
import type { SpecimenType } from '@/schemas/common';
import type { CohortMember } from '@/schemas/registry';
import { CaseModel } from '../cases/case.model';
import { PatientModel } from '../patients/patient.model';
import { SpecimenModel } from '../specimens/specimen.model';

/*
 * What the registry export reads besides the cohort tables: the patient and specimen behind each cohort member,
 * and the signed specimens the cohort tables leave out (rejected, or accepted without results). Portable SQL or
 * the query builder only.
 */

export type MemberContext = {
  patientKey: number;
  patientName: string;
  labPatientId: string;
  dateOfBirth: string;
  /** Collection instant, or receipt when collection was not recorded. */
  collectedOrReceivedAt: Date;
  accepted: boolean;
};

export const memberKey = (caseId: number, label: string) => `${caseId}/${label}`;

/** The patient and specimen of each member of one batch, keyed by memberKey(caseId, specimenLabel). */
export async function contextOfMembers(members: readonly CohortMember[]): Promise<Map<string, MemberContext>> {
  const out = new Map<string, MemberContext>();
  if (members.length === 0) return out;
  const caseIds = [...new Set(members.map((m) => m.caseId))];
  const cases = await CaseModel.findAll({ where: { id: { [Op.in]: caseIds } }, attributes: ['id', 'patientId'] });
  const patients = await PatientModel.findAll({
    where: { id: { [Op.in]: [...new Set(cases.map((c) => c.patientId))] } },
    attributes: ['id', 'labPatientId', 'familyName', 'givenName', 'dateOfBirth'],
  });
  const specimens = await SpecimenModel.findAll({
    where: { caseId: { [Op.in]: caseIds } },
    attributes: ['id', 'caseId', 'label', 'collectedAt', 'receivedAt', 'accepted'],
  });
  const patientById = new Map(patients.map((p) => [p.id, p]));
  const patientOfCase = new Map(cases.map((c) => [c.id, patientById.get(c.patientId)]));
  // The cohort keeps the label as signed, or the specimen id when the label was blank (cohort-signing.ts).
  const specimenByKey = new Map(specimens.map((x) => [memberKey(x.caseId, x.label.trim() || String(x.id)), x]));
  for (const m of members) {
    const p = patientOfCase.get(m.caseId);
    const s = specimenByKey.get(memberKey(m.caseId, m.specimenLabel));
    if (!p || !s) continue;
    out.set(memberKey(m.caseId, m.specimenLabel), {
      patientKey: p.id,
      patientName: `${p.familyName}, ${p.givenName}`,
      labPatientId: p.labPatientId,
      dateOfBirth: p.dateOfBirth,
      collectedOrReceivedAt: s.collectedAt ?? s.receivedAt,
      accepted: s.accepted,
    });
  }
  return out;
}

/** A specimen on a current signed report that has no cohort member (rejected, or accepted with no results). */
export type UnmeasuredSpecimen = MemberContext & {
  caseId: number;
  accession: string;
  specimenLabel: string;
  specimenType: SpecimenType;
  sex: string;
  reportVersion: number;
  reportStatus: 'final' | 'corrected';
  signedAt: Date;
};

type UnmeasuredRow = {
  caseId: number;
  accession: string;
  specimenId: number;
  label: string;
  type: string;
  accepted: boolean | number;
  collectedAt: string | Date | null;
  receivedAt: string | Date;
  version: number;
  kind: string;
  signedAt: string | Date;
  patientId: number;
  labPatientId: string;
  familyName: string;
  givenName: string;
  dateOfBirth: string;
  sex: string;
};

/**
 * Specimens of current (not superseded) signed reports that the cohort tables do not hold, received before the
 * signature (so a specimen added while a case is reopened is not taken for a signed one).
 */
export async function signedSpecimensWithoutCohortRows(sequelize: Sequelize): Promise<UnmeasuredSpecimen[]> {
  const rows = (await sequelize.query(
    `SELECT c.id AS "caseId", c.accession, s.id AS "specimenId", s.label, s.type, s.accepted, s."collectedAt", s."receivedAt",
            r.version, r.kind, r."signedAt", p.id AS "patientId", p."labPatientId", p."familyName", p."givenName",
            p."dateOfBirth", p.sex
       FROM reports r
       JOIN cases c ON c.id = r."caseId"
       JOIN specimens s ON s."caseId" = c.id
       JOIN patients p ON p.id = c."patientId"
      WHERE r."supersededByReportId" IS NULL
        AND s."createdAt" <= r."signedAt"
        AND NOT EXISTS (SELECT 1 FROM cohort_members m
                         WHERE m."specimenId" = s.id OR (m."caseId" = s."caseId" AND m."specimenLabel" = s.label))
      ORDER BY c.id, s.id`,
    { type: QueryTypes.SELECT },
  )) as UnmeasuredRow[];
  return rows.map((r) => ({
    caseId: r.caseId,
    accession: r.accession,
    specimenLabel: r.label.trim() || String(r.specimenId),
    specimenType: r.type as SpecimenType,
    accepted: Boolean(r.accepted),
    collectedOrReceivedAt: new Date(r.collectedAt ?? r.receivedAt),
    sex: r.sex,
    reportVersion: r.version,
    reportStatus: r.kind === 'corrected' ? 'corrected' : 'final',
    signedAt: new Date(r.signedAt),
    patientKey: r.patientId,
    patientName: `${r.familyName}, ${r.givenName}`,
    labPatientId: r.labPatientId,
    dateOfBirth: r.dateOfBirth,
  }));
}
