/**
 * One weighing of a preparation (table `weighings`, append-only: triggers refuse UPDATE and DELETE).
 * Readings are the verbatim strings as typed; a correction is a new row naming the one it supersedes.
 */
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { StoredCapture } from '../../../shared/balance/capture.ts';
import type { Balance } from '../../../shared/schemas/inventory.ts';
import type { ConditionsUsed, ReadingUnit, WeighingMode } from '../../../shared/schemas/preparations.ts';
import { jsonText, optionalText, requiredText } from './helpers.ts';

export class Weighing extends Model<InferAttributes<Weighing>, InferCreationAttributes<Weighing>> {
  declare id: CreationOptional<number>;
  declare preparationId: number;
  declare mode: WeighingMode;
  declare reading: string | null;
  declare beforeReading: string | null;
  declare afterReading: string | null;
  declare unit: ReadingUnit;
  declare netMg: string;
  declare balanceId: number;
  declare balanceSnapshot: Balance;
  declare conditions: ConditionsUsed;
  declare airDensity: string;
  declare inWindow: boolean;
  declare outOfWindowReason: string | null;
  declare supersedesId: number | null;
  declare correctionReason: string | null;
  declare recordedBy: number;
  declare recordedAt: string;
  /** migration 0021: how each reading came in, by field ('{}' on rows written before) */
  declare captures: CreationOptional<Record<string, StoredCapture>>;
}

export function initWeighing(sequelize: Sequelize): typeof Weighing {
  Weighing.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      preparationId: { type: DataTypes.INTEGER, allowNull: false },
      mode: requiredText(),
      reading: optionalText(),
      beforeReading: optionalText(),
      afterReading: optionalText(),
      unit: requiredText(),
      netMg: requiredText(),
      balanceId: { type: DataTypes.INTEGER, allowNull: false },
      balanceSnapshot: jsonText<Balance>('balanceSnapshot', {} as Balance),
      conditions: jsonText<ConditionsUsed>('conditions', {} as ConditionsUsed),
      airDensity: requiredText(),
      inWindow: { type: DataTypes.BOOLEAN, allowNull: false },
      outOfWindowReason: optionalText(),
      supersedesId: { type: DataTypes.INTEGER, allowNull: true },
      correctionReason: optionalText(),
      recordedBy: { type: DataTypes.INTEGER, allowNull: false },
      recordedAt: requiredText(),
      captures: { ...jsonText<Record<string, StoredCapture>>('captures', {}), defaultValue: '{}' },
    },
    { sequelize, tableName: 'weighings', modelName: 'Weighing', underscored: true, timestamps: false },
  );
  return Weighing;
}
