/**
 * Electronic signatures, second-person verification and e-mail (REQUIREMENTS §1E ES-01…ES-08, §1F, §1G).
 *
 * - signatures: one row per signature, append-only (triggers refuse UPDATE and DELETE). A signature carries the
 *   record version it applies to and the SHA-256 of the canonical JSON of that version (record_hash), so it
 *   cannot be moved to another record or survive a change unnoticed. Whether it is still valid is computed
 *   (record_version and record_hash compared with the record now), never stored.
 * - record_versions: the canonical JSON of each signed version (append-only), so an old signature can be
 *   checked against exactly what was signed and the version stays readable.
 * - signature_acknowledgements: a user's first-signing acknowledgement of responsibility (ES-08).
 * - review_flags: records made from one that changed after signing (written by the lineage feature).
 * - mail_queue: outgoing mail, written in the same transaction as the signature; delivered after commit.
 * - fake_mailbox: what the local fake SMTP server received (development and demo; the Outbox page).
 */
import { DataTypes, type QueryInterface } from 'sequelize';

type Ctx = { context: QueryInterface };

export const SIGNATURES_APPEND_ONLY = 'signatures are append-only: a signature is never edited or removed';
export const RECORD_VERSIONS_APPEND_ONLY = 'record_versions are append-only';

const id = () => ({ type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true });
const text = (allowNull = true) => ({ type: DataTypes.TEXT, allowNull });
const ref = (table: string, allowNull = false) => ({
  type: DataTypes.INTEGER,
  allowNull,
  references: { model: table, key: 'id' },
  onUpdate: 'RESTRICT',
  onDelete: 'RESTRICT',
});

const APPEND_ONLY = [
  ['signatures', SIGNATURES_APPEND_ONLY],
  ['record_versions', RECORD_VERSIONS_APPEND_ONLY],
  ['signature_acknowledgements', 'signature_acknowledgements are append-only'],
] as const;

export async function up({ context: qi }: Ctx): Promise<void> {
  await qi.createTable('signatures', {
    id: id(),
    preparation_id: ref('preparations'),
    meaning: text(false), // prepared | verified | returned | discarded | amended
    meaning_text: text(false), // the text shown before signing, stored as signed
    signer_id: ref('users'),
    signer_name: text(false), // printed name at the time of signing
    signed_at: text(false), // UTC ISO with ms
    record_version: { type: DataTypes.INTEGER, allowNull: false },
    record_hash: text(false), // SHA-256 hex of the canonical JSON of that version
    reason: text(),
    checklist: text(), // JSON { key: true } for "verified"
    amends_version: { type: DataTypes.INTEGER, allowNull: true }, // for "amended": the version whose signatures it invalidated
  });
  await qi.addIndex('signatures', ['preparation_id'], { name: 'signatures_preparation' });

  await qi.createTable('record_versions', {
    id: id(),
    preparation_id: ref('preparations'),
    version: { type: DataTypes.INTEGER, allowNull: false },
    canonical_json: text(false),
    record_hash: text(false),
    created_at: text(false),
  });
  await qi.addIndex('record_versions', ['preparation_id', 'version', 'record_hash'], { name: 'record_versions_unique', unique: true });

  await qi.createTable('signature_acknowledgements', {
    user_id: { ...ref('users'), primaryKey: true },
    statement: text(false),
    acknowledged_at: text(false),
  });

  await qi.createTable('review_flags', {
    id: id(),
    preparation_id: ref('preparations'),
    source_preparation_id: ref('preparations', true),
    reason: text(false),
    flagged_at: text(false),
  });
  await qi.addIndex('review_flags', ['preparation_id'], { name: 'review_flags_preparation' });

  await qi.createTable('mail_queue', {
    id: id(),
    kind: text(false), // verification_requested | returned | verified
    preparation_id: ref('preparations', true),
    to_address: text(false),
    subject: text(false),
    text: text(false),
    html: text(false),
    status: text(false), // pending | sent | failed
    attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    last_error: text(),
    next_attempt_at: text(false),
    created_at: text(false),
    sent_at: text(),
  });
  await qi.addIndex('mail_queue', ['status', 'next_attempt_at'], { name: 'mail_queue_due' });

  await qi.createTable('fake_mailbox', {
    id: id(),
    from_address: text(false),
    to_address: text(false),
    subject: text(false),
    text: text(false),
    html: text(false),
    received_at: text(false),
  });

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
  for (const table of ['fake_mailbox', 'mail_queue', 'review_flags', 'signature_acknowledgements', 'record_versions', 'signatures']) {
    await qi.dropTable(table);
  }
}
