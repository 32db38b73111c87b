/**
 * Readings straight from the balance (issue 15): how each reading came in.
 * - weighings.captures and gravimetric_readings.captures: JSON, one entry per reading of the row (weighings:
 *   reading | before | after; gravimetric readings: aliquotReading | finalReading), each
 *   { method: typed | keyboard_burst | serial | bridge, rawLine (the line as received, null when typed),
 *     stability (stable | unstable, null when typed), balancePrintId (the identity the balance printed, or null),
 *     capturedAt, flags (typed, unstable_allowed) }.
 *   Rows written before this migration hold '{}' and are shown as "typed (before capture was recorded)".
 *   Both tables stay append-only: adding a column leaves their triggers in place.
 * - balances: the line shape the balance prints (shared/balance/output-line.ts LINE_SHAPES), the command that asks
 *   it for a stable reading, the identity it prints, and its serial port settings.
 */
import { DataTypes, type QueryInterface } from 'sequelize';

type Ctx = { context: QueryInterface };

const BALANCE_COLUMNS = [
  ['output_shape', { type: DataTypes.TEXT, allowNull: false, defaultValue: 'auto' }],
  ['print_command', { type: DataTypes.TEXT, allowNull: true }],
  ['printed_id', { type: DataTypes.TEXT, allowNull: true }],
  ['serial_baud', { type: DataTypes.INTEGER, allowNull: false, defaultValue: 9600 }],
  ['serial_data_bits', { type: DataTypes.INTEGER, allowNull: false, defaultValue: 8 }],
  ['serial_parity', { type: DataTypes.TEXT, allowNull: false, defaultValue: 'none' }],
  ['serial_stop_bits', { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 }],
  ['serial_line_ending', { type: DataTypes.TEXT, allowNull: false, defaultValue: 'crlf' }],
] as const;

export async function up({ context: qi }: Ctx): Promise<void> {
  await qi.addColumn('weighings', 'captures', { type: DataTypes.TEXT, allowNull: false, defaultValue: '{}' });
  await qi.addColumn('gravimetric_readings', 'captures', { type: DataTypes.TEXT, allowNull: false, defaultValue: '{}' });
  for (const [name, spec] of BALANCE_COLUMNS) await qi.addColumn('balances', name, spec);
}

export async function down({ context: qi }: Ctx): Promise<void> {
  for (const [name] of BALANCE_COLUMNS) await qi.sequelize.query(`ALTER TABLE balances DROP COLUMN ${name};`);
  await qi.sequelize.query('ALTER TABLE gravimetric_readings DROP COLUMN captures;');
  await qi.sequelize.query('ALTER TABLE weighings DROP COLUMN captures;');
}
