import { DataTypes, type Model, type ModelStatic } from 'sequelize';

/**
 * A TEXT column holding JSON. Stored as TEXT (not Sequelize's JSON type) so SQLite's type affinity can
 * never turn a value into a number.
 */
export function jsonText<T>(attribute: string, fallback: T) {
  return {
    type: DataTypes.TEXT,
    allowNull: false,
    get(this: Model): T {
      const raw = this.getDataValue(attribute as never) as unknown;
      if (raw === null || raw === undefined) return fallback;
      return (typeof raw === 'string' ? JSON.parse(raw) : raw) as T;
    },
    set(this: Model, value: T) {
      this.setDataValue(attribute as never, JSON.stringify(value) as never);
    },
  };
}

/** Optional TEXT column (decimal strings, ISO dates). */
export const optionalText = () => ({ type: DataTypes.TEXT, allowNull: true });
export const requiredText = () => ({ type: DataTypes.TEXT, allowNull: false });
export const oneOf = (values: readonly string[]) => ({
  type: DataTypes.TEXT,
  allowNull: false,
  validate: { isIn: { args: [values as string[]], msg: `Must be one of: ${values.join(', ')}` } },
});

export const timestampAttributes = () => ({
  createdAt: { type: DataTypes.TEXT, allowNull: false },
  updatedAt: { type: DataTypes.TEXT, allowNull: false },
});

/**
 * createdAt / updatedAt as UTC ISO strings (Sequelize's own timestamps would write
 * "YYYY-MM-DD HH:MM:SS.SSS +00:00"). Instance saves and bulkCreate only; avoid static Model.update.
 */
export function useIsoTimestamps(model: ModelStatic<Model>): void {
  const stamp = (instance: Model) => {
    const now = new Date().toISOString();
    if (instance.isNewRecord && !instance.getDataValue('createdAt' as never)) {
      instance.setDataValue('createdAt' as never, now as never);
    }
    instance.setDataValue('updatedAt' as never, now as never);
  };
  model.addHook('beforeValidate', (instance: Model) => stamp(instance));
  model.addHook('beforeSave', (instance: Model) => stamp(instance));
  model.addHook('beforeBulkCreate', (instances: Model[]) => instances.forEach(stamp));
}
