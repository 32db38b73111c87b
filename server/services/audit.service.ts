/**
 * The tamper-evident, append-only audit trail (REQUIREMENTS AT-01, AT-02, AT-05, AT-08; 21 CFR 11.10(e),
 * EU GMP Annex 11 §9, ISO/IEC 17025 7.5).
 *
 * Write an entry in the SAME transaction as the change it records:
 *   await writeTransaction(async (t) => { ...change...; await recordAudit({ actor, action, entity, entityId, changes }, t); });
 * Who and when always come from the server: `actor` is the signed-in user the route passes in, and the
 * time is this server's clock in UTC. Nothing a client sends can set them.
 *
 * Hash chain. Each row stores prev_hash (the previous row's hash; 64 zeros for the first row) and
 *   hash = SHA-256 hex( prev_hash + "\n" + canonicalJson({ id, occurredAt, actorId, actorName, action,
 *                                                           entity, entityId, changes, reason }) )
 * where canonical JSON has its keys sorted and no whitespace (server/db/transaction.ts).
 *
 * Choice of id: the id IS part of the hashed content. It is computed inside the IMMEDIATE transaction as
 * max(highest id in the table, sqlite_sequence for audit_entries) + 1 and inserted explicitly. Because the
 * write lock is held from BEGIN, no other writer can take the same id or the same previous hash, and because
 * sqlite_sequence remembers the highest id ever used, deleting the newest entry leaves a visible gap as
 * soon as the next entry is written (and verifyAuditChain reports it even before that).
 *
 * verifyAuditChain walks the table in id order and stops at the first break: a changed row fails its own
 * hash; a deleted row leaves a gap in ids; an inserted or re-linked row fails the previous-hash link.
 * Triggers (migration 0003-audit) refuse UPDATE and DELETE on the table.
 */
import { createHash } from 'node:crypto';
import { col, fn, Op, QueryTypes, where as sequelizeWhere, type Transaction, type WhereOptions } from 'sequelize';
import type {
  AuditChange,
  AuditEntryDto,
  AuditFilter,
  AuditListQuery,
  AuditPage,
  AuditVerifyResult,
} from '../../shared/schemas/audit.ts';
import { AuditEntry } from '../db/models/index.ts';
import { canonicalJson, writeTransaction } from '../db/transaction.ts';

export const GENESIS_HASH = '0'.repeat(64);

export interface AuditInput {
  actor: { id: number; fullName: string } | null; // null only for anonymous events such as a failed sign-in
  action: string; // e.g. create | update | retire | upload | plan | weighing_recorded | weighing_superseded | make_up_recorded | sign_in | sign_in_failed | sign_out | account_locked | account_unlocked | setting_change | print | sign
  entity: string; // e.g. user | setting | reference_material | balance | volumetric_ware | solvent | certificate | preparation | weighing | make_up | session
  entityId: string | number | null;
  changes?: Array<{ field: string; oldValue: unknown; newValue: unknown }>;
  reason?: string | null;
}

/** The hashed content of one entry, exactly as verifyAuditChain rebuilds it. */
interface HashedContent {
  id: number;
  occurredAt: string;
  actorId: number | null;
  actorName: string | null;
  action: string;
  entity: string;
  entityId: string | null;
  changes: unknown;
  reason: string | null;
}

export function entryHash(prevHash: string, content: HashedContent): string {
  return createHash('sha256')
    .update(`${prevHash}\n${canonicalJson(content)}`, 'utf8')
    .digest('hex');
}

function requireName(value: unknown, what: string): string {
  if (typeof value !== 'string' || value.trim() === '') throw new Error(`recordAudit: ${what} must be a non-empty string`);
  return value.trim();
}

