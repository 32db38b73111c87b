/**
 * Expiry extensions (REQUIREMENTS EX-05: an extension needs documented evidence and QA approval, and never
 * exceeds the EX-01 caps; ES-02 meaning "Expiry extension approved (QA)"; ES-03 linked to the record by hash).
 *
 * expiry_extensions: one row per extension, append-only (triggers refuse UPDATE and DELETE): the record, its
 * version and the SHA-256 of its canonical record at signing, the expiry before and after, the reason (the
 * evidence), the QA signer's id and printed name, when, and the signature meaning text.
 *
 * preparations gains the expiry "as signed" for the version extended: pre_extension_version,
 * pre_extension_expires_on and pre_extension_expiry_reason. An extension changes preparations.expires_on and
 * expiry_reason, which are part of the hashed canonical record (signatures.service.ts); while the record is
 * still at pre_extension_version, the canonical record carries the pre-extension expiry instead, so the
 * prepared/verified signatures of that version stay valid (the extension is signed on its own, by QA).
 * A later amendment (new version) hashes the extended expiry like any other field.
 */
import { DataTypes, type QueryInterface } from 'sequelize';

type Ctx = { context: QueryInterface };

export const EXPIRY_EXTENSIONS_APPEND_ONLY = 'expiry_extensions are append-only: record a new extension instead';

const text = (allowNull = true) => ({ type: DataTypes.TEXT, allowNull });
const ref = (table: string) => ({
  type: DataTypes.INTEGER,
  allowNull: false,
  references: { model: table, key: 'id' },
  onUpdate: 'RESTRICT',
  onDelete: 'RESTRICT',
});

const PREPARATION_COLUMNS = [
  ['pre_extension_version', 'INTEGER'],
  ['pre_extension_expires_on', 'TEXT'],
  ['pre_extension_expiry_reason', 'TEXT'],
] as const;

export async function up({ context: qi }: Ctx): Promise<void> {
  for (const [column, type] of PREPARATION_COLUMNS) await qi.sequelize.query(`ALTER TABLE preparations ADD COLUMN ${column} ${type}`);

  await qi.createTable('expiry_extensions', {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    preparation_id: ref('preparations'),
    record_version: { type: DataTypes.INTEGER, allowNull: false },
    record_hash: text(false), // SHA-256 hex of the canonical record at signing (unchanged by the extension)
    previous_expires_on: text(false), // YYYY-MM-DD (lab date)
    previous_expiry_reason: text(false),
    new_expires_on: text(false),
    reason: text(false), // the documented evaluation or evidence
    cap_expires_on: text(), // the latest date allowed at signing (EX-01), null when nothing caps it
    cap_limited_by: text(), // e.g. "parent HWL-2026-0001"
    signed_by: ref('users'),
    signed_by_name: text(false), // printed name at signing
    signed_at: text(false), // UTC ISO
    meaning_text: text(false),
  });
  await qi.addIndex('expiry_extensions', ['preparation_id'], { name: 'expiry_extensions_preparation' });
  await qi.sequelize.query(`CREATE TRIGGER expiry_extensions_no_update BEFORE UPDATE ON expiry_extensions BEGIN SELECT RAISE(ABORT, '${EXPIRY_EXTENSIONS_APPEND_ONLY}'); END;`);
  await qi.sequelize.query(`CREATE TRIGGER expiry_extensions_no_delete BEFORE DELETE ON expiry_extensions BEGIN SELECT RAISE(ABORT, '${EXPIRY_EXTENSIONS_APPEND_ONLY}'); END;`);
}

export async function down({ context: qi }: Ctx): Promise<void> {
  await qi.sequelize.query('DROP TRIGGER IF EXISTS expiry_extensions_no_update;');
  await qi.sequelize.query('DROP TRIGGER IF EXISTS expiry_extensions_no_delete;');
  await qi.dropTable('expiry_extensions');
  for (const [column] of [...PREPARATION_COLUMNS].reverse()) await qi.sequelize.query(`ALTER TABLE preparations DROP COLUMN ${column}`);
}
