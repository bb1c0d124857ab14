import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import { editVersionColumn, idColumn, timestampColumns } from '../../db/columns';

export class SpecimenModel extends Model<InferAttributes<SpecimenModel>, InferCreationAttributes<SpecimenModel>> {
  declare id: CreationOptional<number>;
  declare caseId: number;
  declare label: string;
  declare type: string;
  declare source: string;
  declare collectedAt: Date | null;
  declare receivedAt: Date;
  declare transportCondition: string;
  declare wetWeightMg: number | null;
  declare accepted: boolean;
  declare rejectionReason: string | null;
  declare proteinMgPerMl: number | null;
  declare proteinSource: string | null;
  declare proteinDetails: string | null;
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export class RejectionReasonModel extends Model<InferAttributes<RejectionReasonModel>, InferCreationAttributes<RejectionReasonModel>> {
  declare id: CreationOptional<number>;
  declare text: string;
  declare active: CreationOptional<boolean>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export function initSpecimenModels(sequelize: Sequelize): void {
  SpecimenModel.init(
    {
      id: idColumn,
      caseId: { type: DataTypes.INTEGER, allowNull: false },
      label: { type: DataTypes.STRING(20), allowNull: false },
      type: { type: DataTypes.STRING(30), allowNull: false },
      source: { type: DataTypes.STRING(160), allowNull: false, defaultValue: '' },
      collectedAt: { type: DataTypes.DATE, allowNull: true },
      receivedAt: { type: DataTypes.DATE, allowNull: false },
      transportCondition: { type: DataTypes.STRING(20), allowNull: false },
      wetWeightMg: { type: DataTypes.FLOAT, allowNull: true },
      accepted: { type: DataTypes.BOOLEAN, allowNull: false },
      rejectionReason: { type: DataTypes.STRING(200), allowNull: true },
      proteinMgPerMl: { type: DataTypes.FLOAT, allowNull: true },
      proteinSource: { type: DataTypes.STRING(200), allowNull: true },
      proteinDetails: { type: DataTypes.TEXT, allowNull: true },
      version: editVersionColumn,
      ...timestampColumns,
    },
    { sequelize, tableName: 'specimens', modelName: 'Specimen' },
  );
  RejectionReasonModel.init(
    {
      id: idColumn,
      text: { type: DataTypes.STRING(200), allowNull: false, unique: true },
      active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
      ...timestampColumns,
    },
    { sequelize, tableName: 'rejection_reasons', modelName: 'RejectionReason' },
  );
}
