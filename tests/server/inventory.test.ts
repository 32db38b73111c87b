// Inventory API: create / patch / retire with validation (400 + fields), duplicates (409), audit entries
// with per-field diffs, paging / sorting / filtering / search in SQL, usable=1, the USP <41> minimum weight.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  balanceSchema,
  materialPageSchema,
  referenceMaterialSchema,
  solventSchema,
  volumetricWareSchema,
} from '../../shared/schemas/inventory.ts';
import { recordTrail } from '../../server/services/audit.service.ts';
import { labToday } from '../../server/services/inventory.service.ts';
import { DEMO, expectErrorBody, makeTestApp, sessionCookie, type TestApp } from './helpers/test-app.ts';
import { validBalance, validMaterial, validSolvent, validWare } from './helpers/inventory-fixtures.ts';

let t: TestApp;
let chemist: string;
let admin: string;
let qa: string;

beforeAll(async () => {
  t = await makeTestApp();
  chemist = await sessionCookie(t.app, DEMO.chemist);
  admin = await sessionCookie(t.app, DEMO.admin);
  qa = await sessionCookie(t.app, DEMO.qa);
});
afterAll(() => t.close());

const post = (path: string, body: object, cookie = chemist) => request(t.app).post(path).set('Cookie', cookie).send(body);
const patch = (path: string, body: object, cookie = chemist) => request(t.app).patch(path).set('Cookie', cookie).send(body);
const get = (path: string, cookie = qa) => request(t.app).get(path).set('Cookie', cookie);

describe('reference materials: create', () => {
  it('when the input is valid, then 201 with the DTO; decimal strings keep their digits; status quarantined', async () => {
    const res = await post('/api/materials', validMaterial({ lot: 'C-1', purity: { value: '0.99990', expandedUncertainty: '0.00010', k: '2', basis: 'as-is' } }));
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(referenceMaterialSchema.strict().safeParse(res.body).success, JSON.stringify(res.body)).toBe(true);
    expect(res.body.purity).toEqual({ value: '0.99990', expandedUncertainty: '0.00010', k: '2', standardUncertainty: null, basis: 'as-is' });
    expect(res.body.status).toBe('quarantined');
    expect(res.body.acceptedBy).toBeNull();
    const again = await get(`/api/materials/${res.body.id}`);
    expect(again.body).toEqual(res.body);
  });

  it.each([
    ['purity above 1', { purity: { value: '1.0001', expandedUncertainty: '0.0001', k: '2', basis: 'as-is' } }, 'purity.value'],
    ['purity 0', { purity: { value: '0', expandedUncertainty: '0.0001', k: '2', basis: 'as-is' } }, 'purity.value'],
    ['purity not a number', { purity: { value: 'ninety', basis: 'as-is' } }, 'purity.value'],
    ['expanded uncertainty without k', { purity: { value: '0.999', expandedUncertainty: '0.0002', basis: 'as-is' } }, 'purity.k'],
    ['CRM without any purity uncertainty', { purity: { value: '0.999', basis: 'as-is' } }, 'purity.expandedUncertainty'],
    ['expiry before received', { receivedOn: '2026-03-01', expiresOn: '2026-02-28' }, 'expiresOn'],
    ['not a calendar date', { receivedOn: '2026-02-30' }, 'receivedOn'],
    ['CAS check digit wrong', { casNumber: '7447-40-8' }, 'casNumber'],
    ['CAS badly written', { casNumber: '744740-7' }, 'casNumber'],
    ['hazard statement not a code', { ghsHazardStatements: ['harmful'] }, 'ghsHazardStatements.0'],
    ['pictogram GHS10', { ghsPictograms: ['GHS10'] }, 'ghsPictograms.0'],
    ['no analyte', { analytes: [] }, 'analytes'],
    ['grade unknown', { grade: 'primary' }, 'grade'],
    ['created retired', { status: 'retired' }, 'status'],
    ['name missing', { name: '  ' }, 'name'],
  ])('when %s, then 400 validation_failed naming %s', async (_what, over, field) => {
    const res = await post('/api/materials', validMaterial({ lot: 'BAD', ...over }));
    expect(res.status, JSON.stringify(res.body)).toBe(400);
    expectErrorBody(res.body, 'validation_failed');
    expect(res.body.error.fields[field], JSON.stringify(res.body)).toEqual(expect.any(String));
  });

  it('when a CRM has a standard uncertainty only, and GHS codes are valid, then it is accepted (the H prefix upper-cased, the GHS suffix letters kept)', async () => {
    const res = await post(
      '/api/materials',
      validMaterial({ lot: 'C-2', purity: { value: '0.9990', standardUncertainty: '0.0005', basis: 'as-is' }, ghsHazardStatements: ['h302', 'H319', 'H360Df'], ghsPictograms: ['GHS07'] }),
    );
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    // GHS (UN Rev. 10) distinguishes H360Df (may damage the unborn child, suspected of damaging fertility) from H360FD.
    expect(res.body.ghsHazardStatements).toEqual(['H302', 'H319', 'H360Df']);
  });

  it('when the same lot of the same material from the same producer is registered again, then 409 with fields.lot', async () => {
    const res = await post('/api/materials', validMaterial({ lot: 'c-1' }));
    expect(res.status).toBe(409);
    expectErrorBody(res.body, 'conflict');
    expect(res.body.error.fields.lot).toMatch(/already registered/);
  });

  it('when a material is created, then an audit "create" entry lists the new values, by the signed-in user', async () => {
    const res = await post('/api/materials', validMaterial({ lot: 'C-AUDIT' }));
    const trail = await recordTrail('reference_material', String(res.body.id));
    expect(trail).toHaveLength(1);
    expect(trail[0]).toMatchObject({ action: 'create', actorName: expect.any(String) });
    expect(trail[0]!.changes).toEqual(expect.arrayContaining([{ field: 'lot', oldValue: null, newValue: 'C-AUDIT' }, { field: 'purity.value', oldValue: null, newValue: '0.99985' }]));
  });
});

