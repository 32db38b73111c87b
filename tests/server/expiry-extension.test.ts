// Expired on read and QA expiry extensions (REQUIREMENTS EX-01 caps, EX-04 expiry enforced, EX-05 extension with
// documented evidence and a QA e-signature; ES-02 meaning, ES-03 signatures linked by hash, ES-04 password at
// signing, ES-08 first-signing statement; PW-03 failed passwords counted; AT-01 audited).
//
// Time passes in this file: the records are made today, then the clock (Date only) moves 45 days on, past the
// 30-day lab default stability period, and every user signs in again. Nothing else about the records changes,
// so their signatures stay valid while they show as expired.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { EXPIRY_EXTENSIONS_APPEND_ONLY } from '../../server/db/migrations/0010-expiry-extensions.ts';
import { AuditEntry, ExpiryExtension, Preparation } from '../../server/db/models/index.ts';
import { currentRecordHash, verifySignatures } from '../../server/services/signatures.service.ts';
import { addDays } from '../../shared/prep/dates.ts';
import { EXPIRY_EXTENSION_MEANING_TEXT } from '../../shared/schemas/expiry.ts';
import { VERIFICATION_CHECKLIST } from '../../shared/schemas/preparations.ts';
import { DEMO, DEMO_PASSWORD, expectErrorBody, makeTestApp, sessionCookie, type TestApp } from './helpers/test-app.ts';
import { demoDay } from '../../seed/demo-clock.ts';
import { freeFlask } from './helpers/free-flask.ts';

type Who = 'signedOut' | 'chemist' | 'chemist2' | 'technician' | 'qa' | 'admin';
const PEOPLE = ['chemist', 'chemist2', 'technician', 'qa', 'admin'] as const;
let t: TestApp;
const cookie: Partial<Record<Who, string>> = {};
const ids = { material: {} as Record<string, number>, balance: {} as Record<string, number>, ware: {} as Record<string, number>, solvent: {} as Record<string, { id: number; lot: string }>, template: 0 };

const send = (who: Who, method: 'get' | 'post', path: string, body?: unknown) => {
  const r = request(t.app)[method](path);
  if (who !== 'signedOut') r.set('Cookie', cookie[who]!);
  return body === undefined ? r : r.send(body as object);
};
const CONDITIONS = { temperatureC: '21', pressureHPa: '985', relativeHumidityPct: '45' };
const CHECKLIST = Object.fromEntries(VERIFICATION_CHECKLIST.map((c) => [c.key, true]));
/** The lab zone of the demo lab is Europe/London; the moved clock is set to noon UTC, away from midnight edges. */
const realToday = new Date().toISOString().slice(0, 10);
/** The demo lot's expiry as seeded (before the clock is moved): seed/demo-clock.ts moves demo dates with the seeding day. */
const LOT_EXPIRY = demoDay('2028-02-29');
const DAY_AFTER_LOT_EXPIRY = demoDay('2028-03-01');
const TODAY = addDays(realToday, 45);

const signIn = async () => {
  for (const who of PEOPLE) cookie[who] = await sessionCookie(t.app, DEMO[who]);
};

async function plan() {
  const p = await send('chemist', 'post', '/api/preparations', {
    materialId: ids.material['Pb(NO3)2'],
    analyteFormula: 'Pb',
    target: { value: '1000', unit: 'mg/L' },
    flaskId: ids.ware['VF-100-01'],
    balanceId: ids.balance['BAL-SM1'],
    conditions: { source: 'measured', ...CONDITIONS },
  });
  expect(p.status, JSON.stringify(p.body)).toBe(201);
  return p.body as { id: number; identifier: string; expiresOn: string };
}

