/**
 * A dilution's result is stored when it is computed (at the aliquot or make-up write, or the gravimetric
 * readings write), with its calculation version and what it was computed from (basedOn), instead of being
 * recomputed on every read with the lab's current rounding rule (REQUIREMENTS TR-09: the server recomputes
 * from stored values and stores inputs, results and the formula version; ES-03: a signed record cannot change
 * underneath its signature when a setting changes).
 *
 * preparations.dilution_result: TEXT JSON, nullable. Written inside the same write transaction as the
 * observation it follows from; rows from before this migration stay NULL and are computed on read (legacy).
 */
import type { QueryInterface } from 'sequelize';

type Ctx = { context: QueryInterface };

export async function up({ context: qi }: Ctx): Promise<void> {
  await qi.sequelize.query('ALTER TABLE preparations ADD COLUMN dilution_result TEXT');
}

export async function down({ context: qi }: Ctx): Promise<void> {
  await qi.sequelize.query('ALTER TABLE preparations DROP COLUMN dilution_result');
}
