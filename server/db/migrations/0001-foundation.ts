/**
 * Foundation: users and lab settings.
 * Times are UTC ISO-8601 strings in TEXT columns (the models set them; the default is a safety net).
 */
import { DataTypes, Sequelize, type QueryInterface } from 'sequelize';

type Ctx = { context: QueryInterface };

const NOW_ISO = Sequelize.literal(`(strftime('%Y-%m-%dT%H:%M:%fZ', 'now'))`);

const timestampColumns = () => ({
  created_at: { type: DataTypes.TEXT, allowNull: false, defaultValue: NOW_ISO },
  updated_at: { type: DataTypes.TEXT, allowNull: false, defaultValue: NOW_ISO },
});

export async function up({ context: qi }: Ctx): Promise<void> {
  await qi.createTable('users', {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    email: { type: DataTypes.TEXT, allowNull: false, unique: true }, // stored lower-case
    full_name: { type: DataTypes.TEXT, allowNull: false },
    initials: { type: DataTypes.TEXT, allowNull: false },
    role: { type: DataTypes.TEXT, allowNull: false }, // chemist | technician | qa | admin
    password_hash: { type: DataTypes.TEXT, allowNull: false },
    active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
    failed_login_count: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    locked_at: { type: DataTypes.TEXT, allowNull: true },
    last_login_at: { type: DataTypes.TEXT, allowNull: true },
    ...timestampColumns(),
  });

  await qi.createTable('settings', {
    key: { type: DataTypes.TEXT, primaryKey: true, allowNull: false },
    value: { type: DataTypes.TEXT, allowNull: false }, // JSON text
    updated_at: { type: DataTypes.TEXT, allowNull: false, defaultValue: NOW_ISO },
  });

  // Lab defaults (our fictional demo lab). Values are JSON text; numbers stay decimal strings.
  const defaults: Record<string, unknown> = {
    labName: 'Harbourside Water Laboratory',
    idPrefix: 'HWL',
    timeZone: 'Europe/London',
    defaultRoomConditions: { temperatureC: '20.0', pressureHPa: '1013', relativeHumidityPct: '50' },
    readingWindowPct: '5',
    roundingRule: 'half-even',
  };
  const now = new Date().toISOString();
  await qi.bulkInsert(
    'settings',
    Object.entries(defaults).map(([key, value]) => ({ key, value: JSON.stringify(value), updated_at: now })),
  );
}

export async function down({ context: qi }: Ctx): Promise<void> {
  await qi.dropTable('settings');
  await qi.dropTable('users');
}
