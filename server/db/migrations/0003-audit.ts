/**
 * Audit trail (REQUIREMENTS AT-01..AT-05): one append-only table, hash-chained by the service
 * (server/services/audit.service.ts). Triggers refuse every UPDATE and DELETE, so not even the
 * application's own connection can rewrite or remove an entry.
 */
import { DataTypes, type QueryInterface } from 'sequelize';

type Ctx = { context: QueryInterface };

export const APPEND_ONLY_MESSAGE = 'audit_entries is append-only';

export async function up({ context: qi }: Ctx): Promise<void> {
  await qi.createTable('audit_entries', {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    occurred_at: { type: DataTypes.TEXT, allowNull: false }, // UTC ISO-8601 with ms, server clock
    actor_id: { type: DataTypes.INTEGER, allowNull: true }, // null only for anonymous events (failed sign-in)
    actor_name: { type: DataTypes.TEXT, allowNull: true }, // printed name at the time of the event
    action: { type: DataTypes.TEXT, allowNull: false },
    entity: { type: DataTypes.TEXT, allowNull: false },
    entity_id: { type: DataTypes.TEXT, allowNull: true },
    changes: { type: DataTypes.TEXT, allowNull: false, defaultValue: '[]' }, // canonical JSON [{ field, oldValue, newValue }]
    reason: { type: DataTypes.TEXT, allowNull: true },
    prev_hash: { type: DataTypes.TEXT, allowNull: false },
    hash: { type: DataTypes.TEXT, allowNull: false },
  });
  await qi.addIndex('audit_entries', ['entity', 'entity_id'], { name: 'audit_entries_record' });
  await qi.addIndex('audit_entries', ['occurred_at'], { name: 'audit_entries_occurred_at' });
  await qi.addIndex('audit_entries', ['actor_id'], { name: 'audit_entries_actor' });
  await qi.sequelize.query(
    `CREATE TRIGGER audit_entries_no_update BEFORE UPDATE ON audit_entries
     BEGIN SELECT RAISE(ABORT, '${APPEND_ONLY_MESSAGE}'); END;`,
  );
  await qi.sequelize.query(
    `CREATE TRIGGER audit_entries_no_delete BEFORE DELETE ON audit_entries
     BEGIN SELECT RAISE(ABORT, '${APPEND_ONLY_MESSAGE}'); END;`,
  );
}

export async function down({ context: qi }: Ctx): Promise<void> {
  await qi.sequelize.query('DROP TRIGGER IF EXISTS audit_entries_no_delete;');
  await qi.sequelize.query('DROP TRIGGER IF EXISTS audit_entries_no_update;');
  await qi.dropTable('audit_entries');
}
