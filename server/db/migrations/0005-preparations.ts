/**
 * Preparations: the planned record, its weighings and make-ups (original observations, REQUIREMENTS TR-08),
 * its status events, and the identifier sequence per prefix + year (TR-01: issued once, never reused).
 *
 * Measured values are TEXT holding the string exactly as typed; JSON columns are TEXT (snapshots of the
 * inventory rows at the time of use, the stored inputs and the stored result, TR-09).
 * weighings and make_ups are append-only: triggers refuse UPDATE and DELETE, so a correction is a new row
 * that names the row it supersedes (supersedes_id), and the old row stays as it was.
 */
import { DataTypes, type QueryInterface } from 'sequelize';

type Ctx = { context: QueryInterface };

export const WEIGHINGS_APPEND_ONLY = 'weighings are append-only: record a correction instead';
export const MAKE_UPS_APPEND_ONLY = 'make_ups are append-only: record a new make-up instead';

const id = () => ({ type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true });
const text = (allowNull = true) => ({ type: DataTypes.TEXT, allowNull });
const json = (fallback = '{}') => ({ type: DataTypes.TEXT, allowNull: false, defaultValue: fallback });
const ref = (table: string, allowNull = false) => ({
  type: DataTypes.INTEGER,
  allowNull,
  references: { model: table, key: 'id' },
  onUpdate: 'RESTRICT',
  onDelete: 'RESTRICT',
});

export async function up({ context: qi }: Ctx): Promise<void> {
  await qi.createTable('preparation_sequences', {
    prefix: { type: DataTypes.TEXT, allowNull: false, primaryKey: true },
    year: { type: DataTypes.INTEGER, allowNull: false, primaryKey: true },
    last_seq: { type: DataTypes.INTEGER, allowNull: false },
  });

  await qi.createTable('preparations', {
    id: id(),
    identifier: { type: DataTypes.TEXT, allowNull: false, unique: true }, // HWL-2026-0042
    status: text(false), // planned (later: prepared, verified, returned …)
    version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
    material_id: ref('reference_materials'),
    analyte_formula: text(false),
    target_value: text(false),
    target_unit: text(false),
    volume_value: text(false),
    volume_unit: text(false),
    flask_id: ref('volumetric_ware', true),
    balance_id: ref('balances'),
    inputs: json(), // the PlanInput as received (after validation)
    notes: text(),
    conditions_used: json(),
    snapshot_material: json(),
    snapshot_balance: json(),
    snapshot_flask: text(), // JSON or NULL when a volume was entered
    plan: json(), // targetReading, window, trueMass, factors, expected uncertainty, and the core's response
    gates: json('[]'), // warnings that fired at planning (blocks refuse creation)
    result: text(), // JSON of the latest recomputation, NULL until weighed and made up
    concentration_display: text(),
    expires_on: text(false),
    expiry_reason: text(false),
    created_on: text(false), // lab-local calendar date of creation (for "today")
    created_by: ref('users'),
    created_at: text(false),
    updated_at: text(false),
  });
  await qi.addIndex('preparations', ['created_by'], { name: 'preparations_created_by' });
  await qi.addIndex('preparations', ['created_on'], { name: 'preparations_created_on' });

  await qi.createTable('weighings', {
    id: id(),
    preparation_id: ref('preparations'),
    mode: text(false), // direct | difference
    reading: text(), // verbatim, direct mode
    before_reading: text(), // verbatim, by difference
    after_reading: text(),
    unit: text(false), // mg | g (the unit the readings were typed in)
    net_mg: text(false),
    balance_id: ref('balances'),
    balance_snapshot: json(),
    conditions: json(), // { source, temperatureC, pressureHPa, relativeHumidityPct, measuredAt }
    air_density: text(false), // g/mL, CIPM-2007
    in_window: { type: DataTypes.BOOLEAN, allowNull: false },
    out_of_window_reason: text(),
    supersedes_id: { ...ref('weighings', true), unique: true },
    correction_reason: text(),
    recorded_by: ref('users'),
    recorded_at: text(false),
  });
  await qi.addIndex('weighings', ['preparation_id'], { name: 'weighings_preparation' });

  await qi.createTable('make_ups', {
    id: id(),
    preparation_id: ref('preparations'),
    flask_id: ref('volumetric_ware'),
    flask_identifier: text(false),
    flask_snapshot: json(),
    substituted: { type: DataTypes.BOOLEAN, allowNull: false },
    solvent_id: ref('solvents'),
    solvent_lot: text(false),
    solvent_snapshot: json(),
    solution_temperature_c: text(false),
    apply_temperature_correction: { type: DataTypes.BOOLEAN, allowNull: false },
    correction_reason: text(),
    supersedes_id: { ...ref('make_ups', true), unique: true },
    recorded_by: ref('users'),
    recorded_at: text(false),
  });
  await qi.addIndex('make_ups', ['preparation_id'], { name: 'make_ups_preparation' });

  await qi.createTable('preparation_events', {
    id: id(),
    preparation_id: ref('preparations'),
    status: text(false),
    note: text(),
    by_id: ref('users'),
    by_name: text(false), // printed name at the time of the event
    at: text(false),
  });
  await qi.addIndex('preparation_events', ['preparation_id'], { name: 'preparation_events_preparation' });

  for (const [table, message] of [
    ['weighings', WEIGHINGS_APPEND_ONLY],
    ['make_ups', MAKE_UPS_APPEND_ONLY],
    ['preparation_events', 'preparation_events are append-only'],
  ] as const) {
    await qi.sequelize.query(`CREATE TRIGGER ${table}_no_update BEFORE UPDATE ON ${table} BEGIN SELECT RAISE(ABORT, '${message}'); END;`);
    await qi.sequelize.query(`CREATE TRIGGER ${table}_no_delete BEFORE DELETE ON ${table} BEGIN SELECT RAISE(ABORT, '${message}'); END;`);
  }
}

export async function down({ context: qi }: Ctx): Promise<void> {
  for (const table of ['preparation_events', 'make_ups', 'weighings']) {
    await qi.sequelize.query(`DROP TRIGGER IF EXISTS ${table}_no_update;`);
    await qi.sequelize.query(`DROP TRIGGER IF EXISTS ${table}_no_delete;`);
  }
  await qi.dropTable('preparation_events');
  await qi.dropTable('make_ups');
  await qi.dropTable('weighings');
  await qi.dropTable('preparations');
  await qi.dropTable('preparation_sequences');
}
