// Readings straight from the balance (issue 15 §1–2): every reading is stored with how it came in. A print from the
// balance is parsed again on the server with the shared parser; a value, unit, stability or balance identity that
// does not hold is refused with 422 at the reading's field and nothing is stored. Typed stays possible and is
// flagged. The captures are part of what new signatures hash (canonical version 3); older signatures keep checking.
// Line shapes: shared/balance/output-line.ts ("S S", "ST,GS", plain: common practice, stated from memory there).
// Demo balances (seed/demo-data.ts): BAL-A1 220 g × 0.1 mg, BAL-SM1 82 g × 0.01 mg.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { GravimetricReading, RecordVersion, Weighing } from '../../server/db/models/index.ts';
import { VERIFICATION_CHECKLIST } from '../../shared/schemas/preparations.ts';
import { DEMO, DEMO_PASSWORD, expectErrorBody, makeTestApp, sessionCookie, type TestApp } from './helpers/test-app.ts';
import { emptyFlask } from './helpers/free-flask.ts';

type Who = 'chemist' | 'chemist2' | 'technician' | 'admin' | 'qa';
let t: TestApp;
const cookie: Partial<Record<Who, string>> = {};
const ids = { material: {} as Record<string, number>, balance: {} as Record<string, number>, ware: {} as Record<string, number>, solvent: {} as Record<string, { id: number; lot: string }> };
const send = (who: Who, method: 'get' | 'post' | 'put' | 'patch', path: string, body?: unknown) => {
  const r = request(t.app)[method](path).set('Cookie', cookie[who]!);
  return body === undefined ? r : r.send(body as object);
};
const CONDITIONS = { temperatureC: '21', pressureHPa: '985', relativeHumidityPct: '45' };
const ROOM = { temperatureC: '20', pressureHPa: '1013.25', humidityPct: '50' };
const CHECKLIST = Object.fromEntries(VERIFICATION_CHECKLIST.map((c) => [c.key, true]));
const sign = (who: Who, key: string, meaning: 'prepared' | 'verified') =>
  send(who, 'post', `/api/preparations/${key}/signatures`, { meaning, password: DEMO_PASSWORD, acknowledgeResponsibility: true, ...(meaning === 'verified' ? { checklist: CHECKLIST } : {}) });

/** A 1000 mg/L Pb stock on BAL-SM1 in VF-100-01 (the planned reading is 160.07 mg, METROLOGY §5.4). */
async function planStock(): Promise<string> {
  const p = await send('chemist', 'post', '/api/preparations', {
    materialId: ids.material['Pb(NO3)2'],
    analyteFormula: 'Pb',
    target: { value: '1000', unit: 'mg/L' },
    flaskId: ids.ware['VF-100-01'],
    balanceId: ids.balance['BAL-SM1'],
    conditions: { source: 'measured', ...CONDITIONS },
  });
  expect(p.status, JSON.stringify(p.body)).toBe(201);
  return p.body.identifier as string;
}
const weigh = (key: string, body: Record<string, unknown>) => send('chemist', 'post', `/api/preparations/${key}/weighings`, { mode: 'direct', unit: 'mg', conditions: CONDITIONS, ...body });
const captured = (value: string, rawLine: string, method = 'keyboard_burst', unit = 'mg') => ({ value, unit, capture: { method, rawLine } });
const weighingsOf = async (key: string) => Weighing.count({ where: { preparationId: (await send('chemist', 'get', `/api/preparations/${key}`)).body.id } });
const setUnstable = async (allow: boolean) => expect((await send('admin', 'put', '/api/settings', { allowUnstableReadings: allow })).status).toBe(200);

beforeAll(async () => {
  t = await makeTestApp();
  for (const who of ['chemist', 'chemist2', 'technician', 'admin', 'qa'] as const) cookie[who] = await sessionCookie(t.app, DEMO[who]);
  const get = async (p: string) => (await send('chemist', 'get', p)).body.items as any[];
  for (const m of await get('/api/materials')) ids.material[m.formula] = m.id;
  for (const b of await get('/api/balances')) ids.balance[b.identifier] = b.id;
  for (const w of await get('/api/volumetric-ware?pageSize=100')) ids.ware[w.identifier] = w.id;
  for (const s of await get('/api/solvents')) ids.solvent[s.name] = { id: s.id, lot: s.lot };
}, 60_000);
afterAll(() => t.close());

