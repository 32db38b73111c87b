// The demo lab's working standards (seed/demo-working-standards.ts), seeded through the services: each record is
// there with its status, the series has two levels verified, one prepared and two planned, the expired standard's
// QA extension is refused by its parent's expiry, the lead lot's trace is a tree, and the audit chain verifies.
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { QueryTypes } from 'sequelize';
import request from 'supertest';
import { migrateUp } from '../../server/db/migrate.ts';
import { openDatabase } from '../../server/db/sequelize.ts';
import { seedDemoLab } from '../../seed/seed-demo-lab.ts';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Preparation } from '../../server/db/models/index.ts';
import { verifyAuditChain } from '../../server/services/audit.service.ts';
import { demoDay } from '../../seed/demo-clock.ts';
import { DEMO, DEMO_PASSWORD, demoPasswordHash, makeTestApp, sessionCookie, type TestApp } from './helpers/test-app.ts';

let t: TestApp;
let qa: string;
let chemist: string;
type Row = { identifier: string; status: string; statusBeforeExpiry?: string; kind?: string; analyteFormula: string; target: { value: string; unit: string } };
const get = async (path: string, cookie = qa) => {
  const res = await request(t.app).get(path).set('Cookie', cookie);
  expect(res.status, `${path}: ${JSON.stringify(res.body).slice(0, 300)}`).toBe(200);
  return res.body;
};
let rows: Array<{ id: number; identifier: string; kind: string; analyteFormula: string; targetValue: string; targetUnit: string; seriesId: number | null }>;
const find = (kind: string, analyte: string, value: string, unit = 'mg/L') => {
  const r = rows.find((x) => x.kind === kind && x.analyteFormula === analyte && x.targetValue === value && x.targetUnit === unit);
  expect(r, `${kind} ${analyte} ${value} ${unit}`).toBeDefined();
  return r!;
};

beforeAll(async () => {
  t = await makeTestApp({ seed: 'full' });
  qa = await sessionCookie(t.app, DEMO.qa);
  chemist = await sessionCookie(t.app, DEMO.chemist);
  const [found] = (await t.sequelize.query('SELECT id, identifier, kind, analyte_formula AS analyteFormula, target_value AS targetValue, target_unit AS targetUnit, series_id AS seriesId FROM preparations ORDER BY id')) as [typeof rows, unknown];
  rows = found;
}, 180_000);
afterAll(() => t?.close());

