// Gravimetric dilutions over HTTP (METROLOGY §5.5): plan from a verified parent with the aliquot to weigh and the
// reading to aim for after buoyancy correction (§2.1, air density CIPM-2007 §1.1), balance gates (REQUIREMENTS
// EQ-01/EQ-02/EQ-04, USP <41>), both readings at the bench with their digits checked, append-only corrections
// (TR-08), the stored result (mass fraction mg/kg and mass concentration mg/L, each with its GUM budget), signing
// and verification through the real signature flow (ES-03, RV-02), use as the parent of a volumetric dilution,
// refusals, and the route × role matrix of the two routes.
//
// The parent's concentration is set to exactly 1000 mg/L (u 0.5 mg/L) before it is signed, so that the worked
// values below can be derived by hand.
import { PDFParse } from 'pdf-parse';
import request from 'supertest';
import { QueryTypes } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { GRAVIMETRIC_READINGS_APPEND_ONLY } from '../../server/db/migrations/0012-gravimetric.ts';
import { Preparation } from '../../server/db/models/index.ts';
import { currentRecordHash, verifySignatures } from '../../server/services/signatures.service.ts';
import { airDensityCIPM2007, airDensityUncertainty, buoyancyFactor, D, lastDigitUnit, rectangular, waterDensityTanaka } from '../../shared/calc/index.ts';
import { gravimetricDilution } from '../../shared/calc/dilution.ts';
import { netWeighingUncertainty } from '../../shared/prep/weighing-uncertainty.ts';
import { VERIFICATION_CHECKLIST } from '../../shared/schemas/preparations.ts';
import { DEMO, DEMO_PASSWORD, expectErrorBody, makeTestApp, sessionCookie, type TestApp } from './helpers/test-app.ts';
import { expectClose } from '../helpers/decimal.ts';
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
/** METROLOGY §1.1 check value: 20 °C, 101 325 Pa, 50 % RH, 400 ppm CO2 → ρa = 1.199 31 kg/m³ [C] */
const ROOM = { temperatureC: '20', pressureHPa: '1013.25', humidityPct: '50' };
const CHECKLIST = Object.fromEntries(VERIFICATION_CHECKLIST.map((c) => [c.key, true]));
const signAs = (who: Who, key: string, meaning: 'prepared' | 'verified') =>
  send(who, 'post', `/api/preparations/${key}/signatures`, { meaning, password: DEMO_PASSWORD, acknowledgeResponsibility: true, ...(meaning === 'verified' ? { checklist: CHECKLIST } : {}) });

/** A Pb stock at exactly 1000 mg/L (u 0.5 mg/L), verified through the signature flow unless `verify` is false. */
async function parentStock(verify = true) {
  const p = await send('chemist', 'post', '/api/preparations', {
    materialId: ids.material['Pb(NO3)2'],
    analyteFormula: 'Pb',
    target: { value: '1000', unit: 'mg/L' },
    flaskId: ids.ware['VF-100-01'],
    balanceId: ids.balance['BAL-SM1'],
    conditions: { source: 'measured', ...CONDITIONS },
  });
  expect(p.status, JSON.stringify(p.body)).toBe(201);
  expect((await send('chemist', 'post', `/api/preparations/${p.body.identifier}/weighings`, { mode: 'direct', reading: '160.07', unit: 'mg', conditions: CONDITIONS })).status).toBe(201);
  const water = ids.solvent['Ultrapure water']!;
  const m = await send('chemist', 'post', `/api/preparations/${p.body.identifier}/make-up`, { flaskIdentifier: (await freeFlask(t.app, cookie.chemist!)).identifier, solventId: water.id, solventLot: water.lot, solutionTemperatureC: '20.0', applyTemperatureCorrection: false });
  expect(m.status, JSON.stringify(m.body)).toBe(201);
  await Preparation.sequelize!.query("UPDATE preparations SET result = json_set(result, '$.concentration.value', '1000', '$.concentration.standardUncertainty', '0.5') WHERE id = :id", { replacements: { id: m.body.id } });
  if (verify) {
    expect((await signAs('chemist', p.body.identifier, 'prepared')).status).toBe(201);
    expect((await signAs('chemist2', p.body.identifier, 'verified')).status).toBe(201);
  }
  return { id: m.body.id as number, identifier: p.body.identifier as string };
}