async function stock() {
  const p = await plan();
  const w = await send('chemist', 'post', `/api/preparations/${p.identifier}/weighings`, { mode: 'direct', reading: '160.07', unit: 'mg', conditions: CONDITIONS });
  expect(w.status, JSON.stringify(w.body)).toBe(201);
  const water = ids.solvent['Ultrapure water']!;
  const m = await send('chemist', 'post', `/api/preparations/${p.identifier}/make-up`, { flaskIdentifier: (await freeFlask(t.app, cookie.chemist!)).identifier, solventId: water.id, solventLot: water.lot, solutionTemperatureC: '20.0', applyTemperatureCorrection: false });
  expect(m.status, JSON.stringify(m.body)).toBe(201);
  return m.body as { id: number; identifier: string; expiresOn: string; weighings: Array<{ id: number }> };
}

const signAs = (who: Who, key: string, meaning: 'prepared' | 'verified' | 'returned' | 'discarded', reason?: string) =>
  send(who, 'post', `/api/preparations/${key}/signatures`, { meaning, password: DEMO_PASSWORD, acknowledgeResponsibility: true, ...(meaning === 'verified' ? { checklist: CHECKLIST } : {}), ...(reason ? { reason } : {}) });

async function signed(meaning: 'prepared' | 'returned' | 'verified' | 'discarded') {
  const s = await stock();
  if (meaning === 'discarded') {
    expect((await signAs('chemist', s.identifier, 'discarded', 'spilled during transfer')).status).toBe(201);
    return s;
  }
  expect((await signAs('chemist', s.identifier, 'prepared')).status).toBe(201);
  if (meaning === 'returned') expect((await signAs('chemist2', s.identifier, 'returned', 'recheck the flask identifier')).status).toBe(201);
  if (meaning === 'verified') expect((await signAs('chemist2', s.identifier, 'verified')).status).toBe(201);
  return s;
}

const dilutionBody = () => ({ method: 'volumetric', target: { value: '10', unit: 'mg/L' }, pipetteId: ids.ware['BP-1-01'], flaskId: ids.ware['VF-100-02'] });

const extend = (who: Who, key: string, over: Record<string, unknown> = {}) =>
  send(who, 'post', `/api/preparations/${key}/expiry-extensions`, { newExpiresOn: addDays(TODAY, 20), reason: 'Stability study ST-2026-11: Pb 1000 mg/L in 2 % HNO3 within 0.5 % at 90 days', password: DEMO_PASSWORD, acknowledgeResponsibility: true, ...over });

const detail = async (key: string, who: Who = 'qa') => (await send(who, 'get', `/api/preparations/${key}`)).body;
const labelPrint = (key: string) => send('technician', 'post', `/api/preparations/${key}/label-prints`, { templateId: ids.template, copies: 1 });

const made = {} as Record<'planned' | 'prepared' | 'returned' | 'verified' | 'discarded' | 'forLabels' | 'parent' | 'amend', { id: number; identifier: string; expiresOn: string; weighings?: Array<{ id: number }> }>;
let dilution: { id: number; identifier: string; expiresOn: string };

beforeAll(async () => {
  t = await makeTestApp();
  await signIn();
  const get = async (p: string) => (await send('chemist', 'get', p)).body.items as any[];
  for (const m of await get('/api/materials')) ids.material[m.formula] = m.id;
  for (const b of await get('/api/balances')) ids.balance[b.identifier] = b.id;
  for (const w of await get('/api/volumetric-ware?pageSize=100')) ids.ware[w.identifier] = w.id;
  for (const s of await get('/api/solvents')) ids.solvent[s.name] = { id: s.id, lot: s.lot };
  ids.template = (await get('/api/label-templates')).find((x) => x.name === 'Bench vial 38×25 full').id;

  made.planned = await plan();
  made.prepared = await signed('prepared');
  made.returned = await signed('returned');
  made.verified = await signed('verified');
  made.discarded = await signed('discarded');
  made.forLabels = await signed('verified');
  made.amend = await signed('verified');
  made.parent = await signed('verified');
  // a dilution of the verified parent, made up (its expiry is capped by the parent's, EX-01)
  const d = await send('chemist', 'post', `/api/preparations/${made.parent.identifier}/dilutions`, dilutionBody());
  expect(d.status, JSON.stringify(d.body)).toBe(201);
  expect((await send('chemist', 'post', `/api/preparations/${d.body.identifier}/aliquots`, { pipetteIdentifier: 'BP-1-01' })).status).toBe(201);
  const water = ids.solvent['Ultrapure water']!;
  const m = await send('chemist', 'post', `/api/preparations/${d.body.identifier}/make-up`, { flaskIdentifier: (await freeFlask(t.app, cookie.chemist!)).identifier, solventId: water.id, solventLot: water.lot, solutionTemperatureC: '20.0', applyTemperatureCorrection: false });
  expect(m.status, JSON.stringify(m.body)).toBe(201);
  dilution = m.body;
  for (const p of Object.values(made)) expect(p.expiresOn < TODAY).toBe(true);

  // 45 days later (only Date moves; timers stay real), everyone signs in again (sessions last 12 h)
  vi.useFakeTimers({ toFake: ['Date'] });
  vi.setSystemTime(new Date(`${TODAY}T12:00:00Z`));
  await signIn();
}, 180_000);

