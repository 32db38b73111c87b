import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import { optionalText, requiredText } from './helpers.ts';

/**
 * One row of the append-only audit trail (table `audit_entries`, migration 0003-audit). Rows are only ever
 * created, by server/services/audit.service.ts; SQLite triggers refuse UPDATE and DELETE.
 * `changes` is kept as the canonical JSON text that was hashed (see audit.service.ts).
 */
export class AuditEntry extends Model<InferAttributes<AuditEntry>, InferCreationAttributes<AuditEntry>> {
  declare id: number;
  declare occurredAt: string;
  declare actorId: number | null;
  declare actorName: string | null;
  declare action: string;
  declare entity: string;
  declare entityId: string | null;
  declare changes: CreationOptional<string>;
  declare reason: string | null;
  declare prevHash: string;
  declare hash: string;
  /** The session the entry was written in (migration 0016); null for older rows, anonymous events and jobs. Not hashed. */
  declare sessionId: CreationOptional<string | null>;
}

export function initAuditEntry(sequelize: Sequelize): typeof AuditEntry {
  AuditEntry.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      occurredAt: requiredText(),
      actorId: { type: DataTypes.INTEGER, allowNull: true },
      actorName: optionalText(),
      action: requiredText(),
      entity: requiredText(),
      entityId: optionalText(),
      changes: { type: DataTypes.TEXT, allowNull: false, defaultValue: '[]' },
      reason: optionalText(),
      prevHash: requiredText(),
      hash: requiredText(),
      sessionId: optionalText(),
    },
    { sequelize, tableName: 'audit_entries', modelName: 'AuditEntry', underscored: true, timestamps: false },
  );
  return AuditEntry;
}
