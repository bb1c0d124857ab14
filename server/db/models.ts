import type { Sequelize } from 'sequelize';
import { initAssayDefinitionModel } from '../modules/assay-definitions/assay-definition.model';
import { initAuditEventModel } from '../modules/audit/audit.model';
import { initCaseModels } from '../modules/cases/case.model';
import { initLabProfileModel } from '../modules/lab-profile/lab-profile.model';
import { initMeasurementModel } from '../modules/measurements/measurement.model';
import { initPatientModel } from '../modules/patients/patient.model';
import { initPlateMapModel } from '../modules/plate-maps/plate-map.model';
import { initReferenceIntervalModel } from '../modules/reference-intervals/reference-interval.model';
import { initSpecimenModels } from '../modules/specimens/specimen.model';
import { initUploadModel } from '../modules/uploads/upload.model';
import { initUserModel } from '../modules/users/user.model';
import { initReportModels } from '../modules/reports/report.model';
import { initMailModels } from '../modules/mail/outbox.model';
import { initQcModels } from '../modules/qc/qc.model';
import { initRunModel } from '../modules/runs/run.model';
import { initSavedSearchModel } from '../modules/registry/saved-search.model';
import { associate } from './associate';

/** Binds every model class to this database. Called once per database, by createApp's callers. */
export function initModels(sequelize: Sequelize): void {
  initUserModel(sequelize);
  initLabProfileModel(sequelize);
  initAuditEventModel(sequelize);
  initAssayDefinitionModel(sequelize);
  initPatientModel(sequelize);
  initCaseModels(sequelize);
  initSpecimenModels(sequelize);
  initUploadModel(sequelize);
  initPlateMapModel(sequelize);
  initMeasurementModel(sequelize);
  initReferenceIntervalModel(sequelize);
  initReportModels(sequelize);
  initMailModels(sequelize);
  initRunModel(sequelize);
  initQcModels(sequelize);
  initSavedSearchModel(sequelize);
  associate();
}
