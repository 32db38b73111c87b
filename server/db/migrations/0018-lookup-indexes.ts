/**
 * Indexes for the look-ups that scanned whole tables (issue 11): traces forward from a material lot, a
 * balance, a flask or a solvent lot (by the column and the time of use, so a date range reads only its rows),
 * the expiry digest (by expiry date), and the dilution aliquots delivered with a pipette.
 * Indexes only: no data changes, `down` drops them.
 */
import type { QueryInterface } from 'sequelize';

type Ctx = { context: QueryInterface };

const INDEXES: Array<{ table: string; fields: string[]; name: string }> = [
  { table: 'preparations', fields: ['material_id', 'created_at'], name: 'preparations_material_created' },
  { table: 'preparations', fields: ['balance_id'], name: 'preparations_balance' },
  { table: 'preparations', fields: ['flask_id'], name: 'preparations_flask' },
  { table: 'preparations', fields: ['expires_on'], name: 'preparations_expires_on' },
  { table: 'weighings', fields: ['balance_id', 'recorded_at'], name: 'weighings_balance_recorded' },
  { table: 'make_ups', fields: ['flask_id', 'recorded_at'], name: 'make_ups_flask_recorded' },
  { table: 'make_ups', fields: ['solvent_id', 'recorded_at'], name: 'make_ups_solvent_recorded' },
  { table: 'dilution_aliquots', fields: ['pipette_id'], name: 'dilution_aliquots_pipette' },
];

export async function up({ context: qi }: Ctx): Promise<void> {
  for (const i of INDEXES) await qi.addIndex(i.table, i.fields, { name: i.name });
}

export async function down({ context: qi }: Ctx): Promise<void> {
  for (const i of [...INDEXES].reverse()) await qi.removeIndex(i.table, i.name);
}
