// Audit trail core (REQUIREMENTS AT-02, AT-05): append-only triggers, the keyed (HMAC-SHA-256) hash chain and its
// anchors, tamper detection through a separate raw SQLite connection, field diffs and canonical JSON.
import { createHash, createHmac } from 'node:crypto';
import { appendFileSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import sqlite3 from 'sqlite3';
import { QueryTypes } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEntry } from '../../server/db/models/index.ts';
import { canonicalJson, diffFields, writeTransaction } from '../../server/db/transaction.ts';
import { CHAIN_KEYED_ACTION, GENESIS_HASH, chainHead, entryHash, keyedEntryHash, readAnchors, recordAudit, verifyAuditChain, writeAnchor } from '../../server/services/audit.service.ts';
import { makeTestApp, type TestApp } from './helpers/test-app.ts';

const ACTOR = { id: 7, fullName: 'Dr. Test Analyst' };

/** A separate raw connection to the same file, as someone with file access would open it. */
function rawDb(path: string) {
  const db = new sqlite3.Database(path);
  return {
    exec: (sql: string) => new Promise<void>((res, rej) => db.exec(sql, (e) => (e ? rej(e) : res()))),
    all: <T>(sql: string, params: unknown[] = []) =>
      new Promise<T[]>((res, rej) => db.all(sql, params, (e, rows) => (e ? rej(e) : res(rows as T[])))),
    close: () => new Promise<void>((res, rej) => db.close((e) => (e ? rej(e) : res()))),
  };
}

const UPDATE_TRIGGER_SQL =
  "CREATE TRIGGER audit_entries_no_update BEFORE UPDATE ON audit_entries BEGIN SELECT RAISE(ABORT, 'audit_entries is append-only'); END;";

async function write(n: number, entity = 'preparation') {
  for (let i = 0; i < n; i++) {
    await writeTransaction((t) =>
      recordAudit(
        { actor: ACTOR, action: 'update', entity, entityId: `HWL-${i}`, changes: [{ field: 'volume', oldValue: '100.0', newValue: `${i}.0` }], reason: 'typo' },
        t,
      ),
    );
  }
}

async function lastId(): Promise<number> {
  return (await AuditEntry.max('id')) as number;
}

