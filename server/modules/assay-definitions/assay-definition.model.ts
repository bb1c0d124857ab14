import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { AssayDefinitionStatus } from '@/schemas/assay';
import { idColumn } from '../../db/columns';

/**
 * One version of one assay definition. A change is a new version, saved as a draft; the only later change to a
 * row is its approval (or withdrawal) by a director (migration 0012).
 */
export class AssayDefinitionModel extends Model<InferAttributes<AssayDefinitionModel>, InferCreationAttributes<AssayDefinitionModel>> {
  declare id: CreationOptional<number>;
  declare code: string;
  declare version: number;
  declare data: string;
  declare changeNote: string | null;
  declare createdById: number | null;
  declare createdAt: CreationOptional<Date>;
  declare status: AssayDefinitionStatus;
  declare approvedById: number | null;
  declare approvedAt: Date | null;
}

export function initAssayDefinitionModel(sequelize: Sequelize): void {
  AssayDefinitionModel.init(
    {
      id: idColumn,
      code: { type: DataTypes.STRING(10), allowNull: false },
      version: { type: DataTypes.INTEGER, allowNull: false },
      data: { type: DataTypes.TEXT, allowNull: false },
      changeNote: { type: DataTypes.TEXT, allowNull: true },
      createdById: { type: DataTypes.INTEGER, allowNull: true },
      createdAt: DataTypes.DATE,
      status: { type: DataTypes.STRING(10), allowNull: false, defaultValue: 'approved' },
      approvedById: { type: DataTypes.INTEGER, allowNull: true },
      approvedAt: { type: DataTypes.DATE, allowNull: true },
    },
    { sequelize, tableName: 'assay_definitions', modelName: 'AssayDefinition', updatedAt: false },
  );
}
