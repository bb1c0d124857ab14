import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import { editVersionColumn, timestampColumns } from '../../db/columns';

/** The single row (id 1) describing the performing laboratory, as reports print it. */
export class LabProfileModel extends Model<InferAttributes<LabProfileModel>, InferCreationAttributes<LabProfileModel>> {
  declare id: number;
  declare name: string;
  /** JSON array of address lines. */
  declare addressLines: string;
  declare accreditationNumber: string;
  declare phone: string | null;
  declare timeZone: string;
  declare allowSelfApproval: CreationOptional<boolean>;
  /** JSON array of the Westgard rules switched on; null for all of them (migration 0015). */
  declare qcRules: CreationOptional<string | null>;
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export function initLabProfileModel(sequelize: Sequelize): void {
  LabProfileModel.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true },
      name: { type: DataTypes.STRING(160), allowNull: false },
      addressLines: { type: DataTypes.TEXT, allowNull: false },
      accreditationNumber: { type: DataTypes.STRING(80), allowNull: false },
      phone: { type: DataTypes.STRING(40), allowNull: true },
      timeZone: { type: DataTypes.STRING(60), allowNull: false },
      allowSelfApproval: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      qcRules: { type: DataTypes.TEXT, allowNull: true },
      version: editVersionColumn,
      ...timestampColumns,
    },
    { sequelize, tableName: 'lab_profiles', modelName: 'LabProfile' },
  );
}
