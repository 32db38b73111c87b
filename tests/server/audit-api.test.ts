// Audit trail over HTTP and its wiring (REQUIREMENTS AT-01, AT-02, AT-05, AT-07, AT-08): what sign-in,
// failed sign-in, lockout, sign-out, user and settings changes record; list/filter/paging; CSV export;
// verify; the per-record trail; and every audit route × role.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEntry, User } from '../../server/db/models/index.ts';
import { DEMO, DEMO_PASSWORD, expectErrorBody, makeTestApp, sessionCookie, userIdByEmail, type TestApp } from './helpers/test-app.ts';
import { labDate } from '../../shared/prep/lab-time.ts';

let t: TestApp;
let admin: string;
let qa: string;
let chemist: string;
let technician: string;
let adminId: number;
beforeAll(async () => {
  t = await makeTestApp();
  admin = await sessionCookie(t.app, DEMO.admin);
  qa = await sessionCookie(t.app, DEMO.qa);
  chemist = await sessionCookie(t.app, DEMO.chemist);
  technician = await sessionCookie(t.app, DEMO.technician);
  adminId = await userIdByEmail(t.app, admin, DEMO.admin);
});
afterAll(() => t.close());

/** Entries written after `sinceId`, oldest first. */
async function since(sinceId: number) {
  const rows = await AuditEntry.findAll({ order: [['id', 'ASC']] });
  return rows
    .filter((r) => r.id > sinceId)
    .map((r) => ({ ...r.get({ plain: true }), changes: JSON.parse(r.changes) as Array<{ field: string; oldValue: unknown; newValue: unknown }> }));
}
const mark = async () => ((await AuditEntry.max('id')) as number | null) ?? 0;
const login = (email: string, password: string) => request(t.app).post('/api/auth/login').send({ email, password });

describe('sign-in events', () => {
  it('when a user signs in, then one sign_in entry names them, with server UTC time', async () => {
    const m = await mark();
    const started = new Date().toISOString();
    const res = await login(DEMO.chemist2, DEMO_PASSWORD);
    expect(res.status).toBe(200);
    const [entry, ...rest] = await since(m);
    expect(rest).toEqual([]);
    expect(entry).toMatchObject({
      action: 'sign_in',
      entity: 'session',
      entityId: String(res.body.user.id),
      actorId: res.body.user.id,
      actorName: 'Idris Okonkwo-Baptiste',
    });
    expect(entry!.occurredAt >= started).toBe(true);
    expect(entry!.occurredAt).toMatch(/Z$/);
  });

  it('when the password is wrong, then the request fails but a sign_in_failed entry with no actor and the email tried is kept', async () => {
    const m = await mark();
    expect((await login('  Chemist2@Harbourside.example ', 'wrong-password')).status).toBe(401);
    const entries = await since(m);
    expect(entries).toHaveLength(1);
    expect(entries[0]).toMatchObject({ action: 'sign_in_failed', actorId: null, actorName: null, entity: 'session', entityId: DEMO.chemist2, reason: 'Wrong password' });
    expect(entries[0]!.changes).toEqual([{ field: 'failedLoginCount', oldValue: 0, newValue: 1 }]);
    expect(JSON.stringify(entries)).not.toContain('wrong-password');
  });

  it('when the email is unknown, then it is recorded too', async () => {
    const m = await mark();
    expect((await login('nobody@harbourside.example', 'whatever-pass')).status).toBe(401);
    expect(await since(m)).toMatchObject([{ action: 'sign_in_failed', actorId: null, entityId: 'nobody@harbourside.example', reason: 'Unknown email address' }]);
  });

  it('when five sign-ins fail (REQUIREMENTS AT-08 acceptance), then five failures plus one account_locked entry; then a sign-in on the locked account is recorded', async () => {
    const user = (await User.findOne({ where: { email: DEMO.inactive } }))!;
    user.active = true;
    await user.save();
    const m = await mark();
    for (let i = 1; i <= 5; i++) await login(DEMO.inactive, `wrong-${i}`);
    const entries = await since(m);
    expect(entries.map((e) => e.action)).toEqual(['sign_in_failed', 'sign_in_failed', 'sign_in_failed', 'sign_in_failed', 'sign_in_failed', 'account_locked']);
    expect(entries[5]).toMatchObject({ entity: 'user', entityId: String(user.id), actorId: null, reason: '5 consecutive failed sign-ins' });
    expect(entries[5]!.changes).toEqual([{ field: 'locked', oldValue: false, newValue: true }]);

    const m2 = await mark();
    expect((await login(DEMO.inactive, DEMO_PASSWORD)).status).toBe(423);
    expect(await since(m2)).toMatchObject([{ action: 'sign_in_failed', reason: 'Account is locked' }]);

    const m3 = await mark();
    expect((await request(t.app).post(`/api/users/${user.id}/unlock`).set('Cookie', admin)).status).toBe(200);
    const [unlock] = await since(m3);
    expect(unlock).toMatchObject({ action: 'account_unlocked', entity: 'user', entityId: String(user.id), actorId: adminId, actorName: 'Lena Marchetti' });
    expect(unlock!.changes).toEqual([
      { field: 'locked', oldValue: true, newValue: false },
      { field: 'failedLoginCount', oldValue: 5, newValue: 0 },
    ]);
  });

  it('when a signed-in user signs out, then sign_out is recorded for them', async () => {
    const cookie = await sessionCookie(t.app, DEMO.chemist2);
    const m = await mark();
    expect((await request(t.app).post('/api/auth/logout').set('Cookie', cookie)).status).toBe(204);
    expect(await since(m)).toMatchObject([{ action: 'sign_out', entity: 'session', actorName: 'Idris Okonkwo-Baptiste' }]);
  });

  it('when nobody is signed in, then logout records nothing', async () => {
    const m = await mark();
    expect((await request(t.app).post('/api/auth/logout')).status).toBe(204);
    expect(await since(m)).toEqual([]);
  });
});

