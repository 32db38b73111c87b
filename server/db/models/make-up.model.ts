/**
 * One make-up to volume of a preparation (table `make_ups`, append-only: triggers refuse UPDATE and DELETE).
 * The flask and solvent rows are snapshotted at the time of use.
 */
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { Solvent, VolumetricWare } from '../../../shared/schemas/inventory.ts';
import { jsonText, optionalText, requiredText } from './helpers.ts';

export class MakeUp extends Model<InferAttributes<MakeUp>, InferCreationAttributes<MakeUp>> {
  declare id: CreationOptional<number>;
  declare preparationId: number;
  declare flaskId: number;
  declare flaskIdentifier: string;
  declare flaskSnapshot: VolumetricWare;
  declare substituted: boolean;
  declare solventId: number;
  declare solventLot: string;
  declare solventSnapshot: Solvent;
  declare solutionTemperatureC: string;
  declare applyTemperatureCorrection: boolean;
  declare correctionReason: string | null;
  declare supersedesId: number | null;
  declare recordedBy: number;
  declare recordedAt: string;
}

export function initMakeUp(sequelize: Sequelize): typeof MakeUp {
  MakeUp.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      preparationId: { type: DataTypes.INTEGER, allowNull: false },
      flaskId: { type: DataTypes.INTEGER, allowNull: false },
      flaskIdentifier: requiredText(),
      flaskSnapshot: jsonText<VolumetricWare>('flaskSnapshot', {} as VolumetricWare),
      substituted: { type: DataTypes.BOOLEAN, allowNull: false },
      solventId: { type: DataTypes.INTEGER, allowNull: false },
      solventLot: requiredText(),
      solventSnapshot: jsonText<Solvent>('solventSnapshot', {} as Solvent),
      solutionTemperatureC: requiredText(),
      applyTemperatureCorrection: { type: DataTypes.BOOLEAN, allowNull: false },
      correctionReason: optionalText(),
      supersedesId: { type: DataTypes.INTEGER, allowNull: true },
      recordedBy: { type: DataTypes.INTEGER, allowNull: false },
      recordedAt: requiredText(),
    },
    { sequelize, tableName: 'make_ups', modelName: 'MakeUp', underscored: true, timestamps: false },
  );
  return MakeUp;
}