afterAll(async () => {
  vi.useRealTimers();
  await t.close();
});

describe('expired on read (REQUIREMENTS EX-04)', () => {
  it.each(['planned', 'prepared', 'returned', 'verified'] as const)('a %s record past its expiry shows as expired, its stored status kept', async (stored) => {
    const d = await detail(made[stored].identifier, 'chemist');
    expect(d.status).toBe('expired');
    expect(d.statusBeforeExpiry).toBe(stored);
    expect(d.expiry.expiresOn).toBe(made[stored].expiresOn);
  });

  it('a discarded record stays discarded (no statusBeforeExpiry)', async () => {
    const d = await detail(made.discarded.identifier, 'chemist');
    expect(d.status).toBe('discarded');
    expect(d.statusBeforeExpiry).toBeUndefined();
  });

  it('a record made today is not expired', async () => {
    const fresh = await plan();
    const d = await detail(fresh.identifier, 'chemist');
    expect(d.status).toBe('planned');
    expect(d.statusBeforeExpiry).toBeUndefined();
  });

  it('the list shows expired records as expired; status=expired finds them and status=verified does not', async () => {
    const expired = (await send('qa', 'get', '/api/preparations?status=expired&pageSize=100')).body;
    const byId = new Map((expired.items as any[]).map((i) => [i.identifier, i]));
    for (const stored of ['planned', 'prepared', 'returned', 'verified'] as const) {
      expect(byId.get(made[stored].identifier), stored).toMatchObject({ status: 'expired', statusBeforeExpiry: stored });
    }
    expect(byId.has(made.discarded.identifier)).toBe(false);
    expect((expired.items as any[]).every((i) => i.status === 'expired')).toBe(true);
    const verified = (await send('qa', 'get', '/api/preparations?status=verified&pageSize=100')).body;
    expect((verified.items as any[]).map((i) => i.identifier)).not.toContain(made.verified.identifier);
    expect((verified.items as any[]).every((i) => i.status === 'verified' && i.expiresOn >= TODAY)).toBe(true);
    const all = (await send('qa', 'get', '/api/preparations?pageSize=100')).body;
    expect((all.items as any[]).find((i) => i.identifier === made.verified.identifier)).toMatchObject({ status: 'expired', statusBeforeExpiry: 'verified' });
  });

  it('showing a record as expired changes nothing signed: its signatures stay valid', async () => {
    const d = await detail(made.verified.identifier);
    expect(d.signatures.map((s: any) => [s.meaning, s.valid])).toEqual([['prepared', true], ['verified', true]]);
    expect((await verifySignatures(made.verified.id)).every((c) => c.ok)).toBe(true);
    const row = (await Preparation.findByPk(made.verified.id))!;
    expect(row.status).toBe('verified'); // stored status unchanged
  });

  it('an expired record cannot have labels printed nor be a parent', async () => {
    const labels = await labelPrint(made.forLabels.identifier);
    expect(labels.status).toBe(409);
    expect(labels.body.error.message).toContain(`expired on ${made.forLabels.expiresOn}`);
    const child = await send('chemist', 'post', `/api/preparations/${made.forLabels.identifier}/dilutions`, dilutionBody());
    expect(child.status).toBe(422);
    expect(child.body.error.message).toBe(`${made.forLabels.identifier} expired on ${made.forLabels.expiresOn} and cannot be used as a parent`);
  });
});