describe('user administration events', () => {
  let newId: number;
  it('when an admin creates a user, then a create entry lists each field from null, and never the password', async () => {
    const m = await mark();
    const res = await request(t.app)
      .post('/api/users')
      .set('Cookie', admin)
      .send({ email: 'new.analyst@harbourside.example', fullName: 'Ada Quill', initials: 'aq', role: 'chemist', password: 'long-enough-pass' });
    expect(res.status).toBe(201);
    newId = res.body.user.id;
    const [entry, ...rest] = await since(m);
    expect(rest).toEqual([]);
    expect(entry).toMatchObject({ action: 'create', entity: 'user', entityId: String(newId), actorId: adminId });
    expect(entry!.changes).toEqual([
      { field: 'email', oldValue: null, newValue: 'new.analyst@harbourside.example' },
      { field: 'fullName', oldValue: null, newValue: 'Ada Quill' },
      { field: 'initials', oldValue: null, newValue: 'AQ' },
      { field: 'role', oldValue: null, newValue: 'chemist' },
      { field: 'active', oldValue: null, newValue: true },
      { field: 'mustChangePassword', oldValue: null, newValue: true }, // the admin chose it: temporary
    ]);
    const raw = JSON.stringify(entry);
    expect(raw).not.toContain('long-enough-pass');
    expect(raw).not.toMatch(/\$2[aby]\$/); // no bcrypt hash
  });

  it('when role and active change, then one update entry has exactly those old/new values', async () => {
    const m = await mark();
    const res = await request(t.app).patch(`/api/users/${newId}`).set('Cookie', admin).send({ role: 'qa', active: false, fullName: 'Ada Quill' });
    expect(res.status).toBe(200);
    const entries = await since(m);
    expect(entries).toHaveLength(1);
    expect(entries[0]!.changes).toEqual([
      { field: 'role', oldValue: 'chemist', newValue: 'qa' },
      { field: 'active', oldValue: true, newValue: false },
      { field: 'sessionsEnded', oldValue: null, newValue: 0 }, // deactivation ends every session (none here)
    ]);
  });

  it('when nothing actually changes, then nothing is recorded', async () => {
    const m = await mark();
    expect((await request(t.app).patch(`/api/users/${newId}`).set('Cookie', admin).send({ fullName: 'Ada Quill' })).status).toBe(200);
    expect(await since(m)).toEqual([]);
  });

  it('when the password is set, then "password changed" is recorded without any value', async () => {
    const m = await mark();
    expect((await request(t.app).post(`/api/users/${newId}/password`).set('Cookie', admin).send({ password: 'another-long-pass' })).status).toBe(200);
    const entries = await since(m);
    expect(entries).toMatchObject([{ action: 'password_changed', entity: 'user', entityId: String(newId) }]);
    expect(entries[0]!.changes).toEqual([
      { field: 'password', oldValue: null, newValue: 'password set by an administrator' },
      { field: 'sessionsEnded', oldValue: null, newValue: 0 },
    ]);
    expect(JSON.stringify(entries)).not.toContain('another-long-pass');
  });

  it('when an update is refused (own admin role), then nothing is recorded', async () => {
    const m = await mark();
    expect((await request(t.app).patch(`/api/users/${adminId}`).set('Cookie', admin).send({ role: 'qa' })).status).toBe(409);
    expect(await since(m)).toEqual([]);
  });
});

