// POST /api/calc/volume-check: the HTTP contract (numbers are tested in tests/shared/calc/volume-check.test.ts).
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO, expectErrorBody, makeTestApp, sessionCookie, type TestApp } from './helpers/test-app.ts';
import { validVolumeCheckRequest } from './helpers/volume-check-request.ts';

let t: TestApp;
let technician: string;
beforeAll(async () => {
  t = await makeTestApp();
  technician = await sessionCookie(t.app, DEMO.technician);
});
afterAll(() => t.close());

const post = (body: unknown) => request(t.app).post('/api/calc/volume-check').set('Cookie', technician).send(body as object);
function variant(change: (r: any) => void) {
  const r = structuredClone(validVolumeCheckRequest()) as any;
  change(r);
  return r;
}

describe('POST /api/calc/volume-check', () => {
  it('answers replicate volumes, mean, errors, U with k and the verdict with its limit, every number a decimal string', async () => {
    const res = await post(validVolumeCheckRequest());
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const s = expect.stringMatching(/^-?\d+(\.\d+)?$/);
    expect(res.body).toMatchObject({
      calcVersion: 'volume-check/1',
      method: 'ISO 4787',
      replicates: expect.arrayContaining([{ index: 1, reading: { value: '9.9721', unit: 'g' }, volume: { value: s, unit: 'mL' } }]),
      n: '5',
      mean: { value: s, unit: 'mL' },
      systematicError: { value: s, unit: 'mL', percent: s },
      randomError: { standardDeviation: { value: s, unit: 'mL' }, cvPercent: s },
      uncertainty: { standardUncertainty: s, expandedUncertainty: s, k: '2', unit: 'mL' },
      airDensity: { method: 'CIPM-2007' },
      verdict: { result: 'pass', limit: { systematic: { value: '0.020', unit: 'mL' }, fromMemory: true }, decisionRule: expect.any(String) },
    });
    expect(res.body.replicates).toHaveLength(5);
  });

  it('when signed out, then 401', async () => {
    expect((await request(t.app).post('/api/calc/volume-check').send(validVolumeCheckRequest())).status).toBe(401);
  });

  const bad: [string, unknown, string][] = [
    ['a reading is a JS number', variant((r) => (r.readings[0].value = 9.97)), 'readings.0.value'],
    ['a reading uses a comma', variant((r) => (r.readings[1].value = '9,97')), 'readings.1.value'],
    ['one reading only', variant((r) => (r.readings = [r.readings[0]])), 'readings'],
    ['a reading unit is a volume', variant((r) => (r.readings[2].unit = 'mL')), 'readings.2.unit'],
    ['the kind is unknown', variant((r) => (r.ware.kind = 'beaker')), 'ware.kind'],
    ['a pipette checked by content', variant((r) => (r.ware.mode = 'content')), 'ware.mode'],
    ['the water is too warm for Tanaka', variant((r) => (r.waterTemperatureC = '41')), 'waterTemperatureC'],
    ['the air is outside CIPM-2007', variant((r) => (r.air.temperatureC = '35')), 'air.temperatureC'],
    ['no tabulated limit', variant((r) => (r.ware.nominal.value = '15')), 'ware.nominal.value'],
    ['class null for glass without lab limits', variant((r) => (r.ware.class = null)), 'ware.class'],
  ];
  it.each(bad)('when %s, then 400 naming %s', async (_what, body, field) => {
    const res = await post(body);
    expect(res.status, JSON.stringify(res.body)).toBe(400);
    expectErrorBody(res.body);
    expect(res.body.error.fields?.[field], JSON.stringify(res.body)).toBeTruthy();
  });
});

describe('limit sources as printed', () => {
  it('when a stored source names an internal document, then the printed text leaves it out and says "from memory" once', async () => {
    const { limitSourceText, withoutInternalRefs } = await import('../../shared/calc/volume-tolerances.ts');
    expect(withoutInternalRefs('ISO 648 class A table as recalled in METROLOGY.md §4.4 (from memory); class B = 2 × class A (from memory)')).toBe('ISO 648 class A table (from memory); class B = 2 × class A (from memory)');
    const printed = limitSourceText('ISO 8655-2:2002 Table 1: rows 10, 20 µL as in METROLOGY.md §4.5, the other rows from memory', true);
    expect(printed).not.toMatch(/METROLOGY/);
    expect(printed.match(/from memory/g)).toHaveLength(1);
  });
});
