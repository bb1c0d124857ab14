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

export type NoticeStatus = 'pending' | 'sending' | 'sent' | 'failed';

/**
 * A clinician's notice in the durable outbox: written in the signing transaction, then claimed, sent and marked
 * by the notice worker (docs/notices.md).
 */
export class NoticeModel extends Model<InferAttributes<NoticeModel>, InferCreationAttributes<NoticeModel>> {
  declare id: CreationOptional<number>;
  declare kind: string;
  declare reportId: number | null;
  declare caseId: number | null;
  declare recipientUserId: number | null;
  declare recipient: string;
  declare subject: string;
  /** The message as composed at signing; null only for rows carried over from the earlier delivery log. */
  declare body: string | null;
  declare status: NoticeStatus;
  declare attempts: CreationOptional<number>;
  declare nextAttemptAt: Date | null;
  declare leaseUntil: CreationOptional<Date | null>;
  declare lastAttemptAt: CreationOptional<Date | null>;
  declare lastError: CreationOptional<string | null>;
  declare messageId: CreationOptional<string | null>;
  declare sentAt: CreationOptional<Date | null>;
  declare createdAt: Date;
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
  NoticeModel.init(
    {
      id: idColumn,
      kind: { type: DataTypes.STRING(30), allowNull: false },
      reportId: { type: DataTypes.INTEGER, allowNull: true },
      caseId: { type: DataTypes.INTEGER, allowNull: true },
      recipientUserId: { type: DataTypes.INTEGER, allowNull: true },
      recipient: { type: DataTypes.STRING(320), allowNull: false },
      subject: { type: DataTypes.STRING(500), allowNull: false },
      body: { type: DataTypes.TEXT, allowNull: true },
      status: { type: DataTypes.STRING(10), allowNull: false },
      attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      nextAttemptAt: { type: DataTypes.DATE, allowNull: true },
      leaseUntil: { type: DataTypes.DATE, allowNull: true },
      lastAttemptAt: { type: DataTypes.DATE, allowNull: true },
      lastError: { type: DataTypes.TEXT, allowNull: true },
      messageId: { type: DataTypes.STRING(255), allowNull: true },
      sentAt: { type: DataTypes.DATE, allowNull: true },
      createdAt: { type: DataTypes.DATE, allowNull: false },
    },
    { sequelize, tableName: 'notice_outbox', modelName: 'Notice', timestamps: false },
  );
}
