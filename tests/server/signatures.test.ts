// Electronic signatures and second-person verification over HTTP: POST /api/preparations/:key/signatures,
// the state machine (server/services/preparation-status.ts), self-verification, password re-entry and lockout,
// versioning after signing, and the record hash. Requirement rows (REQUIREMENTS.md §1E, §1F, §1G, §1L) are
// named beside each check; the hash checks use SHA-256 (FIPS 180-4) via node:crypto as the independent reference.
import { createHash } from 'node:crypto';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEntry, RecordVersion, Signature, User } from '../../server/db/models/index.ts';
import { SIGNATURES_APPEND_ONLY } from '../../server/db/migrations/0006-signatures.ts';
import { TRANSITIONS, nextStatus } from '../../server/services/preparation-status.ts';
import { currentRecordHash, verifySignatures } from '../../server/services/signatures.service.ts';
import { SIGNATURE_MEANING_TEXT, VERIFICATION_CHECKLIST } from '../../shared/schemas/preparations.ts';
import { choosePassword, DEMO, DEMO_PASSWORD, expectErrorBody, makeTestApp, sessionCookie, TEMPORARY_PASSWORD, type TestApp } from './helpers/test-app.ts';
import { demoInstant } from '../../seed/demo-clock.ts';
import { freeFlask } from './helpers/free-flask.ts';

type Who = 'signedOut' | 'chemist' | 'chemist2' | 'chemist3' | 'technician' | 'qa' | 'admin';

let t: TestApp;
const cookie: Partial<Record<Who, string>> = {};
const userId: Partial<Record<Who, number>> = {};
const ids = { material: {} as Record<string, number>, balance: {} as Record<string, number>, ware: {} as Record<string, number>, solvent: {} as Record<string, { id: number; lot: string }> };
const CHEMIST3 = { email: 'chemist3.sign@harbourside.example', password: 'third-chemist-pass-2026' };
const passwordOf = (who: Who) => (who === 'chemist3' ? CHEMIST3.password : DEMO_PASSWORD);

const send = (who: Who, method: 'get' | 'post', path: string, body?: unknown) => {
  const r = request(t.app)[method](path);
  if (who !== 'signedOut') r.set('Cookie', cookie[who]!);
  return body === undefined ? r : r.send(body as object);
};

const CONDITIONS = { temperatureC: '21', pressureHPa: '985', relativeHumidityPct: '45' };
const fullChecklist = () => Object.fromEntries(VERIFICATION_CHECKLIST.map((c) => [c.key, true]));

async function plan(who: Who = 'chemist') {
  const res = await send(who, 'post', '/api/preparations', {
    materialId: ids.material['Pb(NO3)2'],
    analyteFormula: 'Pb',
    target: { value: '1000', unit: 'mg/L' },
    flaskId: ids.ware['VF-100-01'],
    balanceId: ids.balance['BAL-SM1'],
    conditions: { source: 'measured', ...CONDITIONS },
  });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body as { id: number; identifier: string; version: number };
}

async function weigh(key: string, who: Who, over: Record<string, unknown> = {}) {
  return send(who, 'post', `/api/preparations/${key}/weighings`, { mode: 'direct', reading: '160.07', unit: 'mg', conditions: CONDITIONS, ...over });
}

async function makeUp(key: string, who: Who, over: Record<string, unknown> = {}) {
  const water = ids.solvent['Ultrapure water']!;
  return send(who, 'post', `/api/preparations/${key}/make-up`, { flaskIdentifier: (await freeFlask(t.app, cookie.chemist!)).identifier, solventId: water.id, solventLot: water.lot, solutionTemperatureC: '20.0', applyTemperatureCorrection: false, ...over });
}

/** Planned by `planner`, weighed and made up by `enterer` (default the planner): ready to sign "prepared". */
async function complete(planner: Who = 'chemist', enterer: Who = planner) {
  const p = await plan(planner);
  expect((await weigh(p.identifier, enterer)).status).toBe(201);
  const m = await makeUp(p.identifier, enterer);
  expect(m.status, JSON.stringify(m.body)).toBe(201);
  return m.body as { id: number; identifier: string; version: number; weighings: Array<{ id: number }> };
}

const signBody = (meaning: string, who: Who, over: Record<string, unknown> = {}) => ({
  meaning,
  password: passwordOf(who),
  acknowledgeResponsibility: true,
  ...(meaning === 'verified' ? { checklist: fullChecklist() } : {}),
  ...(meaning === 'returned' || meaning === 'discarded' ? { reason: `${meaning} in the signature test` } : {}),
  ...over,
});

