// The series proposal offers an intermediate dilution when levels lie too far below the parent (issue 16 §5):
// 5 and 10 µg/L from the demo's verified Pb stock (≈ 1000 mg/L) need ≈ 10⁵, more than any one demo pipette and
// flask give; the proposal names a first dilution of the stock (planned like any dilution) that those levels then
// come from, and that dilution can be planned with exactly the proposed ware [common practice: serial dilution].
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { D } from '../../shared/calc/index.ts';
import { Preparation } from '../../server/db/models/index.ts';
import { DEMO, makeTestApp, sessionCookie, type TestApp } from './helpers/test-app.ts';

let t: TestApp;
let cookie: string;
let pb: string;

beforeAll(async () => {
  t = await makeTestApp();
  cookie = await sessionCookie(t.app, DEMO.chemist);
  pb = (await Preparation.findOne({ where: { analyteFormula: 'Pb', status: 'verified' } }))!.identifier;
}, 90_000);
afterAll(() => t.close());

describe('POST /api/series/proposal with µg/L levels', () => {
  it('proposes an intermediate dilution, and it can be planned as proposed', async () => {
    const res = await request(t.app).post('/api/series/proposal').set('Cookie', cookie).send({ parentKey: pb, levels: [{ value: '0.005', unit: 'mg/L' }, { value: '0.010', unit: 'mg/L' }] });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.levels.every((l: { choice: unknown }) => l.choice === null)).toBe(true);
    const step = res.body.intermediate;
    expect(step, JSON.stringify(res.body)).toBeDefined();
    expect(step.levels.map((l: { index: number }) => l.index)).toEqual([0, 1]);
    const c1 = new D(res.body.parent.concentration.value);
    expect(new D(step.target.value).eq(c1.mul(step.choice.aliquotMl).div(step.choice.finalMl).toSignificantDigits(12))).toBe(true);
    const planned = await request(t.app)
      .post(`/api/preparations/${pb}/dilutions`)
      .set('Cookie', cookie)
      .send({ method: 'volumetric', target: step.target, pipetteId: step.choice.pipette.id, flaskId: step.choice.flask.id, ...(step.choice.pipette.kind === 'piston_pipette' ? { aliquotMl: step.choice.aliquotMl } : {}) });
    expect(planned.status, JSON.stringify(planned.body)).toBe(201);
    expect(planned.body.kind).toBe('dilution');
  });
});