describe('settings events', () => {
  it('when an admin changes settings, then one setting_change per changed key with old and new values exactly as sent', async () => {
    const m = await mark();
    const res = await request(t.app)
      .put('/api/settings')
      .set('Cookie', admin)
      .send({ readingWindowPct: '2.50', roundingRule: 'half-even', defaultRoomConditions: { temperatureC: '21.50' } });
    expect(res.status).toBe(200);
    const entries = await since(m);
    expect(entries.map((e) => [e.action, e.entity, e.entityId])).toEqual([
      ['setting_change', 'setting', 'defaultRoomConditions'],
      ['setting_change', 'setting', 'readingWindowPct'],
    ]); // in the settings schema's key order; roundingRule was already half-even: no entry
    expect(entries[0]!.changes).toEqual([{ field: 'defaultRoomConditions.temperatureC', oldValue: '20.0', newValue: '21.50' }]);
    expect(entries[1]!.changes).toEqual([{ field: 'readingWindowPct', oldValue: '5', newValue: '2.50' }]);
    expect(entries[0]).toMatchObject({ actorId: adminId, actorName: 'Lena Marchetti' });
  });

  it('when a settings change is invalid, then 400 and neither the value nor an entry is written', async () => {
    const m = await mark();
    const res = await request(t.app).put('/api/settings').set('Cookie', admin).send({ readingWindowPct: '80' });
    expect(res.status).toBe(400);
    expect(await since(m)).toEqual([]);
  });
});

