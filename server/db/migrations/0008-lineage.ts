/**
 * Lineage: standards made from standards (REQUIREMENTS TR-04 genealogy as a graph, TR-11 only released,
 * in-date parents, EX-01 expiry capped by every parent).
 *
 * preparations gain `kind` (stock | dilution | series_level | mix; existing rows are stocks) and `series_id`
 * (the calibration series a level belongs to; plain INTEGER so the column can be dropped again).
 * preparation_parents links a preparation to each parent it was made from, with the pipette planned for the
 * aliquot, the planned volume and a frozen snapshot of the parent at use (identifier, status, concentration,
 * u, expiry). dilution_aliquots holds the aliquot actually delivered at the bench (pipette confirmed by its
 * identifier): an original observation, append-only like weighings (a correction is a new row that names the
 * row it supersedes). series holds a calibration series (identifier e.g. HWL-2026-S001).
 */
import { DataTypes, type QueryInterface } from 'sequelize';

type Ctx = { context: QueryInterface };

export const PARENTS_APPEND_ONLY = 'preparation_parents are append-only: the inputs of a preparation are fixed at planning';
export const ALIQUOTS_APPEND_ONLY = 'dilution_aliquots are append-only: record a correction instead';

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
  await qi.sequelize.query(`ALTER TABLE preparations ADD COLUMN kind TEXT NOT NULL DEFAULT 'stock'`);
  await qi.sequelize.query('ALTER TABLE preparations ADD COLUMN series_id INTEGER');
  await qi.addIndex('preparations', ['series_id'], { name: 'preparations_series' });

  await qi.createTable('series', {
    id: id(),
    identifier: { type: DataTypes.TEXT, allowNull: false, unique: true }, // HWL-2026-S001
    parent_preparation_id: ref('preparations'),
    analyte_formula: text(false),
    unit: text(false),
    created_by: ref('users'),
    created_at: text(false),
  });

  await qi.createTable('preparation_parents', {
    id: id(),
    preparation_id: ref('preparations'),
    parent_preparation_id: ref('preparations'),
    aliquot_ware_id: ref('volumetric_ware', true),
    role: text(false), // aliquot (dilution, series level) | component (mix)
    planned_volume_ml: text(), // TEXT decimal, as planned
    snapshot: json(), // { identifier, status, version, analyteFormula, concentration: { value, unit, standardUncertainty }, expiresOn }
    created_at: text(false),
  });
  await qi.addIndex('preparation_parents', ['preparation_id'], { name: 'preparation_parents_child' });
  await qi.addIndex('preparation_parents', ['parent_preparation_id'], { name: 'preparation_parents_parent' });

  await qi.createTable('dilution_aliquots', {
    id: id(),
    preparation_id: ref('preparations'),
    parent_link_id: ref('preparation_parents'),
    pipette_id: ref('volumetric_ware'),
    pipette_identifier: text(false), // as scanned or typed
    pipette_snapshot: json(),
    volume_ml: text(false), // delivered volume: the bulb pipette's nominal, or the piston pipette's setting as typed
    supersedes_id: { ...ref('dilution_aliquots', true), unique: true },
    correction_reason: text(),
    recorded_by: ref('users'),
    recorded_at: text(false),
  });
  await qi.addIndex('dilution_aliquots', ['preparation_id'], { name: 'dilution_aliquots_preparation' });

  for (const [table, message] of [
    ['preparation_parents', PARENTS_APPEND_ONLY],
    ['dilution_aliquots', ALIQUOTS_APPEND_ONLY],
  ] as const) {
    await qi.sequelize.query(`CREATE TRIGGER ${table}_no_update BEFORE UPDATE ON ${table} BEGIN SELECT RAISE(ABORT, '${message}'); END;`);
    await qi.sequelize.query(`CREATE TRIGGER ${table}_no_delete BEFORE DELETE ON ${table} BEGIN SELECT RAISE(ABORT, '${message}'); END;`);
  }
}

export async function down({ context: qi }: Ctx): Promise<void> {
  for (const table of ['dilution_aliquots', 'preparation_parents']) {
    await qi.sequelize.query(`DROP TRIGGER IF EXISTS ${table}_no_update;`);
    await qi.sequelize.query(`DROP TRIGGER IF EXISTS ${table}_no_delete;`);
  }
  await qi.dropTable('dilution_aliquots');
  await qi.dropTable('preparation_parents');
  await qi.dropTable('series');
  await qi.sequelize.query('DROP INDEX IF EXISTS preparations_series');
  await qi.sequelize.query('ALTER TABLE preparations DROP COLUMN series_id');
  await qi.sequelize.query('ALTER TABLE preparations DROP COLUMN kind');
}
