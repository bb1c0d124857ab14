import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import { editVersionColumn, idColumn, timestampColumns } from '../../db/columns';

export class PatientModel extends Model<InferAttributes<PatientModel>, InferCreationAttributes<PatientModel>> {
  declare id: CreationOptional<number>;
  declare labPatientId: string;
  declare familyName: string;
  declare givenName: string;
  declare dateOfBirth: string;
  declare sex: string;
  declare nameKey: string;
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export function initPatientModel(sequelize: Sequelize): void {
  PatientModel.init(
    {
      id: idColumn,
      labPatientId: { type: DataTypes.STRING(40), allowNull: false, unique: true },
      familyName: { type: DataTypes.STRING(80), allowNull: false },
      givenName: { type: DataTypes.STRING(80), allowNull: false },
      dateOfBirth: { type: DataTypes.STRING(10), allowNull: false },
      sex: { type: DataTypes.STRING(10), allowNull: false },
      nameKey: { type: DataTypes.STRING(170), allowNull: false },
      version: editVersionColumn,
      ...timestampColumns,
    },
    { sequelize, tableName: 'patients', modelName: 'Patient' },
  );
}
