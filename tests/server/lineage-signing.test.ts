// Signing volumetric dilutions: complete for "prepared" with a current aliquot, a make-up and the dilution result
// (no weighing); the aliquot records and the dilution result are in the hashed canonical record; the aliquot's
// recorder cannot verify; a verified dilution can be the parent of a further dilution (REQUIREMENTS ES-03, RV-02, TR-11).
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Preparation } from '../../server/db/models/index.ts';
import { currentRecordHash } from '../../server/services/signatures.service.ts';
import { VERIFICATION_CHECKLIST } from '../../shared/schemas/preparations.ts';
import { DEMO, DEMO_PASSWORD, makeTestApp, sessionCookie, type TestApp } from './helpers/test-app.ts';
import { freeFlask } from './helpers/free-flask.ts';

type Who = 'signedOut' | 'chemist' | 'chemist2' | 'technician' | 'qa' | 'admin';
let t: TestApp;
const cookie: Partial<Record<Who, string>> = {};
const ids = { material: {} as Record<string, number>, balance: {} as Record<string, number>, ware: {} as Record<string, number>, solvent: {} as Record<string, { id: number; lot: string }> };

const send = (who: Who, method: 'get' | 'post' | 'put', path: string, body?: unknown) => {
  const r = request(t.app)[method](path);
  if (who !== 'signedOut') r.set('Cookie', cookie[who]!);
  return body === undefined ? r : r.send(body as object);
};
const CONDITIONS = { temperatureC: '21', pressureHPa: '985', relativeHumidityPct: '45' };
const today = () => new Date().toISOString().slice(0, 10); // the test lab zone is Europe/London; runs are away from midnight edges

async function stock(who: Who = 'chemist') {
  const p = await send(who, 'post', '/api/preparations', {
    materialId: ids.material['Pb(NO3)2'],
    analyteFormula: 'Pb',
    target: { value: '1000', unit: 'mg/L' },
    flaskId: ids.ware['VF-100-01'],
    balanceId: ids.balance['BAL-SM1'],
    conditions: { source: 'measured', ...CONDITIONS },
  });
  expect(p.status, JSON.stringify(p.body)).toBe(201);
  const w = await send(who, 'post', `/api/preparations/${p.body.identifier}/weighings`, { mode: 'direct', reading: '160.07', unit: 'mg', conditions: CONDITIONS });
  expect(w.status, JSON.stringify(w.body)).toBe(201);
  const water = ids.solvent['Ultrapure water']!;
  const m = await send(who, 'post', `/api/preparations/${p.body.identifier}/make-up`, { flaskIdentifier: (await freeFlask(t.app, cookie.chemist!)).identifier, solventId: water.id, solventLot: water.lot, solutionTemperatureC: '20.0', applyTemperatureCorrection: false });
  expect(m.status, JSON.stringify(m.body)).toBe(201);
  return m.body as { id: number; identifier: string; expiresOn: string; result: { concentration: { value: string; unit: string; standardUncertainty: string } } };
}

/** A stock made verified through the real signature flow: chemist signs "prepared", chemist2 "verified". */
async function verifiedStock() {
  const s = await stock();
  const prepared = await send('chemist', 'post', `/api/preparations/${s.identifier}/signatures`, { meaning: 'prepared', password: DEMO_PASSWORD, acknowledgeResponsibility: true });
  expect(prepared.status, JSON.stringify(prepared.body)).toBe(201);
  const verified = await send('chemist2', 'post', `/api/preparations/${s.identifier}/signatures`, {
    meaning: 'verified',
    password: DEMO_PASSWORD,
    acknowledgeResponsibility: true,
    checklist: Object.fromEntries(VERIFICATION_CHECKLIST.map((c) => [c.key, true])),
  });
  expect(verified.status, JSON.stringify(verified.body)).toBe(201);
  expect(verified.body.status).toBe('verified');
  return s;
}

const dilutionBody = (over: Record<string, unknown> = {}) => ({ method: 'volumetric', target: { value: '10', unit: 'mg/L' }, pipetteId: ids.ware['BP-1-01'], flaskId: ids.ware['VF-100-02'], ...over });

const CHECKLIST = Object.fromEntries(VERIFICATION_CHECKLIST.map((c) => [c.key, true]));
const signAs = (who: Who, key: string, meaning: 'prepared' | 'verified') =>
  send(who, 'post', `/api/preparations/${key}/signatures`, { meaning, password: DEMO_PASSWORD, acknowledgeResponsibility: true, ...(meaning === 'verified' ? { checklist: CHECKLIST } : {}) });

async function benchWork(key: string, aliquotBy: Who, makeUpBy: Who, pipetteIdentifier = 'BP-1-01', flask?: string) {
  const flaskIdentifier = flask ?? (await freeFlask(t.app, cookie.chemist!)).identifier; // one flask, one open solution
  const a = await send(aliquotBy, 'post', `/api/preparations/${key}/aliquots`, { pipetteIdentifier });
  expect(a.status, JSON.stringify(a.body)).toBe(201);
  const water = ids.solvent['Ultrapure water']!;
  const m = await send(makeUpBy, 'post', `/api/preparations/${key}/make-up`, { flaskIdentifier, solventId: water.id, solventLot: water.lot, solutionTemperatureC: '20.0', applyTemperatureCorrection: false });
  expect(m.status, JSON.stringify(m.body)).toBe(201);
  expect(m.body.dilution.result).toBeTruthy();
  return m.body;
}

