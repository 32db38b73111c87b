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
 *
 * KEYED CHAIN (chain version 2). A plain SHA-256 chain can be recomputed by whoever holds the file, so every
 * entry is now hashed with a key that is not in the database:
 *   hash = HMAC-SHA-256 hex( key, prev_hash + "\n" + canonicalJson(content) )   (RFC 2104, FIPS 198-1)
 * The key is AUDIT_CHAIN_KEY in production (required, ≥ 32 characters) and, outside production, a random key
 * generated once into <data folder>/audit-chain-key like the session secret (server/config.ts). Entries written
 * before the key existed keep their SHA-256 hashes: the first entry written with the key on such a database is
 * an "audit_chain_keyed" entry (entity audit_trail), itself keyed, whose prev_hash seals the whole unkeyed
 * prefix. The check accepts unkeyed entries only before that switch entry; a database whose first entry is
 * keyed (every new one) never holds an unkeyed entry. A chain with unkeyed entries and no switch is "not keyed".
 *
 * ANCHORS. The chain head ({ at, id, hash }) is appended at least daily (the daily job and each start) to a
 * separate append-only log file (AUDIT_ANCHOR_FILE, default <data folder>/audit-anchors.log) and sent in the
 * daily QA e-mail. verifyAuditChain compares with the latest anchor: the entry it names must still exist with
 * that hash, so deleting the newest entries (even with sqlite_sequence rolled back) is found back to the anchor.
 *
 * What someone holding the database file but not the key can and cannot do: they can read every entry, and
 * they can delete or alter rows (dropping the triggers), but they cannot write an entry, a changed entry or a
 * re-linked tail that checks, because each hash needs the key; they cannot hide a deletion of entries up to the
 * latest anchor, which lives outside the file; they can delete entries written after the latest anchor (at most
 * about a day) with the sequence rolled back, and that is not detectable from the file alone — the next anchor
 * and the QA e-mail show the head as it was; and they can replace the whole file with an older copy, which the
 * anchors written since then also expose.
 */
import { createHash, createHmac, randomBytes } from 'node:crypto';
import { appendFileSync, existsSync, mkdirSync, readFileSync } from 'node:fs';
import { dirname } from 'node:path';
import { col, fn, Op, QueryTypes, where as sequelizeWhere, type Sequelize, type Transaction, type WhereOptions } from 'sequelize';
import type {
  AuditChange,
  AuditEntryDto,
  AuditFilter,
  AuditListQuery,
  AuditPage,
  AuditVerifyResult,
} from '../../shared/schemas/audit.ts';
import { AuditEntry } from '../db/models/index.ts';
import { labDayStart } from '../../shared/prep/lab-time.ts';
import { addDays } from '../../shared/prep/dates.ts';
import { canonicalJson, writeTransaction } from '../db/transaction.ts';
import { currentSessionId } from './request-context.ts';
import { defaultAnchorFile, devChainKey } from '../config.ts';

export const GENESIS_HASH = '0'.repeat(64);

