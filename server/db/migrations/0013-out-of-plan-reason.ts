/**
 * A result the plan could not have produced (shared/prep/plan-plausibility.ts: more than twice the target or less
 * than half) is signed "prepared" only with a stated reason; the reason is kept with that signature
 * (signatures.out_of_plan_reason), append-only like the rest of the row, and shown first to the verifier.
 */
import { DataTypes, type QueryInterface } from 'sequelize';

type Ctx = { context: QueryInterface };

export async function up({ context: qi }: Ctx): Promise<void> {
  await qi.addColumn('signatures', 'out_of_plan_reason', { type: DataTypes.TEXT, allowNull: true });
}

export async function down({ context: qi }: Ctx): Promise<void> {
  await qi.sequelize.query('ALTER TABLE signatures DROP COLUMN out_of_plan_reason;');
}