describe('audit trail storage', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await makeTestApp({ seed: false });
  });
  afterAll(() => t.close());

  it('when an entry is written, then its hash is HMAC-SHA-256(key, prev_hash + "\\n" + canonical JSON of its content), the key is outside the database and the first prev_hash is 64 zeros', async () => {
    // Source: the chain definition in REQUIREMENTS AT-05 as specified for this module (audit.service.ts header);
    // HMAC per RFC 2104 / FIPS 198-1 with SHA-256 (FIPS 180-4) via node:crypto. The canonical string is written out by hand here.
    await writeTransaction((tx) =>
      recordAudit({ actor: ACTOR, action: 'create', entity: 'balance', entityId: 3, changes: [{ field: 'capacityG', oldValue: null, newValue: '220.0' }] }, tx),
    );
    const row = (await AuditEntry.findByPk(1))!;
    expect(row.prevHash).toBe('0'.repeat(64));
    expect(row.occurredAt).toMatch(/^\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d\.\d{3}Z$/);
    expect(row.entityId).toBe('3');
    expect(row.changes).toBe('[{"field":"capacityG","newValue":"220.0","oldValue":null}]');
    const canonical =
      `{"action":"create","actorId":7,"actorName":"Dr. Test Analyst","changes":[{"field":"capacityG","newValue":"220.0","oldValue":null}],` +
      `"entity":"balance","entityId":"3","id":1,"occurredAt":"${row.occurredAt}","reason":null}`;
    expect(t.config.auditChainKey).toBe(readFileSync(join(t.dir, 'audit-chain-key'), 'utf8').trim()); // generated into the data folder outside production
    const expected = createHmac('sha256', t.config.auditChainKey).update(`${GENESIS_HASH}\n${canonical}`).digest('hex');
    expect(row.hash).toBe(expected);
    expect(row.hash).not.toBe(createHash('sha256').update(`${GENESIS_HASH}\n${canonical}`).digest('hex'));
  });

  it('when UPDATE or DELETE is sent as raw SQL, then the triggers refuse it and the row is unchanged', async () => {
    const attempt = async (sql: string) => {
      const err = await t.sequelize.query(sql).then(() => null, (e: unknown) => e as { original?: { message?: string }; message: string });
      expect(err, sql).not.toBeNull();
      expect(err!.original?.message ?? err!.message).toMatch(/audit_entries is append-only/);
    };
    await attempt("UPDATE audit_entries SET reason = 'edited' WHERE id = 1");
    await attempt('DELETE FROM audit_entries WHERE id = 1');
    await attempt('DELETE FROM audit_entries');
    const [row] = await t.sequelize.query<{ reason: string | null }>('SELECT reason FROM audit_entries WHERE id = 1', { type: QueryTypes.SELECT });
    expect(row!.reason).toBeNull();
  });

  it('when the model is used to update or destroy, then the database refuses too', async () => {
    const row = (await AuditEntry.findByPk(1))!;
    row.reason = 'edited';
    await expect(row.save()).rejects.toThrow();
    await expect(AuditEntry.destroy({ where: { id: 1 } })).rejects.toThrow();
    expect((await AuditEntry.findByPk(1))!.reason).toBeNull();
  });

  it('when many entries are written, some concurrently, then the chain verifies and ids are consecutive', async () => {
    await write(120);
    await Promise.all(
      Array.from({ length: 30 }, (_, i) =>
        writeTransaction((tx) => recordAudit({ actor: null, action: 'sign_in_failed', entity: 'session', entityId: `x${i}@harbourside.example` }, tx)),
      ),
    );
    const result = await verifyAuditChain();
    expect(result).toEqual({ ok: true, checked: 151 });
    const ids = (await AuditEntry.findAll({ attributes: ['id'], order: [['id', 'ASC']] })).map((r) => r.id);
    expect(ids).toEqual(Array.from({ length: 151 }, (_, i) => i + 1));
  });

  it('when a transaction fails after recordAudit, then the entry is rolled back with the change and the chain stays intact', async () => {
    const before = await lastId();
    await expect(
      writeTransaction(async (tx) => {
        await recordAudit({ actor: ACTOR, action: 'update', entity: 'balance', entityId: 1 }, tx);
        throw new Error('change failed');
      }),
    ).rejects.toThrow('change failed');
    expect(await lastId()).toBe(before);
    await write(1);
    expect((await verifyAuditChain()).ok).toBe(true);
  });

  it('when writeTransaction is nested, then the inner call joins the outer transaction', async () => {
    const before = await lastId();
    await writeTransaction(async (outer) => {
      await writeTransaction(async (inner) => {
        expect(inner).toBe(outer);
        await recordAudit({ actor: ACTOR, action: 'update', entity: 'balance', entityId: 1 }, inner);
      });
    });
    expect(await lastId()).toBe(before + 1);
  });
});

describe('tamper detection with a separate raw SQLite connection', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await makeTestApp({ seed: false });
    await write(20);
  });
  afterAll(() => t.close());

  it('when one row\'s reason is changed behind the triggers, then verify reports exactly that entry as first broken (hash mismatch)', async () => {
    expect(await verifyAuditChain()).toEqual({ ok: true, checked: 20 });
    const raw = rawDb(t.dbPath);
    await raw.exec('DROP TRIGGER audit_entries_no_update;');
    await raw.exec("UPDATE audit_entries SET reason = 'nothing to see' WHERE id = 13;");
    await raw.exec(UPDATE_TRIGGER_SQL); // put the trigger back: the break must still be found
    await raw.close();
    expect(await verifyAuditChain()).toEqual({ ok: false, checked: 13, firstBroken: { id: 13, reason: 'hash mismatch' } });
  });
});

