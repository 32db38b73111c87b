// Seal of signed records (issue 10 §1; 21 CFR 11.10(a), 11.70): every stored column a screen, PDF, label or export
// shows is covered by the signature. Each case alters one thing through a second SQLite connection (as someone
// with the file would, dropping the append-only triggers where needed), then reads through the API: the record
// must show "seal_broken" (never "verified") on the list, the record, the trace and its CSV, the first sighting
// is audited once and QA is e-mailed, and labels are refused.
import { createHash } from 'node:crypto';
import sqlite3 from 'sqlite3';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { canonicalJson } from '../../server/db/transaction.ts';
import { DEMO, expectErrorBody, makeTestApp, sessionCookie, type TestApp } from './helpers/test-app.ts';

let t: TestApp;
let qa = '';
let chemist = '';

/** A separate raw connection to the same file (foreign keys off, as sqlite3 opens it). */
function rawDb(path: string) {
  const db = new sqlite3.Database(path);
  return {
    run: (sql: string, params: unknown[] = []) => new Promise<void>((res, rej) => db.run(sql, params, (e) => (e ? rej(e) : res()))),
    all: <T>(sql: string, params: unknown[] = []) => new Promise<T[]>((res, rej) => db.all(sql, params, (e, rows) => (e ? rej(e) : res(rows as T[])))),
    close: () => new Promise<void>((res, rej) => db.close((e) => (e ? rej(e) : res()))),
  };
}
type Raw = ReturnType<typeof rawDb>;

const get = (path: string, cookie = qa) => request(t.app).get(path).set('Cookie', cookie);

async function listItem(id: number) {
  const res = await get('/api/preparations?pageSize=100');
  expect(res.status).toBe(200);
  return (res.body.items as Array<{ id: number; status: string; sealBroken?: { storedStatus: string; problems: string[] } }>).find((i) => i.id === id)!;
}

beforeAll(async () => {
  t = await makeTestApp();
  qa = await sessionCookie(t.app, DEMO.qa);
  chemist = await sessionCookie(t.app, DEMO.chemist);
}, 120_000);
afterAll(() => t.close());

/** Tamper figures for the report: cases tried and detected. */
const figures = { tried: 0, detected: 0 };
afterAll(() => console.log(`seal tamper cases: ${figures.detected} detected of ${figures.tried} tried`));

describe('the seeded demo records', () => {
  it('when listed and opened, then no signed record shows a broken seal (their hashes still verify)', async () => {
    const list = await get('/api/preparations?pageSize=100');
    expect(list.status).toBe(200);
    expect(list.body.items.length).toBeGreaterThan(3);
    for (const i of list.body.items) {
      expect(i.status, i.identifier).not.toBe('seal_broken');
      const d = await get(`/api/preparations/${i.identifier}`);
      expect(d.body.sealBroken, `${i.identifier}: ${JSON.stringify(d.body.sealBroken)}`).toBeUndefined();
    }
    const audit = await t.sequelize.query("SELECT id FROM audit_entries WHERE action = 'seal_broken'");
    expect(audit[0]).toEqual([]);
  });
});

