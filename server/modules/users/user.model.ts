import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { Role } from '@/schemas/common';
import { editVersionColumn, idColumn, timestampColumns } from '../../db/columns';

export class UserModel extends Model<InferAttributes<UserModel>, InferCreationAttributes<UserModel>> {
  declare id: CreationOptional<number>;
  declare email: string;
  declare name: string;
  declare title: string | null;
  declare role: Role;
  declare passwordHash: string;
  declare active: CreationOptional<boolean>;
  declare failedLogins: CreationOptional<number>;
  declare lockedUntil: Date | null;
  declare mustChangePassword: CreationOptional<boolean>;
  declare passwordChangedAt: CreationOptional<Date | null>;
  declare sessionGeneration: CreationOptional<number>;
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export function initUserModel(sequelize: Sequelize): void {
  UserModel.init(
    {
      id: idColumn,
      email: { type: DataTypes.STRING(254), allowNull: false, unique: true },
      name: { type: DataTypes.STRING(120), allowNull: false },
      title: { type: DataTypes.STRING(120), allowNull: true },
      role: { type: DataTypes.STRING(20), allowNull: false },
      passwordHash: { type: DataTypes.STRING(255), allowNull: false },
      active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
      failedLogins: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      lockedUntil: { type: DataTypes.DATE, allowNull: true },
      mustChangePassword: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      passwordChangedAt: { type: DataTypes.DATE, allowNull: true },
      sessionGeneration: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      version: editVersionColumn,
      ...timestampColumns,
    },
    { sequelize, tableName: 'users', modelName: 'User' },
  );
}