export interface AuditInput {
  actor: { id: number; fullName: string } | null; // null only for anonymous events such as a failed sign-in
  action: string; // e.g. create | update | retire | upload | plan | weighing_recorded | weighing_superseded | make_up_recorded | sign_in | sign_in_failed | sign_out | account_locked | account_unlocked | setting_change | print | sign
  entity: string; // e.g. user | setting | reference_material | balance | volumetric_ware | solvent | certificate | preparation | weighing | make_up | session
  entityId: string | number | null;
  changes?: Array<{ field: string; oldValue: unknown; newValue: unknown }>;
  reason?: string | null;
  /** The session the change was made in; default: the current request's authenticated session. Stored, not hashed. */
  sessionId?: string | null;
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

/** The unkeyed hash of chain version 1 (entries written before the chain key existed). */
export function entryHash(prevHash: string, content: HashedContent): string {
  return createHash('sha256')
    .update(`${prevHash}\n${canonicalJson(content)}`, 'utf8')
    .digest('hex');
}

/** The keyed hash of chain version 2: HMAC-SHA-256 with the chain key. */
export function keyedEntryHash(key: string | Buffer, prevHash: string, content: HashedContent): string {
  return createHmac('sha256', key)
    .update(`${prevHash}\n${canonicalJson(content)}`, 'utf8')
    .digest('hex');
}

export const CHAIN_KEYED_ACTION = 'audit_chain_keyed';
interface ChainSetup {
  key: string;
  anchorFile: string | null;
  /** true once the chain is known to be keyed (fresh, or the switch entry exists) */
  keyed?: boolean;
}

const setups = new WeakMap<Sequelize, ChainSetup>();

/** Called at start-up (createApp, server/index.ts) with the configured key and anchor file. */
export function configureAuditChain(sequelize: Sequelize, opts: { key: string; anchorFile: string | null }): void {
  const existing = setups.get(sequelize);
  if (existing && existing.key === opts.key) {
    existing.anchorFile = opts.anchorFile;
    return;
  }
  setups.set(sequelize, { key: opts.key, anchorFile: opts.anchorFile });
}

/**
 * The chain setup of this database. Without configureAuditChain (a seed or a test before createApp), outside
 * production the key comes from the data folder of the SQLite file, as loadConfig would read it.
 */
function chainSetup(sequelize: Sequelize): ChainSetup {
  const known = setups.get(sequelize);
  if (known) return known;
  if (process.env.NODE_ENV === 'production') throw new Error('The audit chain key is not configured (AUDIT_CHAIN_KEY)');
  const storage = String((sequelize as unknown as { options: { storage?: string } }).options.storage ?? ':memory:');
  const setup: ChainSetup = storage === ':memory:' || storage === ''
    ? { key: randomBytes(48).toString('hex'), anchorFile: null }
    : { key: devChainKey(dirname(storage)), anchorFile: defaultAnchorFile(dirname(storage)) };
  setups.set(sequelize, setup);
  return setup;
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
  const head = await switchToKeyed(sequelize, last ?? null, Number(seq?.seq ?? 0), transaction);
  await insertEntry(chainSetup(sequelize).key, head.last, head.seq, { ...input, action, entity }, transaction);
}

/**
 * On a database that holds unkeyed entries and no switch yet, writes the switch entry (keyed) and returns the new
 * head; otherwise returns the head as given. The "keyed" answer is cached once the transaction commits.
 */
async function switchToKeyed(sequelize: Sequelize, last: { id: number; hash: string } | null, seq: number, transaction: Transaction): Promise<{ last: { id: number; hash: string } | null; seq: number }> {
  const setup = chainSetup(sequelize);
  if (setup.keyed) return { last, seq };
  transaction.afterCommit(() => {
    setup.keyed = true;
  });
  if (!last || (await chainIsKeyed(sequelize, setup.key, transaction))) return { last, seq };
  await insertEntry(setup.key, last, seq, {
    actor: null,
    action: CHAIN_KEYED_ACTION,
    entity: 'audit_trail',
    entityId: null,
    changes: [{ field: 'chainVersion', oldValue: 1, newValue: 2 }],
    reason: 'Entries from here on are hashed with HMAC-SHA-256 and the chain key; the earlier entries keep their SHA-256 hashes and are sealed by this entry',
  }, transaction);
  const [head] = await sequelize.query<{ id: number; hash: string }>('SELECT id, hash FROM audit_entries ORDER BY id DESC LIMIT 1', { type: QueryTypes.SELECT, transaction });
  return { last: head ?? null, seq: Number(head?.id ?? seq) };
}

/** At start-up: a database with unkeyed entries gets its switch entry now (nothing else is written). */
export async function ensureKeyedChain(): Promise<void> {
  const sequelize = AuditEntry.sequelize!;
  if (chainSetup(sequelize).keyed) return;
  await writeTransaction(async (transaction) => {
    const [last] = await sequelize.query<{ id: number; hash: string }>('SELECT id, hash FROM audit_entries ORDER BY id DESC LIMIT 1', { type: QueryTypes.SELECT, transaction });
    const [seq] = await sequelize.query<{ seq: number }>("SELECT seq FROM sqlite_sequence WHERE name = 'audit_entries'", { type: QueryTypes.SELECT, transaction });
    await switchToKeyed(sequelize, last ?? null, Number(seq?.seq ?? 0), transaction);
  });
}

/** Whether the chain is keyed already: its first entry is keyed, or the switch entry exists. */
async function chainIsKeyed(sequelize: Sequelize, key: string, transaction?: Transaction): Promise<boolean> {
  const [sw] = await sequelize.query<{ id: number }>(`SELECT id FROM audit_entries WHERE action = '${CHAIN_KEYED_ACTION}' AND entity = 'audit_trail' LIMIT 1`, { type: QueryTypes.SELECT, transaction });
  if (sw) return true;
  const [first] = await sequelize.query<RawRow>('SELECT * FROM audit_entries ORDER BY id ASC LIMIT 1', { type: QueryTypes.SELECT, transaction });
  return !first || keyedEntryHash(key, first.prev_hash, contentOf(first)) === first.hash;
}

async function insertEntry(key: string, last: { id: number; hash: string } | null, seq: number, input: AuditInput, transaction: Transaction): Promise<void> {
  const action = input.action;
  const entity = input.entity;
  const id = Math.max(Number(last?.id ?? 0), Number(seq ?? 0)) + 1;
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
    {
      ...content,
      changes: changesJson,
      prevHash,
      hash: keyedEntryHash(key, prevHash, content),
      sessionId: input.sessionId !== undefined ? input.sessionId : currentSessionId(),
    },
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

function contentOf(row: RawRow): HashedContent {
  return {
    id: Number(row.id),
    occurredAt: row.occurred_at,
    actorId: row.actor_id === null ? null : Number(row.actor_id),
    actorName: row.actor_name,
    action: row.action,
    entity: row.entity,
    entityId: row.entity_id,
    changes: JSON.parse(row.changes) as unknown,
    reason: row.reason,
  };
}

// ---------------------------------------------------------------------------------------------- anchors

export interface ChainAnchor {
  at: string;
  id: number;
  hash: string;
}

/** The anchors written so far, oldest first (an unreadable line is skipped). */
export function readAnchors(sequelize: Sequelize = AuditEntry.sequelize!): ChainAnchor[] {
  const file = chainSetup(sequelize).anchorFile;
  if (!file || !existsSync(file)) return [];
  const out: ChainAnchor[] = [];
  for (const line of readFileSync(file, 'utf8').split('\n')) {
    if (!line.trim()) continue;
    try {
      const a = JSON.parse(line) as ChainAnchor;
      if (Number.isInteger(a.id) && a.id > 0 && /^[0-9a-f]{64}$/.test(a.hash)) out.push({ at: String(a.at), id: a.id, hash: a.hash });
    } catch {
      /* a damaged line is not an anchor */
    }
  }
  return out;
}

/** The chain head now ({ id, hash }), or null while the trail is empty. */
export async function chainHead(): Promise<{ id: number; hash: string } | null> {
  const [last] = await AuditEntry.sequelize!.query<{ id: number; hash: string }>('SELECT id, hash FROM audit_entries ORDER BY id DESC LIMIT 1', { type: QueryTypes.SELECT });
  return last ? { id: Number(last.id), hash: last.hash } : null;
}

/**
 * Appends the chain head to the anchor log (opened for appending only; one JSON line per anchor) and returns it.
 * Null when the trail is empty or no anchor file is configured.
 */
export async function writeAnchor(now = new Date()): Promise<ChainAnchor | null> {
  const sequelize = AuditEntry.sequelize!;
  const file = chainSetup(sequelize).anchorFile;
  const head = await chainHead();
  if (!file || !head) return null;
  const anchor: ChainAnchor = { at: now.toISOString(), id: head.id, hash: head.hash };
  mkdirSync(dirname(file), { recursive: true });
  appendFileSync(file, JSON.stringify(anchor) + '\n', { flag: 'a', mode: 0o600 });
  return anchor;
}

/**
 * Walks the whole trail in id order; stops at the first break. `checked` counts the entries read. Unkeyed
 * (SHA-256) entries are accepted only before the switch entry; the latest anchor must still match.
 */
export async function verifyAuditChain(): Promise<AuditVerifyResult> {
  const sequelize = AuditEntry.sequelize!;
  const { key } = chainSetup(sequelize);
  const anchors = readAnchors(sequelize);
  const anchor = anchors.at(-1);
  let checked = 0;
  let prev: { id: number; hash: string } | null = null;
  let mode: 'start' | 'unkeyed' | 'keyed' = 'start';
  let anchorSeen = false;
  const withAnchor = (r: AuditVerifyResult): AuditVerifyResult => (anchor ? { ...r, anchor: { id: anchor.id, at: anchor.at, hash: anchor.hash } } : r);
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
      if (id !== expectedId) return withAnchor({ ok: false, checked, firstBroken: { id, reason: 'gap in ids' } });
      if (row.prev_hash !== (prev?.hash ?? GENESIS_HASH)) {
        return withAnchor({ ok: false, checked, firstBroken: { id, reason: 'previous hash mismatch' } });
      }
      let content: HashedContent;
      try {
        content = contentOf(row);
      } catch {
        return withAnchor({ ok: false, checked, firstBroken: { id, reason: 'hash mismatch' } });
      }
      const keyedOk = keyedEntryHash(key, row.prev_hash, content) === row.hash;
      const isSwitch = row.action === CHAIN_KEYED_ACTION && row.entity === 'audit_trail';
      if (mode === 'keyed' || (mode === 'unkeyed' && isSwitch)) {
        if (!keyedOk) return withAnchor({ ok: false, checked, firstBroken: { id, reason: 'hash mismatch' } });
        mode = 'keyed';
      } else if (mode === 'start' && keyedOk) {
        mode = 'keyed';
      } else if (entryHash(row.prev_hash, content) === row.hash && !isSwitch) {
        mode = 'unkeyed'; // written before the chain key existed
      } else {
        return withAnchor({ ok: false, checked, firstBroken: { id, reason: 'hash mismatch' } });
      }
      if (anchor && id === anchor.id) {
        if (row.hash !== anchor.hash) return withAnchor({ ok: false, checked, firstBroken: { id, reason: 'anchor mismatch' } });
        anchorSeen = true;
      }
      prev = { id, hash: row.hash };
    }
    if (rows.length < VERIFY_BATCH) break;
  }
  if (mode === 'unkeyed') return withAnchor({ ok: false, checked, firstBroken: { id: prev!.id, reason: 'not keyed' } });
  // The newest entries were deleted back past the latest anchor (the anchor lives outside the database file).
  if (anchor && !anchorSeen) return withAnchor({ ok: false, checked, firstBroken: { id: (prev?.id ?? 0) + 1, reason: 'anchor mismatch' } });
  // The newest entries were deleted: sqlite_sequence still remembers the highest id ever written.
  const [seq] = await sequelize.query<{ seq: number }>(
    "SELECT seq FROM sqlite_sequence WHERE name = 'audit_entries'",
    { type: QueryTypes.SELECT },
  );
  const highest = Number(seq?.seq ?? 0);
  if (highest > (prev?.id ?? 0)) {
    return withAnchor({ ok: false, checked, firstBroken: { id: (prev?.id ?? 0) + 1, reason: 'gap in ids' } });
  }
  return withAnchor({ ok: true, checked });
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
    sessionId: row.sessionId ?? null,
  };
}

