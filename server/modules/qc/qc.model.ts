import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import { editVersionColumn, idColumn, timestampColumns } from '../../db/columns';

/** One control material at one level and lot (a pooled homogenate, a commercial control…). */
export class ControlMaterialModel extends Model<
  InferAttributes<ControlMaterialModel>,
  InferCreationAttributes<ControlMaterialModel>
> {
  declare id: CreationOptional<number>;
  declare name: string;
  declare lot: string;
  declare level: string;
  declare expiresOn: string;
  declare description: CreationOptional<string>;
  declare retiredAt: CreationOptional<Date | null>;
  declare createdById: number | null;
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

/** A versioned target mean and SD of one control material for one assay. */
export class ControlTargetModel extends Model<InferAttributes<ControlTargetModel>, InferCreationAttributes<ControlTargetModel>> {
  declare id: CreationOptional<number>;
  declare controlMaterialId: number;
  declare assayCode: string;
  declare version: number;
  declare mean: number;
  declare sd: number;
  declare source: 'entered' | 'established';
  declare basis: string | null;
  declare status: CreationOptional<'draft' | 'approved' | 'retired'>;
  declare note: CreationOptional<string>;
  declare createdById: number | null;
  declare approvedById: CreationOptional<number | null>;
  declare approvedAt: CreationOptional<Date | null>;
  declare retiredAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

/** What one run measured on one control material for one assay. */
export class ControlResultModel extends Model<InferAttributes<ControlResultModel>, InferCreationAttributes<ControlResultModel>> {
  declare id: CreationOptional<number>;
  declare runId: number;
  declare controlMaterialId: number;
  declare assayCode: string;
  declare value: number;
  declare wells: CreationOptional<string>;
  declare controlTargetId: number | null;
  declare z: number | null;
  declare measuredAt: Date;
  declare createdAt: CreationOptional<Date>;
}

export function initQcModels(sequelize: Sequelize): void {
  ControlMaterialModel.init(
    {
      id: idColumn,
      name: { type: DataTypes.STRING(120), allowNull: false },
      lot: { type: DataTypes.STRING(60), allowNull: false },
      level: { type: DataTypes.STRING(60), allowNull: false },
      expiresOn: { type: DataTypes.DATEONLY, allowNull: false },
      description: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
      retiredAt: { type: DataTypes.DATE, allowNull: true },
      createdById: { type: DataTypes.INTEGER, allowNull: true },
      version: editVersionColumn,
      ...timestampColumns,
    },
    { sequelize, tableName: 'control_materials', modelName: 'ControlMaterial' },
  );
  ControlTargetModel.init(
    {
      id: idColumn,
      controlMaterialId: { type: DataTypes.INTEGER, allowNull: false },
      assayCode: { type: DataTypes.STRING(10), allowNull: false },
      version: { type: DataTypes.INTEGER, allowNull: false },
      mean: { type: DataTypes.DOUBLE, allowNull: false },
      sd: { type: DataTypes.DOUBLE, allowNull: false },
      source: { type: DataTypes.STRING(12), allowNull: false },
      basis: { type: DataTypes.TEXT, allowNull: true },
      status: { type: DataTypes.STRING(10), allowNull: false, defaultValue: 'draft' },
      note: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
      createdById: { type: DataTypes.INTEGER, allowNull: true },
      approvedById: { type: DataTypes.INTEGER, allowNull: true },
      approvedAt: { type: DataTypes.DATE, allowNull: true },
      retiredAt: { type: DataTypes.DATE, allowNull: true },
      ...timestampColumns,
    },
    { sequelize, tableName: 'control_targets', modelName: 'ControlTarget' },
  );
  ControlResultModel.init(
    {
      id: idColumn,
      runId: { type: DataTypes.INTEGER, allowNull: false },
      controlMaterialId: { type: DataTypes.INTEGER, allowNull: false },
      assayCode: { type: DataTypes.STRING(10), allowNull: false },
      value: { type: DataTypes.DOUBLE, allowNull: false },
      wells: { type: DataTypes.TEXT, allowNull: false, defaultValue: '[]' },
      controlTargetId: { type: DataTypes.INTEGER, allowNull: true },
      z: { type: DataTypes.DOUBLE, allowNull: true },
      measuredAt: { type: DataTypes.DATE, allowNull: false },
      createdAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'control_results', modelName: 'ControlResult', updatedAt: false },
  );
}
