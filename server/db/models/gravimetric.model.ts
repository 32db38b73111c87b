/**
 * Both net readings of a gravimetric dilution (migration 0012-gravimetric; append-only: triggers refuse UPDATE
 * and DELETE). Readings are the verbatim strings the balance showed; a correction is a new row naming the one it supersedes.
 */
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { StoredCapture } from '../../../shared/balance/capture.ts';
import type { Balance } from '../../../shared/schemas/inventory.ts';
import type { ConditionsUsed } from '../../../shared/schemas/preparations.ts';
import { jsonText, optionalText, requiredText } from './helpers.ts';

export class GravimetricReading extends Model<InferAttributes<GravimetricReading>, InferCreationAttributes<GravimetricReading>> {
  declare id: CreationOptional<number>;
  declare preparationId: number;
  declare balanceId: number;
  declare balanceSnapshot: Balance;
  declare unit: 'g' | 'mg';
  declare aliquotReading: string;
  declare finalReading: string;
  declare conditions: ConditionsUsed;
  declare airDensity: string;
  declare airDensityU: string;
  declare supersedesId: number | null;
  declare correctionReason: string | null;
  declare recordedBy: number;
  declare recordedAt: string;
  /** migration 0021: how each reading came in, by field ('{}' on rows written before) */
  declare captures: CreationOptional<Record<string, StoredCapture>>;
}

export function initGravimetric(sequelize: Sequelize): typeof GravimetricReading {
  GravimetricReading.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      preparationId: { type: DataTypes.INTEGER, allowNull: false },
      balanceId: { type: DataTypes.INTEGER, allowNull: false },
      balanceSnapshot: jsonText<Balance>('balanceSnapshot', {} as Balance),
      unit: requiredText(),
      aliquotReading: requiredText(),
      finalReading: requiredText(),
      conditions: jsonText<ConditionsUsed>('conditions', {} as ConditionsUsed),
      airDensity: requiredText(),
      airDensityU: { ...requiredText(), field: 'air_density_u' },
      supersedesId: { type: DataTypes.INTEGER, allowNull: true },
      correctionReason: optionalText(),
      recordedBy: { type: DataTypes.INTEGER, allowNull: false },
      recordedAt: requiredText(),
      captures: { ...jsonText<Record<string, StoredCapture>>('captures', {}), defaultValue: '{}' },
    },
    { sequelize, tableName: 'gravimetric_readings', modelName: 'GravimetricReading', underscored: true, timestamps: false },
  );
  return GravimetricReading;
}