describe('reference materials: patch, accept, retire', () => {
  let id: number;
  beforeAll(async () => {
    id = (await post('/api/materials', validMaterial({ lot: 'P-1' }))).body.id;
  });

  it('when two fields change, then 200 and one audit "update" entry with old and new value of exactly those fields', async () => {
    const res = await patch(`/api/materials/${id}`, { storage: 'fridge F1', purity: { expandedUncertainty: '0.00020' } });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.storage).toBe('fridge F1');
    expect(res.body.purity).toMatchObject({ value: '0.99985', expandedUncertainty: '0.00020', k: '2' });
    const trail = await recordTrail('reference_material', String(id));
    const update = trail.at(-1)!;
    expect(update.action).toBe('update');
    expect(update.changes).toEqual([
      { field: 'purity.expandedUncertainty', oldValue: '0.00010', newValue: '0.00020' },
      { field: 'storage', oldValue: 'desiccator D2', newValue: 'fridge F1' },
    ]);
  });

  it('when "8.0"-style digits change only in writing ("0.99985" → "0.999850"), then it is a change (strings compared as strings)', async () => {
    const res = await patch(`/api/materials/${id}`, { purity: { value: '0.999850' } });
    expect(res.body.purity.value).toBe('0.999850');
    const last = (await recordTrail('reference_material', String(id))).at(-1)!;
    expect(last.changes).toEqual([{ field: 'purity.value', oldValue: '0.99985', newValue: '0.999850' }]);
  });

  it('when nothing changes, then 200 and no audit entry is added', async () => {
    const before = (await recordTrail('reference_material', String(id))).length;
    const res = await patch(`/api/materials/${id}`, { storage: 'fridge F1' });
    expect(res.status).toBe(200);
    expect((await recordTrail('reference_material', String(id))).length).toBe(before);
  });

  it('when a patch breaks a cross-field rule on the merged record (clears k but keeps U), then 400 with fields', async () => {
    const res = await patch(`/api/materials/${id}`, { purity: { k: null } });
    expect(res.status).toBe(400);
    expect(res.body.error.fields['purity.k']).toMatch(/coverage factor/);
    const expiry = await patch(`/api/materials/${id}`, { expiresOn: '2025-01-01' }); // received 2026-01-10
    expect(expiry.status).toBe(400);
    expect(expiry.body.error.fields.expiresOn).toMatch(/before the received date/);
  });

  it('when a patch sends a bad value or status retired, then 400 with the field', async () => {
    const res = await patch(`/api/materials/${id}`, { densityGPerMl: '-1', status: 'retired' });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.fields).sort()).toEqual(['densityGPerMl', 'status']);
  });

  it('when a chemist accepts the quarantined lot, then acceptedBy and acceptedAt are recorded and audited', async () => {
    const res = await patch(`/api/materials/${id}`, { status: 'accepted' });
    expect(res.status).toBe(200);
    expect(res.body.status).toBe('accepted');
    expect(res.body.acceptedBy).toEqual({ id: expect.any(Number), fullName: expect.any(String) });
    expect(res.body.acceptedAt).toMatch(/^\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d\.\d{3}Z$/);
    const last = (await recordTrail('reference_material', String(id))).at(-1)!;
    expect(last.changes.map((c) => c.field).sort()).toEqual(['acceptedAt', 'acceptedBy', 'status']);
    expect(last.changes.find((c) => c.field === 'acceptedBy')!.newValue).toBe(res.body.acceptedBy.fullName);
  });

  it('when retired without a reason, then 400 fields.reason; with a reason, then status retired, audited with the reason', async () => {
    const bad = await post(`/api/materials/${id}/retire`, {});
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields.reason).toMatch(/reason/);
    const res = await post(`/api/materials/${id}/retire`, { reason: 'Lot used up' });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ status: 'retired', retiredReason: 'Lot used up', retiredAt: expect.any(String) });
    const last = (await recordTrail('reference_material', String(id))).at(-1)!;
    expect(last).toMatchObject({ action: 'retire', reason: 'Lot used up' });
    expect(last.changes).toEqual(expect.arrayContaining([{ field: 'status', oldValue: 'accepted', newValue: 'retired' }]));
  });

  it('when a retired item is patched or retired again, then 409 and the record is unchanged', async () => {
    expect((await patch(`/api/materials/${id}`, { storage: 'bin' })).status).toBe(409);
    expect((await post(`/api/materials/${id}/retire`, { reason: 'again' })).status).toBe(409);
    expect((await get(`/api/materials/${id}`)).body.storage).toBe('fridge F1');
  });

  it('when the id is unknown or not a number, then 404 JSON', async () => {
    for (const path of ['/api/materials/999999', '/api/materials/abc']) {
      const res = await get(path);
      expect(res.status).toBe(404);
      expectErrorBody(res.body, 'not_found');
    }
    expect((await patch('/api/materials/999999', { storage: 'x' })).status).toBe(404);
  });
});

