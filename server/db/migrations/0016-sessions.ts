/**
 * Sessions the server can end (21 CFR 11.10(d), 11.300; EU GMP Annex 11 §12).
 *
 * sessions: one row per sign-in. The session cookie (iron-session, sealed with SESSION_SECRET) carries only
 * `id`; every authenticated request looks the row up by its primary key and refuses it once `ended_at` is set,
 * after the lab's idle timeout (last_seen_at) or after the absolute limit (created_at). Rows are kept after
 * they end (ended_reason says why: sign_out, sign_out_everywhere, password_changed, password_reset, locked,
 * deactivated, idle, expired, ended_by_admin).
 *
 * users.must_change_password: set when an administrator chooses the password (new account or reset); until
 * the person chooses their own, every API except "me", sign-out and the password change answers 403
 * password_change_required, so no one signs with a password someone else knows.
 *
 * audit_entries.session_id: the session an entry was written in (NULL for entries from before this migration,
 * anonymous events and scheduled jobs). Not part of the hashed content.
 */
import type { QueryInterface } from 'sequelize';

type Ctx = { context: QueryInterface };

export async function up({ context: qi }: Ctx): Promise<void> {
  await qi.sequelize.query(`CREATE TABLE sessions (
    id TEXT PRIMARY KEY NOT NULL,
    user_id INTEGER NOT NULL REFERENCES users (id),
    created_at TEXT NOT NULL,
    last_seen_at TEXT NOT NULL,
    ended_at TEXT,
    ended_reason TEXT,
    ip TEXT,
    user_agent TEXT
  )`);
  await qi.sequelize.query('CREATE INDEX sessions_user ON sessions (user_id, ended_at)');
  await qi.sequelize.query('CREATE INDEX sessions_open ON sessions (ended_at, last_seen_at)');
  await qi.sequelize.query('ALTER TABLE users ADD COLUMN must_change_password INTEGER NOT NULL DEFAULT 0');
  await qi.sequelize.query('ALTER TABLE audit_entries ADD COLUMN session_id TEXT');
}

export async function down({ context: qi }: Ctx): Promise<void> {
  await qi.sequelize.query('ALTER TABLE audit_entries DROP COLUMN session_id');
  await qi.sequelize.query('ALTER TABLE users DROP COLUMN must_change_password');
  await qi.sequelize.query('DROP TABLE sessions');
}
