/**
 * Inventory models. Measured values are TEXT decimal strings; never convert them to JS numbers here.
 */
import type { LineShapeSetting } from '../../../shared/balance/output-line.ts';
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import {
  BALANCE_STATUSES,
  LOT_STATUSES,
  MATERIAL_GRADES,
  PURITY_BASES,
  WARE_CLASSES,
  WARE_KINDS,
  WARE_STATUSES,
} from '../../../shared/schemas/inventory.ts';
import { jsonText, oneOf, optionalText, requiredText, timestampAttributes, useIsoTimestamps } from './helpers.ts';

const id = () => ({ type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true });
const options = (sequelize: Sequelize, tableName: string, modelName: string) => ({
  sequelize,
  tableName,
  modelName,
  underscored: true,
  timestamps: false,
});

const retiredAttributes = () => ({ retiredAt: optionalText(), retiredReason: optionalText() });

export interface Analyte {
  name: string;
  formula: string;
}

export class ReferenceMaterial extends Model<InferAttributes<ReferenceMaterial>, InferCreationAttributes<ReferenceMaterial>> {
  declare id: CreationOptional<number>;
  declare name: string;
  declare formula: string;
  declare analytes: Analyte[];
  declare casNumber: string | null;
  declare grade: (typeof MATERIAL_GRADES)[number];
  declare producer: string;
  declare catalogueNumber: string | null;
  declare lot: string;
  declare certificateNumber: string | null;
  declare purityValue: string;
  declare purityExpandedUncertainty: string | null;
  declare purityK: string | null;
  declare purityStandardUncertainty: string | null;
  declare purityBasis: (typeof PURITY_BASES)[number];
  declare densityValue: string | null;
  declare receivedOn: string | null;
  declare openedOn: string | null;
  declare expiresOn: string | null;
  declare storage: string | null;
  declare ghsHazardStatements: string[];
  declare ghsPictograms: string[];
  declare status: (typeof LOT_STATUSES)[number];
  /** Who accepted the quarantined lot, and when (UTC ISO). */
  declare acceptedById: CreationOptional<number | null>;
  declare acceptedAt: CreationOptional<string | null>;
  declare retiredAt: CreationOptional<string | null>;
  declare retiredReason: CreationOptional<string | null>;
  declare createdAt: CreationOptional<string>;
  declare updatedAt: CreationOptional<string>;
}

export class Balance extends Model<InferAttributes<Balance>, InferCreationAttributes<Balance>> {
  declare id: CreationOptional<number>;
  declare identifier: string;
  declare description: string;
  declare location: string | null;
  declare capacityG: string;
  declare readabilityMg: string;
  declare minWeightMg: string | null;
  declare minWeightDeterminedOn: string | null;
  declare repeatabilitySdMg: string | null;
  declare minWeightSafetyFactor: string | null;
  declare calibratedOn: string | null;
  declare calibrationDueOn: string | null;
  declare calibrationUncertaintyMg: string | null;
  declare calibrationUncertaintyK: string | null;
  declare weightDensity: CreationOptional<string>;
  /** d at the time m_min was determined (with s, safety factor and date). */
  declare minWeightReadabilityMg: CreationOptional<string | null>;
  /** true when the server computed minWeightMg (USP <41>) rather than storing an entered value. */
  declare minWeightComputed: CreationOptional<boolean>;
  declare status: (typeof BALANCE_STATUSES)[number];
  /** migration 0021: the line shape it prints, its print command and printed identity, its serial settings */
  declare outputShape: CreationOptional<LineShapeSetting>;
  declare printCommand: CreationOptional<string | null>;
  declare printedId: CreationOptional<string | null>;
  declare serialBaud: CreationOptional<number>;
  declare serialDataBits: CreationOptional<number>;
  declare serialParity: CreationOptional<'none' | 'even' | 'odd'>;
  declare serialStopBits: CreationOptional<number>;
  declare serialLineEnding: CreationOptional<'crlf' | 'cr' | 'lf'>;
  declare retiredAt: CreationOptional<string | null>;
  declare retiredReason: CreationOptional<string | null>;
  declare createdAt: CreationOptional<string>;
  declare updatedAt: CreationOptional<string>;
}

export class VolumetricWare extends Model<InferAttributes<VolumetricWare>, InferCreationAttributes<VolumetricWare>> {
  declare id: CreationOptional<number>;
  declare identifier: string;
  declare kind: (typeof WARE_KINDS)[number];
  declare nominalVolumeMl: string;
  /** Column `class` (a reserved word in TS class bodies, hence the attribute name). */
  declare wareClass: (typeof WARE_CLASSES)[number];
  declare toleranceMl: string | null;
  declare material: string | null;
  declare status: (typeof WARE_STATUSES)[number];
  declare retiredAt: CreationOptional<string | null>;
  declare retiredReason: CreationOptional<string | null>;
  declare createdAt: CreationOptional<string>;
  declare updatedAt: CreationOptional<string>;
}

