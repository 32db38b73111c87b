// Readings that cannot be true are refused, and a result outside what the plan could produce is signed only with
// a reason the verifier sees first (issue 16 §2).
// - A reading above the balance's capacity (Max, on the balance record) or a net reading of zero or below is
//   refused with 422 at the field and nothing is stored: direct weighings, weighings by difference (which may be
//   negative: vessel tared on the pan) and both readings of a dilution by mass.
// - "prepared" of a result more than twice the target needs outOfPlanReason (422 without); the reason is stored
//   with the signature and audited; the verifier's checklist starts with it and "verified" needs it ticked.
// Demo balances (seed/demo-data.ts): BAL-A1 220 g × 0.1 mg, BAL-SM1 82 g × 0.01 mg.
import { PDFParse } from 'pdf-parse';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEntry, GravimetricReading, Weighing } from '../../server/db/models/index.ts';
import { OUT_OF_PLAN_CHECK_KEY, VERIFICATION_CHECKLIST } from '../../shared/schemas/preparations.ts';
import { PREVIEW_MARK } from '../../shared/schemas/printing.ts';
import { DEMO, DEMO_PASSWORD, expectErrorBody, makeTestApp, sessionCookie, type TestApp } from './helpers/test-app.ts';
import { freeFlask } from './helpers/free-flask.ts';

type Who = 'chemist' | 'chemist2' | 'technician';
let t: TestApp;
const cookie: Partial<Record<Who, string>> = {};
const ids = { material: {} as Record<string, number>, balance: {} as Record<string, number>, ware: {} as Record<string, number>, solvent: {} as Record<string, { id: number; lot: string }> };
const send = (who: Who, method: 'get' | 'post', path: string, body?: unknown) => {
  const r = request(t.app)[method](path).set('Cookie', cookie[who]!);
  return body === undefined ? r : r.send(body as object);
};
const CONDITIONS = { temperatureC: '21', pressureHPa: '985', relativeHumidityPct: '45' };
const ROOM = { temperatureC: '20', pressureHPa: '1013.25', humidityPct: '50' };
const CHECKLIST = Object.fromEntries(VERIFICATION_CHECKLIST.map((c) => [c.key, true]));
const sign = (who: Who, key: string, meaning: 'prepared' | 'verified', extra: Record<string, unknown> = {}) =>
  send(who, 'post', `/api/preparations/${key}/signatures`, { meaning, password: DEMO_PASSWORD, acknowledgeResponsibility: true, ...(meaning === 'verified' ? { checklist: CHECKLIST } : {}), ...extra });

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
async function makeUp(key: string) {
  const water = ids.solvent['Ultrapure water']!;
  const m = await send('chemist', 'post', `/api/preparations/${key}/make-up`, { flaskIdentifier: (await freeFlask(t.app, cookie.chemist!)).identifier, solventId: water.id, solventLot: water.lot, solutionTemperatureC: '20.0', applyTemperatureCorrection: false });
  expect(m.status, JSON.stringify(m.body)).toBe(201);
  return m.body;
}
const weighingsOf = async (key: string) => Weighing.count({ where: { preparationId: (await send('chemist', 'get', `/api/preparations/${key}`)).body.id } });

beforeAll(async () => {
  t = await makeTestApp();
  for (const who of ['chemist', 'chemist2', 'technician'] as const) cookie[who] = await sessionCookie(t.app, DEMO[who]);
  const get = async (p: string) => (await send('chemist', 'get', p)).body.items as any[];
  for (const m of await get('/api/materials')) ids.material[m.formula] = m.id;
  for (const b of await get('/api/balances')) ids.balance[b.identifier] = b.id;
  for (const w of await get('/api/volumetric-ware?pageSize=100')) ids.ware[w.identifier] = w.id;
  for (const s of await get('/api/solvents')) ids.solvent[s.name] = { id: s.id, lot: s.lot };
}, 60_000);
afterAll(() => t.close());

