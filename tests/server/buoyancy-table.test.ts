// GET /api/calc/buoyancy-table and its PDF: any signed-in role; the lab's room conditions unless t, p, RH are
// entered; 400 with field errors; the PDF prints the numbers the JSON returns.
import { PDFParse } from 'pdf-parse';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buoyancyTable, tableAirDensity } from '../../shared/calc/buoyancy-table.ts';
import { expectErrorBody, DEMO, makeTestApp, sessionCookie, type TestApp } from './helpers/test-app.ts';

let t: TestApp;
const cookie: Record<string, string> = {};
beforeAll(async () => {
  t = await makeTestApp();
  for (const who of ['technician', 'qa'] as const) cookie[who] = await sessionCookie(t.app, DEMO[who]);
}, 90_000);
afterAll(() => t?.close());

const get = (path: string, who: 'technician' | 'qa' = 'technician') => request(t.app).get(path).set('Cookie', cookie[who]!);

describe('GET /api/calc/buoyancy-table', () => {
  it('without conditions, the lab’s stored room conditions give the air density; the factors are the core’s', async () => {
    const settings = (await get('/api/settings')).body;
    const res = await get('/api/calc/buoyancy-table');
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const room = settings.defaultRoomConditions;
    expect(res.body.air).toMatchObject({ source: 'lab-default', temperatureC: room.temperatureC, pressureHPa: room.pressureHPa, relativeHumidityPct: room.relativeHumidityPct });
    const rhoA = tableAirDensity(room);
    expect(res.body.air.density).toBe(rhoA);
    expect(res.body.weightDensity).toBe('8.0');
    expect(res.body.rows).toEqual(buoyancyTable({ airDensity: rhoA, weightDensity: '8.0' }).rows);
  });

  it('with t, p, RH entered: 22 °C, 960 hPa, 45 % → ρa 1.1282 kg/m³ and Pb(NO3)2 B 1.0001081 [C, METROLOGY §2.2]; the weights’ density is kept as typed', async () => {
    const res = await get('/api/calc/buoyancy-table?t=22&p=960&rh=45&weightDensity=8.00', 'qa');
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.air.source).toBe('entered');
    expect(res.body.air.densityKgPerM3Display).toBe('1.1282');
    expect(res.body.weightDensity).toBe('8.00');
    expect(res.body.rows.find((r: { name: string }) => r.name === 'Lead(II) nitrate').factorDisplay).toBe('1.0001081');
  });

  it('400 with the field: only some of t, p, RH; out of range; not a number; never stored, never 500', async () => {
    const partial = await get('/api/calc/buoyancy-table?t=21');
    expect(partial.status).toBe(400);
    expectErrorBody(partial.body, 'validation_failed');
    expect(Object.keys(partial.body.error.fields).sort()).toEqual(['p', 'rh']);
    const bad = await get('/api/calc/buoyancy-table?t=35&p=1%2C013&rh=101&weightDensity=0.5');
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields.t).toMatch(/15 and 27/);
    expect(bad.body.error.fields.p).toBeTruthy();
    expect(bad.body.error.fields.rh).toMatch(/0 and 100/);
    expect(bad.body.error.fields.weightDensity).toMatch(/8\.0/);
    const pdf = await get('/api/calc/buoyancy-table.pdf?rh=50');
    expect(pdf.status).toBe(400);
    expect(Object.keys(pdf.body.error.fields).sort()).toEqual(['p', 't']);
    const twice = await get('/api/calc/buoyancy-table?t=20&t=21&p=1000&rh=50');
    expect(twice.status).toBe(400);
    expect(twice.body.error.fields.t).toBeTruthy();
  });

  it('401 when signed out', async () => {
    expect((await request(t.app).get('/api/calc/buoyancy-table')).status).toBe(401);
    expect((await request(t.app).get('/api/calc/buoyancy-table.pdf')).status).toBe(401);
  });
});

describe('GET /api/calc/buoyancy-table.pdf', () => {
  it('is an A4 sheet with the conditions and every row’s B and 1/B exactly as the JSON shows them', async () => {
    const q = '?t=20.5&p=1008&rh=40&weightDensity=7.95';
    const json = (await get(`/api/calc/buoyancy-table${q}`)).body;
    const res = await get(`/api/calc/buoyancy-table.pdf${q}`).buffer(true).parse((r, cb) => {
      const chunks: Buffer[] = [];
      r.on('data', (c: Buffer) => chunks.push(c));
      r.on('end', () => cb(null, Buffer.concat(chunks)));
    });
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toBe('application/pdf');
    const parser = new PDFParse({ data: new Uint8Array(res.body as Buffer) });
    const info = await parser.getInfo();
    const text = (await parser.getText()).text.replace(/\s+/g, ' ');
    await parser.destroy();
    expect(info.total).toBe(1);
    expect(text).toContain('Buoyancy factor table');
    expect(text).toContain(`ρa = ${json.air.densityKgPerM3Display} kg/m³`);
    expect(text).toContain('ρw = 7.95 g/cm³');
    for (const r of json.rows as Array<{ name: string; density: string; factorDisplay: string; readingPerGramDisplay: string }>) {
      expect(text).toContain(r.name);
      expect(text).toContain(`${r.density} ${r.factorDisplay} ${r.readingPerGramDisplay}`);
    }
  });
});
