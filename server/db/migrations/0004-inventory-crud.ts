/**
 * Inventory editing: acceptance record on reference-material lots, retirement (status + when + why) on
 * every inventory table, the data a balance's minimum weight came from, certificate versions, and an
 * index for every column the lists filter or sort by (GET /api/<kind>?sort=…&status=…; see `npm run bench`).
 * Measured values stay TEXT decimal strings; nominal volume is sorted by an expression index on
 * CAST(nominal_volume_ml AS REAL), so no numeric copy of the value is stored.
 */
import { DataTypes, Sequelize, type QueryInterface } from 'sequelize';

type Ctx = { context: QueryInterface };

const NOW_ISO = Sequelize.literal(`(strftime('%Y-%m-%dT%H:%M:%fZ', 'now'))`);
const text = () => ({ type: DataTypes.TEXT, allowNull: true });

/** table → [index name, columns] */
const INDEXES: Array<[string, string, string[]]> = [
  ['reference_materials', 'reference_materials_name', ['name']],
  ['reference_materials', 'reference_materials_lot', ['lot']],
  ['reference_materials', 'reference_materials_grade', ['grade']],
  ['reference_materials', 'reference_materials_producer', ['producer']],
  ['reference_materials', 'reference_materials_cas_number', ['cas_number']],
  ['reference_materials', 'reference_materials_received_on', ['received_on']],
  ['reference_materials', 'reference_materials_expires_on', ['expires_on']],
  ['reference_materials', 'reference_materials_status_expires_on', ['status', 'expires_on']],
  ['reference_materials', 'reference_materials_updated_at', ['updated_at']],
  ['balances', 'balances_description', ['description']],
  ['balances', 'balances_location', ['location']],
  ['balances', 'balances_calibrated_on', ['calibrated_on']],
  ['balances', 'balances_calibration_due_on', ['calibration_due_on']],
  ['balances', 'balances_status_due_on', ['status', 'calibration_due_on']],
  ['balances', 'balances_updated_at', ['updated_at']],
  ['volumetric_ware', 'volumetric_ware_kind', ['kind']],
  ['volumetric_ware', 'volumetric_ware_class', ['class']],
  ['volumetric_ware', 'volumetric_ware_material', ['material']],
  ['volumetric_ware', 'volumetric_ware_status', ['status']],
  ['volumetric_ware', 'volumetric_ware_updated_at', ['updated_at']],
  ['solvents', 'solvents_name', ['name']],
  ['solvents', 'solvents_grade', ['grade']],
  ['solvents', 'solvents_lot', ['lot']],
  ['solvents', 'solvents_expires_on', ['expires_on']],
  ['solvents', 'solvents_status', ['status']],
  ['solvents', 'solvents_updated_at', ['updated_at']],
];

const RETIRE_TABLES = ['reference_materials', 'balances', 'volumetric_ware', 'solvents'];

export async function up({ context: qi }: Ctx): Promise<void> {
  await qi.addColumn('reference_materials', 'accepted_by_id', {
    type: DataTypes.INTEGER,
    allowNull: true,
    references: { model: 'users', key: 'id' },
  });
  await qi.addColumn('reference_materials', 'accepted_at', text()); // UTC ISO
  for (const table of RETIRE_TABLES) {
    await qi.addColumn(table, 'retired_at', text()); // UTC ISO
    await qi.addColumn(table, 'retired_reason', text());
  }
  await qi.addColumn('balances', 'min_weight_readability_mg', text()); // d used for m_min
  await qi.addColumn('balances', 'min_weight_computed', { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false });

  for (const [table, name, fields] of INDEXES) await qi.addIndex(table, fields, { name });
  await qi.sequelize.query(
    'CREATE INDEX volumetric_ware_nominal_volume ON volumetric_ware (CAST(nominal_volume_ml AS REAL))',
  );

  await qi.createTable('material_certificates', {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    material_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'reference_materials', key: 'id' } },
    version: { type: DataTypes.INTEGER, allowNull: false }, // 1, 2, 3… per material; never replaced
    original_name: { type: DataTypes.TEXT, allowNull: false },
    stored_name: { type: DataTypes.TEXT, allowNull: false, unique: true }, // <uuid>.<ext> under <dataDir>/certificates
    mime_type: { type: DataTypes.TEXT, allowNull: false }, // from the file's magic bytes
    size_bytes: { type: DataTypes.INTEGER, allowNull: false },
    sha256: { type: DataTypes.TEXT, allowNull: false },
    note: { type: DataTypes.TEXT, allowNull: true },
    uploaded_by: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'users', key: 'id' } },
    uploaded_at: { type: DataTypes.TEXT, allowNull: false, defaultValue: NOW_ISO },
  });
  await qi.addIndex('material_certificates', ['material_id', 'version'], { name: 'material_certificates_material_version', unique: true });
}

export async function down({ context: qi }: Ctx): Promise<void> {
  await qi.dropTable('material_certificates');
  await qi.sequelize.query('DROP INDEX IF EXISTS volumetric_ware_nominal_volume');
  for (const [table, name] of [...INDEXES].reverse()) await qi.removeIndex(table, name);
  // SQLite ≥ 3.35 drops a column in place (Sequelize's removeColumn would rebuild the table).
  const drop = (table: string, column: string) => qi.sequelize.query(`ALTER TABLE ${table} DROP COLUMN ${column}`);
  await drop('balances', 'min_weight_computed');
  await drop('balances', 'min_weight_readability_mg');
  for (const table of [...RETIRE_TABLES].reverse()) {
    await drop(table, 'retired_reason');
    await drop(table, 'retired_at');
  }
  await drop('reference_materials', 'accepted_at');
  await drop('reference_materials', 'accepted_by_id');
}
