/**
 * Expiry extensions approved by QA (migration 0010-expiry-extensions): append-only, triggers refuse UPDATE and
 * DELETE. Written by server/services/expiry-extension.service.ts.
 *
 * `expiryAsSigned` is what the hashed canonical record (signatures.service.ts recordForHash) carries as the
 * expiry: while the record is still at the version that was extended, the expiry from before the extension
 * (so the prepared/verified signatures of that version stay valid); otherwise the record's expiry.
 */
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import { optionalText, requiredText } from './helpers.ts';

export class ExpiryExtension extends Model<InferAttributes<ExpiryExtension>, InferCreationAttributes<ExpiryExtension>> {
  declare id: CreationOptional<number>;
  declare preparationId: number;
  declare recordVersion: number;
  declare recordHash: string;
  declare previousExpiresOn: string;
  declare previousExpiryReason: string;
  declare newExpiresOn: string;
  declare reason: string;
  declare capExpiresOn: string | null;
  declare capLimitedBy: string | null;
  declare signedBy: number;
  declare signedByName: string;
  declare signedAt: string;
  declare meaningText: string;
}

export function initExpiryExtensions(sequelize: Sequelize): typeof ExpiryExtension {
  ExpiryExtension.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      preparationId: { type: DataTypes.INTEGER, allowNull: false },
      recordVersion: { type: DataTypes.INTEGER, allowNull: false },
      recordHash: requiredText(),
      previousExpiresOn: requiredText(),
      previousExpiryReason: requiredText(),
      newExpiresOn: requiredText(),
      reason: requiredText(),
      capExpiresOn: optionalText(),
      capLimitedBy: optionalText(),
      signedBy: { type: DataTypes.INTEGER, allowNull: false },
      signedByName: requiredText(),
      signedAt: requiredText(),
      meaningText: requiredText(),
    },
    { sequelize, tableName: 'expiry_extensions', modelName: 'ExpiryExtension', underscored: true, timestamps: false },
  );
  return ExpiryExtension;
}

/** The preparation columns added by migration 0010 (declared on the Preparation model). */
export interface PreExtensionColumns {
  version: number;
  expiresOn: string;
  expiryReason: string;
  preExtensionVersion?: number | null;
  preExtensionExpiresOn?: string | null;
  preExtensionExpiryReason?: string | null;
}

/** The expiry the hashed canonical record carries (see the header). */
export function expiryAsSigned(p: PreExtensionColumns): { expiresOn: string; expiryReason: string } {
  if (p.preExtensionVersion != null && p.preExtensionVersion === p.version && p.preExtensionExpiresOn && p.preExtensionExpiryReason) {
    return { expiresOn: p.preExtensionExpiresOn, expiryReason: p.preExtensionExpiryReason };
  }
  return { expiresOn: p.expiresOn, expiryReason: p.expiryReason };
}