export class Solvent extends Model<InferAttributes<Solvent>, InferCreationAttributes<Solvent>> {
  declare id: CreationOptional<number>;
  declare name: string;
  declare grade: string | null;
  declare lot: string;
  declare density20c: string | null;
  declare expansionCoefficient: string | null;
  declare expiresOn: string | null;
  declare status: (typeof LOT_STATUSES)[number];
  declare retiredAt: CreationOptional<string | null>;
  declare retiredReason: CreationOptional<string | null>;
  declare createdAt: CreationOptional<string>;
  declare updatedAt: CreationOptional<string>;
}

export function initInventory(sequelize: Sequelize) {
  ReferenceMaterial.init(
    {
      id: id(),
      name: requiredText(),
      formula: requiredText(),
      analytes: jsonText<Analyte[]>('analytes', []),
      casNumber: optionalText(),
      grade: oneOf(MATERIAL_GRADES) as never,
      producer: requiredText(),
      catalogueNumber: optionalText(),
      lot: requiredText(),
      certificateNumber: optionalText(),
      purityValue: requiredText(),
      purityExpandedUncertainty: optionalText(),
      purityK: optionalText(),
      purityStandardUncertainty: optionalText(),
      purityBasis: oneOf(PURITY_BASES) as never,
      densityValue: optionalText(),
      receivedOn: optionalText(),
      openedOn: optionalText(),
      expiresOn: optionalText(),
      storage: optionalText(),
      ghsHazardStatements: jsonText<string[]>('ghsHazardStatements', []),
      ghsPictograms: jsonText<string[]>('ghsPictograms', []),
      status: oneOf(LOT_STATUSES) as never,
      acceptedById: { type: DataTypes.INTEGER, allowNull: true },
      acceptedAt: optionalText(),
      ...retiredAttributes(),
      ...timestampAttributes(),
    },
    options(sequelize, 'reference_materials', 'ReferenceMaterial'),
  );

  Balance.init(
    {
      id: id(),
      identifier: { ...requiredText(), unique: true },
      description: requiredText(),
      location: optionalText(),
      capacityG: requiredText(),
      readabilityMg: requiredText(),
      minWeightMg: optionalText(),
      minWeightDeterminedOn: optionalText(),
      repeatabilitySdMg: optionalText(),
      minWeightSafetyFactor: optionalText(),
      calibratedOn: optionalText(),
      calibrationDueOn: optionalText(),
      calibrationUncertaintyMg: optionalText(),
      calibrationUncertaintyK: optionalText(),
      weightDensity: { type: DataTypes.TEXT, allowNull: false, defaultValue: '8.0' },
      minWeightReadabilityMg: optionalText(),
      minWeightComputed: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      status: oneOf(BALANCE_STATUSES) as never,
      outputShape: { type: DataTypes.TEXT, allowNull: false, defaultValue: 'auto' },
      printCommand: optionalText(),
      printedId: optionalText(),
      serialBaud: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 9600 },
      serialDataBits: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 8 },
      serialParity: { type: DataTypes.TEXT, allowNull: false, defaultValue: 'none' },
      serialStopBits: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
      serialLineEnding: { type: DataTypes.TEXT, allowNull: false, defaultValue: 'crlf' },
      ...retiredAttributes(),
      ...timestampAttributes(),
    },
    options(sequelize, 'balances', 'Balance'),
  );

  VolumetricWare.init(
    {
      id: id(),
      identifier: { ...requiredText(), unique: true },
      kind: oneOf(WARE_KINDS) as never,
      nominalVolumeMl: requiredText(),
      wareClass: { ...(oneOf(WARE_CLASSES) as object), field: 'class' } as never,
      toleranceMl: optionalText(),
      material: optionalText(),
      status: oneOf(WARE_STATUSES) as never,
      ...retiredAttributes(),
      ...timestampAttributes(),
    },
    options(sequelize, 'volumetric_ware', 'VolumetricWare'),
  );

  Solvent.init(
    {
      id: id(),
      name: requiredText(),
      grade: optionalText(),
      lot: requiredText(),
      density20c: { ...optionalText(), field: 'density_20c' },
      expansionCoefficient: optionalText(),
      expiresOn: optionalText(),
      status: oneOf(LOT_STATUSES) as never,
      ...retiredAttributes(),
      ...timestampAttributes(),
    },
    options(sequelize, 'solvents', 'Solvent'),
  );

  for (const model of [ReferenceMaterial, Balance, VolumetricWare, Solvent]) useIsoTimestamps(model as never);
  return { ReferenceMaterial, Balance, VolumetricWare, Solvent };
}
