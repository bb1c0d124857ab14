import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import { editVersionColumn, idColumn, timestampColumns } from '../../db/columns';

/** One assay replicate on one specimen: its inputs as entered and the engine's result, with the definition version. */
export class MeasurementModel extends Model<InferAttributes<MeasurementModel>, InferCreationAttributes<MeasurementModel>> {
  declare id: CreationOptional<number>;
  declare caseId: number;
  declare specimenId: number;
  declare assay: string;
  declare replicate: number;
  declare inputMode: string;
  declare inputs: string;
  declare result: string;
  declare definitionId: number;
  declare definitionVersion: number;
  declare activity: number | null;
  declare flags: CreationOptional<string>;
  declare uploadId: number | null;
  /** The analytical run the measurement came from (null for bench entry and single-case imports). */
  declare runId: CreationOptional<number | null>;
  declare createdById: number | null;
  declare excludedReason: CreationOptional<string | null>;
  declare excludedById: CreationOptional<number | null>;
  declare excludedAt: CreationOptional<Date | null>;
  declare submittedAt: CreationOptional<Date | null>;
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export function initMeasurementModel(sequelize: Sequelize): void {
  MeasurementModel.init(
    {
      id: idColumn,
      caseId: { type: DataTypes.INTEGER, allowNull: false },
      specimenId: { type: DataTypes.INTEGER, allowNull: false },
      assay: { type: DataTypes.STRING(10), allowNull: false },
      replicate: { type: DataTypes.INTEGER, allowNull: false },
      inputMode: { type: DataTypes.STRING(10), allowNull: false },
      inputs: { type: DataTypes.TEXT, allowNull: false },
      result: { type: DataTypes.TEXT, allowNull: false },
      definitionId: { type: DataTypes.INTEGER, allowNull: false },
      definitionVersion: { type: DataTypes.INTEGER, allowNull: false },
      activity: { type: DataTypes.FLOAT, allowNull: true },
      flags: { type: DataTypes.TEXT, allowNull: false, defaultValue: '[]' },
      uploadId: { type: DataTypes.INTEGER, allowNull: true },
      runId: { type: DataTypes.INTEGER, allowNull: true },
      createdById: { type: DataTypes.INTEGER, allowNull: true },
      excludedReason: { type: DataTypes.TEXT, allowNull: true },
      excludedById: { type: DataTypes.INTEGER, allowNull: true },
      excludedAt: { type: DataTypes.DATE, allowNull: true },
      submittedAt: { type: DataTypes.DATE, allowNull: true },
      version: editVersionColumn,
      ...timestampColumns,
    },
    { sequelize, tableName: 'measurements', modelName: 'Measurement' },
  );
}
