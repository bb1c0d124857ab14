import { Op, Sequelize } from 'sequelize';
import type { SpecimenType } from '@/schemas/common';
import { inProgressStates, type InProgressCase, type InProgressState } from '@/schemas/report';
import { CaseModel } from '../cases/case.model';

/**
 * The cases one clinician referred that are not reported yet, newest receipt first. Reads only the columns the
 * clinician may see: never results, the interpretation draft or a return reason. A case reopened after signing
 * has reports already and stays in the clinician's report list instead.
 */
export async function listInProgressOfClinician(clinicianId: number): Promise<InProgressCase[]> {
  const rows = await CaseModel.findAll({
    where: {
      referringClinicianId: clinicianId,
      state: { [Op.in]: [...inProgressStates] },
      id: { [Op.notIn]: Sequelize.literal('(SELECT "caseId" FROM reports)') },
    },
    attributes: ['id', 'accession', 'patientName', 'specimenTypes', 'state', 'receivedAt'],
    order: [
      ['receivedAt', 'DESC'],
      ['id', 'DESC'],
    ],
  });
  return rows.map((r) => ({
    caseId: r.id,
    accession: r.accession,
    patientName: r.patientName,
    specimenTypes: r.specimenTypes.split(',').filter(Boolean) as SpecimenType[],
    state: r.state as InProgressState,
    receivedAt: r.receivedAt ? r.receivedAt.toISOString() : null,
  }));
}
