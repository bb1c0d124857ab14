import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import { editVersionColumn, idColumn, timestampColumns } from '../../db/columns';

/** One analytical run: a plate read on one instrument, carrying specimens of several cases, controls and blanks. */
export class AnalyticalRunModel extends Model<InferAttributes<AnalyticalRunModel>, InferCreationAttributes<AnalyticalRunModel>> {
  declare id: CreationOptional<number>;
  declare runNumber: string;
  declare instrument: string;
  declare startedAt: Date;
  declare operatorId: number | null;
  declare plateFormat: number;
  declare layout: string;
  declare definitionVersions: string;
  declare uploadId: number | null;
  declare qcStatus: 'accept' | 'warn' | 'reject' | 'none';
  declare qcViolations: CreationOptional<string>;
  declare overrideReason: CreationOptional<string | null>;
  declare overrideById: CreationOptional<number | null>;
  declare overrideAt: CreationOptional<Date | null>;
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export function initRunModel(sequelize: Sequelize): void {
  AnalyticalRunModel.init(
    {
      id: idColumn,
      runNumber: { type: DataTypes.STRING(30), allowNull: false, unique: true },
      instrument: { type: DataTypes.STRING(120), allowNull: false },
      startedAt: { type: DataTypes.DATE, allowNull: false },
      operatorId: { type: DataTypes.INTEGER, allowNull: true },
      plateFormat: { type: DataTypes.INTEGER, allowNull: false },
      layout: { type: DataTypes.TEXT, allowNull: false },
      definitionVersions: { type: DataTypes.TEXT, allowNull: false },
      uploadId: { type: DataTypes.INTEGER, allowNull: true },
      qcStatus: { type: DataTypes.STRING(10), allowNull: false },
      qcViolations: { type: DataTypes.TEXT, allowNull: false, defaultValue: '[]' },
      overrideReason: { type: DataTypes.TEXT, allowNull: true },
      overrideById: { type: DataTypes.INTEGER, allowNull: true },
      overrideAt: { type: DataTypes.DATE, allowNull: true },
      version: editVersionColumn,
      ...timestampColumns,
    },
    { sequelize, tableName: 'analytical_runs', modelName: 'AnalyticalRun' },
  );
}