describe('balances', () => {
  it('when s and d are given and m_min is not, then m_min = 2000·max(s, 0.41·d)·SF is stored with its data (USP <41>)', async () => {
    // s = 0.03 mg < 0.41·d = 0.041 mg, so s_eff = 0.041 mg; 2000 × 0.041 × 2 = 164 mg (USP <41>, SF per USP <1251>)
    const res = await post('/api/balances', validBalance({ identifier: 'BAL-MW1', minWeightMg: null, repeatabilitySdMg: '0.03', minWeightSafetyFactor: '2', minWeightDeterminedOn: '2026-02-01' }));
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(balanceSchema.strict().safeParse(res.body).success).toBe(true);
    expect(res.body).toMatchObject({
      minWeightMg: '164',
      repeatabilitySdMg: '0.03',
      minWeightReadabilityMg: '0.1',
      minWeightSafetyFactor: '2',
      minWeightDeterminedOn: '2026-02-01',
      minWeightComputed: true,
    });
  });

  it('when SF and the date are not given, then SF 1 and today are stored (2000 × 0.05 mg = 100 mg, USP <41>)', async () => {
    const res = await post('/api/balances', validBalance({ identifier: 'BAL-MW2', minWeightMg: '', repeatabilitySdMg: '0.05', minWeightSafetyFactor: null, minWeightDeterminedOn: null }));
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body).toMatchObject({ minWeightMg: '100', minWeightSafetyFactor: '1', minWeightDeterminedOn: await labToday(), minWeightComputed: true });
    // a new s recomputes the computed value: 2000 × 0.08 mg = 160 mg (USP <41>)
    const upd = await patch(`/api/balances/${res.body.id}`, { repeatabilitySdMg: '0.08' });
    expect(upd.body).toMatchObject({ minWeightMg: '160', minWeightComputed: true });
    const last = (await recordTrail('balance', String(res.body.id))).at(-1)!;
    expect(last.changes).toEqual(expect.arrayContaining([{ field: 'minWeightMg', oldValue: '100', newValue: '160' }, { field: 'repeatabilitySdMg', oldValue: '0.05', newValue: '0.08' }]));
  });

  it('when m_min is entered, then it is kept as entered, not computed', async () => {
    const res = await post('/api/balances', validBalance({ identifier: 'BAL-MW3', minWeightMg: '82.0' }));
    expect(res.body).toMatchObject({ minWeightMg: '82.0', minWeightComputed: false });
    const upd = await patch(`/api/balances/${res.body.id}`, { repeatabilitySdMg: '0.09' });
    expect(upd.body).toMatchObject({ minWeightMg: '82.0', minWeightComputed: false });
  });

  it.each([
    ['readability 0', { readabilityMg: '0' }, 'readabilityMg'],
    ['due before calibration', { calibratedOn: '2026-05-01', calibrationDueOn: '2026-04-30' }, 'calibrationDueOn'],
    ['due on the calibration day', { calibratedOn: '2026-05-01', calibrationDueOn: '2026-05-01' }, 'calibrationDueOn'],
    ['capacity negative', { capacityG: '-220' }, 'capacityG'],
    ['safety factor below 1', { minWeightSafetyFactor: '0.5' }, 'minWeightSafetyFactor'],
    ['calibration U without k', { calibrationUncertaintyK: null }, 'calibrationUncertaintyK'],
    ['status retired on create', { status: 'retired' }, 'status'],
    ['identifier empty', { identifier: '' }, 'identifier'],
  ])('when %s, then 400 naming %s', async (_w, over, field) => {
    const res = await post('/api/balances', validBalance({ identifier: 'BAL-BAD', ...over }));
    expect(res.status, JSON.stringify(res.body)).toBe(400);
    expect(res.body.error.fields[field], JSON.stringify(res.body)).toEqual(expect.any(String));
  });

  it('when the identifier is taken (any case, even by the demo lab), then 409 with fields.identifier', async () => {
    const res = await post('/api/balances', validBalance({ identifier: 'bal-a1' }));
    expect(res.status).toBe(409);
    expect(res.body.error.fields.identifier).toMatch(/already in use/);
    const mine = await post('/api/balances', validBalance({ identifier: 'BAL-DUP' }));
    const other = await post('/api/balances', validBalance({ identifier: 'BAL-DUP2' }));
    const rename = await patch(`/api/balances/${other.body.id}`, { identifier: 'BAL-DUP' });
    expect(rename.status).toBe(409);
    expect(rename.body.error.fields.identifier).toBeDefined();
    expect(mine.status).toBe(201);
  });

  it('when retired, then status "retired" and usable=1 leaves it out', async () => {
    const res = await post('/api/balances', validBalance({ identifier: 'BAL-RET' }));
    const ret = await post(`/api/balances/${res.body.id}/retire`, { reason: 'Replaced by BAL-A3' }, admin);
    expect(ret.body.status).toBe('retired');
    const usable = await get('/api/balances?usable=1&pageSize=200');
    expect(usable.body.items.map((b: { identifier: string }) => b.identifier)).not.toContain('BAL-RET');
  });

  it('when usable=1, then only in-service balances whose calibration is not overdue (due today or later)', async () => {
    await post('/api/balances', validBalance({ identifier: 'BAL-OVERDUE', calibratedOn: '2000-01-01', calibrationDueOn: '2000-12-31' }));
    await post('/api/balances', validBalance({ identifier: 'BAL-OOS', status: 'out_of_service' }));
    const today = await labToday();
    const res = await get('/api/balances?usable=1&pageSize=200');
    const ids = res.body.items.map((b: { identifier: string }) => b.identifier);
    expect(ids).toContain('BAL-X1'.replace('X1', 'MW1'));
    expect(ids).not.toContain('BAL-OVERDUE');
    expect(ids).not.toContain('BAL-OOS');
    for (const b of res.body.items) {
      expect(b.status).toBe('in_service');
      expect(b.calibrationDueOn >= today).toBe(true);
    }
  });
});