describe('POST /api/preparations/:key/expiry-extensions: who and what (REQUIREMENTS EX-05, ES-04, ES-08)', () => {
  it.each(['chemist', 'technician', 'admin'] as const)('as %s: 403 (only QA approves an extension)', async (who) => {
    const res = await extend(who, made.verified.identifier);
    expect(res.status).toBe(403);
    expectErrorBody(res.body, 'forbidden');
    expect(res.body.error.message).toMatch(/needs the QA role/);
  });

  it('signed out: 401', async () => {
    const res = await extend('signedOut', made.verified.identifier);
    expect(res.status).toBe(401);
    expectErrorBody(res.body, 'unauthenticated');
  });

  it('unknown record: 404', async () => {
    expect((await extend('qa', 'HWL-2026-9999')).status).toBe(404);
  });

  it('reason, date and password are required, at the field (400)', async () => {
    const noReason = await extend('qa', made.verified.identifier, { reason: '  ' });
    expect(noReason.status).toBe(400);
    expect(noReason.body.error.fields.reason).toMatch(/reason/i);
    const missing = await send('qa', 'post', `/api/preparations/${made.verified.identifier}/expiry-extensions`, { newExpiresOn: addDays(TODAY, 5), password: DEMO_PASSWORD });
    expect(missing.status).toBe(400);
    expect(missing.body.error.fields.reason).toBeDefined();
    const badDate = await extend('qa', made.verified.identifier, { newExpiresOn: '2027-02-30' });
    expect(badDate.status).toBe(400);
    expect(badDate.body.error.fields.newExpiresOn).toMatch(/YYYY-MM-DD/);
    const noPassword = await extend('qa', made.verified.identifier, { password: '' });
    expect(noPassword.status).toBe(400);
    expect(noPassword.body.error.fields.password).toBeDefined();
  });

  it('the first signature needs the responsibility statement acknowledged (400 at the field)', async () => {
    const res = await extend('qa', made.verified.identifier, { acknowledgeResponsibility: undefined });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.acknowledgeResponsibility).toMatch(/electronic signature/);
  });

  it('a wrong password is 401 at the field, counted and audited, and nothing is stored', async () => {
    const res = await extend('qa', made.verified.identifier, { password: 'not-the-password' });
    expect(res.status).toBe(401);
    expectErrorBody(res.body, 'signature_password');
    expect(res.body.error.fields.password).toBeDefined();
    const failed = await AuditEntry.findAll({ where: { action: 'signature_failed', entityId: String(made.verified.id) } });
    expect(failed.length).toBe(1);
    expect(failed[0]!.reason).toMatch(/expiry extension/);
    expect(await ExpiryExtension.count({ where: { preparationId: made.verified.id } })).toBe(0);
    expect((await detail(made.verified.identifier)).expiry.expiresOn).toBe(made.verified.expiresOn);
  });

  it('the new date must be later than the current expiry and not already past (422 at the field)', async () => {
    const same = await extend('qa', made.verified.identifier, { newExpiresOn: made.verified.expiresOn });
    expect(same.status).toBe(422);
    expect(same.body.error.fields.newExpiresOn).toBe(`The new expiry must be later than the current expiry ${made.verified.expiresOn}`);
    const earlier = await extend('qa', made.verified.identifier, { newExpiresOn: addDays(made.verified.expiresOn, -1) });
    expect(earlier.status).toBe(422);
    const stillPast = await extend('qa', made.verified.identifier, { newExpiresOn: addDays(TODAY, -1) });
    expect(stillPast.status).toBe(422);
    expect(stillPast.body.error.fields.newExpiresOn).toMatch(/already past/);
  });

  it('never beyond the reference material lot (422 naming it; demo Pb(NO3)2 lot NRM-24-0931 expires 2028-02-29)', async () => {
    const d = await detail(made.verified.identifier);
    expect(d.expiryCap).toEqual({ date: LOT_EXPIRY, limitedBy: 'reference material Lead(II) nitrate lot NRM-24-0931', kind: 'material' });
    const res = await extend('qa', made.verified.identifier, { newExpiresOn: DAY_AFTER_LOT_EXPIRY }); // the day after the lot's expiry (demo dates move with the seeding day)
    expect(res.status).toBe(422);
    expect(res.body.error.fields.newExpiresOn).toBe(`The new expiry cannot be later than ${LOT_EXPIRY}, limited by reference material Lead(II) nitrate lot NRM-24-0931`);
  });

  it('a discarded record, or one not made up yet, cannot be extended (409)', async () => {
    const discarded = await extend('qa', made.discarded.identifier);
    expect(discarded.status).toBe(409);
    expect(discarded.body.error.message).toMatch(/discarded/);
    const planned = await extend('qa', made.planned.identifier);
    expect(planned.status).toBe(409);
    expect(planned.body.error.message).toMatch(/not been made up/);
  });
});

