/**
 * Gravimetric checks of volumetric ware (migration 0020-volume-checks). Readings and signatures are append-only
 * (triggers); readings are the verbatim strings the balance showed.
 */
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import { jsonText, optionalText, requiredText } from './helpers.ts';

export interface VolumeCheckPlan {
  kind: 'bulb_pipette' | 'volumetric_flask' | 'piston_pipette' | 'burette';
  class: 'A' | 'B' | null;
  material: 'borosilicate_3_3' | 'soda_lime' | 'polypropylene';
  mode: 'delivery' | 'content';
  nominal: { value: string; unit: string };
  tested: Array<{ value: string; unit: string; replicates: number }>;
  limits?: { systematic: { value: string; unit: string }; random?: { value: string; unit: string }; source: string };
  intervalMonths: number;
}

export interface VolumeCheckConditions {
  waterTemperatureC: string;
  waterAirSaturated: boolean;
  air: { temperatureC: string; pressureHPa: string; relativeHumidityPct: string };
  evaporation?: { value: string; unit: string };
}

export class VolumeCheck extends Model<InferAttributes<VolumeCheck>, InferCreationAttributes<VolumeCheck>> {
  declare id: CreationOptional<number>;
  declare identifier: string;
  declare wareId: number;
  declare wareSnapshot: Record<string, unknown>;
  declare balanceId: number;
  declare balanceSnapshot: Record<string, unknown>;
  declare plan: VolumeCheckPlan;
  declare gates: Array<{ code: string; pass: boolean; message: string }>;
  declare conditions: VolumeCheckConditions;
  declare result: unknown | null;
  declare calcVersion: string | null;
  declare status: 'planned' | 'prepared' | 'verified';
  declare version: CreationOptional<number>;
  declare notes: string | null;
  declare nextDueOn: string | null;
  declare createdBy: number;
  declare createdByName: string;
  declare createdAt: string;
  declare updatedAt: string;
}

export class VolumeCheckReading extends Model<InferAttributes<VolumeCheckReading>, InferCreationAttributes<VolumeCheckReading>> {
  declare id: CreationOptional<number>;
  declare checkId: number;
  declare testedIndex: number;
  declare replicate: number;
  declare value: string;
  declare unit: string;
  declare supersedesId: number | null;
  declare correctionReason: string | null;
  declare recordedBy: number;
  declare recordedByName: string;
  declare recordedAt: string;
}

export class VolumeCheckSignature extends Model<InferAttributes<VolumeCheckSignature>, InferCreationAttributes<VolumeCheckSignature>> {
  declare id: CreationOptional<number>;
  declare checkId: number;
  declare meaning: 'prepared' | 'verified' | 'returned';
  declare meaningText: string;
  declare signerId: number;
  declare signerName: string;
  declare signedAt: string;
  declare recordVersion: number;
  declare recordHash: string;
  declare canonicalJson: string;
  declare reason: string | null;
}

const opts = (sequelize: Sequelize, tableName: string, modelName: string) => ({ sequelize, tableName, modelName, underscored: true, timestamps: false });
const int = (allowNull = false) => ({ type: DataTypes.INTEGER, allowNull });

export function initVolumeChecks(sequelize: Sequelize) {
  VolumeCheck.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      identifier: requiredText(),
      wareId: int(),
      wareSnapshot: jsonText('wareSnapshot', {}),
      balanceId: int(),
      balanceSnapshot: jsonText('balanceSnapshot', {}),
      plan: jsonText<VolumeCheckPlan>('plan', {} as VolumeCheckPlan),
      gates: jsonText('gates', []),
      conditions: jsonText<VolumeCheckConditions>('conditions', {} as VolumeCheckConditions),
      result: {
        type: DataTypes.TEXT,
        allowNull: true,
        get(this: Model): unknown {
          const raw = this.getDataValue('result' as never) as unknown;
          return raw === null || raw === undefined ? null : typeof raw === 'string' ? JSON.parse(raw) : raw;
        },
        set(this: Model, v: unknown) {
          this.setDataValue('result' as never, (v === null ? null : JSON.stringify(v)) as never);
        },
      },
      calcVersion: optionalText(),
      status: requiredText(),
      version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
      notes: optionalText(),
      nextDueOn: optionalText(),
      createdBy: int(),
      createdByName: requiredText(),
      createdAt: requiredText(),
      updatedAt: requiredText(),
    },
    opts(sequelize, 'volume_checks', 'VolumeCheck'),
  );
  VolumeCheckReading.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      checkId: int(),
      testedIndex: int(),
      replicate: int(),
      value: requiredText(),
      unit: requiredText(),
      supersedesId: int(true),
      correctionReason: optionalText(),
      recordedBy: int(),
      recordedByName: requiredText(),
      recordedAt: requiredText(),
    },
    opts(sequelize, 'volume_check_readings', 'VolumeCheckReading'),
  );
  VolumeCheckSignature.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      checkId: int(),
      meaning: requiredText(),
      meaningText: requiredText(),
      signerId: int(),
      signerName: requiredText(),
      signedAt: requiredText(),
      recordVersion: int(),
      recordHash: requiredText(),
      canonicalJson: requiredText(),
      reason: optionalText(),
    },
    opts(sequelize, 'volume_check_signatures', 'VolumeCheckSignature'),
  );
}