describe('tamper §1: each shown column of a verified record, altered through a second connection', () => {
  let raw: Raw;
  let pb: Record<string, unknown>;
  let otherUser = 0;
  let otherMaterial = 0;
  beforeAll(async () => {
    raw = rawDb(t.dbPath);
    [pb] = await raw.all<Record<string, unknown>>("SELECT * FROM preparations WHERE status = 'verified' AND kind = 'stock' ORDER BY id LIMIT 1");
    otherUser = (await raw.all<{ id: number }>('SELECT id FROM users WHERE id <> ? ORDER BY id LIMIT 1', [pb!.created_by]))[0]!.id;
    otherMaterial = (await raw.all<{ id: number }>('SELECT id FROM reference_materials WHERE id <> ? ORDER BY id LIMIT 1', [pb!.material_id]))[0]!.id;
  });
  afterAll(() => raw.close());

  // column -> [the altered value as SQL, what the problem names]
  const cases = (): Array<[string, string, unknown[], RegExp]> => [
    ['concentration_display', '?', ['1500.0 mg/L'], /concentration_display/],
    ['analyte_formula', '?', ['Cd'], /analyte_formula/],
    ['target_value', '?', ['1500'], /target_value/],
    ['target_unit', '?', ['g/L'], /target_value\/target_unit/],
    ['volume_value', '?', ['250'], /volume_value/],
    ['volume_unit', '?', ['L'], /volume_value\/volume_unit/],
    ['material_id', '?', [otherMaterial], /material_id/],
    ['balance_id', '?', [Number(pb.balance_id) + 1], /balance_id/],
    ['flask_id', '?', [null], /flask_id/],
    ['kind', '?', ['dilution'], /kind/],
    ['created_on', '?', ['2026-01-01'], /created_on/],
    ['created_by', '?', [otherUser], /created_by/],
    ['created_at', '?', ['2026-01-01T08:00:00.000Z'], /created_at/],
    ['dilution_result', '?', ['{"display":"1500.0 mg/L"}'], /dilution_result/],
    ['notes', '?', ['made with care'], /notes/],
    ['inputs', "json_set(inputs, '$.target.value', '1500')", [], /inputs/],
    ['conditions_used', "json_set(conditions_used, '$.temperatureC', '35.0')", [], /conditionsUsed/],
    ['snapshot_material', "json_set(snapshot_material, '$.name', 'Cadmium nitrate')", [], /snapshot/],
    ['snapshot_balance', "json_set(snapshot_balance, '$.identifier', 'BAL-ZZ')", [], /snapshot/],
    ['plan', "json_set(plan, '$.targetReading.value', '240.0')", [], /plan/],
    ['gates', "json_insert(gates, '$[#]', json('{\"gate\":\"forged\",\"ok\":true}'))", [], /gates/],
    ['result', "json_set(result, '$.concentration.display', '1500.0 mg/L')", [], /result/],
    ['expires_on', '?', ['2099-12-31'], /expiresOn/],
    ['expiry_reason', '?', ['no limit'], /expiryReason/],
    ['version', 'version + 1', [], /state 'verified' at version/],
    ['status', '?', ['prepared'], /stored state 'prepared'/],
  ];

  it('when any one column is changed, then the list, the record and the trace say seal_broken naming it; restored, the next case starts clean', async () => {
    const id = Number(pb.id);
    for (const [column, expr, params, names] of cases()) {
      figures.tried += 1;
      await raw.run(`UPDATE preparations SET ${column} = ${expr} WHERE id = ?`, [...params, id]);
      const item = await listItem(id);
      const problems = item.sealBroken?.problems ?? [];
      const seen = item.status === 'seal_broken' && problems.some((p) => names.test(p));
      if (column !== 'identifier') {
        const d = await get(`/api/preparations/${id}`);
        expect(d.body.status, column).toBe('seal_broken');
        expect(d.body.sealBroken.storedStatus, column).toBe(column === 'status' ? 'prepared' : 'verified');
      }
      if (seen) figures.detected += 1;
      expect(seen, `${column}: ${item.status} ${JSON.stringify(problems)}`).toBe(true);
      await raw.run(`UPDATE preparations SET ${column} = ? WHERE id = ?`, [pb[column], id]);
    }
    // restored: the row check is clean again, yet the break found at this version stays (audited once per version)
    const item = await listItem(id);
    expect(item.status).toBe('seal_broken');
    const entries = await raw.all<{ reason: string; actor_id: number | null }>("SELECT reason, actor_id FROM audit_entries WHERE action = 'seal_broken' AND entity = 'preparation' AND entity_id = ?", [String(id)]);
    expect(entries).toHaveLength(2); // once per version seen: the signed version, and the version number the 'version' case forged
    expect(entries[0]!.actor_id).toBeNull();
    expect(entries[0]!.reason).toMatch(/concentration_display/);
    const mails = await raw.all<{ to_address: string; subject: string }>("SELECT to_address, subject FROM mail_queue WHERE kind = 'seal_broken' AND preparation_id = ?", [id]);
    expect(mails.map((m) => m.to_address)).toEqual([DEMO.qa, DEMO.qa]);
    expect(mails[0]!.subject).toContain(String(pb.identifier));
  });

  it('then the record, the trace, its CSV and the prep sheet say so, and a label print is refused 409 seal_broken', async () => {
    const key = String(pb.identifier);
    const d = await get(`/api/preparations/${key}`);
    expect(d.body.status).toBe('seal_broken');
    expect(d.body.canSign.verify).toBe(false);
    const tr = await get(`/api/trace/${key}`);
    expect(tr.status).toBe(200);
    const node = tr.body.backward.nodes.find((n: { type: string; detail: { identifier?: string } }) => n.type === 'preparation' && n.detail.identifier === key);
    expect(node.status).toBe('seal_broken');
    const csv = await get(`/api/trace/${key}/report.csv`);
    expect(csv.status).toBe(200);
    expect(csv.text.split('\r\n')[1]).toContain('seal_broken');
    const sheet = await get(`/api/preparations/${key}/prep-sheet.pdf`);
    expect(sheet.status).toBe(200);
    const templates = (await get('/api/label-templates', chemist)).body.items as Array<{ id: number }>;
    const print = await request(t.app).post(`/api/preparations/${key}/label-prints`).set('Cookie', chemist).send({ templateId: templates[0]!.id, copies: 1 });
    expect(print.status).toBe(409);
    expectErrorBody(print.body, 'seal_broken');
    expect(print.body.error.fields.preparation).toBeTruthy();
  });
});

