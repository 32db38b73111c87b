/**
 * Preparation records (migration 0005-preparations). Measured values are TEXT decimal strings; JSON columns
 * are TEXT (helpers.jsonText). Snapshots are frozen copies of the inventory rows taken at planning.
 */
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { ConditionsUsed, Gate, PlanInput, PreparationResult } from '../../../shared/schemas/preparations.ts';
import type { Balance, ReferenceMaterial, VolumetricWare } from '../../../shared/schemas/inventory.ts';
import { jsonText, optionalText, requiredText } from './helpers.ts';

/** What the plan stores (the `plan` JSON column). */
export interface StoredPlan {
  targetReading: { value: string; unit: 'mg' };
  window: { low: string; high: string; unit: 'mg'; pct: string };
  trueMass: { value: string; unit: 'mg' };
  buoyancyFactor: string;
  gravimetricFactor: string;
  airDensity: string;
  expectedUncertainty: { standardUncertainty: string; expandedUncertainty: string; relative: string; display: string };
  /** the core's full response for the planned case */
  calc: unknown;
  /** the request given to the core, so the plan can be recomputed */
  calcRequest: unknown;
  calcVersion: string;
}

export class Preparation extends Model<InferAttributes<Preparation>, InferCreationAttributes<Preparation>> {
  declare id: CreationOptional<number>;
  declare identifier: string;
  declare status: string;
  declare version: CreationOptional<number>;
  declare materialId: number;
  declare analyteFormula: string;
  declare targetValue: string;
  declare targetUnit: string;
  declare volumeValue: string;
  declare volumeUnit: string;
  declare flaskId: number | null;
  declare balanceId: number;
  declare inputs: PlanInput;
  declare notes: string | null;
  declare conditionsUsed: ConditionsUsed;
  declare snapshotMaterial: ReferenceMaterial;
  declare snapshotBalance: Balance;
  declare snapshotFlask: VolumetricWare | null;
  declare plan: StoredPlan;
  declare gates: Gate[];
  declare result: PreparationResult | null;
  declare concentrationDisplay: string | null;
  declare expiresOn: string;
  declare expiryReason: string;
  declare createdOn: string;
  /** stock | dilution | series_level | mix (migration 0008; written by the lineage service). */
  declare kind: CreationOptional<string>;
  /** the expiry as signed at the version QA extended it (migration 0010; written by the expiry-extension service) */
  declare preExtensionVersion: CreationOptional<number | null>;
  declare preExtensionExpiresOn: CreationOptional<string | null>;
  declare preExtensionExpiryReason: CreationOptional<string | null>;
  /** a dilution's stored result with its calcVersion and basedOn (migration 0011; written by lineage-view storeDilutionResult) */
  declare dilutionResult: CreationOptional<Record<string, unknown> | null>;
  declare createdBy: number;
  declare createdAt: string;
  declare updatedAt: string;
}

export class PreparationSequence extends Model<InferAttributes<PreparationSequence>, InferCreationAttributes<PreparationSequence>> {
  declare prefix: string;
  declare year: number;
  declare lastSeq: number;
}

export class PreparationEvent extends Model<InferAttributes<PreparationEvent>, InferCreationAttributes<PreparationEvent>> {
  declare id: CreationOptional<number>;
  declare preparationId: number;
  declare status: string;
  declare note: string | null;
  declare byId: number;
  declare byName: string;
  declare at: string;
}

/** A nullable TEXT column holding JSON (null stays null). */
function nullableJson<T>(attribute: string) {
  return {
    type: DataTypes.TEXT,
    allowNull: true,
    get(this: Model): T | null {
      const raw = this.getDataValue(attribute as never) as unknown;
      if (raw === null || raw === undefined) return null;
      return (typeof raw === 'string' ? JSON.parse(raw) : raw) as T;
    },
    set(this: Model, value: T | null) {
      this.setDataValue(attribute as never, (value === null ? null : JSON.stringify(value)) as never);
    },
  };
}

export function initPreparations(sequelize: Sequelize) {
  Preparation.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      identifier: { ...requiredText(), unique: true },
      status: requiredText(),
      version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
      materialId: { type: DataTypes.INTEGER, allowNull: false },
      analyteFormula: requiredText(),
      targetValue: requiredText(),
      targetUnit: requiredText(),
      volumeValue: requiredText(),
      volumeUnit: requiredText(),
      flaskId: { type: DataTypes.INTEGER, allowNull: true },
      balanceId: { type: DataTypes.INTEGER, allowNull: false },
      inputs: jsonText<PlanInput>('inputs', {} as PlanInput),
      notes: optionalText(),
      conditionsUsed: jsonText<ConditionsUsed>('conditionsUsed', {} as ConditionsUsed),
      snapshotMaterial: jsonText<ReferenceMaterial>('snapshotMaterial', {} as ReferenceMaterial),
      snapshotBalance: jsonText<Balance>('snapshotBalance', {} as Balance),
      snapshotFlask: nullableJson<VolumetricWare>('snapshotFlask'),
      plan: jsonText<StoredPlan>('plan', {} as StoredPlan),
      gates: jsonText<Gate[]>('gates', []),
      result: nullableJson<PreparationResult>('result'),
      concentrationDisplay: optionalText(),
      expiresOn: requiredText(),
      expiryReason: requiredText(),
      createdOn: requiredText(),
      kind: { type: DataTypes.TEXT, allowNull: false, defaultValue: 'stock' },
      preExtensionVersion: { type: DataTypes.INTEGER, allowNull: true },
      preExtensionExpiresOn: optionalText(),
      preExtensionExpiryReason: optionalText(),
      dilutionResult: nullableJson<Record<string, unknown>>('dilutionResult'),
      createdBy: { type: DataTypes.INTEGER, allowNull: false },
      createdAt: requiredText(),
      updatedAt: requiredText(),
    },
    { sequelize, tableName: 'preparations', modelName: 'Preparation', underscored: true, timestamps: false },
  );

  PreparationSequence.init(
    {
      prefix: { ...requiredText(), primaryKey: true },
      year: { type: DataTypes.INTEGER, allowNull: false, primaryKey: true },
      lastSeq: { type: DataTypes.INTEGER, allowNull: false },
    },
    { sequelize, tableName: 'preparation_sequences', modelName: 'PreparationSequence', underscored: true, timestamps: false },
  );

  PreparationEvent.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      preparationId: { type: DataTypes.INTEGER, allowNull: false },
      status: requiredText(),
      note: optionalText(),
      byId: { type: DataTypes.INTEGER, allowNull: false },
      byName: requiredText(),
      at: requiredText(),
    },
    { sequelize, tableName: 'preparation_events', modelName: 'PreparationEvent', underscored: true, timestamps: false },
  );

  return { Preparation, PreparationSequence, PreparationEvent };
}

