/**
 * Lineage (migration 0008-lineage): parents of a preparation with their snapshot at use, the aliquots
 * delivered at the bench (append-only: triggers refuse UPDATE and DELETE), and calibration series.
 * preparations.kind and preparations.series_id are read and written by server/services/lineage.service.ts.
 */
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { VolumetricWare } from '../../../shared/schemas/inventory.ts';
import type { ParentSnapshot } from '../../../shared/schemas/lineage.ts';
import { jsonText, optionalText, requiredText } from './helpers.ts';

export class PreparationParent extends Model<InferAttributes<PreparationParent>, InferCreationAttributes<PreparationParent>> {
  declare id: CreationOptional<number>;
  declare preparationId: number;
  declare parentPreparationId: number;
  declare aliquotWareId: number | null;
  declare role: string;
  declare plannedVolumeMl: string | null;
  declare snapshot: ParentSnapshot;
  declare createdAt: string;
}

export class DilutionAliquot extends Model<InferAttributes<DilutionAliquot>, InferCreationAttributes<DilutionAliquot>> {
  declare id: CreationOptional<number>;
  declare preparationId: number;
  declare parentLinkId: number;
  declare pipetteId: number;
  declare pipetteIdentifier: string;
  declare pipetteSnapshot: VolumetricWare;
  declare volumeMl: string;
  declare supersedesId: number | null;
  declare correctionReason: string | null;
  declare recordedBy: number;
  declare recordedAt: string;
}

export class Series extends Model<InferAttributes<Series>, InferCreationAttributes<Series>> {
  declare id: CreationOptional<number>;
  declare identifier: string;
  declare parentPreparationId: number;
  declare analyteFormula: string;
  declare unit: string;
  declare createdBy: number;
  declare createdAt: string;
}

export function initLineage(sequelize: Sequelize) {
  PreparationParent.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      preparationId: { type: DataTypes.INTEGER, allowNull: false },
      parentPreparationId: { type: DataTypes.INTEGER, allowNull: false },
      aliquotWareId: { type: DataTypes.INTEGER, allowNull: true },
      role: requiredText(),
      plannedVolumeMl: optionalText(),
      snapshot: jsonText<ParentSnapshot>('snapshot', {} as ParentSnapshot),
      createdAt: requiredText(),
    },
    { sequelize, tableName: 'preparation_parents', modelName: 'PreparationParent', underscored: true, timestamps: false },
  );
  DilutionAliquot.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      preparationId: { type: DataTypes.INTEGER, allowNull: false },
      parentLinkId: { type: DataTypes.INTEGER, allowNull: false },
      pipetteId: { type: DataTypes.INTEGER, allowNull: false },
      pipetteIdentifier: requiredText(),
      pipetteSnapshot: jsonText<VolumetricWare>('pipetteSnapshot', {} as VolumetricWare),
      volumeMl: requiredText(),
      supersedesId: { type: DataTypes.INTEGER, allowNull: true },
      correctionReason: optionalText(),
      recordedBy: { type: DataTypes.INTEGER, allowNull: false },
      recordedAt: requiredText(),
    },
    { sequelize, tableName: 'dilution_aliquots', modelName: 'DilutionAliquot', underscored: true, timestamps: false },
  );
  Series.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      identifier: { ...requiredText(), unique: true },
      parentPreparationId: { type: DataTypes.INTEGER, allowNull: false },
      analyteFormula: requiredText(),
      unit: requiredText(),
      createdBy: { type: DataTypes.INTEGER, allowNull: false },
      createdAt: requiredText(),
    },
    { sequelize, tableName: 'series', modelName: 'Series', underscored: true, timestamps: false },
  );
}