describe('demo working standards', () => {
  it('then the lead stock has a verified 10 mg/L dilution, and from it a five-level series: two verified, one prepared, two planned', async () => {
    const stock = find('stock', 'Pb', '1000');
    const d1 = find('dilution', 'Pb', '10');
    const detail = await get(`/api/preparations/${d1.identifier}`);
    expect(detail.status).toBe('verified');
    expect(detail.dilution.parent.identifier).toBe(stock.identifier);
    expect(detail.dilution.result.value).toBeTruthy(); // computed by the core at make-up
    const series = await get('/api/series');
    expect(series.total).toBe(1);
    const s = series.items[0];
    expect(s.parent.identifier).toBe(d1.identifier);
    const levels = await get(`/api/series/${s.identifier}`);
    const shown = (levels.levels as Row[]).map((l) => [l.target.value, l.status]);
    expect(shown).toEqual([
      ['0.1', 'verified'],
      ['0.2', 'verified'],
      ['0.5', 'prepared'],
      ['1', 'planned'],
      ['2', 'planned'],
    ]);
  });

  it('then a gravimetric dilution of the stock has both readings, a result in mg/kg and the preparer\'s signature', async () => {
    const g = find('dilution', 'Pb', '10', 'mg/kg');
    const d = await get(`/api/preparations/${g.identifier}`);
    expect(d.status).toBe('prepared');
    expect(d.gravimetric.method).toBe('gravimetric');
    expect(d.gravimetric.readings).toHaveLength(1);
    expect(d.gravimetric.result.massFraction.value).toMatch(/^\d+\.\d+$/);
  });

  it('then a Cd stock is verified and the Pb + Cd mix of both stocks is verified', async () => {
    const cd = find('stock', 'Cd', '1000');
    expect((await get(`/api/preparations/${cd.identifier}`)).status).toBe('verified');
    const mixRow = rows.find((r) => r.kind === 'mix');
    expect(mixRow?.analyteFormula).toBe('Pb+Cd');
    const mix = await get(`/api/preparations/${mixRow!.identifier}`);
    expect(mix.status).toBe('verified');
    expect(mix.mix.components.map((c: { parent: { identifier: string } }) => c.parent.identifier)).toEqual([find('stock', 'Pb', '1000').identifier, cd.identifier]);
  });

  it('then one working standard is expired, capped by its expired parent, and QA cannot extend it', async () => {
    const stocks = rows.filter((r) => r.kind === 'stock' && r.analyteFormula === 'Pb');
    expect(stocks).toHaveLength(2);
    const old = stocks[1]!;
    const ws = find('dilution', 'Pb', '100');
    const d = await get(`/api/preparations/${ws.identifier}`);
    expect(d.status).toBe('expired');
    expect(d.statusBeforeExpiry).toBe('verified');
    expect(d.expiresOn).toBe(demoDay('2026-10-31')); // the October stock's expiry (30-day lab default from 2026-10-01)
    expect(d.expiryCap).toMatchObject({ date: demoDay('2026-10-31'), limitedBy: `parent ${old.identifier}` });
    expect(d.canExtendExpiry.allowed).toBe(false);
    expect(d.canExtendExpiry.reason).toContain(old.identifier);
    // the only expired working standard (the October stock is a stock)
    const expired = (await get('/api/preparations?status=expired&pageSize=100')).items as Row[];
    expect(expired.map((r) => r.identifier).sort()).toEqual([old.identifier, ws.identifier].sort());
    // asking again is refused the same way (422, the parent named) and nothing is stored
    const before = await t.sequelize.query('SELECT COUNT(*) AS n FROM expiry_extensions');
    const res = await request(t.app)
      .post(`/api/preparations/${ws.identifier}/expiry-extensions`)
      .set('Cookie', qa)
      .send({ newExpiresOn: demoDay('2026-12-20'), reason: 'Stability data support two more weeks', password: DEMO_PASSWORD, acknowledgeResponsibility: true });
    expect(res.status, JSON.stringify(res.body)).toBe(422);
    expect(res.body.error.fields.newExpiresOn).toContain(old.identifier);
    expect(await t.sequelize.query('SELECT COUNT(*) AS n FROM expiry_extensions')).toEqual(before);
  });

  it('then the lead lot traced forward reaches every lead record: stocks, dilutions, series levels, the gravimetric dilution and the mix', async () => {
    const materials = (await get('/api/materials?pageSize=100')).items as Array<{ formula: string; lot: string }>;
    const lot = materials.find((m) => m.formula === 'Pb(NO3)2')!.lot;
    const trace = await get(`/api/trace/${encodeURIComponent(lot)}`, chemist);
    const lead = rows.filter((r) => r.analyteFormula === 'Pb' || r.analyteFormula === 'Pb+Cd').map((r) => r.identifier);
    expect([...trace.forwardPreparations].sort()).toEqual([...lead].sort());
    const edges = trace.forward.edges as Array<{ relation: string }>;
    expect(edges.filter((e) => e.relation === 'diluted into').length).toBeGreaterThanOrEqual(8); // 2 dilutions, 5 levels, the gravimetric one
  });

  it('then every seeded record keeps its seal and the audit chain verifies', async () => {
    expect((await verifyAuditChain()).ok).toBe(true);
    const sealed = await Preparation.count({ where: { status: 'seal_broken' } });
    expect(sealed).toBe(0);
    for (const r of rows) expect((await get(`/api/preparations/${r.identifier}`)).status).not.toBe('seal_broken');
  });
});

describe('demo working standards seeded on a later day (dates move with the seeding day, seed/demo-clock.ts)', () => {
  // last in the file: seeding another database binds the models to it
  it('seeded months after the base day, the same records have the same statuses and the expired one is still refused by its parent', async () => {
    const later = new Date('2027-03-15T08:00:00Z');
    const dir = mkdtempSync(join(tmpdir(), 'tarebook-ws-later-'));
    const sequelize = await openDatabase(join(dir, 's.sqlite'));
    try {
      await migrateUp(sequelize);
      await seedDemoLab(sequelize, { env: { NODE_ENV: 'test' }, passwordHash: await demoPasswordHash(), now: later });
      const got = await sequelize.query<{ kind: string; status: string; expires_on: string; target_value: string; target_unit: string }>(
        "SELECT kind, status, expires_on, target_value, target_unit FROM preparations WHERE id > 5 ORDER BY id",
        { type: QueryTypes.SELECT },
      );
      const now = await t.sequelize.query<{ kind: string; status: string; target_value: string; target_unit: string }>("SELECT kind, status, target_value, target_unit FROM preparations WHERE id > 5 ORDER BY id", { type: QueryTypes.SELECT });
      expect(got.map(({ kind, status, target_value, target_unit }) => ({ kind, status, target_value, target_unit }))).toEqual(now);
      const ws = got.find((r) => r.kind === 'dilution' && r.target_value === '100')!;
      expect(ws.expires_on).toBe(demoDay('2026-10-31', later));
      expect(ws.expires_on < '2027-03-15').toBe(true);
      expect(got.filter((r) => r.expires_on >= '2027-03-15').length).toBe(got.length - 2); // all but the October stock and its dilution are in date
    } finally {
      await sequelize.close();
      rmSync(dir, { recursive: true, force: true });
    }
  }, 240_000);
});
