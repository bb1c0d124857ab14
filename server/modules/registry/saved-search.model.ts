import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import { idColumn } from '../../db/columns';

/** A named cohort filter kept by one user for themselves (migration 0016). */
export class SavedSearchModel extends Model<InferAttributes<SavedSearchModel>, InferCreationAttributes<SavedSearchModel>> {
  declare id: CreationOptional<number>;
  declare userId: number;
  declare name: string;
  /** The filter as JSON (src/schemas/registry.ts, without paging). */
  declare filters: string;
  declare createdAt: CreationOptional<Date>;
}

export function initSavedSearchModel(sequelize: Sequelize): void {
  SavedSearchModel.init(
    {
      id: idColumn,
      userId: { type: DataTypes.INTEGER, allowNull: false },
      name: { type: DataTypes.STRING(80), allowNull: false },
      filters: { type: DataTypes.TEXT, allowNull: false },
      createdAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'saved_searches', modelName: 'SavedSearch', updatedAt: false },
  );
}