const signAs = (who: Who, key: string, meaning: string, over: Record<string, unknown> = {}) =>
  send(who, 'post', `/api/preparations/${key}/signatures`, signBody(meaning, who, over));

async function signOk(who: Who, key: string, meaning: string, over: Record<string, unknown> = {}) {
  const res = await signAs(who, key, meaning, over);
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body;
}

beforeAll(async () => {
  t = await makeTestApp();
  for (const who of ['chemist', 'chemist2', 'technician', 'qa', 'admin'] as const) cookie[who] = await sessionCookie(t.app, DEMO[who]);
  const created = await send('admin', 'post', '/api/users', { email: CHEMIST3.email, fullName: 'Saoirse Dunmore', initials: 'SD', role: 'chemist', password: TEMPORARY_PASSWORD });
  expect(created.status, JSON.stringify(created.body)).toBe(201);
  cookie.chemist3 = await choosePassword(t.app, CHEMIST3.email, CHEMIST3.password); // the admin's password is temporary
  for (const who of ['chemist', 'chemist2', 'chemist3', 'technician', 'qa', 'admin'] as const) {
    const email = who === 'chemist3' ? CHEMIST3.email : DEMO[who];
    userId[who] = (await User.findOne({ where: { email } }))!.id;
  }
  const get = async (p: string) => (await send('chemist', 'get', p)).body.items as any[];
  for (const m of await get('/api/materials')) ids.material[m.formula] = m.id;
  for (const b of await get('/api/balances')) ids.balance[b.identifier] = b.id;
  for (const w of await get('/api/volumetric-ware')) ids.ware[w.identifier] = w.id;
  for (const s of await get('/api/solvents')) ids.solvent[s.name] = { id: s.id, lot: s.lot };
}, 60_000);
afterAll(() => t.close());

describe('POST /api/preparations/:key/signatures: roles (REQUIREMENTS RV-07, AC-02)', () => {
  it('when each role signs "prepared", then only the chemist gets 201; technician and admin 403 by role, QA 403 by meaning, signed out 401', async () => {
    const p = await complete();
    const expected: Record<Exclude<Who, 'chemist2' | 'chemist3'>, number> = { signedOut: 401, technician: 403, qa: 403, admin: 403, chemist: 201 };
    for (const [who, status] of Object.entries(expected) as [Who, number][]) {
      const res = await signAs(who, p.identifier, 'prepared');
      expect(res.status, `${who}: ${JSON.stringify(res.body)}`).toBe(status);
      if (status !== 201) expectErrorBody(res.body);
      if (status === 403) expect(res.body.error.code).toBe('forbidden');
    }
  });

  it('when technician, QA or admin try to verify, then 403; a second chemist gets 201 (RV-01, RV-07)', async () => {
    const p = await complete();
    await signOk('chemist', p.identifier, 'prepared');
    for (const who of ['technician', 'qa', 'admin'] as const) {
      const res = await signAs(who, p.identifier, 'verified');
      expect(res.status, who).toBe(403);
      expect(res.body.error.code).toBe('forbidden');
    }
    const v = await signOk('chemist2', p.identifier, 'verified');
    expect(v.status).toBe('verified');
  });
});