export async function recordAudit(input: AuditInput, transaction: Transaction): Promise<void> {
  if (!transaction) throw new Error('recordAudit needs the transaction of the change it records');
  const action = requireName(input.action, 'action');
  const entity = requireName(input.entity, 'entity');
  const sequelize = AuditEntry.sequelize!;

  const [last] = await sequelize.query<{ id: number; hash: string }>(
    'SELECT id, hash FROM audit_entries ORDER BY id DESC LIMIT 1',
    { type: QueryTypes.SELECT, transaction },
  );
  const [seq] = await sequelize.query<{ seq: number }>(
    "SELECT seq FROM sqlite_sequence WHERE name = 'audit_entries'",
    { type: QueryTypes.SELECT, transaction },
  );
  const id = Math.max(Number(last?.id ?? 0), Number(seq?.seq ?? 0)) + 1;
  const prevHash = last?.hash ?? GENESIS_HASH;

  const changes = (input.changes ?? []).map((c) => ({
    field: requireName(c.field, 'change field'),
    oldValue: c.oldValue,
    newValue: c.newValue,
  }));
  const changesJson = canonicalJson(changes);
  const reason = typeof input.reason === 'string' && input.reason.trim() !== '' ? input.reason.trim() : null;
  const content: HashedContent = {
    id,
    occurredAt: new Date().toISOString(),
    actorId: input.actor ? input.actor.id : null,
    actorName: input.actor ? input.actor.fullName : null,
    action,
    entity,
    entityId: input.entityId === null || input.entityId === undefined ? null : String(input.entityId),
    changes: JSON.parse(changesJson) as unknown,
    reason,
  };
  await AuditEntry.create(
    { ...content, changes: changesJson, prevHash, hash: entryHash(prevHash, content) },
    { transaction },
  );
}

interface RawRow {
  id: number;
  occurred_at: string;
  actor_id: number | null;
  actor_name: string | null;
  action: string;
  entity: string;
  entity_id: string | null;
  changes: string;
  reason: string | null;
  prev_hash: string;
  hash: string;
}

const VERIFY_BATCH = 500;

/** Walks the whole trail in id order; stops at the first break. `checked` counts the entries read. */
export async function verifyAuditChain(): Promise<AuditVerifyResult> {
  const sequelize = AuditEntry.sequelize!;
  let checked = 0;
  let prev: { id: number; hash: string } | null = null;
  for (;;) {
    const rows: RawRow[] = await sequelize.query<RawRow>(
      `SELECT id, occurred_at, actor_id, actor_name, action, entity, entity_id, changes, reason, prev_hash, hash
       FROM audit_entries WHERE id > :after ORDER BY id ASC LIMIT ${VERIFY_BATCH}`,
      { type: QueryTypes.SELECT, replacements: { after: prev?.id ?? 0 } },
    );
    for (const row of rows) {
      checked += 1;
      const id: number = Number(row.id);
      const expectedId: number = (prev?.id ?? 0) + 1;
      if (id !== expectedId) return { ok: false, checked, firstBroken: { id, reason: 'gap in ids' } };
      if (row.prev_hash !== (prev?.hash ?? GENESIS_HASH)) {
        return { ok: false, checked, firstBroken: { id, reason: 'previous hash mismatch' } };
      }
      let changes: unknown;
      try {
        changes = JSON.parse(row.changes);
      } catch {
        return { ok: false, checked, firstBroken: { id, reason: 'hash mismatch' } };
      }
      const recomputed = entryHash(row.prev_hash, {
        id,
        occurredAt: row.occurred_at,
        actorId: row.actor_id === null ? null : Number(row.actor_id),
        actorName: row.actor_name,
        action: row.action,
        entity: row.entity,
        entityId: row.entity_id,
        changes,
        reason: row.reason,
      });
      if (recomputed !== row.hash) return { ok: false, checked, firstBroken: { id, reason: 'hash mismatch' } };
      prev = { id, hash: row.hash };
    }
    if (rows.length < VERIFY_BATCH) break;
  }
  // The newest entries were deleted: sqlite_sequence still remembers the highest id ever written.
  const [seq] = await sequelize.query<{ seq: number }>(
    "SELECT seq FROM sqlite_sequence WHERE name = 'audit_entries'",
    { type: QueryTypes.SELECT },
  );
  const highest = Number(seq?.seq ?? 0);
  if (highest > (prev?.id ?? 0)) {
    return { ok: false, checked, firstBroken: { id: (prev?.id ?? 0) + 1, reason: 'gap in ids' } };
  }
  return { ok: true, checked };
}

