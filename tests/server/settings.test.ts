// Lab settings: any signed-in role reads, only admin writes; partial updates validated with zod.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEFAULT_LAB_SETTINGS } from '../../shared/schemas/settings.ts';
import { DEMO, makeTestApp, sessionCookie, type TestApp } from './helpers/test-app.ts';

let t: TestApp;
let admin: string;
let technician: string;
beforeAll(async () => {
  t = await makeTestApp();
  admin = await sessionCookie(t.app, DEMO.admin);
  technician = await sessionCookie(t.app, DEMO.technician);
});
afterAll(() => t.close());

describe('GET /api/settings', () => {
  it('when freshly migrated, then it returns the demo lab defaults with decimal strings', async () => {
    const res = await request(t.app).get('/api/settings').set('Cookie', technician);
    expect(res.status).toBe(200);
    expect(res.body).toEqual({
      labName: 'Harbourside Water Laboratory',
      idPrefix: 'HWL',
      timeZone: 'Europe/London',
      defaultRoomConditions: { temperatureC: '20.0', pressureHPa: '1013', relativeHumidityPct: '50' },
      readingWindowPct: '5',
      roundingRule: 'half-even',
    });
    expect(res.body).toEqual(DEFAULT_LAB_SETTINGS);
  });
});

describe('PUT /api/settings', () => {
  it('when an admin sends a partial update, then only those values change and trailing zeros are kept', async () => {
    const res = await request(t.app)
      .put('/api/settings')
      .set('Cookie', admin)
      .send({ readingWindowPct: '2.50', defaultRoomConditions: { temperatureC: '21.50' } });
    expect(res.status).toBe(200);
    expect(res.body.readingWindowPct).toBe('2.50');
    expect(res.body.defaultRoomConditions).toEqual({ temperatureC: '21.50', pressureHPa: '1013', relativeHumidityPct: '50' });
    expect(res.body.labName).toBe('Harbourside Water Laboratory');

    const again = await request(t.app).get('/api/settings').set('Cookie', technician);
    expect(again.body).toEqual(res.body);
  });

  it.each([
    [{ timeZone: 'Mars/Olympus_Mons' }, 'timeZone', 'Enter an IANA time zone, e.g. Europe/London'],
    [{ idPrefix: 'hw' }, 'idPrefix', 'Use 2 to 8 capital letters or digits, starting with a letter, e.g. HWL'],
    [{ roundingRule: 'banker' }, 'roundingRule', 'Choose one of: half-even, half-up'],
    [{ readingWindowPct: '0' }, 'readingWindowPct', 'Use a window greater than 0 and at most 50 %'],
    [{ readingWindowPct: 5 }, 'readingWindowPct', 'Enter a number, e.g. 20.0'],
    [{ defaultRoomConditions: { pressureHPa: '1200' } }, 'defaultRoomConditions.pressureHPa', 'Pressure must be between 600 and 1100 hPa'],
    [{ defaultRoomConditions: { temperatureC: '20,0' } }, 'defaultRoomConditions.temperatureC', 'Enter a number, e.g. 20.0'],
    [{ labName: '' }, 'labName', 'Enter the laboratory name'],
  ])('when the update is %j, then 400 with fields[%s]', async (body, field, message) => {
    const res = await request(t.app).put('/api/settings').set('Cookie', admin).send(body);
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('validation_failed');
    expect(res.body.error.fields).toEqual({ [field]: message });
  });

  it('when a technician tries to update, then 403 naming the admin role', async () => {
    const res = await request(t.app).put('/api/settings').set('Cookie', technician).send({ labName: 'Other' });
    expect(res.status).toBe(403);
    expect(res.body.error.message).toBe('This needs the admin role');
  });
});