describe('an extension by QA', () => {
  let extended: any;

  it('is stored with the reason and the signature, moves the expiry and leaves the record verified', async () => {
    const before = await currentRecordHash(made.forLabels.id);
    const res = await extend('qa', made.forLabels.identifier, { newExpiresOn: addDays(TODAY, 20) });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    extended = res.body;
    expect(extended.status).toBe('verified');
    expect(extended.statusBeforeExpiry).toBeUndefined();
    expect(extended.version).toBe(before.version); // no new version: the prepared and verified signatures still apply
    expect(extended.expiresOn).toBe(addDays(TODAY, 20));
    expect(extended.expiry.reason).toBe(`extended by QA Tomasz Achterberg on ${TODAY}: Stability study ST-2026-11: Pb 1000 mg/L in 2 % HNO3 within 0.5 % at 90 days`);
    expect(extended.expiryExtensions[0].signedBy.fullName).toBe('Tomasz Achterberg');
    expect(extended.expiryExtensions).toHaveLength(1);
    expect(extended.expiryExtensions[0]).toMatchObject({
      previousExpiresOn: made.forLabels.expiresOn,
      newExpiresOn: addDays(TODAY, 20),
      reason: 'Stability study ST-2026-11: Pb 1000 mg/L in 2 % HNO3 within 0.5 % at 90 days',
      meaningText: EXPIRY_EXTENSION_MEANING_TEXT,
      recordVersion: before.version,
      recordHash: before.hash,
      cap: { date: LOT_EXPIRY, limitedBy: 'reference material Lead(II) nitrate lot NRM-24-0931' },
    });
    expect(extended.expiryExtensions[0].signedAt).toBe(new Date(`${TODAY}T12:00:00Z`).toISOString());
    const row = (await ExpiryExtension.findOne({ where: { preparationId: made.forLabels.id } }))!;
    expect(row.previousExpiryReason).toMatch(/limited by/);
  });

  it('keeps the earlier signatures valid: the hash of the record is the one signed (ES-03)', async () => {
    expect(extended.signatures.map((s: any) => [s.meaning, s.valid])).toEqual([['prepared', true], ['verified', true]]);
    const checks = await verifySignatures(made.forLabels.id);
    expect(checks.map((c) => c.ok)).toEqual([true, true]);
    expect((await currentRecordHash(made.forLabels.id)).hash).toBe(extended.expiryExtensions[0].recordHash);
    const fresh = await detail(made.forLabels.identifier, 'chemist');
    expect(fresh.signatures.every((s: any) => s.valid)).toBe(true);
    expect(fresh.status).toBe('verified');
  });

  it('is audited: expiry_extended with old and new values and the reason (AT-01)', async () => {
    const audit = await AuditEntry.findAll({ where: { action: 'expiry_extended', entityId: String(made.forLabels.id) } });
    expect(audit).toHaveLength(1);
    const a = audit[0]!;
    expect(a.reason).toMatch(/ST-2026-11/);
    const changes = JSON.parse(a.changes as unknown as string) as Array<{ field: string; oldValue: unknown; newValue: unknown }>;
    expect(changes).toEqual(expect.arrayContaining([{ field: 'expiresOn', oldValue: made.forLabels.expiresOn, newValue: addDays(TODAY, 20) }]));
    expect(changes.find((c) => c.field === 'expiryReason')!.newValue).toMatch(/^extended by QA /);
  });

  it('is listed for every role; the form is for QA only (canExtendExpiry)', async () => {
    const forChemist = await detail(made.forLabels.identifier, 'chemist');
    expect(forChemist.expiryExtensions).toHaveLength(1);
    expect(forChemist.canExtendExpiry).toEqual({ allowed: false, reason: 'Only QA can extend an expiry' });
    const forQa = await detail(made.forLabels.identifier, 'qa');
    expect(forQa.canExtendExpiry).toEqual({ allowed: true });
  });

  it('makes the record usable again: labels print and it can be a parent', async () => {
    const labels = await labelPrint(made.forLabels.identifier);
    expect(labels.status, JSON.stringify(labels.body)).toBe(201);
    const child = await send('chemist', 'post', `/api/preparations/${made.forLabels.identifier}/dilutions`, dilutionBody());
    expect(child.status, JSON.stringify(child.body)).toBe(201);
    expect(child.body.dilution.parent.snapshot.expiresOn).toBe(addDays(TODAY, 20));
    expect(child.body.expiresOn <= addDays(TODAY, 20)).toBe(true);
  });

  it('a second extension appends a row; the append-only triggers refuse UPDATE and DELETE', async () => {
    const res = await extend('qa', made.forLabels.identifier, { newExpiresOn: addDays(TODAY, 40), reason: 'Second stability point ST-2026-11 at 120 days' });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.expiryExtensions.map((e: any) => [e.previousExpiresOn, e.newExpiresOn])).toEqual([
      [made.forLabels.expiresOn, addDays(TODAY, 20)],
      [addDays(TODAY, 20), addDays(TODAY, 40)],
    ]);
    expect(res.body.signatures.every((s: any) => s.valid)).toBe(true);
    expect((await verifySignatures(made.forLabels.id)).every((c) => c.ok)).toBe(true);
    const refused = async (sql: string) => {
      try {
        await t.sequelize.query(sql, { replacements: { id: made.forLabels.id } });
      } catch (e) {
        const err = e as { message: string; original?: { message?: string } };
        return `${err.original?.message ?? ''} ${err.message}`;
      }
      return 'not refused';
    };
    expect(await refused("UPDATE expiry_extensions SET reason = 'edited' WHERE preparation_id = :id")).toContain(EXPIRY_EXTENSIONS_APPEND_ONLY);
    expect(await refused("UPDATE expiry_extensions SET new_expires_on = '2099-01-01' WHERE preparation_id = :id")).toContain(EXPIRY_EXTENSIONS_APPEND_ONLY);
    expect(await refused('DELETE FROM expiry_extensions WHERE preparation_id = :id')).toContain(EXPIRY_EXTENSIONS_APPEND_ONLY);
    expect(await ExpiryExtension.count({ where: { preparationId: made.forLabels.id } })).toBe(2);
  });
});