describe('GET /api/audit', () => {
  it('when QA lists the trail, then newest first with paging totals', async () => {
    const res = await request(t.app).get('/api/audit?pageSize=3').set('Cookie', qa);
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ page: 1, pageSize: 3, total: await AuditEntry.count() });
    const ids = res.body.items.map((e: { id: number }) => e.id);
    expect(ids).toHaveLength(3);
    expect([...ids].sort((a: number, b: number) => b - a)).toEqual(ids);
    expect(ids[0]).toBe(await mark());
    const page2 = await request(t.app).get('/api/audit?pageSize=3&page=2').set('Cookie', qa);
    expect(page2.body.items[0].id).toBe(ids[2] - 1);
  });

  it('when filtered by entity, entityId, action and actor, then only matching entries', async () => {
    const res = await request(t.app).get(`/api/audit?entity=setting&entityId=readingWindowPct&action=setting_change&actorId=${adminId}`).set('Cookie', qa);
    expect(res.status).toBe(200);
    expect(res.body.total).toBe(1);
    expect(res.body.items[0].changes).toEqual([{ field: 'readingWindowPct', oldValue: '5', newValue: '2.50' }]);
  });

  it('when searched, then the match is case-insensitive over names, ids, values and reasons, and % is literal', async () => {
    const res = await request(t.app).get('/api/audit?search=ADA%20QUILL').set('Cookie', qa);
    expect(res.body.total).toBeGreaterThanOrEqual(1);
    expect(res.body.items.every((e: object) => JSON.stringify(e).toLowerCase().includes('ada quill'))).toBe(true);
    // '%' must match only entries that contain a literal '%' (as a LIKE wildcard it would match everything).
    const pct = await request(t.app).get('/api/audit?search=%25&pageSize=200').set('Cookie', qa);
    expect(pct.status).toBe(200);
    expect(pct.body.total).toBeLessThan(await AuditEntry.count());
    expect(pct.body.items.every((e: object) => JSON.stringify(e).includes('%'))).toBe(true);
  });

  it('when filtered by dates, then from/to are lab days (the lab’s zone, Europe/London in the tests), both included', async () => {
    const today = labDate(new Date(), 'Europe/London'); // the boundaries themselves: tests/shared/prep/lab-time.test.ts
    const all = await request(t.app).get(`/api/audit?from=${today}&to=${today}`).set('Cookie', qa);
    expect(all.body.total).toBe(await AuditEntry.count());
    const past = await request(t.app).get('/api/audit?from=2001-01-01&to=2001-12-31').set('Cookie', qa);
    expect(past.body).toMatchObject({ total: 0, items: [] });
  });

  it('when filters are malformed, then 400 with the fields named', async () => {
    const res = await request(t.app).get('/api/audit?from=2026-02-30&to=yesterday&page=0&pageSize=500&actorId=abc').set('Cookie', qa);
    expect(res.status).toBe(400);
    expectErrorBody(res.body, 'validation_failed');
    expect(Object.keys(res.body.error.fields).sort()).toEqual(['actorId', 'from', 'page', 'pageSize', 'to']);
    const order = await request(t.app).get('/api/audit?from=2026-03-02&to=2026-03-01').set('Cookie', qa);
    expect(order.status).toBe(400);
    expect(order.body.error.fields).toEqual({ to: 'The "to" date must not be before the "from" date' });
    const repeated = await request(t.app).get('/api/audit?entity=a&entity=b').set('Cookie', qa);
    expect(repeated.status).toBe(400);
  });
});

describe('GET /api/audit/export.csv', () => {
  it('when exported, then an attachment with a header row, CRLF lines and RFC 4180 quoting; the export itself is audited', async () => {
    const res = await request(t.app).get('/api/audit/export.csv?entity=user').set('Cookie', admin);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/^text\/csv/);
    expect(res.headers['content-disposition']).toMatch(/^attachment; filename="tarebook-audit-\d{8}T\d{6}Z\.csv"$/);
    const lines = res.text.split('\r\n');
    expect(lines[0]).toBe('id,occurred_at_utc,actor_id,actor_name,action,entity,entity_id,changes,reason,prev_hash,hash,session_id');
    expect(lines.at(-1)).toBe(''); // every line ends in CRLF
    const body = lines.slice(1, -1);
    expect(body.length).toBe(await AuditEntry.count({ where: { entity: 'user' } }));
    // A changes cell holds commas and quotes: quoted, inner quotes doubled (RFC 4180 §2.6–2.7).
    expect(res.text).toContain('"[{""field"":""locked"",""newValue"":false,""oldValue"":true},{""field"":""failedLoginCount"",""newValue"":0,""oldValue"":5}]"');
    expect(body.every((l) => /^\d+,\d{4}-/.test(l))).toBe(true);
    const [last] = await since((await mark()) - 1);
    expect(last).toMatchObject({ action: 'export', entity: 'audit_trail', actorId: adminId });
    expect(last!.changes).toEqual([{ field: 'filter.entity', oldValue: null, newValue: 'user' }]);
  });

  it('when a reason holds a comma, a quote and a line break, then the cell is quoted and reads back exactly', async () => {
    const { writeTransaction } = await import('../../server/db/transaction.ts');
    const { recordAudit } = await import('../../server/services/audit.service.ts');
    await writeTransaction((tx) =>
      recordAudit({ actor: { id: adminId, fullName: 'Lena Marchetti' }, action: 'update', entity: 'balance', entityId: 'BAL-CSV', reason: 'wrong flask, "B" not "A"\nre-entered' }, tx),
    );
    const res = await request(t.app).get('/api/audit/export.csv?entityId=BAL-CSV').set('Cookie', qa);
    expect(res.text).toContain(',"wrong flask, ""B"" not ""A""\nre-entered",');
  });

  it('when the filters are malformed, then 400 JSON, not a CSV', async () => {
    const res = await request(t.app).get('/api/audit/export.csv?from=12/03/2026').set('Cookie', qa);
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toHaveProperty('from');
  });
});