let parent: Awaited<ReturnType<typeof verifiedStock>>;

beforeAll(async () => {
  t = await makeTestApp();
  for (const who of ['chemist', 'chemist2', 'technician', 'qa', 'admin'] as const) cookie[who] = await sessionCookie(t.app, DEMO[who]);
  const get = async (p: string) => (await send('chemist', 'get', p)).body.items as any[];
  for (const m of await get('/api/materials')) ids.material[m.formula] = m.id;
  for (const b of await get('/api/balances')) ids.balance[b.identifier] = b.id;
  for (const w of await get('/api/volumetric-ware?pageSize=100')) ids.ware[w.identifier] = w.id;
  for (const s of await get('/api/solvents')) ids.solvent[s.name] = { id: s.id, lot: s.lot };
  parent = await verifiedStock();
}, 90_000);
afterAll(() => t.close());

describe('signing a volumetric dilution', () => {
  it('prepared by the chemist, refused "verified" to the same chemist, verified by a second chemist; then a second-generation dilution from it', async () => {
    const d = (await send('chemist', 'post', `/api/preparations/${parent.identifier}/dilutions`, dilutionBody())).body;
    expect(d.status).toBe('planned');
    expect(d.canSign.prepare).toBe(false);
    expect(d.canSign.reasons.prepare).toMatch(/aliquot/);
    const made = await benchWork(d.identifier, 'chemist', 'chemist');
    expect(made.canSign.prepare, JSON.stringify(made.canSign)).toBe(true);

    // the hashed record carries the aliquot records and the dilution result
    const row = (await Preparation.findOne({ where: { identifier: d.identifier } }))!;
    const content = JSON.parse((await currentRecordHash(row.id)).canonical);
    expect(content.aliquots).toHaveLength(1);
    expect(content.aliquots[0]).toMatchObject({ id: made.dilution.aliquots[0].id, volumeMl: '1', pipetteIdentifier: 'BP-1-01', recordedAt: made.dilution.aliquots[0].recordedAt });
    expect(content.dilutionResult.value).toBe(made.dilution.result.value);
    expect(content.weighings).toEqual([]);

    const prepared = await signAs('chemist', d.identifier, 'prepared');
    expect(prepared.status, JSON.stringify(prepared.body)).toBe(201);
    expect(prepared.body.status).toBe('prepared');
    expect(prepared.body.signatures.at(-1).valid).toBe(true);

    const self = await signAs('chemist', d.identifier, 'verified');
    expect(self.status, JSON.stringify(self.body)).toBe(403);
    expect(self.body.error.code).toBe('self_verification');

    const forChemist2 = (await send('chemist2', 'get', `/api/preparations/${d.identifier}`)).body;
    expect(forChemist2.canSign.verify, JSON.stringify(forChemist2.canSign)).toBe(true);
    const verified = await signAs('chemist2', d.identifier, 'verified');
    expect(verified.status, JSON.stringify(verified.body)).toBe(201);
    expect(verified.body.status).toBe('verified');
    expect(verified.body.signatures.every((s: { valid: boolean }) => s.valid)).toBe(true);

    // a verified dilution is itself a usable parent: its concentration is its dilution result
    const second = await send('chemist', 'post', `/api/preparations/${d.identifier}/dilutions`, dilutionBody({ target: { value: '0.1', unit: 'mg/L' } }));
    expect(second.status, JSON.stringify(second.body)).toBe(201);
    expect(second.body.kind).toBe('dilution');
    expect(second.body.dilution.parent.identifier).toBe(d.identifier);
    expect(second.body.dilution.parent.snapshot.concentration.value).toBe(made.dilution.result.value);
    expect(second.body.expiresOn <= verified.body.expiresOn).toBe(true);
  });

  it('whoever recorded the aliquot cannot verify the version they entered it in', async () => {
    const d = (await send('chemist', 'post', `/api/preparations/${parent.identifier}/dilutions`, dilutionBody())).body;
    await benchWork(d.identifier, 'chemist2', 'technician');
    const prepared = await signAs('chemist', d.identifier, 'prepared');
    expect(prepared.status, JSON.stringify(prepared.body)).toBe(201);
    const byRecorder = await signAs('chemist2', d.identifier, 'verified');
    expect(byRecorder.status, JSON.stringify(byRecorder.body)).toBe(403);
    expect(byRecorder.body.error.code).toBe('self_verification');
    expect(byRecorder.body.error.message).toMatch(/aliquot/);
  });

  it('a dilution without an aliquot is refused "prepared" with 409', async () => {
    const d = (await send('chemist', 'post', `/api/preparations/${parent.identifier}/dilutions`, dilutionBody())).body;
    const water = ids.solvent['Ultrapure water']!;
    const m = await send('chemist', 'post', `/api/preparations/${d.identifier}/make-up`, { flaskIdentifier: (await freeFlask(t.app, cookie.chemist!)).identifier, solventId: water.id, solventLot: water.lot, solutionTemperatureC: '20.0', applyTemperatureCorrection: false });
    expect(m.status, JSON.stringify(m.body)).toBe(201);
    const res = await signAs('chemist', d.identifier, 'prepared');
    expect(res.status, JSON.stringify(res.body)).toBe(409);
    expect(res.body.error.code).toBe('invalid_transition');
    expect(res.body.error.message).toMatch(/aliquot/);
    expect((await send('chemist', 'get', `/api/preparations/${d.identifier}`)).body.status).toBe('planned');
  });
});