describe('tamper: a changed new value with its own hash recomputed', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await makeTestApp({ seed: false });
    await write(10);
  });
  afterAll(() => t.close());

  it('when row 4\'s new value and hash are rewritten with a recomputed SHA-256 (no key), then row 4 fails its own hash', async () => {
    const raw = rawDb(t.dbPath);
    const [row] = await raw.all<Record<string, unknown>>('SELECT * FROM audit_entries WHERE id = 4');
    const changes = '[{"field":"volume","newValue":"99.0","oldValue":"100.0"}]';
    const forged = entryHash(String(row!.prev_hash), {
      id: 4,
      occurredAt: String(row!.occurred_at),
      actorId: Number(row!.actor_id),
      actorName: String(row!.actor_name),
      action: String(row!.action),
      entity: String(row!.entity),
      entityId: String(row!.entity_id),
      changes: JSON.parse(changes),
      reason: String(row!.reason),
    });
    await raw.exec('DROP TRIGGER audit_entries_no_update;');
    await raw.exec(`UPDATE audit_entries SET changes = '${changes}', hash = '${forged}' WHERE id = 4;`);
    await raw.close();
    expect(await verifyAuditChain()).toEqual({ ok: false, checked: 4, firstBroken: { id: 4, reason: 'hash mismatch' } });
  });
});

describe('tamper: deleted rows', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await makeTestApp({ seed: false });
    await write(10);
  });
  afterAll(() => t.close());

  it('when a row in the middle is deleted, then verify reports the entry after it (gap in ids)', async () => {
    const raw = rawDb(t.dbPath);
    await raw.exec('DROP TRIGGER audit_entries_no_delete;');
    await raw.exec('DELETE FROM audit_entries WHERE id = 6;');
    await raw.close();
    expect(await verifyAuditChain()).toEqual({ ok: false, checked: 6, firstBroken: { id: 7, reason: 'gap in ids' } });
  });

  it('when the newest row is deleted too, then the gap is still reported, and a new entry does not reuse its id', async () => {
    const raw = rawDb(t.dbPath);
    await raw.exec('DELETE FROM audit_entries WHERE id = 10;'); // delete trigger still dropped
    await raw.close();
    expect((await verifyAuditChain()).firstBroken).toEqual({ id: 7, reason: 'gap in ids' });
    await write(1);
    expect(await lastId()).toBe(11);
  });
});

describe('tamper: only the newest row deleted', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await makeTestApp({ seed: false });
    await write(5);
  });
  afterAll(() => t.close());

  it('when the last entry is deleted, then sqlite_sequence exposes the missing id (gap in ids)', async () => {
    const raw = rawDb(t.dbPath);
    await raw.exec('DROP TRIGGER audit_entries_no_delete; DELETE FROM audit_entries WHERE id = 5;');
    await raw.close();
    expect(await verifyAuditChain()).toEqual({ ok: false, checked: 4, firstBroken: { id: 5, reason: 'gap in ids' } });
  });
});

describe('tamper: inserted rows', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await makeTestApp({ seed: false });
    await write(5);
  });
  afterAll(() => t.close());

  it('when a forged row is appended with the right previous hash but a made-up hash, then it fails its own hash', async () => {
    const raw = rawDb(t.dbPath);
    const [last] = await raw.all<{ hash: string }>('SELECT hash FROM audit_entries WHERE id = 5');
    await raw.all(
      `INSERT INTO audit_entries (id, occurred_at, actor_id, actor_name, action, entity, entity_id, changes, reason, prev_hash, hash)
       VALUES (6, '2026-01-01T00:00:00.000Z', 7, 'Dr. Test Analyst', 'sign', 'preparation', 'HWL-1', '[]', NULL, ?, ?)`,
      [last!.hash, 'f'.repeat(64)],
    );
    await raw.close();
    expect(await verifyAuditChain()).toEqual({ ok: false, checked: 6, firstBroken: { id: 6, reason: 'hash mismatch' } });
  });

  it('when a row is slipped in with a skipped id, then the gap is reported', async () => {
    const raw = rawDb(t.dbPath);
    await raw.exec('DROP TRIGGER audit_entries_no_delete; DELETE FROM audit_entries WHERE id = 6;');
    const [last] = await raw.all<{ hash: string }>('SELECT hash FROM audit_entries WHERE id = 5');
    await raw.all(
      `INSERT INTO audit_entries (id, occurred_at, actor_id, actor_name, action, entity, entity_id, changes, reason, prev_hash, hash)
       VALUES (9, '2026-01-01T00:00:00.000Z', NULL, NULL, 'sign', 'preparation', 'HWL-1', '[]', NULL, ?, ?)`,
      [last!.hash, 'e'.repeat(64)],
    );
    await raw.close();
    expect((await verifyAuditChain()).firstBroken).toEqual({ id: 9, reason: 'gap in ids' });
  });
});

