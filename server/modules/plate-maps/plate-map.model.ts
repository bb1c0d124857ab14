import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import { editVersionColumn, idColumn, timestampColumns } from '../../db/columns';

/** A reusable plate layout: which well holds which specimen, assay, trace role and replicate. */
export class PlateMapModel extends Model<InferAttributes<PlateMapModel>, InferCreationAttributes<PlateMapModel>> {
  declare id: CreationOptional<number>;
  declare name: string;
  declare wells: string;
  declare description: CreationOptional<string>;
  declare createdById: number | null;
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export function initPlateMapModel(sequelize: Sequelize): void {
  PlateMapModel.init(
    {
      id: idColumn,
      name: { type: DataTypes.STRING(120), allowNull: false, unique: true },
      wells: { type: DataTypes.TEXT, allowNull: false },
      description: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
      createdById: { type: DataTypes.INTEGER, allowNull: true },
      version: editVersionColumn,
      ...timestampColumns,
    },
    { sequelize, tableName: 'plate_maps', modelName: 'PlateMap' },
  );
}