describe('state machine (REQUIREMENTS ES-07, RV-06)', () => {
  it('the transition table allows exactly the contract transitions', () => {
    // contract: planned → prepared → verified | returned → prepared; amend → planned; discard and expire from live states
    expect(nextStatus('planned', 'sign_prepared')).toBe('prepared');
    expect(nextStatus('prepared', 'sign_verified')).toBe('verified');
    expect(nextStatus('prepared', 'sign_returned')).toBe('returned');
    expect(nextStatus('returned', 'sign_prepared')).toBe('prepared');
    for (const s of ['prepared', 'returned', 'verified']) expect(nextStatus(s, 'amend')).toBe('planned');
    expect(nextStatus('planned', 'sign_verified')).toBeNull();
    expect(nextStatus('returned', 'sign_verified')).toBeNull();
    expect(nextStatus('verified', 'sign_returned')).toBeNull();
    expect(nextStatus('planned', 'amend')).toBeNull();
    expect(TRANSITIONS.discarded).toEqual({});
    expect(nextStatus('nonsense', 'sign_prepared')).toBeNull();
  });

  it('when a record goes planned → returned → prepared → verified → discarded, then every allowed step is 201 and every refused one 409 naming the current state', async () => {
    const p = await plan();
    // planned, incomplete: cannot be prepared or verified
    let r = await signAs('chemist', p.identifier, 'prepared');
    expect(r.status).toBe(409);
    expect(r.body.error.code).toBe('invalid_transition');
    expect(r.body.error.message).toMatch(/current state is 'planned'.*weighing/);
    r = await signAs('chemist2', p.identifier, 'verified');
    expect(r.status).toBe(409);
    expect(r.body.error.message).toContain("current state is 'planned'");
    r = await signAs('chemist2', p.identifier, 'returned');
    expect(r.status).toBe(409);
    expect(r.body.error.message).toContain("current state is 'planned'");

    expect((await weigh(p.identifier, 'chemist')).status).toBe(201);
    r = await signAs('chemist', p.identifier, 'prepared');
    expect(r.status).toBe(409);
    expect(r.body.error.message).toMatch(/current state is 'planned'.*make-up/);
    expect((await makeUp(p.identifier, 'chemist')).status).toBe(201);

    let d = await signOk('chemist', p.identifier, 'prepared');
    expect(d.status).toBe('prepared');
    r = await signAs('chemist', p.identifier, 'prepared');
    expect(r.status).toBe(409);
    expect(r.body.error.message).toContain("current state is 'prepared'");

    // returned needs a reason (RV-06)
    r = await signAs('chemist2', p.identifier, 'returned', { reason: undefined });
    expect(r.status).toBe(400);
    expect(r.body.error.fields.reason).toMatch(/reason/);
    d = await signOk('chemist2', p.identifier, 'returned', { reason: 'Check the flask identifier against the bench log' });
    expect(d.status).toBe('returned');
    expect(d.signatures.at(-1)).toMatchObject({ meaning: 'returned', reason: 'Check the flask identifier against the bench log', valid: true });
    r = await signAs('chemist2', p.identifier, 'verified');
    expect(r.status).toBe(409);
    expect(r.body.error.message).toContain("current state is 'returned'");

    d = await signOk('chemist', p.identifier, 'prepared');
    expect(d.status).toBe('prepared');
    d = await signOk('chemist2', p.identifier, 'verified');
    expect(d.status).toBe('verified');
    for (const meaning of ['prepared', 'verified', 'returned']) {
      r = await signAs(meaning === 'prepared' ? 'chemist' : 'chemist2', p.identifier, meaning);
      expect(r.status, meaning).toBe(409);
      expect(r.body.error.message).toContain("current state is 'verified'");
    }

    // discarded by QA with a reason; then nothing more (CO-05)
    r = await signAs('qa', p.identifier, 'discarded', { reason: undefined });
    expect(r.status).toBe(400);
    expect(r.body.error.fields.reason).toBeDefined();
    d = await signOk('qa', p.identifier, 'discarded', { reason: 'Flask found chipped after release' });
    expect(d.status).toBe('discarded');
    r = await signAs('qa', p.identifier, 'discarded');
    expect(r.status).toBe(409);
    expect(r.body.error.message).toContain("current state is 'discarded'");
    r = await weigh(p.identifier, 'chemist', { supersedesId: d.weighings[0].id, correctionReason: 'late correction', signature: { password: DEMO_PASSWORD } });
    expect(r.status).toBe(409);
    expect(r.body.error.message).toContain("current state is 'discarded'");

    // the whole path is in the status history, each with who and when (RV-06: all stages visible)
    expect(d.statusHistory.map((e: { status: string }) => e.status)).toEqual(['planned', 'prepared', 'returned', 'prepared', 'verified', 'discarded']);
    expect(d.signatures.map((s: { meaning: string }) => s.meaning)).toEqual(['prepared', 'returned', 'prepared', 'verified', 'discarded']);
    for (const s of d.signatures) {
      expect(s.meaningText).toBe(SIGNATURE_MEANING_TEXT[s.meaning as keyof typeof SIGNATURE_MEANING_TEXT]);
      expect(s.signedAt).toMatch(/^\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d\.\d{3}Z$/); // ES-01: UTC with ms
      expect(s.recordHash).toMatch(/^[0-9a-f]{64}$/);
    }
  });

  it('when a chemist discards a planned record, then it is discarded; an unknown record is 404', async () => {
    const p = await plan();
    const d = await signOk('chemist', p.identifier, 'discarded', { reason: 'Planned twice by mistake' });
    expect(d.status).toBe('discarded');
    const r = await signAs('chemist', 'HWL-2026-9999', 'prepared');
    expect(r.status).toBe(404);
  });
});

