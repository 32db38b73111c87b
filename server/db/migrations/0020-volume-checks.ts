/**
 * Gravimetric checks of volumetric ware (ISO 4787 / ISO 8655-6).
 * - volume_checks: one check of one ware item: the ware and balance as they were (snapshots), the plan (tested
 *   volumes and replicates), the gates evaluated, the conditions, the stored result with its calc version, the
 *   status (planned | prepared | verified), the record version and the next due date set by verification.
 * - volume_check_readings: each net reading of water as the balance showed it (TEXT, verbatim); original
 *   observations, append-only (triggers refuse UPDATE and DELETE); a correction is a new row naming the row it
 *   supersedes, with a reason.
 * - volume_check_signatures: e-signatures on a check (prepared, verified, returned), append-only like signatures;
 *   each carries the record version and the SHA-256 of the canonical JSON it signed.
 */
import { DataTypes, type QueryInterface } from 'sequelize';

type Ctx = { context: QueryInterface };

export const VOLUME_CHECK_READINGS_APPEND_ONLY = 'volume_check_readings are append-only: record a correction instead';
export const VOLUME_CHECK_SIGNATURES_APPEND_ONLY = 'volume_check_signatures are append-only: a signature is never edited or removed';

const text = (allowNull = true) => ({ type: DataTypes.TEXT, allowNull });
const json = (fallback: string) => ({ type: DataTypes.TEXT, allowNull: false, defaultValue: fallback });
const ref = (table: string, allowNull = false) => ({ type: DataTypes.INTEGER, allowNull, references: { model: table, key: 'id' }, onUpdate: 'RESTRICT', onDelete: 'RESTRICT' });
const id = () => ({ type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true });

const APPEND_ONLY = [
  ['volume_check_readings', VOLUME_CHECK_READINGS_APPEND_ONLY],
  ['volume_check_signatures', VOLUME_CHECK_SIGNATURES_APPEND_ONLY],
] as const;

export async function up({ context: qi }: Ctx): Promise<void> {
  await qi.createTable('volume_checks', {
    id: id(),
    identifier: { type: DataTypes.TEXT, allowNull: false, unique: true }, // VC-YYYY-NNNN
    ware_id: ref('volumetric_ware'),
    ware_snapshot: json('{}'),
    balance_id: ref('balances'),
    balance_snapshot: json('{}'),
    plan: json('{}'), // { kind, class, material, mode, nominal, tested: [{ value, unit, replicates }], limits? }
    gates: json('[]'),
    conditions: json('{}'), // { waterTemperatureC, waterAirSaturated, air: { temperatureC, pressureHPa, relativeHumidityPct }, evaporation? }
    result: text(), // JSON { verdict, tested: [VolumeCheckResponse …] } once every replicate is in
    calc_version: text(),
    status: text(false), // planned | prepared | verified
    version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
    notes: text(),
    next_due_on: text(), // set when verified
    created_by: ref('users'),
    created_by_name: text(false),
    created_at: text(false),
    updated_at: text(false),
  });
  await qi.addIndex('volume_checks', ['ware_id'], { name: 'volume_checks_ware' });

  await qi.createTable('volume_check_readings', {
    id: id(),
    check_id: ref('volume_checks'),
    tested_index: { type: DataTypes.INTEGER, allowNull: false },
    replicate: { type: DataTypes.INTEGER, allowNull: false },
    value: text(false), // TEXT decimal, verbatim
    unit: text(false), // g | mg
    supersedes_id: { ...ref('volume_check_readings', true), unique: true },
    correction_reason: text(),
    recorded_by: ref('users'),
    recorded_by_name: text(false),
    recorded_at: text(false),
  });
  await qi.addIndex('volume_check_readings', ['check_id'], { name: 'volume_check_readings_check' });

  await qi.createTable('volume_check_signatures', {
    id: id(),
    check_id: ref('volume_checks'),
    meaning: text(false), // prepared | verified | returned
    meaning_text: text(false),
    signer_id: ref('users'),
    signer_name: text(false),
    signed_at: text(false),
    record_version: { type: DataTypes.INTEGER, allowNull: false },
    record_hash: text(false),
    canonical_json: text(false), // what was signed
    reason: text(),
  });
  await qi.addIndex('volume_check_signatures', ['check_id'], { name: 'volume_check_signatures_check' });

  for (const [table, message] of APPEND_ONLY) {
    await qi.sequelize.query(`CREATE TRIGGER ${table}_no_update BEFORE UPDATE ON ${table} BEGIN SELECT RAISE(ABORT, '${message}'); END;`);
    await qi.sequelize.query(`CREATE TRIGGER ${table}_no_delete BEFORE DELETE ON ${table} BEGIN SELECT RAISE(ABORT, '${message}'); END;`);
  }
}

export async function down({ context: qi }: Ctx): Promise<void> {
  for (const [table] of APPEND_ONLY) {
    await qi.sequelize.query(`DROP TRIGGER IF EXISTS ${table}_no_update;`);
    await qi.sequelize.query(`DROP TRIGGER IF EXISTS ${table}_no_delete;`);
  }
  for (const table of ['volume_check_signatures', 'volume_check_readings', 'volume_checks']) await qi.dropTable(table);
}
