// A dilution whose solvent differs from its parent's matrix carries a warning in its detail (issue 16 §5;
// shared/prep/matrix.ts): the demo Pb stock is made up with nitric acid 2 % (seed/demo-preparations.ts); planned or
// made up with methanol, the dilution's detail names both solvents; with the same nitric acid it does not.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Preparation } from '../../server/db/models/index.ts';
import { DEMO, makeTestApp, sessionCookie, type TestApp } from './helpers/test-app.ts';
import { freeFlask } from './helpers/free-flask.ts';

let t: TestApp;
let cookie: string;
const ware: Record<string, number> = {};
const solvent: Record<string, { id: number; lot: string }> = {};
let pb: string;
const send = (method: 'get' | 'post', path: string, body?: unknown) => {
  const r = request(t.app)[method](path).set('Cookie', cookie);
  return body === undefined ? r : r.send(body as object);
};

beforeAll(async () => {
  t = await makeTestApp();
  cookie = await sessionCookie(t.app, DEMO.chemist);
  for (const w of (await send('get', '/api/volumetric-ware?pageSize=100')).body.items) ware[w.identifier] = w.id;
  for (const s of (await send('get', '/api/solvents')).body.items) solvent[s.name] = { id: s.id, lot: s.lot };
  pb = (await Preparation.findOne({ where: { analyteFormula: 'Pb', status: 'verified' } }))!.identifier;
}, 90_000);
afterAll(() => t.close());

const plan = async (solventName?: string) => {
  const d = await send('post', `/api/preparations/${pb}/dilutions`, { method: 'volumetric', target: { value: '10', unit: 'mg/L' }, pipetteId: ware['BP-1-01'], flaskId: ware['VF-100-02'], ...(solventName ? { solventId: solvent[solventName]!.id } : {}) });
  expect(d.status, JSON.stringify(d.body)).toBe(201);
  return d.body;
};

describe('solvent against the parent matrix', () => {
  it('planned with methanol: warned from the plan on, naming both solvents', async () => {
    const d = await plan('Methanol');
    expect(d.dilution.matrixWarning).toMatchObject({ parentSolvent: 'Nitric acid 2 % (v/v)', solvent: 'Methanol' });
    expect(d.dilution.matrixWarning.message).toContain(`${pb} is in Nitric acid 2 % (v/v)`);
  });

  it('made up with methanol without a planned solvent: warned after the make-up; with the parent\u2019s nitric acid: no warning', async () => {
    const d = await plan();
    expect(d.dilution.matrixWarning).toBeUndefined();
    const tech = await sessionCookie(t.app, DEMO.technician);
    expect((await request(t.app).post(`/api/preparations/${d.identifier}/aliquots`).set('Cookie', tech).send({ pipetteIdentifier: 'BP-1-01' })).status).toBe(201);
    const m = await request(t.app)
      .post(`/api/preparations/${d.identifier}/make-up`)
      .set('Cookie', tech)
      .send({ flaskIdentifier: (await freeFlask(t.app, await sessionCookie(t.app, DEMO.chemist))).identifier, solventId: solvent['Methanol']!.id, solventLot: solvent['Methanol']!.lot, solutionTemperatureC: '20.0', applyTemperatureCorrection: false });
    expect(m.status, JSON.stringify(m.body)).toBe(201);
    expect(m.body.dilution.matrixWarning).toMatchObject({ parentSolvent: 'Nitric acid 2 % (v/v)', solvent: 'Methanol' });
    const same = await plan('Nitric acid 2 % (v/v)');
    expect(same.dilution.matrixWarning).toBeUndefined();
  });
});