describe('the cap by the parent (REQUIREMENTS EX-01)', () => {
  it('a dilution cannot outlive its parent: 422 naming the parent; once the parent is extended, up to its new expiry', async () => {
    const d0 = await detail(dilution.identifier);
    expect(d0.status).toBe('expired');
    expect(d0.expiryCap).toMatchObject({ date: made.parent.expiresOn, limitedBy: `parent ${made.parent.identifier}`, kind: 'parent' });
    expect(d0.canExtendExpiry.allowed).toBe(false);
    expect(d0.canExtendExpiry.reason).toContain(`parent ${made.parent.identifier}`);
    const refused = await extend('qa', dilution.identifier, { newExpiresOn: addDays(TODAY, 10) });
    expect(refused.status).toBe(422);
    expect(refused.body.error.fields.newExpiresOn).toBe(`The new expiry cannot be later than ${made.parent.expiresOn}, limited by parent ${made.parent.identifier}`);

    // the parent's current expiry is the cap: extend the parent first
    expect((await extend('qa', made.parent.identifier, { newExpiresOn: addDays(TODAY, 60) })).status).toBe(201);
    const d1 = await detail(dilution.identifier);
    expect(d1.expiryCap).toMatchObject({ date: addDays(TODAY, 60), limitedBy: `parent ${made.parent.identifier}` });
    const beyond = await extend('qa', dilution.identifier, { newExpiresOn: addDays(TODAY, 61) });
    expect(beyond.status).toBe(422);
    expect(beyond.body.error.fields.newExpiresOn).toContain(`parent ${made.parent.identifier}`);
    const ok = await extend('qa', dilution.identifier, { newExpiresOn: addDays(TODAY, 60) });
    expect(ok.status, JSON.stringify(ok.body)).toBe(201);
    expect(ok.body.status).toBe('planned'); // the dilution was made up but not signed
    expect(ok.body.expiryExtensions[0].cap).toEqual({ date: addDays(TODAY, 60), limitedBy: `parent ${made.parent.identifier}` });
  });
});