const planBody = (over: Record<string, unknown> = {}) => ({ target: { value: '10', unit: 'mg/kg' }, balanceId: ids.balance['BAL-A1'], plannedFinalMassG: '100', parentDensity: '1.0091', finalDensity: '0.998', ...over });

let parent: { id: number; identifier: string };

beforeAll(async () => {
  t = await makeTestApp();
  for (const who of ['chemist', 'chemist2', 'technician', 'qa', 'admin'] as const) cookie[who] = await sessionCookie(t.app, DEMO[who]);
  const get = async (p: string) => (await send('chemist', 'get', p)).body.items as any[];
  for (const m of await get('/api/materials')) ids.material[m.formula] = m.id;
  for (const b of await get('/api/balances')) ids.balance[b.identifier] = b.id;
  for (const w of await get('/api/volumetric-ware?pageSize=100')) ids.ware[w.identifier] = w.id;
  for (const s of await get('/api/solvents')) ids.solvent[s.name] = { id: s.id, lot: s.lot };
  parent = await parentStock();
}, 120_000);
afterAll(() => t.close());

describe('POST /api/preparations/:key/gravimetric-dilutions', () => {
  it('plans the aliquot to weigh: true mass and the reading to aim for after buoyancy correction [METROLOGY §5.5, §2.1]', async () => {
    const res = await send('chemist', 'post', `/api/preparations/${parent.identifier}/gravimetric-dilutions`, planBody());
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const d = res.body;
    expect(d.kind).toBe('dilution');
    expect(d.status).toBe('planned');
    expect(d.dilution).toBeUndefined(); // the volumetric section stays volumetric
    const g = d.gravimetric;
    expect(g.method).toBe('gravimetric');
    expect(g.parent.identifier).toBe(parent.identifier);
    expect(g.plan.method).toBe('gravimetric');
    // w1 = γ1/ρ1 = 1000 mg/L / 1.0091 g/mL = 990.98206 mg/kg (by hand); u_r² = (0.5/1000)² + (0.0001/√3/1.0091)²
    expectClose(g.plan.parentMassFraction.value, '990.98206322', '1e-7');
    const urW1 = new D('0.0005').pow(2).plus(rectangular(lastDigitUnit('1.0091')).div('1.0091').pow(2)).sqrt();
    expectClose(g.plan.parentMassFraction.standardUncertainty, new D(1000).div('1.0091').mul(urW1), '1e-12');
    // aliquot true mass m_a = w2·m_f/w1 = 10·100/990.98206 = 1.009100 g (by hand: 1.0091 g, since w1 = 1000/1.0091)
    expectClose(g.plan.aliquot.trueMassG, '1.0091', '1e-15');
    // reading to aim for: m' = m/B, B = (1 − ρa/8.0)/(1 − ρa/1.0091) at the lab defaults 20.0 °C, 1013 hPa, 50 %
    const rhoA = airDensityCIPM2007({ temperatureC: '20.0', pressurePa: '101300', relativeHumidity: '0.5' }).density.div(1000);
    expectClose(g.plan.airDensity.value, rhoA, '1e-15');
    expectClose(rhoA, '0.00119931', '5e-7'); // METROLOGY §1.1 check value at 1013.25 hPa; 0.25 hPa less is −3e-7 g/mL
    const Ba = buoyancyFactor({ airDensity: rhoA, sampleDensity: '1.0091', weightDensity: '8.0' });
    expectClose(g.plan.aliquot.readingG, new D('1.0091').div(Ba), '1e-15');
    expectClose(buoyancyFactor({ airDensity: '0.0012', sampleDensity: '1.0091', weightDensity: '8.0' }), '1.0010404', '1e-7'); // METROLOGY §2.2: 2 % HNO3 at ρa 0.0012 → B = 1.001 040 4
    expect(g.plan.aliquot.readingShownG).toBe('1.0081'); // 1.0091/1.00104 = 1.00805 g, shown with BAL-A1's 4 decimals in g
    const Bf = buoyancyFactor({ airDensity: rhoA, sampleDensity: '0.998', weightDensity: '8.0' });
    expectClose(g.plan.final.readingG, new D(100).div(Bf), '1e-12');
    // planned result ≈ target: w2 = 10 mg/kg exactly when both readings are the planned ones
    expectClose(g.plan.planned.massFraction.value, '10', '1e-12');
    expectClose(g.plan.planned.massConcentration.value, '9.98', '1e-12'); // γ = w·ρ_final = 10 × 0.998
    expect(d.targetUnit ?? d.target.unit).toBe('mg/kg');
    // expiry capped by the parent (EX-01)
    const p = await send('qa', 'get', `/api/preparations/${parent.identifier}`);
    expect(d.expiresOn <= p.body.expiresOn).toBe(true);
    expect(p.body.children.map((c: { identifier: string }) => c.identifier)).toContain(d.identifier);
  });

  it('defaults the densities to water (Tanaka 2001) at the parent make-up temperature and the room temperature, ±0.005 g/mL', async () => {
    const res = await send('chemist', 'post', `/api/preparations/${parent.identifier}/gravimetric-dilutions`, planBody({ parentDensity: undefined, finalDensity: undefined }));
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const plan = res.body.gravimetric.plan;
    // METROLOGY §3.1: water at 20 °C = 998.2067 kg/m³ [V-calc]; the parent was made up at 20.0 °C, the lab default room is 20.0 °C
    expectClose(plan.parentDensity.value, '0.9982067', '5e-8');
    expectClose(plan.parentDensity.value, waterDensityTanaka('20.0').div(1000), '1e-15');
    expectClose(plan.parentDensity.standardUncertainty, rectangular('0.005'), '1e-18');
    expect(plan.parentDensity.basis).toMatch(/water at 20\.0 °C/);
    expectClose(plan.finalDensity.value, '0.9982067', '5e-8');
  });

  it('refuses a balance below its minimum weight with 422 and the gate; an overdue balance with 422 [USP <41>, EQ-02]', async () => {
    // 1 mg/kg in 10 g from ~991 mg/kg: an aliquot of about 10 mg, below BAL-A1's 160 mg minimum weight
    const low = await send('chemist', 'post', `/api/preparations/${parent.identifier}/gravimetric-dilutions`, planBody({ target: { value: '1', unit: 'mg/kg' }, plannedFinalMassG: '10' }));
    expect(low.status, JSON.stringify(low.body)).toBe(422);
    expect(low.body.error.code).toBe('gate_blocked');
    const gate = low.body.error.gates.find((x: { code: string }) => x.code === 'below_min_weight');
    expect(gate.severity).toBe('block');
    expect(gate.message).toMatch(/160 mg/);
    // the aliquot scales with the final mass: 10 g × 160 mg / 10.1 mg ≈ 158.5 g
    expect(gate.action).toMatch(/final mass of at least 15\d\.\d g/);
    const overdue = await send('chemist', 'post', `/api/preparations/${parent.identifier}/gravimetric-dilutions`, planBody({ balanceId: ids.balance['BAL-A2'] }));
    expect(overdue.status).toBe(422);
    expect(overdue.body.error.gates.map((x: { code: string }) => x.code)).toContain('calibration_overdue');
    const out = await send('chemist', 'post', `/api/preparations/${parent.identifier}/gravimetric-dilutions`, planBody({ balanceId: ids.balance['BAL-T1'] }));
    expect(out.status).toBe(422);
    expect(out.body.error.gates.map((x: { code: string }) => x.code)).toContain('balance_out_of_service');
    // more than the balance holds
    const big = await send('chemist', 'post', `/api/preparations/${parent.identifier}/gravimetric-dilutions`, planBody({ plannedFinalMassG: '500' }));
    expect(big.status).toBe(400);
    expect(big.body.error.fields.plannedFinalMassG).toMatch(/220 g/);
  });

  it('refuses an unverified parent (422, TR-11) and bad input with 400 at the fields', async () => {
    const unverified = await parentStock(false);
    const res = await send('chemist', 'post', `/api/preparations/${unverified.identifier}/gravimetric-dilutions`, planBody());
    expect(res.status).toBe(422);
    expectErrorBody(res.body);
    expect(res.body.error.code).toBe('parent_not_usable');
    expect(res.body.error.fields.parent).toMatch(/not verified/);

    const bad = await send('chemist', 'post', `/api/preparations/${parent.identifier}/gravimetric-dilutions`, { target: { value: '10,5', unit: 'mg/L' }, balanceId: 'x', plannedFinalMassG: '-1', parentDensity: '998' });
    expect(bad.status).toBe(400);
    expectErrorBody(bad.body);
    expect(Object.keys(bad.body.error.fields).sort()).toEqual(['balanceId', 'parentDensity', 'plannedFinalMassG', 'target.unit', 'target.value']);
    expect(bad.body.error.fields.parentDensity).toMatch(/g\/mL/);
    const notDilution = await send('chemist', 'post', `/api/preparations/${parent.identifier}/gravimetric-dilutions`, planBody({ target: { value: '2000', unit: 'mg/kg' } }));
    expect(notDilution.status).toBe(422);
    expect(notDilution.body.error.fields['target.value']).toMatch(/not below/);
    expect((await send('chemist', 'post', '/api/preparations/HWL-2099-9999/gravimetric-dilutions', planBody())).status).toBe(404);
  });
});

