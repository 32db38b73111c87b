/**
 * Signatures and what they are checked against (migration 0006-signatures). signatures, record_versions and
 * signature_acknowledgements are append-only (triggers); review_flags are written by the lineage feature.
 */
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { SignatureMeaning } from '../../../shared/schemas/preparations.ts';
import { optionalText, requiredText } from './helpers.ts';

export class Signature extends Model<InferAttributes<Signature>, InferCreationAttributes<Signature>> {
  declare id: CreationOptional<number>;
  declare preparationId: number;
  declare meaning: SignatureMeaning;
  declare meaningText: string;
  declare signerId: number;
  declare signerName: string;
  declare signedAt: string;
  declare recordVersion: number;
  declare recordHash: string;
  declare reason: string | null;
  declare checklist: Record<string, true> | null;
  declare amendsVersion: number | null;
  /** "prepared" of a result outside the plan: the signer's stated reason (migration 0013) */
  declare outOfPlanReason: CreationOptional<string | null>;
}

export class RecordVersion extends Model<InferAttributes<RecordVersion>, InferCreationAttributes<RecordVersion>> {
  declare id: CreationOptional<number>;
  declare preparationId: number;
  declare version: number;
  declare canonicalJson: string;
  declare recordHash: string;
  declare createdAt: string;
}

export class SignatureAcknowledgement extends Model<InferAttributes<SignatureAcknowledgement>, InferCreationAttributes<SignatureAcknowledgement>> {
  declare userId: number;
  declare statement: string;
  declare acknowledgedAt: string;
}

export class ReviewFlag extends Model<InferAttributes<ReviewFlag>, InferCreationAttributes<ReviewFlag>> {
  declare id: CreationOptional<number>;
  declare preparationId: number;
  declare sourcePreparationId: number | null;
  declare reason: string;
  declare flaggedAt: string;
}

export function initSignatures(sequelize: Sequelize) {
  Signature.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      preparationId: { type: DataTypes.INTEGER, allowNull: false },
      meaning: requiredText() as never,
      meaningText: requiredText(),
      signerId: { type: DataTypes.INTEGER, allowNull: false },
      signerName: requiredText(),
      signedAt: requiredText(),
      recordVersion: { type: DataTypes.INTEGER, allowNull: false },
      recordHash: requiredText(),
      reason: optionalText(),
      checklist: {
        type: DataTypes.TEXT,
        allowNull: true,
        get(this: Signature) {
          const raw = this.getDataValue('checklist') as unknown;
          if (raw === null || raw === undefined) return null;
          return (typeof raw === 'string' ? JSON.parse(raw) : raw) as Record<string, true>;
        },
        set(this: Signature, value: Record<string, true> | null) {
          this.setDataValue('checklist', (value === null ? null : JSON.stringify(value)) as never);
        },
      },
      amendsVersion: { type: DataTypes.INTEGER, allowNull: true },
      outOfPlanReason: optionalText(),
    },
    { sequelize, tableName: 'signatures', modelName: 'Signature', underscored: true, timestamps: false },
  );
  RecordVersion.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      preparationId: { type: DataTypes.INTEGER, allowNull: false },
      version: { type: DataTypes.INTEGER, allowNull: false },
      canonicalJson: requiredText(),
      recordHash: requiredText(),
      createdAt: requiredText(),
    },
    { sequelize, tableName: 'record_versions', modelName: 'RecordVersion', underscored: true, timestamps: false },
  );
  SignatureAcknowledgement.init(
    {
      userId: { type: DataTypes.INTEGER, primaryKey: true },
      statement: requiredText(),
      acknowledgedAt: requiredText(),
    },
    { sequelize, tableName: 'signature_acknowledgements', modelName: 'SignatureAcknowledgement', underscored: true, timestamps: false },
  );
  ReviewFlag.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      preparationId: { type: DataTypes.INTEGER, allowNull: false },
      sourcePreparationId: { type: DataTypes.INTEGER, allowNull: true },
      reason: requiredText(),
      flaggedAt: requiredText(),
    },
    { sequelize, tableName: 'review_flags', modelName: 'ReviewFlag', underscored: true, timestamps: false },
  );
  return { Signature, RecordVersion, SignatureAcknowledgement, ReviewFlag };
}