/**
 * `from` and `to` are lab days (calendar days in the lab's time zone, shared/prep/lab-time.ts), both included: from
 * 00:00 on `from` to before 00:00 on the day after `to`, on the lab's clock.
 */
function where(query: Omit<AuditListQuery, 'page' | 'pageSize'>, timeZone: string): WhereOptions<AuditEntry> {
  const and: WhereOptions<AuditEntry>[] = [];
  if (query.entity) and.push({ entity: query.entity });
  if (query.entityId) and.push({ entityId: query.entityId });
  if (query.actorId !== undefined) and.push({ actorId: query.actorId });
  if (query.action) and.push({ action: query.action });
  if (query.from) and.push({ occurredAt: { [Op.gte]: labDayStart(query.from, timeZone) } });
  if (query.to) and.push({ occurredAt: { [Op.lt]: labDayStart(addDays(query.to, 1), timeZone) } });
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

export async function listAudit(query: AuditListQuery, timeZone = 'UTC'): Promise<AuditPage> {
  const { page, pageSize } = query;
  const { rows, count } = await AuditEntry.findAndCountAll({
    where: where(query, timeZone),
    order: [['id', 'DESC']],
    limit: pageSize,
    offset: (page - 1) * pageSize,
  });
  return { items: rows.map(toDto), total: count, page, pageSize };
}

/** Every matching entry, newest first, in pages of 1000 (for the CSV export). */
export async function* allAudit(query: Omit<AuditListQuery, 'page' | 'pageSize'>, timeZone = 'UTC'): AsyncGenerator<AuditEntryDto> {
  let beforeId: number | null = null;
  for (;;) {
    const base = where(query, timeZone);
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
  'session_id',
] as const;

/**
 * One CSV field (RFC 4180 §2): quoted when it holds a comma, a double quote, CR or LF, or leading or
 * trailing spaces; quotes doubled. A value that a spreadsheet would run as a formula (first character
 * =, +, -, @, tab or CR; OWASP "CSV Injection") is made inert with a leading apostrophe, and so is a value
 * that already begins with an apostrophe, so the export stays reversible: the stored value is the cell with
 * one leading apostrophe removed wherever a cell begins with one (see csvStoredValue).
 */
export function csvField(value: unknown): string {
  let s = value === null || value === undefined ? '' : typeof value === 'string' ? value : canonicalJson(value);
  if (/^[=+\-@\t\r']/.test(s)) s = `'${s}`;
  return /[",\r\n]|^\s|\s$/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/** The stored value of an unquoted CSV cell written by csvField (the inverse of the apostrophe rule). */
export const csvStoredValue = (cell: string): string => (cell.startsWith("'") ? cell.slice(1) : cell);

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
    e.sessionId,
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