describe('the readings at the bench, the stored result, signing and use as a parent', () => {
  it('records both readings, stores the result against the core and a worked value, signs, verifies and dilutes by volume from it', async () => {
    const d = (await send('chemist', 'post', `/api/preparations/${parent.identifier}/gravimetric-dilutions`, planBody())).body;
    const key = d.identifier as string;

    // the stock endpoints stay closed to it
    const w = await send('technician', 'post', `/api/preparations/${key}/weighings`, { mode: 'direct', reading: '1.0081', unit: 'g', conditions: CONDITIONS });
    expect(w.status).toBe(409);
    expect(w.body.error.code).toBe('not_weighable');
    expect(w.body.error.message).toMatch(/gravimetric/);
    expect((await send('technician', 'post', `/api/preparations/${key}/aliquots`, { pipetteIdentifier: 'BP-1-01' })).status).toBe(409);
    const water = ids.solvent['Ultrapure water']!;
    expect((await send('technician', 'post', `/api/preparations/${key}/make-up`, { flaskIdentifier: 'VF-100-02', solventId: water.id, solventLot: water.lot, solutionTemperatureC: '20.0', applyTemperatureCorrection: false })).status).toBe(409);
    // the readings endpoint is closed to volumetric dilutions
    const vol = await send('chemist', 'post', `/api/preparations/${parent.identifier}/dilutions`, { method: 'volumetric', target: { value: '10', unit: 'mg/L' }, pipetteId: ids.ware['BP-1-01'], flaskId: ids.ware['VF-100-02'] });
    expect(vol.status, JSON.stringify(vol.body)).toBe(201);
    expect((await send('technician', 'post', `/api/preparations/${vol.body.identifier}/gravimetric-readings`, { aliquotReading: '1.0000', finalReading: '100.0000', room: ROOM })).body.error.code).toBe('not_gravimetric');

    // reading digits: BAL-A1 reads to 0.1 mg, so 4 decimals in g
    const digits = await send('technician', 'post', `/api/preparations/${key}/gravimetric-readings`, { aliquotReading: '1.000', finalReading: '100.00000', room: ROOM });
    expect(digits.status).toBe(400);
    expect(digits.body.error.fields.aliquotReading).toMatch(/4 decimals in g/);
    expect(digits.body.error.fields.finalReading).toMatch(/4 decimals in g/);
    const order = await send('technician', 'post', `/api/preparations/${key}/gravimetric-readings`, { aliquotReading: '100.0000', finalReading: '1.0000', room: ROOM });
    expect(order.status).toBe(400);
    expect(order.body.error.fields.finalReading).toMatch(/more than the aliquot/);
    const room = await send('technician', 'post', `/api/preparations/${key}/gravimetric-readings`, { aliquotReading: '1.0000', finalReading: '100.0000', room: { ...ROOM, temperatureC: '35' } });
    expect(room.status).toBe(400);
    expect(room.body.error.fields['room.temperatureC']).toMatch(/15 and 27/);
    const tooSmall = await send('technician', 'post', `/api/preparations/${key}/gravimetric-readings`, { aliquotReading: '0.0100', finalReading: '100.0000', room: ROOM });
    expect(tooSmall.status).toBe(422);
    expect(tooSmall.body.error.gates[0].code).toBe('below_min_weight');

    const r = await send('technician', 'post', `/api/preparations/${key}/gravimetric-readings`, { aliquotReading: '1.0000', finalReading: '100.0000', room: ROOM });
    expect(r.status, JSON.stringify(r.body)).toBe(201);
    const g = r.body.gravimetric;
    expect(g.readings).toHaveLength(1);
    expect(g.readings[0]).toMatchObject({ aliquotReading: '1.0000', finalReading: '100.0000', unit: 'g' }); // digits kept
    const res = g.result;
    expect(res.basedOn).toEqual({ readingsId: g.readings[0].id });

    // independently with the core (METROLOGY §5.5) and the shared input uncertainties
    const air = airDensityUncertainty({ temperatureC: '20', pressurePa: '101325', relativeHumidity: '0.5' });
    const rhoA = air.density.div(1000);
    expectClose(rhoA, '0.00119931', '5e-9'); // METROLOGY §1.1 check value 1.199 31 kg/m³ [C]
    const uBal = new D(netWeighingUncertainty({ readabilityMg: '0.1', repeatabilitySdMg: '0.08', calibrationUncertaintyMg: '0.15', calibrationUncertaintyK: '2' }).standardUncertainty).div(1000);
    const w1 = new D(1000).div('1.0091');
    const core = gravimetricDilution({
      parentMassFraction: w1,
      u: w1.mul(new D('0.0005').pow(2).plus(rectangular('0.0001').div('1.0091').pow(2)).sqrt()),
      aliquotReading: { value: '1.0000', standardUncertainty: uBal },
      finalReading: { value: '100.0000', standardUncertainty: uBal },
      densities: { aliquot: '1.0091', aliquotU: rectangular('0.0001'), final: '0.998', finalU: rectangular('0.001'), weights: '8.0' },
      air: { density: rhoA, standardUncertainty: air.standardUncertainty.div(1000) },
    });
    expectClose(res.massFraction.value, core.massFraction.value, '1e-15');
    expectClose(res.massFraction.standardUncertainty, core.massFraction.standardUncertainty, '1e-15');
    expectClose(res.massConcentration.value, core.massConcentration.value, '1e-15');
    expectClose(res.massConcentration.standardUncertainty, core.massConcentration.standardUncertainty, '1e-15');
    // worked by hand: w2 = (1000/1.0091)·(1.0000/100.0000)·B(1.0091)/B(0.998) with ρa = 0.001 199 31 g/mL:
    // B ratio = (1 − ρa/0.998)/(1 − ρa/1.0091) = 0.998 798 3/0.998 811 5 = 0.999 986 77 → w2 = 9.909 69 mg/kg;
    // γ2 = w2·ρ_final = 9.909 69 × 0.998 = 9.889 87 mg/L
    expectClose(res.massFraction.value, '9.90969', '5e-6');
    expectClose(res.massConcentration.value, '9.88987', '5e-6');
    expectClose(res.buoyancyRatio, '0.99998677', '5e-9');
    expect(res.massFraction.unit).toBe('mg/kg');
    expect(res.massConcentration.unit).toBe('mg/L');
    expect(res.massFraction.budget.map((b: { input: string }) => b.input)).toEqual(['parent', 'aliquot', 'final', 'airDensity', 'aliquotDensity', 'finalDensity']);
    expect(res.massFraction.display).toMatch(/^9\.9\d* ± 0\.0\d+ mg\/kg \(k = 2\)$/);
    expect(r.body.concentrationDisplay).toBe(`${res.massFraction.display}; ${res.massConcentration.display}`);
    expect(r.body.stage).toBe('complete'); // both readings: weighed and made up to mass in one step
    expect(d.stage).toBe('planned');
    const listed = await send('chemist', 'get', `/api/preparations?search=${key}`);
    expect(listed.body.items.find((x: { identifier: string }) => x.identifier === key).stage).toBe('complete');

    // append-only: a second record without supersedesId is refused; a correction supersedes and keeps the first
    const again = await send('technician', 'post', `/api/preparations/${key}/gravimetric-readings`, { aliquotReading: '1.0002', finalReading: '100.0000', room: ROOM });
    expect(again.status).toBe(409);
    const noReason = await send('technician', 'post', `/api/preparations/${key}/gravimetric-readings`, { aliquotReading: '1.0002', finalReading: '100.0000', room: ROOM, supersedesId: g.readings[0].id });
    expect(noReason.status).toBe(400);
    expect(noReason.body.error.fields.correctionReason).toBeTruthy();
    const fix = await send('technician', 'post', `/api/preparations/${key}/gravimetric-readings`, { aliquotReading: '1.0002', finalReading: '100.0000', room: ROOM, supersedesId: g.readings[0].id, correctionReason: 'tare not re-zeroed before the aliquot' });
    expect(fix.status, JSON.stringify(fix.body)).toBe(201);
    expect(fix.body.gravimetric.readings).toHaveLength(2);
    expect(fix.body.gravimetric.readings[0].supersededById).toBe(fix.body.gravimetric.readings[1].id);
    expect(fix.body.gravimetric.result.basedOn.readingsId).toBe(fix.body.gravimetric.readings[1].id);
    expectClose(fix.body.gravimetric.result.massFraction.value, new D(res.massFraction.value).mul('1.0002'), '1e-12'); // w2 ∝ r_a
    for (const sql of ["UPDATE gravimetric_readings SET aliquot_reading = '9.9999' WHERE id = :id", 'DELETE FROM gravimetric_readings WHERE id = :id']) {
      const err = await Preparation.sequelize!.query(sql, { replacements: { id: g.readings[0].id } }).then(() => null, (e: { original?: { message?: string }; message: string }) => e);
      expect(err?.original?.message ?? err?.message).toContain(GRAVIMETRIC_READINGS_APPEND_ONLY);
    }
    const stored = (await Preparation.sequelize!.query<{ dilution_result: string }>('SELECT dilution_result FROM preparations WHERE id = :id', { replacements: { id: d.id }, type: QueryTypes.SELECT }))[0]!;
    expect(JSON.parse(stored.dilution_result)).toEqual(fix.body.gravimetric.result);

    // signing: complete for "prepared" with current readings and a result; the hashed record carries both
    const before = await send('chemist', 'get', `/api/preparations/${key}`);
    expect(before.body.canSign.prepare, JSON.stringify(before.body.canSign)).toBe(true);
    const content = JSON.parse((await currentRecordHash(d.id)).canonical);
    expect(content.gravimetricReadings).toHaveLength(2);
    expect(content.gravimetricReadings[1]).toMatchObject({ aliquotReading: '1.0002', finalReading: '100.0000', unit: 'g', correctionReason: 'tare not re-zeroed before the aliquot' });
    expect(content.dilutionResult.massFraction.value).toBe(fix.body.gravimetric.result.massFraction.value);
    expect(content.aliquots).toBeUndefined();
    const prepared = await signAs('chemist', key, 'prepared');
    expect(prepared.status, JSON.stringify(prepared.body)).toBe(201);
    expect((await signAs('chemist', key, 'verified')).status).toBe(403); // the planner and preparer cannot verify
    const verified = await signAs('chemist2', key, 'verified');
    expect(verified.status, JSON.stringify(verified.body)).toBe(201);
    expect(verified.body.status).toBe('verified');
    expect((await verifySignatures(d.id)).every((c) => c.ok)).toBe(true);

    // the prep sheet of a gravimetric dilution renders (no stock plan fields to read)
    const sheet = await send('chemist', 'get', `/api/preparations/${key}/prep-sheet.pdf`).buffer(true).parse((res, cb) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () => cb(null, Buffer.concat(chunks)));
    });
    expect(sheet.status).toBe(200);
    const parser = new PDFParse({ data: new Uint8Array(sheet.body as Buffer) });
    const pdf = (await parser.getText()).text.replace(/\s+/g, ' ');
    await parser.destroy();
    for (const text of ['Readings of the aliquot and the final solution', 'aliquot 1.0002 g; final 100.0000 g', 'SUPERSEDED by', fix.body.gravimetric.result.massFraction.display, fix.body.gravimetric.result.massConcentration.display]) expect(pdf).toContain(text);

    // as a parent of a volumetric dilution its mass concentration is the parent concentration
    const gamma = new D(fix.body.gravimetric.result.massConcentration.value);
    const child = await send('chemist', 'post', `/api/preparations/${key}/dilutions`, { method: 'volumetric', target: { value: gamma.div(100).toSignificantDigits(3).toString(), unit: 'mg/L' }, pipetteId: ids.ware['BP-1-01'], flaskId: ids.ware['VF-100-02'] });
    expect(child.status, JSON.stringify(child.body)).toBe(201);
    expect(child.body.dilution.parent.snapshot.concentration.value).toBe(gamma.toString());
    expect(child.body.dilution.parent.snapshot.concentration.unit).toBe('mg/L');
    expectClose(child.body.dilution.planned.value, gamma.div(100), '1e-15'); // c2 = c1·Vp/Vf [METROLOGY §5.5]
  });

  it('whoever recorded the readings cannot verify them (RV-02); without readings "prepared" is refused with 409', async () => {
    const d = (await send('chemist', 'post', `/api/preparations/${parent.identifier}/gravimetric-dilutions`, planBody())).body;
    const none = await signAs('chemist', d.identifier, 'prepared');
    expect(none.status).toBe(409);
    expect(none.body.error.message).toMatch(/readings/);
    expect((await send('chemist2', 'post', `/api/preparations/${d.identifier}/gravimetric-readings`, { aliquotReading: '1.0081', finalReading: '99.8950', room: ROOM })).status).toBe(201);
    expect((await signAs('chemist', d.identifier, 'prepared')).status).toBe(201);
    const byRecorder = await signAs('chemist2', d.identifier, 'verified');
    expect(byRecorder.status).toBe(403);
    expect(byRecorder.body.error.message).toMatch(/readings/);
  });
});