describe('tamper §1: entries and signatures (full check on the record)', () => {
  let raw: Raw;
  let toc: Record<string, unknown>;
  beforeAll(async () => {
    raw = rawDb(t.dbPath);
    // the other signed stocks of the demo; each case takes a fresh one so it is its own first sighting
    [toc] = await raw.all<Record<string, unknown>>("SELECT * FROM preparations WHERE status = 'prepared' AND kind = 'stock' ORDER BY id LIMIT 1");
  });
  afterAll(() => raw.close());

  it('when a weighing, the make-up, or the signature itself (hash recomputed without the key) is changed, then the record shows seal_broken', async () => {
    const id = Number(toc.id);
    const detail = async () => (await get(`/api/preparations/${id}`)).body as { status: string; sealBroken?: { problems: string[] } };
    expect((await detail()).status).toBe('prepared');

    // 1. a weighing (append-only: the attacker drops the trigger)
    figures.tried += 1;
    const [w] = await raw.all<{ id: number; net_mg: string }>('SELECT id, net_mg FROM weighings WHERE preparation_id = ? ORDER BY id DESC LIMIT 1', [id]);
    await raw.run('DROP TRIGGER weighings_no_update');
    await raw.run("UPDATE weighings SET net_mg = '240.0' WHERE id = ?", [w!.id]);
    let d = await detail();
    if (d.status === 'seal_broken' && d.sealBroken!.problems.some((p) => /weighings/.test(p))) figures.detected += 1;
    expect(d.sealBroken?.problems.join('; ')).toMatch(/no longer match the "prepared" signature/);
    await raw.run('UPDATE weighings SET net_mg = ? WHERE id = ?', [w!.net_mg, w!.id]);

    // 2. the make-up
    figures.tried += 1;
    const [m] = await raw.all<{ id: number; solution_temperature_c: string }>('SELECT id, solution_temperature_c FROM make_ups WHERE preparation_id = ? ORDER BY id DESC LIMIT 1', [id]);
    await raw.run('DROP TRIGGER make_ups_no_update');
    await raw.run("UPDATE make_ups SET solution_temperature_c = '35.0' WHERE id = ?", [m!.id]);
    d = await detail();
    if (d.status === 'seal_broken' && d.sealBroken!.problems.some((p) => /make-up/.test(p))) figures.detected += 1;
    expect(d.status).toBe('seal_broken');
    await raw.run('UPDATE make_ups SET solution_temperature_c = ? WHERE id = ?', [m!.solution_temperature_c, m!.id]);

    // 3. re-signing by hand: change the display, store a new canonical JSON and point the signature at its SHA-256
    figures.tried += 1;
    const [sig] = await raw.all<{ id: number; record_hash: string; record_version: number }>('SELECT id, record_hash, record_version FROM signatures WHERE preparation_id = ? ORDER BY id DESC LIMIT 1', [id]);
    const [rv] = await raw.all<{ canonical_json: string }>('SELECT canonical_json FROM record_versions WHERE preparation_id = ? AND record_hash = ?', [id, sig!.record_hash]);
    const forged = JSON.parse(rv!.canonical_json) as { shown: { concentrationDisplay: string } };
    forged.shown.concentrationDisplay = '1500.0 mg/L';
    const forgedJson = canonicalJson(forged);
    const forgedHash = createHash('sha256').update(forgedJson, 'utf8').digest('hex');
    await raw.run('DROP TRIGGER signatures_no_update');
    await raw.run('INSERT INTO record_versions (preparation_id, version, canonical_json, record_hash, created_at) VALUES (?, ?, ?, ?, ?)', [id, sig!.record_version, forgedJson, forgedHash, '2026-12-01T00:00:00.000Z']);
    await raw.run('UPDATE signatures SET record_hash = ? WHERE preparation_id = ?', [forgedHash, id]);
    await raw.run("UPDATE preparations SET concentration_display = '1500.0 mg/L' WHERE id = ?", [id]);
    d = await detail();
    const problems = d.sealBroken?.problems ?? [];
    if (d.status === 'seal_broken' && problems.some((p) => /audit trail/.test(p))) figures.detected += 1;
    expect(problems.join('; ')).toMatch(/does not match the audit trail/);
    expect((await listItem(id)).status).toBe('seal_broken'); // the list finds the earlier full-check finding
  });
});

