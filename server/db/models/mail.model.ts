/** Outgoing mail queue and the local fake SMTP server's mailbox (migration 0006-signatures). */
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import { optionalText, requiredText } from './helpers.ts';

export type MailStatus = 'pending' | 'sent' | 'failed';

export class MailQueueItem extends Model<InferAttributes<MailQueueItem>, InferCreationAttributes<MailQueueItem>> {
  declare id: CreationOptional<number>;
  declare kind: string;
  declare preparationId: number | null;
  declare toAddress: string;
  declare subject: string;
  declare text: string;
  declare html: string;
  declare status: MailStatus;
  declare attempts: CreationOptional<number>;
  declare lastError: string | null;
  declare nextAttemptAt: string;
  declare createdAt: string;
  declare sentAt: string | null;
}

export class FakeMail extends Model<InferAttributes<FakeMail>, InferCreationAttributes<FakeMail>> {
  declare id: CreationOptional<number>;
  declare fromAddress: string;
  declare toAddress: string;
  declare subject: string;
  declare text: string;
  declare html: string;
  declare receivedAt: string;
}

export function initMail(sequelize: Sequelize) {
  MailQueueItem.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      kind: requiredText(),
      preparationId: { type: DataTypes.INTEGER, allowNull: true },
      toAddress: requiredText(),
      subject: requiredText(),
      text: requiredText(),
      html: requiredText(),
      status: requiredText() as never,
      attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      lastError: optionalText(),
      nextAttemptAt: requiredText(),
      createdAt: requiredText(),
      sentAt: optionalText(),
    },
    { sequelize, tableName: 'mail_queue', modelName: 'MailQueueItem', underscored: true, timestamps: false },
  );
  FakeMail.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      fromAddress: requiredText(),
      toAddress: requiredText(),
      subject: requiredText(),
      text: requiredText(),
      html: requiredText(),
      receivedAt: requiredText(),
    },
    { sequelize, tableName: 'fake_mailbox', modelName: 'FakeMail', underscored: true, timestamps: false },
  );
  return { MailQueueItem, FakeMail };
}
