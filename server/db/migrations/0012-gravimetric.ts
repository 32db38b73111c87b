/**
 * Gravimetric dilutions (METROLOGY §5.5): gravimetric_readings holds both net readings of a gravimetric dilution
 * (the aliquot of parent solution and the final solution), verbatim as the balance showed them, with the balance
 * snapshot, the room conditions and the air density (CIPM-2007) at the time. Original observations: append-only
 * like weighings and aliquots (triggers refuse UPDATE and DELETE; a correction is a new row naming the row it
 * supersedes, with a reason). The result computed from them is stored in preparations.dilution_result (0011).
 */
import { DataTypes, type QueryInterface } from 'sequelize';

type Ctx = { context: QueryInterface };

export const GRAVIMETRIC_READINGS_APPEND_ONLY = 'gravimetric_readings are append-only: record a correction instead';

const text = (allowNull = true) => ({ type: DataTypes.TEXT, allowNull });
const ref = (table: string, allowNull = false) => ({ type: DataTypes.INTEGER, allowNull, references: { model: table, key: 'id' }, onUpdate: 'RESTRICT', onDelete: 'RESTRICT' });

export async function up({ context: qi }: Ctx): Promise<void> {
  await qi.createTable('gravimetric_readings', {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    preparation_id: ref('preparations'),
    balance_id: ref('balances'),
    balance_snapshot: { type: DataTypes.TEXT, allowNull: false, defaultValue: '{}' },
    unit: text(false), // g | mg, as the balance showed
    aliquot_reading: text(false), // TEXT decimal, verbatim
    final_reading: text(false), // TEXT decimal, verbatim
    conditions: { type: DataTypes.TEXT, allowNull: false, defaultValue: '{}' }, // { source, temperatureC, pressureHPa, relativeHumidityPct, measuredAt }
    air_density: text(false), // g/mL, CIPM-2007
    air_density_u: text(false), // g/mL, standard uncertainty
    supersedes_id: { ...ref('gravimetric_readings', true), unique: true },
    correction_reason: text(),
    recorded_by: ref('users'),
    recorded_at: text(false),
  });
  await qi.addIndex('gravimetric_readings', ['preparation_id'], { name: 'gravimetric_readings_preparation' });
  await qi.sequelize.query(`CREATE TRIGGER gravimetric_readings_no_update BEFORE UPDATE ON gravimetric_readings BEGIN SELECT RAISE(ABORT, '${GRAVIMETRIC_READINGS_APPEND_ONLY}'); END;`);
  await qi.sequelize.query(`CREATE TRIGGER gravimetric_readings_no_delete BEFORE DELETE ON gravimetric_readings BEGIN SELECT RAISE(ABORT, '${GRAVIMETRIC_READINGS_APPEND_ONLY}'); END;`);
}

export async function down({ context: qi }: Ctx): Promise<void> {
  await qi.sequelize.query('DROP TRIGGER IF EXISTS gravimetric_readings_no_update;');
  await qi.sequelize.query('DROP TRIGGER IF EXISTS gravimetric_readings_no_delete;');
  await qi.dropTable('gravimetric_readings');
}
