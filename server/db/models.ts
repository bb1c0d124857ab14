import type { Sequelize } from 'sequelize';
import { initAuditEventModel } from '../modules/audit/audit.model';
import { initLabProfileModel } from '../modules/lab-profile/lab-profile.model';
import { initUserModel } from '../modules/users/user.model';
import { associate } from './associate';

/** Binds every model class to this database. Called once per database, by createApp and the start-up script. */
export function initModels(sequelize: Sequelize): void {
  initUserModel(sequelize);
  initLabProfileModel(sequelize);
  initAuditEventModel(sequelize);
  associate();
}
