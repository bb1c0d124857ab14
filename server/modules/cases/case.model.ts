import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import { editVersionColumn, idColumn, timestampColumns } from '../../db/columns';

export class CaseModel extends Model<InferAttributes<CaseModel>, InferCreationAttributes<CaseModel>> {
  declare id: CreationOptional<number>;
  declare accession: string;
  declare patientId: number;
  declare referringClinicianId: number;
  declare clinicalIndication: string;
  declare priority: string;
  declare state: string;
  declare cancelReason: string | null;
  declare returnReason: string | null;
  declare amendReason: CreationOptional<string | null>;
  declare amendedAt: CreationOptional<Date | null>;
  declare receivedAt: Date | null;
  declare specimenTypes: CreationOptional<string>;
  declare searchText: string;
  declare patientName: string;
  declare patternCode: string | null;
  declare resultsSnapshot: string | null;
  declare createdById: number | null;
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export class AccessionCounterModel extends Model<InferAttributes<AccessionCounterModel>, InferCreationAttributes<AccessionCounterModel>> {
  declare year: number;
  declare last: number;
}

export function initCaseModels(sequelize: Sequelize): void {
  CaseModel.init(
    {
      id: idColumn,
      accession: { type: DataTypes.STRING(20), allowNull: false, unique: true },
      patientId: { type: DataTypes.INTEGER, allowNull: false },
      referringClinicianId: { type: DataTypes.INTEGER, allowNull: false },
      clinicalIndication: { type: DataTypes.TEXT, allowNull: false },
      priority: { type: DataTypes.STRING(10), allowNull: false },
      state: { type: DataTypes.STRING(20), allowNull: false },
      cancelReason: { type: DataTypes.TEXT, allowNull: true },
      returnReason: { type: DataTypes.TEXT, allowNull: true },
      amendReason: { type: DataTypes.TEXT, allowNull: true },
      amendedAt: { type: DataTypes.DATE, allowNull: true },
      receivedAt: { type: DataTypes.DATE, allowNull: true },
      specimenTypes: { type: DataTypes.STRING(200), allowNull: false, defaultValue: ',' },
      searchText: { type: DataTypes.STRING(300), allowNull: false },
      patientName: { type: DataTypes.STRING(170), allowNull: false },
      patternCode: { type: DataTypes.STRING(40), allowNull: true },
      resultsSnapshot: { type: DataTypes.TEXT, allowNull: true },
      createdById: { type: DataTypes.INTEGER, allowNull: true },
      version: editVersionColumn,
      ...timestampColumns,
    },
    { sequelize, tableName: 'cases', modelName: 'Case' },
  );
  AccessionCounterModel.init(
    {
      year: { type: DataTypes.INTEGER, primaryKey: true },
      last: { type: DataTypes.INTEGER, allowNull: false },
    },
    { sequelize, tableName: 'accession_counters', modelName: 'AccessionCounter', timestamps: false },
  );
}