/** Verifies the chain, then records that the check was run (and its result) as an audit entry. */
export async function verifyAndRecord(actor: { id: number; fullName: string }): Promise<AuditVerifyResult> {
  const result = await verifyAuditChain();
  await writeTransaction((t) =>
    recordAudit(
      {
        actor,
        action: 'verify_chain',
        entity: 'audit_trail',
        entityId: null,
        changes: [
          { field: 'result', oldValue: null, newValue: result.ok ? 'intact' : 'broken' },
          { field: 'checked', oldValue: null, newValue: result.checked },
          ...(result.firstBroken
            ? [{ field: 'firstBroken', oldValue: null, newValue: `#${result.firstBroken.id}: ${result.firstBroken.reason}` }]
            : []),
        ],
      },
      t,
    ),
  );
  return result;
}

// ---------------------------------------------------------------------------------------------- reading

function toDto(row: AuditEntry): AuditEntryDto {
  let changes: AuditChange[] = [];
  try {
    const parsed = JSON.parse(row.changes) as unknown;
    if (Array.isArray(parsed)) changes = parsed as AuditChange[];
  } catch {
    changes = [];
  }
  return {
    id: row.id,
    occurredAt: row.occurredAt,
    actorId: row.actorId,
    actorName: row.actorName,
    action: row.action,
    entity: row.entity,
    entityId: row.entityId,
    changes,
    reason: row.reason,
    prevHash: row.prevHash,
    hash: row.hash,
  };
}

/** `to` is a whole UTC day: entries up to the end of that day are included. */
function where(query: Omit<AuditListQuery, 'page' | 'pageSize'>): WhereOptions<AuditEntry> {
  const and: WhereOptions<AuditEntry>[] = [];
  if (query.entity) and.push({ entity: query.entity });
  if (query.entityId) and.push({ entityId: query.entityId });
  if (query.actorId !== undefined) and.push({ actorId: query.actorId });
  if (query.action) and.push({ action: query.action });
  if (query.from) and.push({ occurredAt: { [Op.gte]: `${query.from}T00:00:00.000Z` } });
  if (query.to) and.push({ occurredAt: { [Op.lte]: `${query.to}T23:59:59.999Z` } });
  if (query.search) {
    // Case-insensitive substring (instr, not LIKE, so % and _ are plain characters).
    const needle = query.search.toLowerCase();
    const contains = (column: string) =>
      sequelizeWhere(fn('instr', fn('lower', col(column)), needle), Op.gt, 0);
    and.push({
      [Op.or]: ['actor_name', 'action', 'entity', 'entity_id', 'changes', 'reason'].map(contains),
    } as WhereOptions<AuditEntry>);
  }
  return and.length ? { [Op.and]: and } : {};
}

export async function listAudit(query: AuditListQuery): Promise<AuditPage> {
  const { page, pageSize } = query;
  const { rows, count } = await AuditEntry.findAndCountAll({
    where: where(query),
    order: [['id', 'DESC']],
    limit: pageSize,
    offset: (page - 1) * pageSize,
  });
  return { items: rows.map(toDto), total: count, page, pageSize };
}

/** Every matching entry, newest first, in pages of 1000 (for the CSV export). */
export async function* allAudit(query: Omit<AuditListQuery, 'page' | 'pageSize'>): AsyncGenerator<AuditEntryDto> {
  let beforeId: number | null = null;
  for (;;) {
    const base = where(query);
    const rows: AuditEntry[] = await AuditEntry.findAll({
      where: beforeId === null ? base : { [Op.and]: [base, { id: { [Op.lt]: beforeId } }] },
      order: [['id', 'DESC']],
      limit: 1000,
    });
    for (const row of rows) yield toDto(row);
    if (rows.length < 1000) return;
    beforeId = rows[rows.length - 1]!.id;
  }
}

/** The trail of one record, oldest first. */
export async function recordTrail(entity: string, entityId: string): Promise<AuditEntryDto[]> {
  const rows = await AuditEntry.findAll({ where: { entity, entityId }, order: [['id', 'ASC']] });
  return rows.map(toDto);
}

