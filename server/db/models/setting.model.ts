import { Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import { jsonText, requiredText } from './helpers.ts';

/** One lab setting per row; `value` is JSON text. */
export class Setting extends Model<InferAttributes<Setting>, InferCreationAttributes<Setting>> {
  declare key: string;
  declare value: unknown;
  declare updatedAt: CreationOptional<string>;
}

export function initSetting(sequelize: Sequelize): typeof Setting {
  Setting.init(
    {
      key: { ...requiredText(), primaryKey: true },
      value: jsonText<unknown>('value', null),
      updatedAt: requiredText(),
    },
    { sequelize, tableName: 'settings', modelName: 'Setting', underscored: true, timestamps: false },
  );
  const stamp = (s: Setting) => s.setDataValue('updatedAt', new Date().toISOString());
  Setting.addHook('beforeValidate', stamp);
  Setting.addHook('beforeSave', stamp);
  Setting.addHook('beforeBulkCreate', (rows: Setting[]) => rows.forEach(stamp));
  return Setting;
}
