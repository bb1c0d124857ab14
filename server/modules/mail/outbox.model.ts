import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import { idColumn } from '../../db/columns';

/** A message the local SMTP stand-in received (development and tests only). */
export class OutboxMessageModel extends Model<InferAttributes<OutboxMessageModel>, InferCreationAttributes<OutboxMessageModel>> {
  declare id: CreationOptional<number>;
  declare messageId: string | null;
  declare fromAddress: string | null;
  declare toAddress: string;
  declare subject: string;
  declare text: string;
  declare receivedAt: Date;
}

/** One attempt to send a notice, with its outcome. */
export class MailDeliveryModel extends Model<InferAttributes<MailDeliveryModel>, InferCreationAttributes<MailDeliveryModel>> {
  declare id: CreationOptional<number>;
  declare kind: string;
  declare reportId: number | null;
  declare caseId: number | null;
  declare recipientUserId: number | null;
  declare recipient: string;
  declare subject: string;
  declare status: 'sent' | 'failed';
  declare error: string | null;
  declare messageId: string | null;
  declare attemptedAt: Date;
}

export function initMailModels(sequelize: Sequelize): void {
  OutboxMessageModel.init(
    {
      id: idColumn,
      messageId: { type: DataTypes.STRING(255), allowNull: true },
      fromAddress: { type: DataTypes.STRING(320), allowNull: true },
      toAddress: { type: DataTypes.TEXT, allowNull: false },
      subject: { type: DataTypes.STRING(500), allowNull: false },
      text: { type: DataTypes.TEXT, allowNull: false },
      receivedAt: { type: DataTypes.DATE, allowNull: false },
    },
    { sequelize, tableName: 'outbox_messages', modelName: 'OutboxMessage', timestamps: false },
  );
  MailDeliveryModel.init(
    {
      id: idColumn,
      kind: { type: DataTypes.STRING(30), allowNull: false },
      reportId: { type: DataTypes.INTEGER, allowNull: true },
      caseId: { type: DataTypes.INTEGER, allowNull: true },
      recipientUserId: { type: DataTypes.INTEGER, allowNull: true },
      recipient: { type: DataTypes.STRING(320), allowNull: false },
      subject: { type: DataTypes.STRING(500), allowNull: false },
      status: { type: DataTypes.STRING(10), allowNull: false },
      error: { type: DataTypes.TEXT, allowNull: true },
      messageId: { type: DataTypes.STRING(255), allowNull: true },
      attemptedAt: { type: DataTypes.DATE, allowNull: false },
    },
    { sequelize, tableName: 'mail_deliveries', modelName: 'MailDelivery', timestamps: false },
  );
}