/** The content of a raw row as the chain hashes it. */
function contentOfRaw(row: Record<string, unknown>, over: Record<string, unknown> = {}) {
  return {
    id: Number(row.id),
    occurredAt: String(row.occurred_at),
    actorId: row.actor_id === null ? null : Number(row.actor_id),
    actorName: row.actor_name === null ? null : String(row.actor_name),
    action: String(row.action),
    entity: String(row.entity),
    entityId: row.entity_id === null ? null : String(row.entity_id),
    changes: JSON.parse(String(row.changes)) as unknown,
    reason: row.reason === null ? null : String(row.reason),
    ...over,
  };
}

describe('tamper §4: the keyed chain and its anchors (attacker holds the file, not the key)', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await makeTestApp({ seed: false });
    await write(12);
  });
  afterAll(() => t.close());

  it('when the last entries are deleted with the sequence rolled back and a forged entry is appended with a recomputed hash, then the check finds it; with the anchor it also finds the truncation', async () => {
    const anchor = await writeAnchor(new Date('2026-12-01T06:00:00.000Z'));
    expect(anchor).toEqual({ at: '2026-12-01T06:00:00.000Z', ...(await chainHead())! });
    expect(readAnchors().at(-1)).toEqual(anchor); // one JSON line per anchor in the append-only log
    expect(readFileSync(t.config.auditAnchorFile, 'utf8')).toContain(`"id":${anchor!.id}`);
    expect(await verifyAuditChain()).toEqual({ ok: true, checked: 12, anchor: { id: 12, at: anchor!.at, hash: anchor!.hash } });

    const raw = rawDb(t.dbPath);
    await raw.exec("DROP TRIGGER audit_entries_no_delete; DELETE FROM audit_entries WHERE id > 9; UPDATE sqlite_sequence SET seq = 9 WHERE name = 'audit_entries';");
    // the truncated tail alone: the anchor names entry 12, which is gone
    expect(await verifyAuditChain()).toMatchObject({ ok: false, checked: 9, firstBroken: { id: 10, reason: 'anchor mismatch' } });
    // then a forged entry 10 with the right previous hash and a hash recomputed both ways an attacker without the key can
    const [nine] = await raw.all<Record<string, unknown>>('SELECT * FROM audit_entries WHERE id = 9');
    const content = contentOfRaw(nine!, { id: 10, occurredAt: '2026-12-01T07:00:00.000Z', changes: [], reason: 'forged' });
    for (const forged of [entryHash(String(nine!.hash), content), keyedEntryHash('a guessed key that is not the chain key', String(nine!.hash), content)]) {
      await raw.exec('DELETE FROM audit_entries WHERE id = 10;');
      await raw.all(
        `INSERT INTO audit_entries (id, occurred_at, actor_id, actor_name, action, entity, entity_id, changes, reason, prev_hash, hash) VALUES (10, ?, ?, ?, ?, ?, ?, '[]', 'forged', ?, ?)`,
        [content.occurredAt, content.actorId, content.actorName, content.action, content.entity, content.entityId, nine!.hash, forged],
      );
      expect(await verifyAuditChain()).toMatchObject({ ok: false, checked: 10, firstBroken: { id: 10, reason: 'hash mismatch' } });
    }
    await raw.close();
  });
});

