/**
 * Label templates and label prints (migration 0007-printing). label_prints is append-only (triggers);
 * its JSON columns keep the template and the label content exactly as printed.
 */
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { LabelContent, LabelLayout } from '../../../shared/schemas/printing.ts';
import { jsonText, requiredText, timestampAttributes, useIsoTimestamps } from './helpers.ts';

export class LabelTemplate extends Model<InferAttributes<LabelTemplate>, InferCreationAttributes<LabelTemplate>> {
  declare id: CreationOptional<number>;
  declare name: string;
  declare widthMm: string;
  declare heightMm: string;
  declare layout: LabelLayout;
  declare content: LabelContent;
  declare active: CreationOptional<boolean>;
  declare createdAt: CreationOptional<string>;
  declare updatedAt: CreationOptional<string>;
}

/** The template as stored with a print (what the labels were laid out with). */
export interface TemplateSnapshot {
  id: number;
  name: string;
  widthMm: string;
  heightMm: string;
  layout: LabelLayout;
  content: LabelContent;
}

/** The label content as printed, taken from the record version (REQUIREMENTS LB-06: no free-text override). */
export interface LabelSnapshot {
  identifier: string;
  version: number;
  status: string;
  materialName: string;
  analyteFormula: string;
  /** e.g. "1001.0 ± 2.7 mg/L (k = 2)"; the planned target while no result exists */
  concentration: string;
  /** short form for small labels, e.g. "1001.0 mg/L" */
  concentrationShort: string;
  solvent: string | null;
  preparedOn: string;
  expiresOn: string;
  preparerInitials: string;
  storage: string | null;
  pictograms: string[];
}

export class LabelPrint extends Model<InferAttributes<LabelPrint>, InferCreationAttributes<LabelPrint>> {
  declare id: CreationOptional<number>;
  declare preparationId: number;
  declare preparationVersion: number;
  declare templateId: number;
  declare templateSnapshot: TemplateSnapshot;
  declare labelSnapshot: LabelSnapshot;
  declare statusAtPrint: string;
  declare copies: number;
  declare number: number;
  declare isReprint: boolean;
  declare reason: string | null;
  declare printedBy: number;
  declare printedByName: string;
  declare printedAt: string;
}

export function initPrinting(sequelize: Sequelize) {
  LabelTemplate.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      name: requiredText(),
      widthMm: requiredText(),
      heightMm: requiredText(),
      layout: jsonText<LabelLayout>('layout', { kind: 'roll' }),
      content: requiredText(),
      active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
      ...timestampAttributes(),
    },
    { sequelize, tableName: 'label_templates', modelName: 'LabelTemplate', underscored: true, timestamps: false },
  );
  useIsoTimestamps(LabelTemplate);

  LabelPrint.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      preparationId: { type: DataTypes.INTEGER, allowNull: false },
      preparationVersion: { type: DataTypes.INTEGER, allowNull: false },
      templateId: { type: DataTypes.INTEGER, allowNull: false },
      templateSnapshot: jsonText<TemplateSnapshot>('templateSnapshot', {} as TemplateSnapshot),
      labelSnapshot: jsonText<LabelSnapshot>('labelSnapshot', {} as LabelSnapshot),
      statusAtPrint: requiredText(),
      copies: { type: DataTypes.INTEGER, allowNull: false },
      number: { type: DataTypes.INTEGER, allowNull: false },
      isReprint: { type: DataTypes.BOOLEAN, allowNull: false },
      reason: { type: DataTypes.TEXT, allowNull: true },
      printedBy: { type: DataTypes.INTEGER, allowNull: false },
      printedByName: requiredText(),
      printedAt: requiredText(),
    },
    { sequelize, tableName: 'label_prints', modelName: 'LabelPrint', underscored: true, timestamps: false },
  );
  return { LabelTemplate, LabelPrint };
}