describe('volumetric ware and solvents', () => {
  it('when ware is created, patched and retired, then each step is audited; tolerance must be > 0', async () => {
    const res = await post('/api/volumetric-ware', validWare({ identifier: 'VF-T-1' }));
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(volumetricWareSchema.strict().safeParse(res.body).success).toBe(true);
    const bad = await patch(`/api/volumetric-ware/${res.body.id}`, { toleranceMl: '0' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields.toleranceMl).toMatch(/greater than 0/);
    const upd = await patch(`/api/volumetric-ware/${res.body.id}`, { toleranceMl: '0.08', class: 'B' });
    expect(upd.body).toMatchObject({ toleranceMl: '0.08', class: 'B' });
    await post(`/api/volumetric-ware/${res.body.id}/retire`, { reason: 'Chipped neck' });
    const trail = await recordTrail('volumetric_ware', String(res.body.id));
    expect(trail.map((e) => e.action)).toEqual(['create', 'update', 'retire']);
    expect(trail[1]!.changes).toEqual([
      { field: 'class', oldValue: 'A', newValue: 'B' },
      { field: 'toleranceMl', oldValue: '0.10', newValue: '0.08' },
    ]);
    const dup = await post('/api/volumetric-ware', validWare({ identifier: 'VF-T-1' }));
    expect(dup.status).toBe(409);
    expect(dup.body.error.fields.identifier).toBeDefined();
  });

  it('when a solvent is created and patched, then the DTO keeps its digits and bad values give 400 with fields', async () => {
    const res = await post('/api/solvents', validSolvent({ lot: 'S-T-1', density20cGPerMl: '0.78220' }));
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(solventSchema.strict().safeParse(res.body).success).toBe(true);
    expect(res.body.density20cGPerMl).toBe('0.78220');
    const bad = await patch(`/api/solvents/${res.body.id}`, { density20cGPerMl: 'abc', expiresOn: '31/12/2027' });
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fields).sort()).toEqual(['density20cGPerMl', 'expiresOn']);
    const ret = await post(`/api/solvents/${res.body.id}/retire`, { reason: 'Bottle contaminated' });
    expect(ret.body.status).toBe('retired');
  });

  it('when a body is not an object, then 400 JSON, never 500', async () => {
    const res = await request(t.app).post('/api/solvents').set('Cookie', chemist).set('Content-Type', 'application/json').send('42');
    expect(res.status).toBe(400);
    expectErrorBody(res.body);
  });
});