describe('second person (REQUIREMENTS RV-02)', () => {
  it('when the preparer verifies their own record with everything right, then 403 self_verification and the refusal is audited', async () => {
    const p = await complete('chemist');
    await signOk('chemist', p.identifier, 'prepared');
    const before = await AuditEntry.count({ where: { action: 'signature_refused' } });
    for (const meaning of ['verified', 'returned']) {
      const r = await signAs('chemist', p.identifier, meaning);
      expect(r.status, meaning).toBe(403);
      expect(r.body.error.code).toBe('self_verification');
    }
    expect(await AuditEntry.count({ where: { action: 'signature_refused' } })).toBe(before + 2);
    const d = (await send('chemist', 'get', `/api/preparations/${p.identifier}`)).body;
    expect(d.status).toBe('prepared');
    expect(d.canSign).toMatchObject({ verify: false, return: false });
    expect(d.canSign.reasons.verify).toMatch(/prepared|planned/);
    const other = (await send('chemist2', 'get', `/api/preparations/${p.identifier}`)).body;
    expect(other.canSign).toMatchObject({ verify: true, return: true, prepare: false });
  });

  it('when a second chemist corrected the weighing, then that chemist cannot verify this version; a third chemist can', async () => {
    const p = await plan('chemist');
    const w = await weigh(p.identifier, 'technician', { reading: '160.17' });
    expect(w.status).toBe(201);
    const fixed = await weigh(p.identifier, 'chemist2', { reading: '160.07', supersedesId: w.body.weighings[0].id, correctionReason: 'Typing error; balance printout shows 160.07 mg' });
    expect(fixed.status, JSON.stringify(fixed.body)).toBe(201);
    expect((await makeUp(p.identifier, 'technician')).status).toBe(201);
    await signOk('chemist', p.identifier, 'prepared');
    const r = await signAs('chemist2', p.identifier, 'verified');
    expect(r.status).toBe(403);
    expect(r.body.error.code).toBe('self_verification');
    expect(r.body.error.message).toMatch(/entered or changed data|weighing/);
    const d = await signOk('chemist3', p.identifier, 'verified');
    expect(d.status).toBe('verified');
    expect(d.signatures.at(-1)).toMatchObject({ meaning: 'verified', signer: { fullName: 'Saoirse Dunmore' }, checklist: fullChecklist() });
  });

  it('when a verification misses one checklist item, then 400 names the item (RV-03)', async () => {
    const p = await complete();
    await signOk('chemist', p.identifier, 'prepared');
    const { audit_trail_reviewed: _dropped, ...partial } = fullChecklist();
    const r = await signAs('chemist2', p.identifier, 'verified', { checklist: partial });
    expect(r.status).toBe(400);
    expect(Object.keys(r.body.error.fields)).toEqual(['checklist.audit_trail_reviewed']);
    const none = await signAs('chemist2', p.identifier, 'verified', { checklist: undefined });
    expect(none.status).toBe(400);
    expect(Object.keys(none.body.error.fields)).toHaveLength(VERIFICATION_CHECKLIST.length);
    const bad = await signAs('chemist2', p.identifier, 'verified', { checklist: { ...fullChecklist(), equipment_ok: false } });
    expect(bad.status).toBe(400);
  });
});