describe('tamper §4: a chain that began before the key existed', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await makeTestApp({ seed: false });
  });
  afterAll(() => t.close());

  it('when unkeyed entries exist, then the next write puts the keyed switch entry first and the chain verifies; rewriting it all unkeyed without the switch is "not keyed"', async () => {
    // three entries as the previous release wrote them (plain SHA-256), inserted behind the app's back
    const raw = rawDb(t.dbPath);
    let prev = GENESIS_HASH;
    for (let id = 1; id <= 3; id++) {
      const content = { id, occurredAt: `2026-11-0${id}T08:00:00.000Z`, actorId: 7, actorName: 'Dr. Test Analyst', action: 'update', entity: 'balance', entityId: '1', changes: [], reason: null };
      const hash = entryHash(prev, content);
      await raw.all(`INSERT INTO audit_entries (id, occurred_at, actor_id, actor_name, action, entity, entity_id, changes, reason, prev_hash, hash) VALUES (?, ?, 7, 'Dr. Test Analyst', 'update', 'balance', '1', '[]', NULL, ?, ?)`, [id, content.occurredAt, prev, hash]);
      prev = hash;
    }
    expect(await verifyAuditChain()).toMatchObject({ ok: false, firstBroken: { id: 3, reason: 'not keyed' } });
    await write(2);
    const rows = await raw.all<Record<string, unknown>>('SELECT * FROM audit_entries ORDER BY id');
    expect(rows.map((r) => r.action)).toEqual(['update', 'update', 'update', CHAIN_KEYED_ACTION, 'update', 'update']);
    expect(rows[3]!.hash).toBe(keyedEntryHash(t.config.auditChainKey, String(rows[3]!.prev_hash), contentOfRaw(rows[3]!)));
    expect(await verifyAuditChain()).toEqual({ ok: true, checked: 6 });

    // an attacker drops the switch and re-links everything after it with plain SHA-256
    await raw.exec('DROP TRIGGER audit_entries_no_delete; DROP TRIGGER audit_entries_no_update; DELETE FROM audit_entries WHERE id > 3;');
    let head = String(rows[2]!.hash);
    for (const [i, r] of rows.slice(4).entries()) {
      const content = contentOfRaw(r, { id: 4 + i });
      const hash = entryHash(head, content);
      await raw.all(`INSERT INTO audit_entries (id, occurred_at, actor_id, actor_name, action, entity, entity_id, changes, reason, prev_hash, hash) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`, [content.id, content.occurredAt, content.actorId, content.actorName, content.action, content.entity, content.entityId, String(r.changes), content.reason, head, hash]);
      head = hash;
    }
    await raw.exec("UPDATE sqlite_sequence SET seq = 5 WHERE name = 'audit_entries';");
    await raw.close();
    expect(await verifyAuditChain()).toMatchObject({ ok: false, firstBroken: { id: 5, reason: 'not keyed' } });
  });

  it('when the anchor log holds a damaged line, then that line is skipped, not read as an anchor', async () => {
    appendFileSync(t.config.auditAnchorFile, 'not json\n');
    expect(readAnchors().length).toBe(0);
  });
});

describe('diffFields and canonical JSON', () => {
  it('when decimal strings differ only in trailing zeros, then they are a change (DEVELOPERS.md: values kept exactly as entered)', () => {
    expect(diffFields({ volume: '100.0', unit: 'mL' }, { volume: '100', unit: 'mL' })).toEqual([
      { field: 'volume', oldValue: '100.0', newValue: '100' },
    ]);
  });

  it('when JSON values differ only in key order, then there is no change; when a nested value differs, there is', () => {
    expect(diffFields({ air: { t: '20.0', p: '1013' } }, { air: { p: '1013', t: '20.0' } })).toEqual([]);
    expect(diffFields({ air: { t: '20.0' } }, { air: { t: '20.5' } })).toEqual([
      { field: 'air', oldValue: { t: '20.0' }, newValue: { t: '20.5' } },
    ]);
  });

  it('when a field is only on one side, then it is reported with null on the other, in before-then-after order', () => {
    expect(diffFields({ a: '1', b: undefined }, { a: '1', c: true })).toEqual([{ field: 'c', oldValue: null, newValue: true }]);
    expect(diffFields({ x: 'old' }, {})).toEqual([{ field: 'x', oldValue: 'old', newValue: null }]);
    expect(diffFields({ s: 'a', n: 1 }, { s: 'b', n: 2 }).map((c) => c.field)).toEqual(['s', 'n']);
  });

  it('when numbers and strings look alike, then they still differ (1 vs "1")', () => {
    expect(diffFields({ n: 1 }, { n: '1' })).toHaveLength(1);
  });

  it('when canonicalised, then keys are sorted at every depth and there is no whitespace', () => {
    expect(canonicalJson({ b: [{ z: 1, a: null }], a: 'x', u: undefined })).toBe('{"a":"x","b":[{"a":null,"z":1}]}');
    expect(canonicalJson(undefined)).toBe('null');
    expect(canonicalJson(new Date('2026-03-12T09:00:00.000Z'))).toBe('"2026-03-12T09:00:00.000Z"');
  });
});