describe('route × role (REQUIREMENTS AC-02)', () => {
  it('POST /api/preparations/:key/gravimetric-dilutions: chemist only; /gravimetric-readings: chemist and technician', async () => {
    const plan = `/api/preparations/${parent.identifier}/gravimetric-dilutions`;
    for (const [who, status] of [['signedOut', 401], ['technician', 403], ['qa', 403], ['admin', 403], ['chemist', 201]] as const) {
      expect((await send(who, 'post', plan, planBody())).status, who).toBe(status);
    }
    const d = (await send('chemist', 'post', plan, planBody())).body;
    const readings = `/api/preparations/${d.identifier}/gravimetric-readings`;
    for (const [who, status] of [['signedOut', 401], ['qa', 403], ['admin', 403]] as const) {
      expect((await send(who, 'post', readings, { aliquotReading: '1.0081', finalReading: '99.8950', room: ROOM })).status, who).toBe(status);
    }
    expect((await send('technician', 'post', readings, { aliquotReading: '1.0081', finalReading: '99.8950', room: ROOM })).status).toBe(201);
    const fix = { aliquotReading: '1.0080', finalReading: '99.8950', room: ROOM, correctionReason: 'drop on the rim' };
    const rid = (await send('chemist', 'get', `/api/preparations/${d.identifier}`)).body.gravimetric.readings[0].id;
    expect((await send('chemist', 'post', readings, { ...fix, supersedesId: rid })).status).toBe(201);
  });
});
