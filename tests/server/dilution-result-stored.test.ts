// A dilution's result is stored at the write that produces it (migration 0011), with its calc version and basedOn,
// and read back as stored: changing the lab's rounding rule afterwards changes neither the number on the record nor
// the validity of its signatures (REQUIREMENTS TR-09 stored results with the formula version, ES-03 the signed
// content). Rows without a stored result (legacy) are still computed on read, with the current rule.
//
// The parent's concentration is set to 1000.45 mg/L (u = 0.5 mg/L) before it is signed, so that 1 mL into 100 mL
// gives exactly 10.0045 mg/L: with U ≈ 0.067 mg/L the GUM rounding (JCGM 100:2008 7.2.6; METROLOGY §5.5) keeps
// three decimals and the value is an exact tie, "10.004" by half-even (ISO 80000-1 Annex B) and "10.005" by half-up
// (USP General Notices 7.20). A recomputation under the other rule would therefore show a different number.
import request from 'supertest';
import { QueryTypes } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Preparation } from '../../server/db/models/index.ts';
import { verifySignatures } from '../../server/services/signatures.service.ts';
import { volumetricDilution } from '../../shared/calc/dilution.ts';
import { rectangular, triangular } from '../../shared/calc/index.ts';
import { VERIFICATION_CHECKLIST } from '../../shared/schemas/preparations.ts';
import { DEMO, DEMO_PASSWORD, makeTestApp, sessionCookie, type TestApp } from './helpers/test-app.ts';
import { expectClose } from '../helpers/decimal.ts';
import { freeFlask } from './helpers/free-flask.ts';

type Who = 'chemist' | 'chemist2' | 'technician' | 'qa' | 'admin';
let t: TestApp;
const cookie: Partial<Record<Who, string>> = {};
const ids = { material: {} as Record<string, number>, balance: {} as Record<string, number>, ware: {} as Record<string, number>, solvent: {} as Record<string, { id: number; lot: string }> };
const send = (who: Who, method: 'get' | 'post' | 'put', path: string, body?: unknown) => {
  const r = request(t.app)[method](path).set('Cookie', cookie[who]!);
  return body === undefined ? r : r.send(body as object);
};
const CONDITIONS = { temperatureC: '21', pressureHPa: '985', relativeHumidityPct: '45' };
const CHECKLIST = Object.fromEntries(VERIFICATION_CHECKLIST.map((c) => [c.key, true]));
const signAs = (who: Who, key: string, meaning: 'prepared' | 'verified') =>
  send(who, 'post', `/api/preparations/${key}/signatures`, { meaning, password: DEMO_PASSWORD, acknowledgeResponsibility: true, ...(meaning === 'verified' ? { checklist: CHECKLIST } : {}) });
const storedColumn = async (id: number) =>
  (await Preparation.sequelize!.query<{ dilution_result: string | null }>('SELECT dilution_result FROM preparations WHERE id = :id', { replacements: { id }, type: QueryTypes.SELECT }))[0]!.dilution_result;

/** A verified Pb stock whose stored concentration is 1000.45 ± 0.5 mg/L (set before signing, so the signed record carries it). */
async function verifiedParent() {
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
  await Preparation.sequelize!.query(
    "UPDATE preparations SET result = json_set(result, '$.concentration.value', '1000.45', '$.concentration.standardUncertainty', '0.5') WHERE id = :id",
    { replacements: { id: m.body.id } },
  );
  expect((await signAs('chemist', p.body.identifier, 'prepared')).status).toBe(201);
  const v = await signAs('chemist2', p.body.identifier, 'verified');
  expect(v.status, JSON.stringify(v.body)).toBe(201);
  return v.body as { identifier: string };
}

beforeAll(async () => {
  t = await makeTestApp();
  for (const who of ['chemist', 'chemist2', 'technician', 'qa', 'admin'] as const) cookie[who] = await sessionCookie(t.app, DEMO[who]);
  const get = async (p: string) => (await send('chemist', 'get', p)).body.items as any[];
  for (const m of await get('/api/materials')) ids.material[m.formula] = m.id;
  for (const b of await get('/api/balances')) ids.balance[b.identifier] = b.id;
  for (const w of await get('/api/volumetric-ware?pageSize=100')) ids.ware[w.identifier] = w.id;
  for (const s of await get('/api/solvents')) ids.solvent[s.name] = { id: s.id, lot: s.lot };
}, 90_000);
afterAll(() => t.close());