describe('a weighing reading from the balance', () => {
  it('when a keyboard burst "S S     160.07 mg" is sent with the value 160.07, then it is stored as keyboard_burst with its raw line and stability', async () => {
    const key = await planStock();
    const res = await weigh(key, { reading: captured('160.07', 'S S     160.07 mg\r\n') });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const c = res.body.weighings[0].captures.reading;
    expect(c).toMatchObject({ method: 'keyboard_burst', rawLine: 'S S     160.07 mg\r\n', stability: 'stable', balancePrintId: null, flags: [] });
    expect(res.body.weighings[0].reading).toEqual({ value: '160.07', unit: 'mg' });
    const row = await Weighing.findOne({ where: { preparationId: res.body.id } });
    expect(row!.captures.reading!.method).toBe('keyboard_burst');
  });

  it('when the value sent differs from the printed value, then 422 at reading and nothing is stored', async () => {
    const key = await planStock();
    const res = await weigh(key, { reading: captured('160.08', 'S S     160.07 mg') });
    expect(res.status, JSON.stringify(res.body)).toBe(422);
    expectErrorBody(res.body);
    expect(res.body.error.code).toBe('capture_refused');
    expect(res.body.error.fields.reading).toMatch(/not the one the balance printed \(160\.07 mg\)/);
    expect(await weighingsOf(key)).toBe(0);
  });

  it('when the print is in g but the entry in mg, then 422 at reading', async () => {
    const key = await planStock();
    const res = await weigh(key, { reading: captured('16.07', 'ST,GS,+0016.07  g', 'serial', 'mg'), confirmOutOfWindow: true, outOfWindowReason: 'unit test' });
    expect(res.status, JSON.stringify(res.body)).toBe(422);
    expect(res.body.error.fields.reading).toMatch(/printed 16\.07 g, but the entry is in mg/);
  });

  it('when the print is not a reading (overload), then 422 with the balance message', async () => {
    const key = await planStock();
    const res = await weigh(key, { reading: captured('160.07', 'S +') });
    expect(res.status).toBe(422);
    expect(res.body.error.fields.reading).toMatch(/overload/);
  });

  it('when the balance marked the reading unstable, then 422; with allowUnstableReadings on it is stored flagged unstable_allowed', async () => {
    const key = await planStock();
    const refused = await weigh(key, { reading: captured('160.07', 'S D     160.07 mg', 'serial') });
    expect(refused.status).toBe(422);
    expect(refused.body.error.fields.reading).toMatch(/unstable/);
    expect(await weighingsOf(key)).toBe(0);
    await setUnstable(true);
    try {
      const ok = await weigh(key, { reading: captured('160.07', 'S D     160.07 mg', 'serial') });
      expect(ok.status, JSON.stringify(ok.body)).toBe(201);
      expect(ok.body.weighings[0].captures.reading).toMatchObject({ method: 'serial', stability: 'unstable', flags: ['unstable_allowed'] });
    } finally {
      await setUnstable(false);
    }
  });

  it('when the print names another balance than the selected one, then 422; its own identifier is accepted', async () => {
    const key = await planStock();
    const other = await weigh(key, { reading: captured('160.07', 'ID: BAL-A1\r\nS S     160.07 mg\r\n', 'serial') });
    expect(other.status).toBe(422);
    expect(other.body.error.fields.reading).toMatch(/from balance "BAL-A1", not the selected BAL-SM1/);
    const own = await weigh(key, { reading: captured('160.07', 'ID: bal-sm1\r\nS S     160.07 mg\r\n', 'serial') });
    expect(own.status, JSON.stringify(own.body)).toBe(201);
    expect(own.body.weighings[0].captures.reading).toMatchObject({ method: 'serial', balancePrintId: 'bal-sm1', stability: 'stable' });
  });

  it('when a reading is sent as plain text, then it is stored as typed and flagged; a typed capture with a raw line is refused', async () => {
    const key = await planStock();
    const bad = await weigh(key, { reading: { value: '160.07', unit: 'mg', capture: { method: 'typed', rawLine: 'S S 160.07 mg' } } });
    expect(bad.status).toBe(422);
    const res = await weigh(key, { mode: 'difference', before: '1000.00', after: { value: '839.93', capture: { method: 'typed' } } });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.weighings[0].captures.before).toMatchObject({ method: 'typed', rawLine: null, flags: ['typed'] });
    expect(res.body.weighings[0].captures.after).toMatchObject({ method: 'typed', rawLine: null, flags: ['typed'] });
  });

  it('when a capture from the balance has no raw line or an unknown method, then it is refused at the field', async () => {
    const key = await planStock();
    const noLine = await weigh(key, { reading: { value: '160.07', capture: { method: 'serial' } } });
    expect(noLine.status).toBe(422);
    expect(noLine.body.error.fields.reading).toMatch(/rawLine/);
    const unknown = await weigh(key, { reading: { value: '160.07', capture: { method: 'telepathy', rawLine: 'x' } } });
    expect(unknown.status).toBe(400);
    expect(Object.keys(unknown.body.error.fields).join()).toMatch(/captures\.reading\.method/);
  });
});