describe('a change after an extension (CO-02)', () => {
  it('an amendment makes a new version that carries the extended expiry; every stored signature still checks out', async () => {
    const ext = await extend('qa', made.amend.identifier, { newExpiresOn: addDays(TODAY, 15) });
    expect(ext.status).toBe(201);
    const w = made.amend.weighings![0]!;
    const res = await send('chemist', 'post', `/api/preparations/${made.amend.identifier}/weighings`, {
      mode: 'direct',
      reading: '160.09',
      unit: 'mg',
      conditions: CONDITIONS,
      supersedesId: w.id,
      correctionReason: 'transcription error, balance printout shows 160.09',
      signature: { password: DEMO_PASSWORD, acknowledgeResponsibility: true },
    });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.version).toBe(ext.body.version + 1);
    expect(res.body.status).toBe('planned');
    expect(res.body.expiresOn).toBe(addDays(TODAY, 15));
    const content = JSON.parse((await currentRecordHash(made.amend.id)).canonical);
    expect(content.expiresOn).toBe(addDays(TODAY, 15));
    expect(content.expiryReason).toMatch(/^extended by QA /);
    const checks = await verifySignatures(made.amend.id);
    expect(checks.map((c) => [c.meaning, c.ok])).toEqual([['prepared', true], ['verified', true], ['amended', true]]);
    expect(res.body.signatures.map((s: any) => [s.meaning, s.valid])).toEqual([['prepared', false], ['verified', false], ['amended', true]]);
  });
});

describe('lockout (REQUIREMENTS PW-03; the signature service counts signing failures)', () => {
  it('consecutive wrong passwords at extension lock the QA account (423), audited', async () => {
    const statuses: number[] = [];
    for (let i = 0; i < t.config.lockoutThreshold; i++) statuses.push((await extend('qa', made.verified.identifier, { password: `wrong-${i}` })).status);
    expect(statuses.slice(0, -1).every((s) => s === 401)).toBe(true);
    expect(statuses.at(-1)).toBe(423);
    // the lock ended the QA session (migration 0016): the cookie is refused; signing in again says locked
    const after = await extend('qa', made.verified.identifier);
    expect(after.status).toBe(401);
    const locked = await request(t.app).post('/api/auth/login').send({ email: DEMO.qa, password: DEMO_PASSWORD });
    expect(locked.status).toBe(423);
    expectErrorBody(locked.body, 'account_locked');
    expect(await AuditEntry.count({ where: { action: 'account_locked' } })).toBe(1);
    expect(await ExpiryExtension.count({ where: { preparationId: made.verified.id } })).toBe(0);
  });
});
