/**
 * Certificate files of reference-material lots. Every upload is a new version (1, 2, 3…); no row is
 * ever replaced or deleted. The file itself lives at <dataDir>/certificates/<storedName>.
 */
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import { CERTIFICATE_MIME_TYPES } from '../../../shared/schemas/inventory.ts';
import { oneOf, optionalText, requiredText } from './helpers.ts';

export class MaterialCertificate extends Model<InferAttributes<MaterialCertificate>, InferCreationAttributes<MaterialCertificate>> {
  declare id: CreationOptional<number>;
  declare materialId: number;
  declare version: number;
  declare originalName: string;
  declare storedName: string;
  declare mimeType: (typeof CERTIFICATE_MIME_TYPES)[number];
  declare sizeBytes: number;
  declare sha256: string;
  declare note: string | null;
  declare uploadedBy: number;
  declare uploadedAt: string;
}

export function initMaterialCertificate(sequelize: Sequelize) {
  MaterialCertificate.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      materialId: { type: DataTypes.INTEGER, allowNull: false },
      version: { type: DataTypes.INTEGER, allowNull: false },
      originalName: requiredText(),
      storedName: { ...requiredText(), unique: true },
      mimeType: oneOf(CERTIFICATE_MIME_TYPES) as never,
      sizeBytes: { type: DataTypes.INTEGER, allowNull: false },
      sha256: requiredText(),
      note: optionalText(),
      uploadedBy: { type: DataTypes.INTEGER, allowNull: false },
      uploadedAt: requiredText(),
    },
    { sequelize, tableName: 'material_certificates', modelName: 'MaterialCertificate', underscored: true, timestamps: false },
  );
  return MaterialCertificate;
}