describe('the captures are signed (canonical version 3)', () => {
  it('when a stock with a captured reading is signed prepared, then the signed content holds the capture and canonicalVersion 3', async () => {
    const key = await planStock();
    expect((await weigh(key, { reading: captured('160.07', 'S S     160.07 mg\r\n') })).status).toBe(201);
    const water = ids.solvent['Ultrapure water']!;
    await emptyFlask(t.app, cookie.qa!, 'VF-100-01', DEMO_PASSWORD);
    const m = await send('chemist', 'post', `/api/preparations/${key}/make-up`, { flaskIdentifier: 'VF-100-01', solventId: water.id, solventLot: water.lot, solutionTemperatureC: '20.0', applyTemperatureCorrection: false });
    expect(m.status, JSON.stringify(m.body)).toBe(201);
    const s = await sign('chemist', key, 'prepared');
    expect(s.status, JSON.stringify(s.body)).toBe(201);
    const rv = await RecordVersion.findOne({ where: { preparationId: m.body.id }, order: [['id', 'DESC']] });
    const signed = JSON.parse(rv!.canonicalJson);
    expect(signed.canonicalVersion).toBe(3);
    expect(signed.weighings[0].captures.reading).toMatchObject({ method: 'keyboard_burst', rawLine: 'S S     160.07 mg\r\n' });
    const detail = (await send('chemist2', 'get', `/api/preparations/${key}`)).body;
    expect(detail.sealBroken ?? null).toBeNull();
    expect(detail.signatures.at(-1).valid).toBe(true);
  });
});

describe('the readings of a dilution by mass', () => {
  it('when both readings come from the balance, then both are stored with their captures; a mismatch is refused at its field', async () => {
    const parentKey = await planStock();
    expect((await weigh(parentKey, { reading: '160.07' })).status).toBe(201);
    const water = ids.solvent['Ultrapure water']!;
    await emptyFlask(t.app, cookie.qa!, 'VF-100-01', DEMO_PASSWORD);
    expect((await send('chemist', 'post', `/api/preparations/${parentKey}/make-up`, { flaskIdentifier: 'VF-100-01', solventId: water.id, solventLot: water.lot, solutionTemperatureC: '20.0', applyTemperatureCorrection: false })).status).toBe(201);
    expect((await sign('chemist', parentKey, 'prepared')).status).toBe(201);
    expect((await sign('chemist2', parentKey, 'verified')).status).toBe(201);
    const plan = await send('chemist', 'post', `/api/preparations/${parentKey}/gravimetric-dilutions`, { target: { value: '10', unit: 'mg/kg' }, balanceId: ids.balance['BAL-A1'], plannedFinalMassG: '100', parentDensity: '1.0091', finalDensity: '0.998' });
    expect(plan.status, JSON.stringify(plan.body)).toBe(201);
    const key = plan.body.identifier as string;
    const post = (body: Record<string, unknown>) => send('technician', 'post', `/api/preparations/${key}/gravimetric-readings`, { room: ROOM, ...body });
    const bad = await post({ aliquotReading: captured('1.0081', 'ST,GS,+0001.0081  g', 'serial', 'g'), finalReading: captured('100.0000', 'ST,GS,+0100.0001  g', 'serial', 'g') });
    expect(bad.status, JSON.stringify(bad.body)).toBe(422);
    expect(Object.keys(bad.body.error.fields)).toEqual(['finalReading']);
    expect(await GravimetricReading.count({ where: { preparationId: plan.body.id } })).toBe(0);
    const ok = await post({ aliquotReading: captured('1.0081', 'ST,GS,+0001.0081  g', 'serial', 'g'), finalReading: '100.0000', unit: 'g' });
    expect(ok.status, JSON.stringify(ok.body)).toBe(201);
    const r = await GravimetricReading.findOne({ where: { preparationId: plan.body.id } });
    expect(r!.captures.aliquotReading).toMatchObject({ method: 'serial', rawLine: 'ST,GS,+0001.0081  g', stability: 'stable' });
    expect(r!.captures.finalReading).toMatchObject({ method: 'typed', flags: ['typed'] });
  });
});

describe('the balance record says how the balance prints', () => {
  it('when a balance is created with an output shape, print command and serial settings, then they are stored; bad ones are 400 at the field', async () => {
    const base = { identifier: 'BAL-CAP-1', description: 'Capture test balance', capacityG: '220', readabilityMg: '0.1' };
    const bad = await send('admin', 'post', '/api/balances', { ...base, outputShape: 'fancy', serialBaud: 1234, serialParity: 'mark', printCommand: 'SI→' });
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fields).sort()).toEqual(['outputShape', 'printCommand', 'serialBaud', 'serialParity']);
    const ok = await send('admin', 'post', '/api/balances', { ...base, outputShape: 'header_csv', printCommand: 'SI', printedId: 'SN 0042', serialBaud: 2400, serialDataBits: 7, serialParity: 'even', serialStopBits: 1, serialLineEnding: 'cr' });
    expect(ok.status, JSON.stringify(ok.body)).toBe(201);
    expect(ok.body).toMatchObject({ outputShape: 'header_csv', printCommand: 'SI', printedId: 'SN 0042', serialBaud: 2400, serialDataBits: 7, serialParity: 'even', serialStopBits: 1, serialLineEnding: 'cr' });
    const defaults = await send('admin', 'post', '/api/balances', { ...base, identifier: 'BAL-CAP-2' });
    expect(defaults.body).toMatchObject({ outputShape: 'auto', printCommand: null, serialBaud: 9600, serialDataBits: 8, serialParity: 'none', serialStopBits: 1, serialLineEnding: 'crlf' });
  });
});
