// Old dilution records keep their budget (issue 16 §5). New records are written with the fuller budget,
// calc version "dilution-2" (shared/calc/dilution.ts: tolerances, repeatability a/√6 from each tolerance [common
// practice], aliquot-to-final temperature difference ±4 °C rectangular [QUAM A1]). A record written before is
// never recomputed with it:
// - a result stored under dilution-1 (migration 0011 onwards) is returned as stored (its basedOn still names the
//   current aliquot and make-up), so its number, budget and signed hash stay as they were;
// - a row without a stored result (written before migration 0011, hence before dilution-2) is computed on read
//   with the dilution-1 budget (server/services/lineage-view.ts dilutionResultOf), so a signature made over that
//   reading stays valid.
// Only a new aliquot or make-up (a new version, through an amendment once signed) stores a dilution-2 result.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Preparation } from '../../server/db/models/index.ts';
import { verifySignatures } from '../../server/services/signatures.service.ts';
import { volumetricDilution } from '../../shared/calc/dilution.ts';
import { triangular } from '../../shared/calc/index.ts';
import { DEMO, DEMO_PASSWORD, makeTestApp, sessionCookie, type TestApp } from './helpers/test-app.ts';
import { expectClose } from '../helpers/decimal.ts';
import { freeFlask } from './helpers/free-flask.ts';

type Who = 'chemist' | 'chemist2' | 'technician';
let t: TestApp;
const cookie: Partial<Record<Who, string>> = {};
const send = (who: Who, method: 'get' | 'post', path: string, body?: unknown) => {
  const r = request(t.app)[method](path).set('Cookie', cookie[who]!);
  return body === undefined ? r : r.send(body as object);
};
const ware: Record<string, number> = {};
let water: { id: number; lot: string };
let pb: Preparation;

beforeAll(async () => {
  t = await makeTestApp();
  for (const who of ['chemist', 'chemist2', 'technician'] as const) cookie[who] = await sessionCookie(t.app, DEMO[who]);
  for (const w of (await send('chemist', 'get', '/api/volumetric-ware?pageSize=100')).body.items) ware[w.identifier] = w.id;
  const s = (await send('chemist', 'get', '/api/solvents')).body.items.find((x: { name: string }) => x.name === 'Ultrapure water');
  water = { id: s.id, lot: s.lot };
  pb = (await Preparation.findOne({ where: { analyteFormula: 'Pb', status: 'verified' } }))!; // the demo's verified Pb stock
}, 90_000);
afterAll(() => t.close());

/** A dilution of the demo Pb stock, planned and made up in a flask that holds no open solution (one flask, one open solution). */
async function madeUpDilution(): Promise<{ id: number; identifier: string; result: any; flask: string }> {
  const fl = await freeFlask(t.app, cookie.chemist!);
  const d = await send('chemist', 'post', `/api/preparations/${pb.identifier}/dilutions`, { method: 'volumetric', target: { value: '10', unit: 'mg/L' }, pipetteId: ware['BP-1-01'], flaskId: fl.id });
  expect(d.status, JSON.stringify(d.body)).toBe(201);
  expect((await send('technician', 'post', `/api/preparations/${d.body.identifier}/aliquots`, { pipetteIdentifier: 'BP-1-01' })).status).toBe(201);
  const m = await send('technician', 'post', `/api/preparations/${d.body.identifier}/make-up`, { flaskIdentifier: fl.identifier, solventId: water.id, solventLot: water.lot, solutionTemperatureC: '20.0', applyTemperatureCorrection: false });
  expect(m.status, JSON.stringify(m.body)).toBe(201);
  return { id: d.body.id, identifier: d.body.identifier, result: m.body.dilution.result, flask: fl.identifier };
}

describe('dilution budgets by calc version', () => {
  it('a new record is written with dilution-2 (six budget rows, each naming its source)', async () => {
    const { result, flask } = await madeUpDilution();
    expect(result.calcVersion).toMatch(/^dilution-2/);
    expect(result.budget.map((b: { input: string }) => b.input)).toEqual(['parent', 'aliquot', 'final', 'aliquotRepeatability', 'finalRepeatability', 'temperature']);
    const label = (n: string) => result.budget.find((b: { input: string }) => b.input === n).label as string;
    expect(label('aliquotRepeatability')).toMatch(/±0\.008 mL tolerance of BP-1-01, triangular a\/√6; common practice/);
    expect(label('finalRepeatability')).toContain(`tolerance of ${flask}, triangular a/√6; common practice`);
    expect(label('temperature')).toMatch(/±\s?4 °C rectangular, QUAM A1; β = 0\.000207 \/K, of Ultrapure water/); // the make-up solvent's β (seed)
  });

  it('a record without a stored result (written before) is read with dilution-1, and its signature stays valid; stored dilution-1 results are returned as stored', async () => {
    const d = await madeUpDilution();
    // as written before migration 0011: no stored result
    await Preparation.sequelize!.query('UPDATE preparations SET dilution_result = NULL WHERE id = :id', { replacements: { id: d.id } });
    const read = (await send('chemist', 'get', `/api/preparations/${d.identifier}`)).body;
    const old = read.dilution.result;
    expect(old.calcVersion).toMatch(/^dilution-1/);
    expect(old.budget.map((b: { input: string }) => b.input)).toEqual(['parent', 'aliquot', 'final']);
    // its number: the tolerances only (METROLOGY §5.5, §4.4: triangular a/√6)
    const c1 = pb.result!.concentration;
    const core = volumetricDilution({ parent: { value: c1.value, unit: c1.unit, standardUncertainty: c1.standardUncertainty }, aliquot: { volumeMl: '1', standardUncertainty: triangular('0.008') }, final: { volumeMl: '100', standardUncertainty: triangular('0.10') } });
    expectClose(old.standardUncertainty, core.standardUncertainty, '1e-15');
    expect(old.standardUncertainty).not.toBe(d.result.standardUncertainty); // the same dilution under dilution-2 differs

    const signed = await send('chemist', 'post', `/api/preparations/${d.identifier}/signatures`, { meaning: 'prepared', password: DEMO_PASSWORD, acknowledgeResponsibility: true });
    expect(signed.status, JSON.stringify(signed.body)).toBe(201);
    expect((await verifySignatures(d.id)).every((c) => c.ok)).toBe(true);
    expect((await send('chemist2', 'get', `/api/preparations/${d.identifier}`)).body.dilution.result).toEqual(old); // read again: the same

    // a stored dilution_result is a signed, shown column (canonical record version 2): writing it after signing is
    // a tamper and breaks the seal, as tests/server/seal.test.ts shows
    await Preparation.sequelize!.query('UPDATE preparations SET dilution_result = :r WHERE id = :id', { replacements: { id: d.id, r: JSON.stringify(old) } });
    expect((await verifySignatures(d.id)).every((c) => c.ok)).toBe(false);
  });
});