describe('a reading the balance cannot show is refused (422 at the field, nothing stored)', () => {
  it('the balances carry their capacity (demo: BAL-A1 220 g, BAL-SM1 82 g)', async () => {
    const items = (await send('chemist', 'get', '/api/balances')).body.items as Array<{ identifier: string; capacityG: string }>;
    expect(items.find((b) => b.identifier === 'BAL-A1')!.capacityG).toBe('220');
    expect(items.find((b) => b.identifier === 'BAL-SM1')!.capacityG).toBe('82');
  });

  it('when a direct reading of 99999999999999999999.0 mg is sent for a 220 g balance, then 422 at reading, even with an out-of-window reason', async () => {
    const key = await planStock();
    const auditedBefore = await AuditEntry.count({ where: { action: 'weighing_recorded' } });
    const res = await weigh(key, { reading: '99999999999999999999.0', balanceId: ids.balance['BAL-A1'], confirmOutOfWindow: true, outOfWindowReason: 'spilled' });
    expect(res.status, JSON.stringify(res.body)).toBe(422);
    expectErrorBody(res.body);
    expect(res.body.error.code).toBe('reading_impossible');
    expect(res.body.error.fields.reading).toMatch(/BAL-A1 weighs up to 220 g/);
    expect(await weighingsOf(key)).toBe(0);
    expect(await AuditEntry.count({ where: { action: 'weighing_recorded' } })).toBe(auditedBefore);
  });

  it('when a direct reading is below zero or zero, then 422 at reading; in g above 82 g on BAL-SM1, 422; exactly 82 g is a reading (then the window applies)', async () => {
    const key = await planStock();
    for (const reading of ['-160.07', '0.00']) {
      const res = await weigh(key, { reading });
      expect(res.status, reading).toBe(422);
      expect(res.body.error.fields.reading, reading).toMatch(reading === '0.00' ? /cannot be zero/ : /cannot be below zero/);
    }
    const over = await weigh(key, { reading: '82.00001', unit: 'g' });
    expect(over.status).toBe(422);
    expect(over.body.error.fields.reading).toMatch(/BAL-SM1 weighs up to 82 g/);
    const max = await weigh(key, { reading: '82.00000', unit: 'g' });
    expect(max.status).toBe(400); // a reading the balance can show, far outside the window: asks for a reason
    expect(max.body.error.fields.outOfWindowReason).toBeTruthy();
    expect(await weighingsOf(key)).toBe(0);
  });

  it('when weighing by difference, then a reading beyond the capacity is refused at its field; a tared vessel (0.00 then -160.07 mg) is a weighing of 160.07 mg', async () => {
    const key = await planStock();
    const over = await weigh(key, { mode: 'difference', before: '90000.00', after: '89839.93' });
    expect(over.status).toBe(422);
    expect(Object.keys(over.body.error.fields).sort()).toEqual(['after', 'before']);
    const under = await weigh(key, { mode: 'difference', before: '0.00', after: '-90000.00' });
    expect(under.status).toBe(422);
    expect(under.body.error.fields.after).toMatch(/weighs up to 82 g/);
    expect(await weighingsOf(key)).toBe(0);
    const tared = await weigh(key, { mode: 'difference', before: '0.00', after: '-160.07' });
    expect(tared.status, JSON.stringify(tared.body)).toBe(201);
    expect(tared.body.weighings[0]).toMatchObject({ net: { value: '160.07', unit: 'mg' }, after: { value: '-160.07', unit: 'mg' } });
  });

  it('when a reading of a dilution by mass is below zero or beyond the capacity, then 422 at that reading and no readings are stored', async () => {
    // a verified parent, made to plan (no out-of-plan reason needed)
    const parentKey = await planStock();
    expect((await weigh(parentKey, { reading: '160.07' })).status).toBe(201);
    await makeUp(parentKey);
    expect((await sign('chemist', parentKey, 'prepared')).status).toBe(201);
    expect((await sign('chemist2', parentKey, 'verified')).status).toBe(201);
    const plan = await send('chemist', 'post', `/api/preparations/${parentKey}/gravimetric-dilutions`, { target: { value: '10', unit: 'mg/kg' }, balanceId: ids.balance['BAL-A1'], plannedFinalMassG: '100', parentDensity: '1.0091', finalDensity: '0.998' });
    expect(plan.status, JSON.stringify(plan.body)).toBe(201);
    const key = plan.body.identifier as string;
    const post = (body: Record<string, unknown>) => send('technician', 'post', `/api/preparations/${key}/gravimetric-readings`, { room: ROOM, ...body });
    const negative = await post({ aliquotReading: '-1.0081', finalReading: '100.0000' });
    expect(negative.status, JSON.stringify(negative.body)).toBe(422);
    expect(negative.body.error.code).toBe('reading_impossible');
    expect(negative.body.error.fields.aliquotReading).toMatch(/below zero/);
    const over = await post({ aliquotReading: '1.0081', finalReading: '300.0000' });
    expect(over.status).toBe(422);
    expect(over.body.error.fields.finalReading).toMatch(/BAL-A1 weighs up to 220 g/);
    const overMg = await post({ aliquotReading: '1008.1', finalReading: '99999999999999999999.0', unit: 'mg' });
    expect(overMg.status).toBe(422);
    expect(overMg.body.error.fields.finalReading).toMatch(/220 g/);
    expect(await GravimetricReading.count({ where: { preparationId: plan.body.id } })).toBe(0);
  });
});