/**
 * The observations of a preparation are audited under their own entity (a weighing, a make-up, an
 * aliquot, gravimetric readings); each table is keyed by preparation_id.
 */
const PREPARATION_PARTS: ReadonlyArray<readonly [entity: string, table: string]> = [
  ['weighing', 'weighings'],
  ['make_up', 'make_ups'],
  ['aliquot', 'dilution_aliquots'],
  ['gravimetric_readings', 'gravimetric_readings'],
];

/**
 * The whole trail of one preparation, oldest first: the entries of the record itself and of every
 * weighing, make-up, aliquot and gravimetric reading recorded for it (what the verifier reviews).
 * `key` is the preparation's id; an unknown id gives the entries stored under it, if any.
 */
export async function preparationTrail(key: string): Promise<AuditEntryDto[]> {
  const or: WhereOptions[] = [{ entity: 'preparation', entityId: key }];
  if (/^\d+$/.test(key)) {
    const sequelize = AuditEntry.sequelize!;
    for (const [entity, table] of PREPARATION_PARTS) {
      const ids = await sequelize.query<{ id: number }>(`SELECT id FROM ${table} WHERE preparation_id = :id`, { replacements: { id: Number(key) }, type: QueryTypes.SELECT });
      if (ids.length) or.push({ entity, entityId: { [Op.in]: ids.map((r) => String(r.id)) } });
    }
  }
  const rows = await AuditEntry.findAll({ where: { [Op.or]: or }, order: [['id', 'ASC']] });
  return rows.map(toDto);
}

// ---------------------------------------------------------------------------------------------- CSV

export const AUDIT_CSV_COLUMNS = [
  'id',
  'occurred_at_utc',
  'actor_id',
  'actor_name',
  'action',
  'entity',
  'entity_id',
  'changes',
  'reason',
  'prev_hash',
  'hash',
] as const;

/**
 * One CSV field (RFC 4180 §2): quoted when it holds a comma, a double quote, CR or LF, or leading or
 * trailing spaces; quotes doubled. Values are written exactly as stored (no formula escaping, which
 * would alter the record); open the file as text in a spreadsheet.
 */
export function csvField(value: unknown): string {
  const s = value === null || value === undefined ? '' : typeof value === 'string' ? value : canonicalJson(value);
  return /[",\r\n]|^\s|\s$/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

export function csvLine(values: unknown[]): string {
  return `${values.map(csvField).join(',')}\r\n`;
}

/** One CSV line per entry; `changes` is the canonical JSON that was hashed, so the chain can be re-checked. */
export function auditCsvLine(e: AuditEntryDto): string {
  return csvLine([
    e.id,
    e.occurredAt,
    e.actorId,
    e.actorName,
    e.action,
    e.entity,
    e.entityId,
    canonicalJson(e.changes),
    e.reason,
    e.prevHash,
    e.hash,
  ]);
}

/** Records that the trail was exported and with which filters (REQUIREMENTS AT-01: exports are audited). */
export async function recordExport(actor: { id: number; fullName: string }, filter: AuditFilter): Promise<void> {
  const used = Object.entries(filter).filter(([, v]) => v !== undefined);
  await writeTransaction((t) =>
    recordAudit(
      {
        actor,
        action: 'export',
        entity: 'audit_trail',
        entityId: null,
        changes: used.map(([field, value]) => ({ field: `filter.${field}`, oldValue: null, newValue: value })),
      },
      t,
    ),
  );
}

/** The people who appear in the trail (for the "user" filter; QA cannot list accounts). */
export async function listActors(): Promise<Array<{ id: number; name: string }>> {
  const rows = await AuditEntry.sequelize!.query<{ actor_id: number; actor_name: string }>(
    // SQLite: with MAX() in the result, the bare actor_name comes from the row holding that maximum.
    `SELECT actor_id, actor_name, MAX(id) AS last_id FROM audit_entries WHERE actor_id IS NOT NULL
     GROUP BY actor_id ORDER BY actor_name, actor_id`,
    { type: QueryTypes.SELECT },
  );
  return rows.map((r) => ({ id: Number(r.actor_id), name: r.actor_name }));
}