describe('lists: paging, sorting, filtering, search in SQL', () => {
  beforeAll(async () => {
    // 30 flasks and pipettes with volumes whose text order differs from their numeric order
    const volumes = ['1', '2', '5', '10', '20', '25', '50', '100', '200', '250', '500', '1000', '2000', '0.5', '1.5'];
    for (const [i, v] of volumes.entries()) {
      await post('/api/volumetric-ware', validWare({ identifier: `LST-VF-${String(i).padStart(2, '0')}`, nominalVolumeMl: v, toleranceMl: null }), admin);
      await post('/api/volumetric-ware', validWare({ identifier: `LST-BP-${String(i).padStart(2, '0')}`, kind: 'bulb_pipette', nominalVolumeMl: v, toleranceMl: null, status: i % 3 === 0 ? 'out_of_service' : 'in_service' }), admin);
    }
  });

  it('when paging with pageSize 7, then pages are disjoint, cover total, and carry page/pageSize', async () => {
    const first = await get('/api/volumetric-ware?search=LST-&pageSize=7&page=1&sort=identifier');
    expect(first.status).toBe(200);
    expect(first.body).toMatchObject({ total: 30, page: 1, pageSize: 7 });
    const seen: string[] = [];
    for (let page = 1; page <= 5; page++) {
      const res = await get(`/api/volumetric-ware?search=LST-&pageSize=7&page=${page}&sort=identifier`);
      expect(res.body.items.length).toBe(page < 5 ? 7 : 2);
      seen.push(...res.body.items.map((w: { identifier: string }) => w.identifier));
    }
    expect(new Set(seen).size).toBe(30);
    expect(seen).toEqual([...seen].sort());
    const beyond = await get('/api/volumetric-ware?search=LST-&pageSize=7&page=9');
    expect(beyond.body).toMatchObject({ items: [], total: 30, page: 9 });
  });

  it('when sorting by nominal volume, then by value, not by text (0.5 < 2 < 10 < 1000); desc reverses', async () => {
    const res = await get('/api/volumetric-ware?search=LST-VF&sort=nominalVolumeMl&pageSize=200');
    const vols = res.body.items.map((w: { nominalVolumeMl: string }) => w.nominalVolumeMl);
    expect(vols).toEqual(['0.5', '1', '1.5', '2', '5', '10', '20', '25', '50', '100', '200', '250', '500', '1000', '2000']);
    const desc = await get('/api/volumetric-ware?search=LST-VF&sort=nominalVolumeMl&dir=desc&pageSize=200');
    expect(desc.body.items.map((w: { nominalVolumeMl: string }) => w.nominalVolumeMl)).toEqual([...vols].reverse());
  });

  it('when filtering by kind and status, and usable=1, then only matching rows and a matching total', async () => {
    const pipettes = await get('/api/volumetric-ware?search=LST-&kind=bulb_pipette&pageSize=200');
    expect(pipettes.body.total).toBe(15);
    expect(pipettes.body.items.every((w: { kind: string }) => w.kind === 'bulb_pipette')).toBe(true);
    const oos = await get('/api/volumetric-ware?search=LST-&status=out_of_service');
    expect(oos.body.total).toBe(5);
    const usable = await get('/api/volumetric-ware?search=LST-&usable=1&pageSize=200');
    expect(usable.body.total).toBe(25);
    expect(usable.body.items.every((w: { status: string }) => w.status === 'in_service')).toBe(true);
  });

  it('when searching, then every word must match some text column, case-insensitively; % and _ are literal', async () => {
    const res = await get('/api/materials?search=sodium%20NRM&pageSize=200');
    const names = res.body.items.map((m: { name: string; lot: string }) => `${m.name} ${m.lot}`);
    expect(names.length).toBeGreaterThan(0);
    for (const n of names) expect(n.toLowerCase()).toMatch(/sodium.*nrm/);
    const pct = await get('/api/materials?search=%25');
    expect(pct.body.total).toBe(0);
    const underscore = await get('/api/volumetric-ware?search=_');
    const all = await get('/api/volumetric-ware?pageSize=200');
    expect(underscore.body.total).toBe(all.body.items.filter((w: { identifier: string; kind: string; material: string | null }) => `${w.identifier}${w.kind}${w.material ?? ''}`.includes('_')).length);
    const byAnalyte = await get('/api/materials?search=fluoride');
    expect(byAnalyte.body.items.map((m: { name: string }) => m.name)).toContain('Sodium fluoride');
  });

  it('when materials sort by expiry desc and filter by grade, then the order and filter hold', async () => {
    const res = await get('/api/materials?grade=CRM&sort=expiresOn&dir=desc&pageSize=200');
    expect(materialPageSchema.safeParse(res.body).success).toBe(true);
    const items = res.body.items as { grade: string; expiresOn: string | null }[];
    expect(items.every((m) => m.grade === 'CRM')).toBe(true);
    const dates = items.map((m) => m.expiresOn ?? '');
    expect(dates).toEqual([...dates].sort().reverse());
  });

  it('when usable=1 on materials, then only accepted lots in date (expiresOn ≥ today or none)', async () => {
    await post('/api/materials', validMaterial({ lot: 'U-EXPIRED', status: 'accepted', receivedOn: '2000-01-01', expiresOn: '2001-01-01' }));
    await post('/api/materials', validMaterial({ lot: 'U-NODATE', status: 'accepted', expiresOn: null }));
    await post('/api/materials', validMaterial({ lot: 'U-QUAR', status: 'quarantined' }));
    const today = await labToday();
    const res = await get('/api/materials?usable=1&pageSize=200');
    const lots = res.body.items.map((m: { lot: string }) => m.lot);
    expect(lots).toContain('U-NODATE');
    expect(lots).not.toContain('U-EXPIRED');
    expect(lots).not.toContain('U-QUAR');
    for (const m of res.body.items) {
      expect(m.status).toBe('accepted');
      expect(m.expiresOn === null || m.expiresOn >= today).toBe(true);
    }
  });

  it('when a material is created already accepted, then the creator is its acceptor', async () => {
    const res = await post('/api/materials', validMaterial({ lot: 'U-ACC', status: 'accepted' }), admin);
    expect(res.body.acceptedBy).toEqual({ id: expect.any(Number), fullName: expect.any(String) });
  });

  it.each([
    ['sort=color', 'sort'],
    ['dir=up', 'dir'],
    ['page=0', 'page'],
    ['page=abc', 'page'],
    ['pageSize=201', 'pageSize'],
    ['status=lost', 'status'],
    ['grade=premium', 'grade'],
    ['usable=yes', 'usable'],
  ])('when the list query has %s, then 400 naming %s', async (qs, field) => {
    const res = await get(`/api/materials?${qs}`);
    expect(res.status).toBe(400);
    expectErrorBody(res.body, 'validation_failed');
    expect(res.body.error.fields[field]).toEqual(expect.any(String));
  });

  it('when no query is given, then page 1 of 25 sorted by name', async () => {
    const res = await get('/api/materials');
    expect(res.body).toMatchObject({ page: 1, pageSize: 25 });
    const names = res.body.items.map((m: { name: string }) => m.name);
    expect(names).toEqual([...names].sort((a: string, b: string) => (a < b ? -1 : a > b ? 1 : 0)));
  });
});