describe('a result outside what the plan could produce is signed only with a reason, and the verifier sees it first', () => {
  let key = '';
  it('when the result is more than twice the target, then "prepared" without a reason is 422 at outOfPlanReason', async () => {
    key = await planStock();
    // 400.00 mg instead of 160.07 mg: kept with an out-of-window reason; the result is about 2.5 × the target
    const w = await weigh(key, { reading: '400.00', confirmOutOfWindow: true, outOfWindowReason: 'whole vial transferred' });
    expect(w.status, JSON.stringify(w.body)).toBe(201);
    const d = await makeUp(key);
    expect(d.resultOutOfPlan.messages[0]).toMatch(/more than twice the target 1000 mg\/L/);
    for (const extra of [{}, { outOfPlanReason: ' x ' }]) {
      const res = await sign('chemist', key, 'prepared', extra);
      expect(res.status, JSON.stringify(res.body)).toBe(422);
      expectErrorBody(res.body);
      expect(res.body.error.code).toBe('result_out_of_plan');
      expect(res.body.error.fields.outOfPlanReason).toMatch(/more than twice the target/);
    }
    expect((await send('chemist', 'get', `/api/preparations/${key}`)).body.status).toBe('planned');
  });

  it('when a reason is stated, then it is signed, the reason is kept with the signature and audited', async () => {
    const res = await sign('chemist', key, 'prepared', { outOfPlanReason: 'Stock for a high-level spike, 2500 mg/L intended' });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const s = res.body.signatures.find((x: { meaning: string }) => x.meaning === 'prepared');
    expect(s.outOfPlanReason).toBe('Stock for a high-level spike, 2500 mg/L intended');
    expect(res.body.resultOutOfPlan).toMatchObject({ reason: 'Stock for a high-level spike, 2500 mg/L intended', statedBy: s.signer.fullName });
    const audit = await AuditEntry.findOne({ where: { action: 'sign', entityId: String(res.body.id) }, order: [['id', 'DESC']] });
    expect(JSON.stringify(audit!.changes)).toContain('Stock for a high-level spike');
    // and the prep sheet's signature table carries it (whitespace ignored: table cells wrap)
    const sheet = await send('chemist', 'get', `/api/preparations/${key}/prep-sheet.pdf?preview=1`).buffer(true).parse((r, cb) => {
      const chunks: Buffer[] = [];
      r.on('data', (c: Buffer) => chunks.push(c));
      r.on('end', () => cb(null, Buffer.concat(chunks)));
    });
    expect(sheet.status).toBe(200);
    const parser = new PDFParse({ data: new Uint8Array(sheet.body as Buffer) });
    const text = (await parser.getText()).text.replace(/\s+/g, '');
    await parser.destroy();
    expect(text).toContain('resultoutsidetheplan,reason:Stockforahigh-levelspike');
    expect(text).toContain(PREVIEW_MARK.replace(/\s+/g, '')); // shown as a preview: marked, not recorded
  });

  it('then the verifier\'s checklist starts with the out-of-plan result and its reason, and "verified" needs that item ticked', async () => {
    const d = (await send('chemist2', 'get', `/api/preparations/${key}`)).body;
    expect(d.verificationChecklist[0].key).toBe(OUT_OF_PLAN_CHECK_KEY);
    expect(d.verificationChecklist[0].label).toMatch(/more than twice the target/);
    expect(d.verificationChecklist[0].label).toContain('Stock for a high-level spike');
    expect(d.verificationChecklist).toHaveLength(VERIFICATION_CHECKLIST.length + 1);
    const without = await sign('chemist2', key, 'verified');
    expect(without.status).toBe(400);
    expect(without.body.error.fields[`checklist.${OUT_OF_PLAN_CHECK_KEY}`]).toBeTruthy();
    const ok = await sign('chemist2', key, 'verified', { checklist: { ...CHECKLIST, [OUT_OF_PLAN_CHECK_KEY]: true } });
    expect(ok.status, JSON.stringify(ok.body)).toBe(201);
    expect(ok.body.signatures.find((x: { meaning: string }) => x.meaning === 'verified').checklist[OUT_OF_PLAN_CHECK_KEY]).toBe(true);
  });
});