describe('password at each signing and the lockout (REQUIREMENTS ES-04, ES-06, PW-03)', () => {
  it('when the password is wrong, then 401 signature_password with fields.password, counted and audited, and nothing is signed', async () => {
    const p = await complete();
    const before = (await User.findByPk(userId.chemist))!.failedLoginCount;
    const audits = await AuditEntry.count({ where: { action: 'signature_failed' } });
    const r = await signAs('chemist', p.identifier, 'prepared', { password: 'not-my-password' });
    expect(r.status).toBe(401);
    expect(r.body.error.code).toBe('signature_password');
    expect(r.body.error.fields.password).toBeDefined();
    expect((await User.findByPk(userId.chemist))!.failedLoginCount).toBe(before + 1);
    expect(await AuditEntry.count({ where: { action: 'signature_failed' } })).toBe(audits + 1);
    expect(await Signature.count({ where: { preparationId: p.id } })).toBe(0);
    // a good signature resets the consecutive-failure count
    await signOk('chemist', p.identifier, 'prepared');
    expect((await User.findByPk(userId.chemist))!.failedLoginCount).toBe(0);
  });

  it('when a chemist gets the signing password wrong five times, then the account is locked (423) like after failed sign-ins', async () => {
    const email = 'lockout.sign@harbourside.example';
    const password = 'amber-flask-lockout-7';
    expect((await send('admin', 'post', '/api/users', { email, fullName: 'Ola Brennan', initials: 'OB', role: 'chemist', password: TEMPORARY_PASSWORD })).status).toBe(201);
    const c = await choosePassword(t.app, email, password);
    const p = await complete('chemist');
    const statuses: number[] = [];
    for (let i = 0; i < 5; i++) {
      const r = await request(t.app).post(`/api/preparations/${p.identifier}/signatures`).set('Cookie', c).send({ meaning: 'discarded', reason: 'lockout check', password: 'wrong-guess', acknowledgeResponsibility: true });
      statuses.push(r.status);
    }
    expect(statuses).toEqual([401, 401, 401, 401, 423]); // config default LOCKOUT_THRESHOLD 5 (REQUIREMENTS PW-03)
    const u = await User.findOne({ where: { email } });
    expect(u!.lockedAt).not.toBeNull();
    expect(await AuditEntry.count({ where: { action: 'account_locked', entityId: String(u!.id) } })).toBe(1);
    const r = await request(t.app).post(`/api/preparations/${p.identifier}/signatures`).set('Cookie', c).send({ meaning: 'discarded', reason: 'lockout check', password, acknowledgeResponsibility: true });
    expect(r.status).toBe(401); // the lock ended every session of the account (migration 0016)
    expect((await request(t.app).post('/api/auth/login').send({ email, password })).status).toBe(423);
  });

  it('when a user signs for the first time without acknowledging the statement, then 400 with the statement; the acknowledgement is stored once (ES-08)', async () => {
    const email = 'first.sign@harbourside.example';
    const password = 'violet-burette-91';
    expect((await send('admin', 'post', '/api/users', { email, fullName: 'Kit Farrow', initials: 'KF', role: 'chemist', password: TEMPORARY_PASSWORD })).status).toBe(201);
    const c = await choosePassword(t.app, email, password);
    const p = await plan('chemist');
    const d0 = (await request(t.app).get(`/api/preparations/${p.identifier}`).set('Cookie', c)).body;
    expect(d0.canSign.acknowledgementRequired).toBe(true);
    let r = await request(t.app).post(`/api/preparations/${p.identifier}/signatures`).set('Cookie', c).send({ meaning: 'discarded', reason: 'first signature', password });
    expect(r.status).toBe(400);
    expect(r.body.error.fields.acknowledgeResponsibility).toMatch(/legally binding/);
    r = await request(t.app).post(`/api/preparations/${p.identifier}/signatures`).set('Cookie', c).send({ meaning: 'discarded', reason: 'first signature', password, acknowledgeResponsibility: true });
    expect(r.status).toBe(201);
    expect(r.body.canSign.acknowledgementRequired).toBe(false);
    const p2 = await plan('chemist');
    r = await request(t.app).post(`/api/preparations/${p2.identifier}/signatures`).set('Cookie', c).send({ meaning: 'discarded', reason: 'second signature', password });
    expect(r.status).toBe(201);
  });
});

