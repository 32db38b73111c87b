/**
 * Write transactions and field diffs for the audit trail.
 *
 * writeTransaction runs `fn` in `BEGIN IMMEDIATE`: SQLite takes the write lock at BEGIN, so two writers can
 * never both read the same "last audit entry" and fork the hash chain. Sequelize's sqlite dialect opens a
 * fresh connection per transaction whose busy timeout is node-sqlite3's 1 s (STACK P6), so writes from this
 * process are also queued here, one at a time; that keeps BEGIN IMMEDIATE from waiting on our own writers.
 *
 * A writeTransaction called inside another one joins the outer transaction (no nesting, no dead-lock):
 * services can call each other without knowing who opened the transaction.
 *
 * Usage, with the audit entry in the same transaction as the change it records:
 *   await writeTransaction(async (transaction) => {
 *     await thing.save({ transaction });
 *     await recordAudit({ actor, action: 'update', entity: 'thing', entityId: thing.id, changes }, transaction);
 *   });
 */
import { AsyncLocalStorage } from 'node:async_hooks';
import { Transaction, type Sequelize } from 'sequelize';
import { AuditEntry } from './models/audit-entry.model.ts';

const current = new AsyncLocalStorage<Transaction>();
let queue: Promise<unknown> = Promise.resolve();

function boundSequelize(): Sequelize {
  const sequelize = AuditEntry.sequelize;
  if (!sequelize) throw new Error('writeTransaction: models are not initialised (call initModels first)');
  return sequelize;
}

/** Runs fn in an IMMEDIATE SQLite transaction (takes the write lock at BEGIN, so the audit hash chain cannot fork). */
export function writeTransaction<T>(fn: (t: Transaction) => Promise<T>): Promise<T> {
  const outer = current.getStore();
  if (outer) return fn(outer);
  const sequelize = boundSequelize();
  const run = () =>
    sequelize.transaction({ type: Transaction.TYPES.IMMEDIATE }, (t) => current.run(t, () => fn(t)));
  const result = queue.then(run, run);
  queue = result.then(
    () => undefined,
    () => undefined,
  );
  return result;
}

/** The writeTransaction this code runs inside, if any. */
export function currentWriteTransaction(): Transaction | undefined {
  return current.getStore();
}

/**
 * Canonical JSON: object keys sorted, no whitespace, `undefined` members left out (as JSON.stringify does),
 * a top-level `undefined` written as null, values with toJSON (Date, Sequelize instances) converted first.
 * Decimal strings stay strings, so "8.0" and "8" differ.
 */
export function canonicalJson(value: unknown): string {
  return JSON.stringify(normalise(value)) ?? 'null';
}

function normalise(value: unknown): unknown {
  if (value === undefined || value === null) return null;
  if (typeof value === 'bigint') return value.toString();
  if (typeof value === 'number') return Number.isFinite(value) ? value : null;
  if (typeof value !== 'object') return typeof value === 'function' || typeof value === 'symbol' ? null : value;
  const withJson = value as { toJSON?: () => unknown };
  if (typeof withJson.toJSON === 'function') return normalise(withJson.toJSON());
  if (Array.isArray(value)) return value.map((v) => normalise(v));
  const out: Record<string, unknown> = {};
  for (const key of Object.keys(value).sort()) {
    const v = (value as Record<string, unknown>)[key];
    if (v === undefined || typeof v === 'function' || typeof v === 'symbol') continue;
    out[key] = normalise(v);
  }
  return out;
}

/**
 * Field-by-field differences for the audit trail (decimal strings compared as strings; JSON values by canonical JSON).
 * Fields are those of `before` in their order, then fields only in `after`. A field missing on one side
 * counts as null there; values are returned normalised (undefined → null), so they serialise as shown.
 */
export function diffFields(
  before: Record<string, unknown>,
  after: Record<string, unknown>,
): Array<{ field: string; oldValue: unknown; newValue: unknown }> {
  const fields = [...Object.keys(before), ...Object.keys(after).filter((k) => !(k in before))];
  const changes: Array<{ field: string; oldValue: unknown; newValue: unknown }> = [];
  for (const field of fields) {
    const oldValue = normalise(before[field]);
    const newValue = normalise(after[field]);
    if (JSON.stringify(oldValue) !== JSON.stringify(newValue)) changes.push({ field, oldValue, newValue });
  }
  return changes;
}
