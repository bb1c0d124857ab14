import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import { idColumn } from '../../db/columns';

/** One version of one assay definition. Rows are never updated: a change is a new version. */
export class AssayDefinitionModel extends Model<InferAttributes<AssayDefinitionModel>, InferCreationAttributes<AssayDefinitionModel>> {
  declare id: CreationOptional<number>;
  declare code: string;
  declare version: number;
  declare data: string;
  declare changeNote: string | null;
  declare createdById: number | null;
  declare createdAt: CreationOptional<Date>;
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
    },
    { sequelize, tableName: 'assay_definitions', modelName: 'AssayDefinition', updatedAt: false },
  );
}