describe('changes after signing (REQUIREMENTS ES-03, CO-01, CO-02)', () => {
  it('when a verified record is corrected, then version + 1, old signatures stay listed as superseded, status planned with amendedFromVersion, and a new independent verification is needed', async () => {
    const p = await complete('chemist');
    await signOk('chemist', p.identifier, 'prepared');
    const verified = await signOk('chemist2', p.identifier, 'verified');
    const v = verified.version as number;
    const wid = verified.weighings[0].id as number;
    const correction = { reading: '160.08', supersedesId: wid, correctionReason: 'Balance printout shows 160.08 mg' };

    let r = await weigh(p.identifier, 'chemist3', correction);
    expect(r.status).toBe(400);
    expect(r.body.error.fields['signature.password']).toMatch(/password/);
    r = await weigh(p.identifier, 'chemist3', { ...correction, correctionReason: undefined, supersedesId: undefined });
    expect(r.status).toBe(409); // a second weighing must name the one it corrects
    r = await weigh(p.identifier, 'technician', { ...correction, signature: { password: DEMO_PASSWORD } });
    expect(r.status).toBe(403); // CO-03: technicians do not amend signed records
    r = await weigh(p.identifier, 'chemist3', { ...correction, signature: { password: 'wrong-password' } });
    expect(r.status).toBe(401);
    expect(r.body.error.code).toBe('signature_password');
    expect((await send('chemist', 'get', `/api/preparations/${p.identifier}`)).body.version).toBe(v); // nothing stored

    r = await weigh(p.identifier, 'chemist3', { ...correction, signature: { password: CHEMIST3.password, acknowledgeResponsibility: true } });
    expect(r.status, JSON.stringify(r.body)).toBe(201);
    const d = r.body;
    expect(d.version).toBe(v + 1);
    expect(d.status).toBe('planned');
    expect(d.amendedFromVersion).toBe(v);
    expect(d.signatures.map((s: any) => [s.meaning, s.recordVersion, s.valid])).toEqual([
      ['prepared', v, false],
      ['verified', v, false],
      ['amended', v + 1, true],
    ]);
    expect(d.signatures[2]).toMatchObject({ signer: { fullName: 'Saoirse Dunmore' }, reason: 'Balance printout shows 160.08 mg' });
    expect(d.weighings.find((w: any) => w.id === wid).supersededById).toBeDefined(); // the old entry stays visible

    // must be signed prepared again, then verified by someone who is neither preparer nor changer of v+1
    r = await signAs('chemist2', p.identifier, 'verified');
    expect(r.status).toBe(409);
    expect(r.body.error.message).toContain("current state is 'planned'");
    await signOk('chemist', p.identifier, 'prepared');
    for (const who of ['chemist', 'chemist3'] as const) {
      r = await signAs(who, p.identifier, 'verified');
      expect(r.status, who).toBe(403);
      expect(r.body.error.code).toBe('self_verification');
    }
    const again = await signOk('chemist2', p.identifier, 'verified');
    expect(again.status).toBe('verified');
    expect(again.signatures.filter((s: any) => s.valid).map((s: any) => s.meaning)).toEqual(['amended', 'prepared', 'verified']);
    expect(again.statusHistory.at(-3)).toMatchObject({ status: 'planned', note: expect.stringMatching(/Amended after signing/) });
  });

  it('when the make-up of a prepared record is redone, then the same amendment rules apply', async () => {
    const p = await complete('chemist');
    await signOk('chemist', p.identifier, 'prepared');
    let r = await makeUp(p.identifier, 'chemist', { correctionReason: 'Meniscus above the mark; made up again' });
    expect(r.status).toBe(400);
    expect(r.body.error.fields['signature.password']).toBeDefined();
    r = await makeUp(p.identifier, 'chemist', { correctionReason: 'Meniscus above the mark; made up again', signature: { password: DEMO_PASSWORD } });
    expect(r.status, JSON.stringify(r.body)).toBe(201);
    expect(r.body.status).toBe('planned');
    expect(r.body.signatures.map((s: any) => s.valid)).toEqual([false, true]);
  });
});