describe('the dilution result is stored at write time', () => {
  it('aliquot + make-up store the result; after a change of the rounding rule the record shows the same number and its signature stays valid', async () => {
    const parent = await verifiedParent();
    const d = await send('chemist', 'post', `/api/preparations/${parent.identifier}/dilutions`, { method: 'volumetric', target: { value: '10', unit: 'mg/L' }, pipetteId: ids.ware['BP-1-01'], flaskId: ids.ware['VF-100-02'] });
    expect(d.status, JSON.stringify(d.body)).toBe(201);
    expect(d.body.dilution.parent.snapshot.concentration.value).toBe('1000.45');
    const key = d.body.identifier as string;

    const a = await send('technician', 'post', `/api/preparations/${key}/aliquots`, { pipetteIdentifier: 'BP-1-01' });
    expect(a.status, JSON.stringify(a.body)).toBe(201);
    expect(a.body.dilution.result).toBeUndefined(); // no make-up yet
    expect(await storedColumn(d.body.id)).toBeNull();
    const water = ids.solvent['Ultrapure water']!;
    const m = await send('technician', 'post', `/api/preparations/${key}/make-up`, { flaskIdentifier: (await freeFlask(t.app, cookie.chemist!)).identifier, solventId: water.id, solventLot: water.lot, solutionTemperatureC: '20.0', applyTemperatureCorrection: false });
    expect(m.status, JSON.stringify(m.body)).toBe(201);
    const result = m.body.dilution.result;

    // the number itself, computed independently with the core: c2 = c1·Vp/Vf, tolerances triangular (METROLOGY §5.5, §4.4),
    // and, as every new record (dilution-2), each item's repeatability a/√6 from its tolerance [common practice] and the
    // aliquot-to-final temperature difference ±4 °C rectangular [QUAM A1] with the water lot's β = 0.000207 /K (seed)
    const core = volumetricDilution({ ...coreArgs(), rounding: 'half-even' });
    expect(result.value).toBe('10.0045');
    expect(result.value).toBe(core.value);
    expectClose(result.standardUncertainty, core.standardUncertainty, '1e-18'); // the server carries the tolerances' u at 20 digits
    expect(result.display).toBe('10.004 ± 0.094 mg/L (k = 2)'); // half-even keeps the even 4 (the lab default rule)
    expect(volumetricDilution({ ...coreArgs(), rounding: 'half-up' }).display).toBe('10.005 ± 0.094 mg/L (k = 2)'); // the other rule would differ
    expect(result.basedOn).toEqual({ aliquotId: a.body.dilution.aliquots[0].id, makeUpId: m.body.makeUp.id });
    expect(result.calcVersion).toMatch(/^dilution-2/);
    expect(m.body.concentrationDisplay).toBe(result.display);

    // stored in the same write: the column holds exactly what the API shows
    const raw = await storedColumn(d.body.id);
    expect(raw).not.toBeNull();
    expect(JSON.parse(raw!)).toEqual(result);

    const prepared = await signAs('chemist', key, 'prepared');
    expect(prepared.status, JSON.stringify(prepared.body)).toBe(201);

    // the admin changes the lab's rounding rule
    const s = await send('admin', 'put', '/api/settings', { roundingRule: 'half-up' });
    expect(s.status, JSON.stringify(s.body)).toBe(200);
    expect(s.body.roundingRule).toBe('half-up');

    const after = await send('chemist2', 'get', `/api/preparations/${key}`);
    expect(after.status).toBe(200);
    expect(after.body.dilution.result).toEqual(result);
    expect(after.body.dilution.result.display).toBe('10.004 ± 0.094 mg/L (k = 2)');
    expect(after.body.concentrationDisplay).toBe('10.004 ± 0.094 mg/L (k = 2)');
    expect(after.body.signatures.map((x: { meaning: string; valid: boolean }) => [x.meaning, x.valid])).toEqual([['prepared', true]]);
    expect((await verifySignatures(d.body.id)).every((c) => c.ok)).toBe(true);
    expect(after.body.canSign.verify, JSON.stringify(after.body.canSign)).toBe(true);

    // verified under the new rule, and used as a parent: the child's snapshot carries the stored value and display
    const verified = await signAs('chemist2', key, 'verified');
    expect(verified.status, JSON.stringify(verified.body)).toBe(201);
    const child = await send('chemist', 'post', `/api/preparations/${key}/dilutions`, { method: 'volumetric', target: { value: '0.1', unit: 'mg/L' }, pipetteId: ids.ware['BP-1-01'], flaskId: ids.ware['VF-100-02'] });
    expect(child.status, JSON.stringify(child.body)).toBe(201);
    expect(child.body.dilution.parent.snapshot.concentration).toEqual({ value: result.value, unit: 'mg/L', standardUncertainty: result.standardUncertainty, display: '10.004 ± 0.094 mg/L (k = 2)' });

    // a legacy row (no stored result) is computed on read with the current rule and the budget of its time (dilution-1:
    // tolerances only), so it would show 10.005 ± 0.067 and break the signature made over the stored dilution-2 result
    await Preparation.sequelize!.query('UPDATE preparations SET dilution_result = NULL WHERE id = :id', { replacements: { id: d.body.id } });
    const legacy = await send('chemist', 'get', `/api/preparations/${key}`);
    expect(legacy.body.dilution.result.display).toBe('10.005 ± 0.067 mg/L (k = 2)');
    expect(legacy.body.dilution.result.calcVersion).toMatch(/^dilution-1/);
    expect((await verifySignatures(d.body.id)).some((c) => !c.ok)).toBe(true);
    await send('admin', 'put', '/api/settings', { roundingRule: 'half-even' });
  });
});

function coreArgs() {
  return {
    parent: { value: '1000.45', unit: 'mg/L', standardUncertainty: '0.5' },
    aliquot: { volumeMl: '1', standardUncertainty: triangular('0.008') },
    final: { volumeMl: '100', standardUncertainty: triangular('0.10') },
    repeatability: { aliquotMl: triangular('0.008'), finalMl: triangular('0.10') },
    temperature: { betaPerK: '0.000207', standardUncertaintyC: rectangular('4') },
  };
}