describe('the daily integrity run (§1 sweep, §4 anchor in the QA e-mail)', () => {
  it('when it runs, then the chain head is appended to the anchor log and e-mailed to QA with the broken seals, and the chain check compares with it', async () => {
    const { runDailyIntegrity } = await import('../../server/services/integrity-report.service.ts');
    const { readAnchors, verifyAuditChain } = await import('../../server/services/audit.service.ts');
    const before = readAnchors().length;
    const r = await runDailyIntegrity(new Date('2026-12-05T06:05:00.000Z'));
    expect(r.chain.ok).toBe(true);
    expect(r.sealBroken.length).toBe(2); // the two records altered above
    expect(readAnchors()).toHaveLength(before + 1);
    expect(readAnchors().at(-1)).toEqual(r.anchor);
    const raw = rawDb(t.dbPath);
    const mails = await raw.all<{ to_address: string; subject: string; text_body?: string; body_text?: string }>("SELECT * FROM mail_queue WHERE kind = 'integrity_report'");
    await raw.close();
    expect(mails.map((m) => m.to_address)).toEqual([DEMO.qa]);
    const body = JSON.stringify(mails[0]);
    expect(body).toContain(`#${r.anchor!.id} ${r.anchor!.hash}`);
    for (const id of r.sealBroken) expect(body).toContain(id);
    expect((await verifyAuditChain()).anchor).toEqual({ id: r.anchor!.id, at: r.anchor!.at, hash: r.anchor!.hash });
  });
});

describe('signatures written before canonical version 2', () => {
  it('when the signed content is version 1, then the row still checks, and a changed concentration_display is found by deriving it from the signed result', async () => {
    const { Preparation } = await import('../../server/db/models/index.ts');
    const { canonicalRecord, shownColumns } = await import('../../server/services/signatures.service.ts');
    const { sealProblems } = await import('../../server/services/record-integrity.ts');
    // the verified stock of the demo (its row was restored after the cases above; this check is pure)
    const p = (await Preparation.findOne({ where: { status: 'verified', kind: 'stock' }, order: [['id', 'ASC']] }))!;
    expect(p.result?.concentration.display).toBeTruthy();
    const v1 = canonicalRecord(p, [], [], null, 1);
    expect(JSON.parse(v1.canonical).shown).toBeUndefined();
    const sig = { id: 1, meaning: p.status, recordVersion: p.version, recordHash: v1.hash } as never;
    const input = () => ({ p, sigs: [sig], signed: { canonicalJson: v1.canonical } as never });
    expect(sealProblems(input(), shownColumns)).toEqual([]);
    p.concentrationDisplay = '1500.0 mg/L';
    expect(sealProblems(input(), shownColumns)).toEqual(['concentration_display differs from the signed result']);
  });
});