describe('record hash and signature integrity (REQUIREMENTS ES-03)', () => {
  it('the signed hash is SHA-256 of the stored canonical JSON of that version, and it changes with any data change', async () => {
    const p = await complete('chemist');
    const d = await signOk('chemist', p.identifier, 'prepared');
    const sig = d.signatures[0];
    const rv = await RecordVersion.findOne({ where: { preparationId: p.id, version: sig.recordVersion } });
    expect(createHash('sha256').update(rv!.canonicalJson, 'utf8').digest('hex')).toBe(sig.recordHash); // FIPS 180-4 via node:crypto
    const content = JSON.parse(rv!.canonicalJson);
    expect(content).toMatchObject({ preparationId: p.id, identifier: p.identifier, version: sig.recordVersion });
    expect(Object.keys(content)).toEqual([...Object.keys(content)].sort()); // canonical: keys sorted
    expect(content.weighings[0].reading).toBe('160.07'); // verbatim decimal string
    const now = await currentRecordHash(p.id);
    expect(now.hash).toBe(sig.recordHash);
    expect(await verifySignatures(p.id)).toEqual([expect.objectContaining({ ok: true })]);

    await makeUp(p.identifier, 'chemist', { solutionTemperatureC: '20.5', correctionReason: 'Temperature re-read', signature: { password: DEMO_PASSWORD } });
    const after = await currentRecordHash(p.id);
    expect(after.hash).not.toBe(sig.recordHash);
    expect((await verifySignatures(p.id)).every((c) => c.ok)).toBe(true); // old signature still matches its own stored version
  });

  it('when a signature row is copied onto another record, then the integrity check reports it; signature rows cannot be updated or deleted', async () => {
    const a = await complete('chemist');
    await signOk('chemist', a.identifier, 'prepared');
    const b = await plan('chemist');
    const s = (await Signature.findOne({ where: { preparationId: a.id } }))!;
    const q = t.sequelize;
    await q.query(
      `INSERT INTO signatures (preparation_id, meaning, meaning_text, signer_id, signer_name, signed_at, record_version, record_hash, reason, checklist, amends_version)
       SELECT :b, meaning, meaning_text, signer_id, signer_name, signed_at, record_version, record_hash, reason, checklist, amends_version FROM signatures WHERE id = :id`,
      { replacements: { b: b.id, id: s.id } },
    );
    // and the stored version too, so only the content names the real record
    await q.query(`INSERT INTO record_versions (preparation_id, version, canonical_json, record_hash, created_at) SELECT :b, version, canonical_json, record_hash, created_at FROM record_versions WHERE preparation_id = :a`, { replacements: { a: a.id, b: b.id } });
    const checks = await verifySignatures(b.id);
    expect(checks).toEqual([expect.objectContaining({ ok: false, problem: expect.stringContaining(`preparation ${a.id}`) })]);
    const moved = (await send('chemist', 'get', `/api/preparations/${b.identifier}`)).body;
    expect(moved.signatures[0].valid).toBe(false); // the hash does not match this record

    const refused = async (sql: string) => {
      try {
        await q.query(sql);
      } catch (e) {
        const err = e as { message: string; original?: { message?: string } };
        return `${err.original?.message ?? ''} ${err.message}`;
      }
      return 'not refused';
    };
    expect(await refused(`UPDATE signatures SET signer_name = 'Someone Else' WHERE id = ${s.id}`)).toContain(SIGNATURES_APPEND_ONLY);
    expect(await refused(`DELETE FROM signatures WHERE id = ${s.id}`)).toContain(SIGNATURES_APPEND_ONLY);
    expect((await Signature.findByPk(s.id))!.signerName).toBe('Dr. Maren Tollefsen');
  });

  it('when the record is signed, then the success is audited with meaning, version and hash', async () => {
    const p = await complete('chemist');
    const d = await signOk('chemist', p.identifier, 'prepared');
    const e = await AuditEntry.findOne({ where: { action: 'sign', entity: 'preparation', entityId: String(p.id) }, order: [['id', 'DESC']] });
    expect(e).not.toBeNull();
    const text = JSON.stringify(e!.toJSON());
    expect(text).toContain('prepared');
    expect(text).toContain(d.signatures[0].recordHash);
  });
});

describe('demo seed (seed/demo-preparations.ts)', () => {
  it('the Pb record is prepared by the first chemist and verified by the second, the TOC record is prepared, all with intact hashes', async () => {
    const list = (await send('qa', 'get', '/api/preparations?search=HWL-2026-000&pageSize=100')).body.items as any[];
    const seeded = list.filter((i) => i.createdAt.startsWith('2026-11')).sort((a, b) => a.id - b.id);
    const pb = (await send('qa', 'get', `/api/preparations/${seeded[0].identifier}`)).body;
    expect(pb.status).toBe('verified');
    expect(pb.signatures.map((s: any) => [s.meaning, s.signer.fullName, s.valid])).toEqual([
      ['prepared', 'Dr. Maren Tollefsen', true],
      ['verified', 'Idris Okonkwo-Baptiste', true],
    ]);
    const toc = (await send('qa', 'get', `/api/preparations/${seeded[2].identifier}`)).body;
    expect(toc.status).toBe('prepared');
    expect(toc.signatures).toEqual([expect.objectContaining({ meaning: 'prepared', valid: true, signedAt: demoInstant('2026-11-18T14:03:00Z') })]);
    for (const p of [pb, toc]) expect((await verifySignatures(p.id)).every((c) => c.ok)).toBe(true);
    const forIdris = (await send('chemist2', 'get', `/api/preparations/${toc.identifier}`)).body;
    expect(forIdris.canSign).toMatchObject({ verify: true, return: true });
  });
});