describe('POST /api/audit/verify', () => {
  it('when the chain is intact, then ok with the count, and the check is recorded afterwards as its own entry', async () => {
    const before = await AuditEntry.count();
    const res = await request(t.app).post('/api/audit/verify').set('Cookie', qa);
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ ok: true, checked: before });
    const [entry] = await since((await mark()) - 1);
    expect(entry).toMatchObject({ action: 'verify_chain', entity: 'audit_trail', actorName: 'Tomasz Achterberg' });
    expect(entry!.changes).toEqual([
      { field: 'result', oldValue: null, newValue: 'intact' },
      { field: 'checked', oldValue: null, newValue: before },
    ]);
  });
});

describe('GET /api/audit/actors', () => {
  it('when QA opens the user filter, then everyone who acted appears once, by their latest printed name', async () => {
    const res = await request(t.app).get('/api/audit/actors').set('Cookie', qa);
    expect(res.status).toBe(200);
    const names = res.body.items.map((a: { name: string }) => a.name);
    expect(names).toContain('Lena Marchetti');
    expect(names).toContain('Tomasz Achterberg');
    expect(new Set(res.body.items.map((a: { id: number }) => a.id)).size).toBe(names.length);
    expect(res.body.items).toContainEqual({ id: adminId, name: 'Lena Marchetti' });
  });
});

