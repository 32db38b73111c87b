// POST /api/calc/preparation: the route validates with the shared schema and runs shared/calc.
// The numbers themselves are tested in tests/shared/calc; here only the HTTP contract is checked.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO, expectErrorBody, makeTestApp, sessionCookie, type TestApp } from './helpers/test-app.ts';
import { validCalcRequest } from './helpers/calc-request.ts';

let t: TestApp;
let chemist: string;
beforeAll(async () => {
  t = await makeTestApp();
  chemist = await sessionCookie(t.app, DEMO.chemist);
});
afterAll(() => t.close());

const post = (body: unknown) => request(t.app).post('/api/calc/preparation').set('Cookie', chemist).send(body as object);

/** Deep copy of the valid request with one change applied. */
function variant(change: (r: any) => void) {
  const r = structuredClone(validCalcRequest()) as any;
  change(r);
  return r;
}

describe('POST /api/calc/preparation', () => {
  it('when the request is valid, then 200 with the documented response names, numbers as decimal strings', async () => {
    const res = await post(validCalcRequest());
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const b = res.body;
    expect(b).toMatchObject({
      airDensity: { value: expect.any(String), unit: 'g/mL', standardUncertainty: expect.any(String), method: 'CIPM-2007' },
      gravimetricFactor: expect.any(String),
      gravimetricFactorStandardUncertainty: expect.any(String),
      buoyancyFactor: expect.any(String),
      trueMass: { value: expect.any(String), unit: expect.any(String) },
      balanceReading: { value: expect.any(String), unit: expect.any(String) },
      planned: {
        expectedUncertainty: {
          value: expect.any(String),
          unit: 'mg/L',
          standardUncertainty: expect.any(String),
          expandedUncertainty: expect.any(String),
          k: '2',
          display: expect.any(String),
        },
        budget: expect.any(Array),
      },
      actual: {
        trueMass: { value: expect.any(String), unit: expect.any(String) },
        concentration: { value: expect.any(String), unit: 'mg/L', display: expect.stringContaining('mg/L') },
        budget: expect.any(Array),
      },
    });
    // plausibility only (common practice): ~160 mg of Pb(NO3)2 gives 1000 mg/L Pb in 100 mL
    expect(b.balanceReading.value).toMatch(/^15\d\.\d+$|^16\d\.\d+$/);
    expect(b.planned.budget[0]).toMatchObject({ input: expect.any(String), contribution: expect.any(String) });
  });

  it('when there is no weighing, then the plan is returned without "actual"', async () => {
    const res = await post(variant((r) => delete r.weighing));
    expect(res.status).toBe(200);
    expect(res.body.actual).toBeUndefined();
  });

  it('when signed out, then 401', async () => {
    const res = await request(t.app).post('/api/calc/preparation').send(validCalcRequest());
    expect(res.status).toBe(401);
  });

  const bad: [string, unknown, string][] = [
    ['the volume is missing', variant((r) => delete r.volume), 'volume'],
    ['the target value is missing', variant((r) => delete r.target.value), 'target.value'],
    ['the volume unit is unknown', variant((r) => (r.volume.unit = 'gallon')), 'volume.unit'],
    ['the target unit is unknown', variant((r) => (r.target.unit = 'ppm-ish')), 'target.unit'],
    ['the reading is negative', variant((r) => (r.weighing.reading.value = '-159.9')), 'weighing.reading.value'],
    ['the reading is zero', variant((r) => (r.weighing.reading.value = '0')), 'weighing.reading.value'],
    ['the purity is above 1', variant((r) => (r.material.purity.value = '1.2')), 'material.purity.value'],
    ['the purity is a number, not a string', variant((r) => (r.material.purity.value = 0.9995)), 'material.purity.value'],
    ['the temperature is outside 15–27 °C', variant((r) => (r.air.temperatureC = '40')), 'air.temperatureC'],
    ['the pressure is missing', variant((r) => delete r.air.pressureHPa), 'air.pressureHPa'],
    ['the formula is not a formula', variant((r) => (r.material.formula = 'Xx9')), 'material.formula'],
    ['a number uses a decimal comma', variant((r) => (r.volume.value = '100,0')), 'volume.value'],
  ];
  it.each(bad)('when %s, then 400 with fields[%s]', async (_what, body, field) => {
    const res = await post(body);
    expect(res.status, JSON.stringify(res.body)).toBe(400);
    expectErrorBody(res.body);
    expect(res.body.error.fields, JSON.stringify(res.body)).toHaveProperty([field]);
    expect(typeof res.body.error.fields[field]).toBe('string');
  });

  it('when the temperature is out of range, then the CalcError code and message come through', async () => {
    const res = await post(variant((r) => (r.air.temperatureC = '40')));
    expect(res.body.error.code).toBe('calc_out_of_range');
    expect(res.body.error.fields['air.temperatureC']).toBe(res.body.error.message);
  });

  it('when the JSON is malformed, then 400 bad_request', async () => {
    const res = await request(t.app)
      .post('/api/calc/preparation')
      .set('Cookie', chemist)
      .set('Content-Type', 'application/json')
      .send('{"target": {"value": "1000", ');
    expect(res.status).toBe(400);
    expectErrorBody(res.body, 'bad_request');
  });

  it('when the body is missing, then 400 validation_failed', async () => {
    const res = await request(t.app).post('/api/calc/preparation').set('Cookie', chemist);
    expect(res.status).toBe(400);
    expectErrorBody(res.body, 'validation_failed');
  });
});
