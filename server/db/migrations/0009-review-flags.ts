/**
 * Review flags raised by QA from a trace (REQUIREMENTS §0.1 principle 5, TR-04; issue "flag for review"):
 * review_flags (created in 0006 for records made from one that changed after signing) gains who raised the
 * flag, what it came from ("balance BAL-A2 failed a check"), the trace subject and date range, and when and
 * by whom it was cleared.
 *
 * A flag is never deleted, and its content never changes; the only update allowed is clearing it once
 * (cleared_at, cleared_by, cleared_by_name, cleared_reason from NULL). Triggers enforce both.
 * flagged_by / cleared_by hold user ids without a REFERENCES clause so that `down` can DROP COLUMN
 * (SQLite refuses to drop a column that is part of a foreign key); the printed names are kept beside them.
 */
import { DataTypes, type QueryInterface } from 'sequelize';

type Ctx = { context: QueryInterface };

export const REVIEW_FLAGS_NO_DELETE = 'review_flags are never deleted: clear the flag instead';
export const REVIEW_FLAGS_NO_EDIT = 'a review flag is only ever cleared, once; its content never changes';

const COLUMNS = [
  'source', // what the flag came from, e.g. "balance BAL-A2 failed a check"
  'trace_subject', // the identifier traced, e.g. "BAL-A2"
  'trace_from', // the trace's date range (lab dates), when given
  'trace_to',
  'flagged_by', // user id (NULL for flags raised by the system, e.g. an amendment upstream)
  'flagged_by_name',
  'cleared_at', // UTC ISO
  'cleared_by',
  'cleared_by_name',
  'cleared_reason',
] as const;

const INTEGER_COLUMNS = new Set<string>(['flagged_by', 'cleared_by']);

export async function up({ context: qi }: Ctx): Promise<void> {
  for (const column of COLUMNS) {
    await qi.addColumn('review_flags', column, { type: INTEGER_COLUMNS.has(column) ? DataTypes.INTEGER : DataTypes.TEXT, allowNull: true });
  }
  await qi.addIndex('review_flags', ['cleared_at'], { name: 'review_flags_cleared_at' });
  await qi.sequelize.query(
    `CREATE TRIGGER review_flags_no_delete BEFORE DELETE ON review_flags BEGIN SELECT RAISE(ABORT, '${REVIEW_FLAGS_NO_DELETE}'); END;`,
  );
  const unchanged = ['preparation_id', 'source_preparation_id', 'reason', 'flagged_at', ...COLUMNS.filter((c) => !c.startsWith('cleared_'))]
    .map((c) => `NEW.${c} IS NOT OLD.${c}`)
    .join(' OR ');
  await qi.sequelize.query(
    `CREATE TRIGGER review_flags_clear_only BEFORE UPDATE ON review_flags
     WHEN OLD.cleared_at IS NOT NULL OR NEW.cleared_at IS NULL OR NEW.id IS NOT OLD.id OR ${unchanged}
     BEGIN SELECT RAISE(ABORT, '${REVIEW_FLAGS_NO_EDIT}'); END;`,
  );
}

export async function down({ context: qi }: Ctx): Promise<void> {
  await qi.sequelize.query('DROP TRIGGER IF EXISTS review_flags_clear_only;');
  await qi.sequelize.query('DROP TRIGGER IF EXISTS review_flags_no_delete;');
  await qi.removeIndex('review_flags', 'review_flags_cleared_at');
  for (const column of [...COLUMNS].reverse()) await qi.sequelize.query(`ALTER TABLE review_flags DROP COLUMN ${column};`);
}