describe('GET /api/audit/records/:entity/:entityId', () => {
  it('when any signed-in role asks for one record, then its trail comes oldest first', async () => {
    const res = await request(t.app).get('/api/audit/records/setting/readingWindowPct').set('Cookie', technician);
    expect(res.status).toBe(200);
    expect(res.body.items).toHaveLength(1);
    expect(res.body.items[0]).toMatchObject({ action: 'setting_change', entityId: 'readingWindowPct' });
    const user = await request(t.app).get(`/api/audit/records/user/${await userIdByEmail(t.app, admin, DEMO.inactive)}`).set('Cookie', qa);
    const ids = user.body.items.map((e: { id: number }) => e.id);
    expect(ids.length).toBeGreaterThanOrEqual(2);
    expect([...ids].sort((a: number, b: number) => a - b)).toEqual(ids);
  });

  it('when a chemist asks for security records (users, sessions), then 403; an unknown record type shape is 404', async () => {
    const res = await request(t.app).get(`/api/audit/records/user/${adminId}`).set('Cookie', chemist);
    expect(res.status).toBe(403);
    expectErrorBody(res.body, 'forbidden');
    expect((await request(t.app).get('/api/audit/records/session/1').set('Cookie', technician)).status).toBe(403);
    const bad = await request(t.app).get('/api/audit/records/DROP%20TABLE/1').set('Cookie', qa);
    expect(bad.status).toBe(404);
    expectErrorBody(bad.body, 'not_found');
  });

  it('when the trail of a preparation is asked for, then it holds the entries of its weighings and make-ups too (aliquots and gravimetric readings alike), oldest first', async () => {
    const sequelize = AuditEntry.sequelize!;
    for (const [entity, table] of [['weighing', 'weighings'], ['make_up', 'make_ups']] as const) {
      const [part] = (await sequelize.query(`SELECT id, preparation_id AS preparationId FROM ${table} ORDER BY id LIMIT 1`))[0] as Array<{ id: number; preparationId: number }>;
      expect(part, `the demo lab has a row in ${table}`).toBeDefined();
      const res = await request(t.app).get(`/api/audit/records/preparation/${part!.preparationId}`).set('Cookie', technician);
      expect(res.status).toBe(200);
      const items = res.body.items as Array<{ id: number; entity: string; entityId: string }>;
      expect(items).toContainEqual(expect.objectContaining({ entity, entityId: String(part!.id) }));
      expect(items.some((e) => e.entity === 'preparation' && e.entityId === String(part!.preparationId))).toBe(true);
      const ids = items.map((e) => e.id);
      expect([...ids].sort((a, b) => a - b)).toEqual(ids);
      // nothing of another preparation
      const own = new Set((await sequelize.query(`SELECT CAST(id AS TEXT) AS id FROM ${table} WHERE preparation_id = ?`, { replacements: [part!.preparationId] }))[0].map((r) => (r as { id: string }).id));
      for (const e of items.filter((i) => i.entity === entity)) expect(own.has(e.entityId)).toBe(true);
    }
  });

  it('when a record has no history, then an empty list', async () => {
    const res = await request(t.app).get('/api/audit/records/preparation/HWL-NOPE').set('Cookie', chemist);
    expect(res.body).toEqual({ items: [] });
  });
});

describe('roles and the absence of edit routes', () => {
  const routes: Array<[method: 'get' | 'post', path: string, reviewersOnly: boolean]> = [
    ['get', '/api/audit', true],
    ['get', '/api/audit/export.csv', true],
    ['post', '/api/audit/verify', true],
    ['get', '/api/audit/records/preparation/1', false],
  ];
  const who = () => ({ chemist, technician, qa, admin });
  for (const [method, path, reviewersOnly] of routes) {
    it(`${method.toUpperCase()} ${path}: signed out 401; chemist/technician ${reviewersOnly ? '403' : '200'}; qa/admin 200`, async () => {
      const out = await request(t.app)[method](path);
      expect(out.status).toBe(401);
      expectErrorBody(out.body, 'unauthenticated');
      for (const [role, cookie] of Object.entries(who())) {
        const res = await request(t.app)[method](path).set('Cookie', cookie);
        const want = reviewersOnly && (role === 'chemist' || role === 'technician') ? 403 : 200;
        expect(res.status, `${role}: ${JSON.stringify(res.body)}`).toBe(want);
        if (want === 403) expect(res.body.error.message).toBe('This needs the QA or admin role');
      }
    });
  }

  it('when anyone tries to change or delete an entry over HTTP, then 404 and the chain is untouched', async () => {
    const id = await mark();
    for (const method of ['put', 'patch', 'delete'] as const) {
      for (const path of [`/api/audit/${id}`, '/api/audit', `/api/audit/records/setting/readingWindowPct`]) {
        const res = await request(t.app)[method](path).set('Cookie', admin).send({ reason: 'edited' });
        expect(res.status, `${method} ${path}`).toBe(404);
      }
    }
    const post = await request(t.app).post('/api/audit').set('Cookie', admin).send({ action: 'sign', actorId: 1, occurredAt: '2001-01-01T00:00:00.000Z' });
    expect(post.status).toBe(404);
    expect((await request(t.app).post('/api/audit/verify').set('Cookie', admin)).body.ok).toBe(true);
  });
});
