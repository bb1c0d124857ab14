import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import { idColumn } from '../../db/columns';

export class AuditEventModel extends Model<InferAttributes<AuditEventModel>, InferCreationAttributes<AuditEventModel>> {
  declare id: CreationOptional<number>;
  declare at: Date;
  declare actorId: number | null;
  declare actorEmail: string | null;
  declare action: string;
  declare entity: string;
  declare entityId: string | null;
  declare caseId: number | null;
  declare before: string | null;
  declare after: string | null;
  declare note: string | null;
}

export function initAuditEventModel(sequelize: Sequelize): void {
  AuditEventModel.init(
    {
      id: idColumn,
      at: { type: DataTypes.DATE, allowNull: false },
      actorId: { type: DataTypes.INTEGER, allowNull: true },
      actorEmail: { type: DataTypes.STRING(254), allowNull: true },
      action: { type: DataTypes.STRING(40), allowNull: false },
      entity: { type: DataTypes.STRING(60), allowNull: false },
      entityId: { type: DataTypes.STRING(60), allowNull: true },
      caseId: { type: DataTypes.INTEGER, allowNull: true },
      before: { type: DataTypes.TEXT, allowNull: true },
      after: { type: DataTypes.TEXT, allowNull: true },
      note: { type: DataTypes.TEXT, allowNull: true },
    },
    { sequelize, tableName: 'audit_events', modelName: 'AuditEvent', timestamps: false },
  );
}
