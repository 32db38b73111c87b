// Standards made from standards over HTTP: dilutions of a verified parent (REQUIREMENTS TR-04, TR-11),
// the dilution result with the parent as a budget input (METROLOGY §5.5), expiry capped by the stability rule,
// the reference material and the parent (REQUIREMENTS EX-01, EX-02), calibration series, and route × role.
import request from 'supertest';
import { PDFParse } from 'pdf-parse';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEntry, Preparation } from '../../server/db/models/index.ts';
import { D, rectangular, triangular } from '../../shared/calc/index.ts';
import { addDays } from '../../shared/prep/dates.ts';
import { VERIFICATION_CHECKLIST } from '../../shared/schemas/preparations.ts';
import { DEMO, DEMO_PASSWORD, expectErrorBody, makeTestApp, sessionCookie, type TestApp } from './helpers/test-app.ts';
import { expectClose } from '../helpers/decimal.ts';
import { freeFlask } from './helpers/free-flask.ts';

type Who = 'signedOut' | 'chemist' | 'chemist2' | 'technician' | 'qa' | 'admin';
let t: TestApp;
const cookie: Partial<Record<Who, string>> = {};
const ids = { material: {} as Record<string, number>, balance: {} as Record<string, number>, ware: {} as Record<string, number>, solvent: {} as Record<string, { id: number; lot: string }> };

const send = (who: Who, method: 'get' | 'post' | 'put', path: string, body?: unknown) => {
  const r = request(t.app)[method](path);
  if (who !== 'signedOut') r.set('Cookie', cookie[who]!);
  return body === undefined ? r : r.send(body as object);
};
const CONDITIONS = { temperatureC: '21', pressureHPa: '985', relativeHumidityPct: '45' };
const today = () => new Date().toISOString().slice(0, 10); // the test lab zone is Europe/London; runs are away from midnight edges

async function stock(who: Who = 'chemist') {
  const p = await send(who, 'post', '/api/preparations', {
    materialId: ids.material['Pb(NO3)2'],
    analyteFormula: 'Pb',
    target: { value: '1000', unit: 'mg/L' },
    flaskId: ids.ware['VF-100-01'],
    balanceId: ids.balance['BAL-SM1'],
    conditions: { source: 'measured', ...CONDITIONS },
  });
  expect(p.status, JSON.stringify(p.body)).toBe(201);
  const w = await send(who, 'post', `/api/preparations/${p.body.identifier}/weighings`, { mode: 'direct', reading: '160.07', unit: 'mg', conditions: CONDITIONS });
  expect(w.status, JSON.stringify(w.body)).toBe(201);
  const water = ids.solvent['Ultrapure water']!;
  const m = await send(who, 'post', `/api/preparations/${p.body.identifier}/make-up`, { flaskIdentifier: (await freeFlask(t.app, cookie.chemist!)).identifier, solventId: water.id, solventLot: water.lot, solutionTemperatureC: '20.0', applyTemperatureCorrection: false });
  expect(m.status, JSON.stringify(m.body)).toBe(201);
  return m.body as { id: number; identifier: string; expiresOn: string; result: { concentration: { value: string; unit: string; standardUncertainty: string } } };
}

/** A stock made verified through the real signature flow: chemist signs "prepared", chemist2 "verified". */
async function verifiedStock() {
  const s = await stock();
  const prepared = await send('chemist', 'post', `/api/preparations/${s.identifier}/signatures`, { meaning: 'prepared', password: DEMO_PASSWORD, acknowledgeResponsibility: true });
  expect(prepared.status, JSON.stringify(prepared.body)).toBe(201);
  const verified = await send('chemist2', 'post', `/api/preparations/${s.identifier}/signatures`, {
    meaning: 'verified',
    password: DEMO_PASSWORD,
    acknowledgeResponsibility: true,
    checklist: Object.fromEntries(VERIFICATION_CHECKLIST.map((c) => [c.key, true])),
  });
  expect(verified.status, JSON.stringify(verified.body)).toBe(201);
  expect(verified.body.status).toBe('verified');
  return s;
}

const dilutionBody = (over: Record<string, unknown> = {}) => ({ method: 'volumetric', target: { value: '10', unit: 'mg/L' }, pipetteId: ids.ware['BP-1-01'], flaskId: ids.ware['VF-100-02'], ...over });
const setExpiry = (id: number, expiresOn: string) => Preparation.sequelize!.query('UPDATE preparations SET expires_on = :e WHERE id = :id', { replacements: { e: expiresOn, id } });

let parent: Awaited<ReturnType<typeof verifiedStock>>;

beforeAll(async () => {
  t = await makeTestApp();
  for (const who of ['chemist', 'chemist2', 'technician', 'qa', 'admin'] as const) cookie[who] = await sessionCookie(t.app, DEMO[who]);
  const get = async (p: string) => (await send('chemist', 'get', p)).body.items as any[];
  for (const m of await get('/api/materials')) ids.material[m.formula] = m.id;
  for (const b of await get('/api/balances')) ids.balance[b.identifier] = b.id;
  for (const w of await get('/api/volumetric-ware?pageSize=100')) ids.ware[w.identifier] = w.id;
  for (const s of await get('/api/solvents')) ids.solvent[s.name] = { id: s.id, lot: s.lot };
  parent = await verifiedStock();
}, 90_000);
afterAll(() => t.close());

describe('POST /api/preparations/:key/dilutions', () => {
  it('from a verified, in-date parent: a planned dilution whose expected budget has the parent as an input [METROLOGY §5.5]', async () => {
    const res = await send('chemist', 'post', `/api/preparations/${parent.identifier}/dilutions`, dilutionBody());
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const d = res.body;
    expect(d.kind).toBe('dilution');
    expect(d.status).toBe('planned');
    expect(d.identifier).toMatch(/^HWL-\d{4}-\d{4}$/);
    expect(d.identifier).not.toBe(parent.identifier);
    expect(d.dilution.parent.identifier).toBe(parent.identifier);
    expect(d.dilution.parent.snapshot.status).toBe('verified');
    const c1 = new D(parent.result.concentration.value);
    const u1 = new D(parent.result.concentration.standardUncertainty);
    // c2 = c1·Vp/Vf = c1·1/100; u_r² = u_r(c1)² + (0.008/√6/1)² + (0.10/√6/100)² [METROLOGY §5.5, tolerances §4.4]
    // + the fuller budget (dilution-2, shared/calc/dilution.ts): repeatability a/√6 of each tolerance [common practice]
    // and β·u(ΔT) with water's β = 2.1e-4 /K and ΔT ±4 °C rectangular [QUAM A1]
    expectClose(d.dilution.planned.value, c1.div(100), '1e-15');
    const ur = u1
      .div(c1)
      .pow(2)
      .plus(triangular('0.008').pow(2).mul(2))
      .plus(triangular('0.10').div(100).pow(2).mul(2))
      .plus(new D('0.00021').mul(rectangular('4')).pow(2))
      .sqrt();
    expectClose(d.dilution.planned.relative, ur, '1e-12');
    expect(d.dilution.planned.budget.map((b: { input: string }) => b.input)).toEqual(['parent', 'aliquot', 'final', 'aliquotRepeatability', 'finalRepeatability', 'temperature']);
    expect(d.dilution.planned.budget.find((b: { input: string }) => b.input === 'aliquotRepeatability').label).toMatch(/±0\.008 mL tolerance of BP-1-01, triangular a\/√6; common practice/);
    // the parent's forward trace lists the child (TR-04)
    const p = await send('qa', 'get', `/api/preparations/${parent.identifier}`);
    expect(p.body.children.map((c: { identifier: string }) => c.identifier)).toContain(d.identifier);
    // and the QA trace labels the child as a dilution, not as a stock solution
    const trace = await send('qa', 'get', `/api/trace/${parent.identifier}`);
    expect(trace.status, JSON.stringify(trace.body)).toBe(200);
    const node = trace.body.forward.nodes.find((n: { detail?: { identifier?: string } }) => n.detail?.identifier === d.identifier);
    expect(node?.detail?.kind).toBe('dilution');
  });

  it('a piston pipette is planned only at a volume it can be set to (steps of a thousandth of nominal, common practice)', async () => {
    // PP-1000-01 (1.000 mL) sets in 0.001 mL steps: 0.9995 mL cannot be set, 0.999 mL can
    const bad = await send('chemist', 'post', `/api/preparations/${parent.identifier}/dilutions`, dilutionBody({ target: { value: '10', unit: 'mg/L' }, pipetteId: ids.ware['PP-1000-01'], aliquotMl: '0.9995' }));
    expect(bad.status, JSON.stringify(bad.body)).toBe(400);
    expect(Object.values(bad.body.error.fields ?? {}).join(' ')).toMatch(/steps of 0\.001 mL: use 1 mL|steps of 0\.001 mL: use 0\.999 mL/);
    const ok = await send('chemist', 'post', `/api/preparations/${parent.identifier}/dilutions`, dilutionBody({ target: { value: '10', unit: 'mg/L' }, pipetteId: ids.ware['PP-1000-01'], aliquotMl: '0.999' }));
    expect(ok.status, JSON.stringify(ok.body)).toBe(201);
  });

  it('at the bench: the aliquot (pipette confirmed) and the make-up give the result; a weighing is refused 409', async () => {
    const d = (await send('chemist', 'post', `/api/preparations/${parent.identifier}/dilutions`, dilutionBody())).body;
    const wrong = await send('technician', 'post', `/api/preparations/${d.identifier}/aliquots`, { pipetteIdentifier: 'BP-2-01' });
    expect(wrong.status).toBe(400);
    expect(wrong.body.error.fields.pipetteIdentifier).toMatch(/BP-1-01/);
    const a = await send('technician', 'post', `/api/preparations/${d.identifier}/aliquots`, { pipetteIdentifier: 'BP-1-01' });
    expect(a.status, JSON.stringify(a.body)).toBe(201);
    expect(a.body.dilution.aliquots).toHaveLength(1);
    expect(a.body.dilution.aliquots[0].volumeMl).toBe('1');
    const again = await send('technician', 'post', `/api/preparations/${d.identifier}/aliquots`, { pipetteIdentifier: 'BP-1-01' });
    expect(again.status).toBe(409);
    const water = ids.solvent['Ultrapure water']!;
    const m = await send('technician', 'post', `/api/preparations/${d.identifier}/make-up`, { flaskIdentifier: (await freeFlask(t.app, cookie.chemist!)).identifier, solventId: water.id, solventLot: water.lot, solutionTemperatureC: '20.0', applyTemperatureCorrection: false });
    expect(m.status, JSON.stringify(m.body)).toBe(201);
    const r = m.body.dilution.result;
    expectClose(r.value, new D(parent.result.concentration.value).div(100), '1e-15'); // c2 = c1·Vp/Vf [METROLOGY §5.5]
    expect(r.basedOn).toEqual({ aliquotId: a.body.dilution.aliquots[0].id, makeUpId: m.body.makeUp.id });
    expect(r.display).toMatch(/^10\.0\d0 ± 0\.0\d\d mg\/L \(k = 2\)$/);
    // cautions for pipetting a solution, not weighing a dust (issue 16 §4; shared/prep/cautions.ts)
    expect(m.body.hazards.task).toMatch(/^Pipetting a solution/);
    expect(m.body.hazards.cautions.some((c: string) => /dust/.test(c))).toBe(false);
    expect(m.body.hazards.cautions).toContain('Never pipette by mouth: use a pipette filler or the piston pipette, and wear gloves and eye protection');
        // the make-up keeps the parent cap on the expiry (EX-01)
    expect(m.body.expiry.expiresOn <= parent.expiresOn).toBe(true);
    const w = await send('chemist', 'post', `/api/preparations/${d.identifier}/weighings`, { mode: 'direct', reading: '160.07', unit: 'mg', conditions: CONDITIONS });
    expect(w.status).toBe(409);
    expect(w.body.error.code).toBe('not_weighable');
    // the record's trail (page and prep sheet) holds the aliquot and the make-up entries (issue 16 §4)
    const trail = (await send('chemist', 'get', `/api/audit/records/preparation/${d.id}`)).body.items as Array<{ entity: string }>;
    expect(trail.map((e) => e.entity)).toEqual(expect.arrayContaining(['preparation', 'aliquot', 'make_up']));
    const sheet = await send('chemist', 'get', `/api/preparations/${d.identifier}/prep-sheet.pdf?preview=1`)
      .buffer(true)
      .parse((r, cb) => {
        const chunks: Buffer[] = [];
        r.on('data', (c: Buffer) => chunks.push(c));
        r.on('end', () => cb(null, Buffer.concat(chunks)));
      });
    expect(sheet.status).toBe(200);
    const parser = new PDFParse({ data: new Uint8Array(sheet.body as Buffer) });
    const text = (await parser.getText()).text.replace(/\s+/g, ' ');
    await parser.destroy();
    expect(text).toContain(`${trail.length} audit entries for this record`);
    expect(text).toMatch(/\(aliquot \d+\)/);
    expect(text).toMatch(/\(make_up \d+\)/);
    // a correction names the aliquot it supersedes and keeps the old one visible
    const fix = await send('chemist', 'post', `/api/preparations/${d.identifier}/aliquots`, { pipetteIdentifier: 'BP-1-01', supersedesId: a.body.dilution.aliquots[0].id, correctionReason: 'tip touched the flask neck' });
    expect(fix.status, JSON.stringify(fix.body)).toBe(201);
    expect(fix.body.dilution.aliquots).toHaveLength(2);
    expect(fix.body.dilution.aliquots[0].supersededById).toBe(fix.body.dilution.aliquots[1].id);
  });

  it('refuses an unverified parent with 422 naming its state, and audits the attempt (TR-11)', async () => {
    const planned = await stock();
    const res = await send('chemist', 'post', `/api/preparations/${planned.identifier}/dilutions`, dilutionBody());
    expect(res.status).toBe(422);
    expectErrorBody(res.body);
    expect(res.body.error.code).toBe('parent_not_usable');
    expect(res.body.error.message).toContain(`${planned.identifier} is 'planned', not verified`);
    const audit = await AuditEntry.findAll({ where: { action: 'parent_refused', entityId: String(planned.id) } });
    expect(audit.length).toBeGreaterThan(0);
  });

  it('refuses an expired parent with 422 naming its expiry (TR-11, EX-04)', async () => {
    const p = await verifiedStock();
    const yesterday = addDays(today(), -1);
    await setExpiry(p.id, yesterday);
    const res = await send('chemist', 'post', `/api/preparations/${p.identifier}/dilutions`, dilutionBody());
    expect(res.status).toBe(422);
    expect(res.body.error.message).toBe(`${p.identifier} expired on ${yesterday} and cannot be used as a parent`);
  });

  it('refuses ware that cannot give the target, a class mismatch of unit, and out-of-service or non-pipette ware (400/422 at the field)', async () => {
    const far = await send('chemist', 'post', `/api/preparations/${parent.identifier}/dilutions`, dilutionBody({ target: { value: '50', unit: 'mg/L' } }));
    expect(far.status).toBe(422);
    expect(far.body.error.fields.target).toMatch(/gives 10\.0\d mg\/L, not 50 mg\/L/);
    const unit = await send('chemist', 'post', `/api/preparations/${parent.identifier}/dilutions`, dilutionBody({ target: { value: '10', unit: 'µg/L' } }));
    expect(unit.status).toBe(400);
    expect(unit.body.error.fields['target.unit']).toMatch(/mg\/L/);
    const flaskAsPipette = await send('chemist', 'post', `/api/preparations/${parent.identifier}/dilutions`, dilutionBody({ pipetteId: ids.ware['VF-10-01'] }));
    expect(flaskAsPipette.status).toBe(400);
    expect(flaskAsPipette.body.error.fields.pipetteId).toMatch(/volumetric flask/);
    const bad = await send('chemist', 'post', `/api/preparations/${parent.identifier}/dilutions`, { method: 'volumetric', target: { value: 'ten', unit: 'mg/L' } });
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fields)).toEqual(expect.arrayContaining(['target.value', 'pipetteId', 'flaskId']));
  });
});

describe('expiry of a dilution: the earliest of stability period, reference material and parent (REQUIREMENTS EX-01, EX-02)', () => {
  it('limited by the stability period (lab default 30 days) when the parent and the material last longer', async () => {
    const p = await verifiedStock();
    await setExpiry(p.id, addDays(today(), 200));
    const d = (await send('chemist', 'post', `/api/preparations/${p.identifier}/dilutions`, dilutionBody())).body;
    expect(d.expiry.expiresOn).toBe(addDays(today(), 30));
    expect(d.expiry.reason).toContain('limited by the stability period');
  });

  it('limited by the parent: "limited by parent HWL-…"', async () => {
    const p = await verifiedStock();
    const soon = addDays(today(), 3);
    await setExpiry(p.id, soon);
    const d = (await send('chemist', 'post', `/api/preparations/${p.identifier}/dilutions`, dilutionBody())).body;
    expect(d.expiry.expiresOn).toBe(soon);
    expect(d.expiry.reason).toContain(`limited by parent ${p.identifier}, which expires on ${soon}`);
  });

  it('limited by the reference material of the root when it expires first', async () => {
    const p = await verifiedStock();
    await setExpiry(p.id, addDays(today(), 200));
    const materialDay = addDays(today(), 5);
    await Preparation.sequelize!.query(`UPDATE preparations SET snapshot_material = json_set(snapshot_material, '$.expiresOn', :e) WHERE id = :id`, { replacements: { e: materialDay, id: p.id } });
    const d = (await send('chemist', 'post', `/api/preparations/${p.identifier}/dilutions`, dilutionBody())).body;
    expect(d.expiry.expiresOn).toBe(materialDay);
    expect(d.expiry.reason).toContain('limited by the reference material');
  });

  it('a stability rule for dilutions applies, and its basis is recorded', async () => {
    const put = await send('admin', 'put', '/api/settings', { stabilityRules: [{ id: 'SR-9', appliesTo: { kind: 'dilution', analyteFormula: 'Pb' }, days: 7, basis: 'study ST-2026-09' }] });
    expect(put.status, JSON.stringify(put.body)).toBe(200);
    try {
      const d = (await send('chemist', 'post', `/api/preparations/${parent.identifier}/dilutions`, dilutionBody())).body;
      expect(d.expiry.expiresOn).toBe(addDays(today(), 7));
      expect(d.expiry.reason).toContain('rule SR-9: study ST-2026-09');
    } finally {
      expect((await send('admin', 'put', '/api/settings', { stabilityRules: [] })).status).toBe(200);
    }
  });

  it('a rule with a bad field is refused at the field (400)', async () => {
    const put = await send('admin', 'put', '/api/settings', { stabilityRules: [{ id: 'SR-X', appliesTo: { kind: 'sauce' }, days: -1, basis: '' }] });
    expect(put.status).toBe(400);
    expect(Object.keys(put.body.error.fields).join(' ')).toMatch(/stabilityRules\.0\./);
  });
});

describe('calibration series', () => {
  const levels = ['1', '2', '5', '10', '20'].map((value) => ({ value, unit: 'mg/L' }));

  it('proposes a pipette and flask per level and creates 5 levels, each its own preparation [METROLOGY §5.5; common practice]', async () => {
    const prop = await send('chemist', 'post', '/api/series/proposal', { parentKey: parent.identifier, levels });
    expect(prop.status, JSON.stringify(prop.body)).toBe(200);
    expect(prop.body.levels).toHaveLength(5);
    for (const l of prop.body.levels) {
      expect(l.choice, JSON.stringify(l)).not.toBeNull();
      // achieved ratio within 5 % of the target (the proposal's own bound); the parent is not exactly 1000 mg/L
      expect(new D(l.choice.concentration).minus(l.target.value).div(l.target.value).abs().lte('0.05')).toBe(true);
    }
    const body = {
      parentKey: parent.identifier,
      levels: prop.body.levels.map((l: any) => ({ target: l.target, pipetteId: l.choice.pipette.id, flaskId: l.choice.flask.id, ...(l.choice.pipette.kind === 'piston_pipette' ? { aliquotMl: l.choice.aliquotMl } : {}) })),
    };
    const created = await send('chemist', 'post', '/api/series', body);
    expect(created.status, JSON.stringify(created.body)).toBe(201);
    expect(created.body.series.identifier).toMatch(/^HWL-\d{4}-S\d{3}$/);
    const idents = created.body.preparations.map((p: any) => p.identifier);
    expect(new Set(idents).size).toBe(5);
    for (const p of created.body.preparations) {
      expect(p.kind).toBe('series_level');
      expect(p.dilution.series.identifier).toBe(created.body.series.identifier);
    }
    const got = await send('technician', 'get', `/api/series/${created.body.series.identifier}`);
    expect(got.status).toBe(200);
    expect(got.body.levels.map((l: any) => l.identifier)).toEqual(idents);
    expect(got.body.parent.identifier).toBe(parent.identifier);
  });

  it('the chemist can change a level; a level the ware cannot reach refuses the whole series at its field', async () => {
    const res = await send('chemist', 'post', '/api/series', { parentKey: parent.identifier, levels: [{ target: { value: '10', unit: 'mg/L' }, pipetteId: ids.ware['BP-1-01'], flaskId: ids.ware['VF-100-02'] }, { target: { value: '10', unit: 'mg/L' }, pipetteId: ids.ware['BP-5-01'], flaskId: ids.ware['VF-100-02'] }] });
    expect(res.status).toBe(422);
    expect(Object.keys(res.body.error.fields)).toEqual(['levels.1.target']);
  });

  it('one flask, one solution: a proposal never offers the flask the stock is still in, nor one flask for two levels; creating a series with one flask twice is refused at the field', async () => {
    const prop = await send('chemist', 'post', '/api/series/proposal', { parentKey: parent.identifier, levels: [{ value: '10', unit: 'mg/L' }, { value: '20', unit: 'mg/L' }, { value: '50', unit: 'mg/L' }] });
    expect(prop.status, JSON.stringify(prop.body)).toBe(200);
    const offered = prop.body.levels.flatMap((l: any) => [l.choice, ...l.alternatives].filter(Boolean).map((c: any) => c.flask.identifier));
    expect(offered).not.toContain((parent as any).makeUp.flask.identifier); // the parent is still in its flask
    expect(offered).not.toContain('VF-100-01'); // the demo Pb stock is still in VF-100-01
    const chosen = prop.body.levels.map((l: any) => l.choice?.flask.identifier).filter(Boolean);
    expect(chosen.length).toBeGreaterThan(1);
    expect(new Set(chosen).size).toBe(chosen.length);
    const res = await send('chemist', 'post', '/api/series', {
      parentKey: parent.identifier,
      levels: [
        { target: { value: '10', unit: 'mg/L' }, pipetteId: ids.ware['BP-1-01'], flaskId: ids.ware['VF-100-02'] },
        { target: { value: '20', unit: 'mg/L' }, pipetteId: ids.ware['BP-2-01'], flaskId: ids.ware['VF-100-02'] },
      ],
    });
    expect(res.status).toBe(400);
    expectErrorBody(res.body, 'validation_failed');
    expect(Object.keys(res.body.error.fields)).toEqual(['levels.1.flaskId']);
    expect(res.body.error.fields['levels.1.flaskId']).toMatch(/VF-100-02 is already the flask of level 1/);
  });

  it('one flask, one open solution: a flask holding an open record is refused at make-up and for a new dilution or series level (409 at the field, naming the record), marked in the list, and free again once that record is discarded', async () => {
    const held = (parent as any).makeUp.flask as { identifier: string };
    const heldId = (await send('chemist', 'get', '/api/volumetric-ware?kind=volumetric_flask&pageSize=200')).body.items.find((w: any) => w.identifier === held.identifier);
    expect(heldId.holds).toBe(parent.identifier);
    // a new dilution into it
    const dil = await send('chemist', 'post', `/api/preparations/${parent.identifier}/dilutions`, dilutionBody({ flaskId: heldId.id }));
    expect(dil.status, JSON.stringify(dil.body)).toBe(409);
    expectErrorBody(dil.body, 'flask_occupied');
    expect(dil.body.error.fields.flaskId).toMatch(new RegExp(`^${held.identifier} still holds ${parent.identifier}`));
    // a series level into it
    const ser = await send('chemist', 'post', '/api/series', { parentKey: parent.identifier, levels: [{ target: { value: '10', unit: 'mg/L' }, pipetteId: ids.ware['BP-1-01'], flaskId: ids.ware['VF-100-02'] }, { target: { value: '20', unit: 'mg/L' }, pipetteId: ids.ware['BP-2-01'], flaskId: heldId.id }] });
    expect(ser.status).toBe(409);
    expect(Object.keys(ser.body.error.fields)).toEqual(['levels.1.flaskId']);
    // the make-up of a planned dilution scanned into it
    const d = (await send('chemist', 'post', `/api/preparations/${parent.identifier}/dilutions`, dilutionBody())).body;
    expect((await send('technician', 'post', `/api/preparations/${d.identifier}/aliquots`, { pipetteIdentifier: 'BP-1-01' })).status).toBe(201);
    const water = ids.solvent['Ultrapure water']!;
    const before = await AuditEntry.count();
    const mu = await send('technician', 'post', `/api/preparations/${d.identifier}/make-up`, { flaskIdentifier: held.identifier, solventId: water.id, solventLot: water.lot, solutionTemperatureC: '20.0', applyTemperatureCorrection: false });
    expect(mu.status).toBe(409);
    expect(mu.body.error.fields.flaskIdentifier).toMatch(new RegExp(`^${held.identifier} still holds ${parent.identifier}`));
    expect(await AuditEntry.count()).toBe(before); // nothing stored
    // the demo Pb stock holds VF-100-01 (seed): the same rule
    const vf1 = await send('chemist', 'post', `/api/preparations/${parent.identifier}/dilutions`, dilutionBody({ flaskId: ids.ware['VF-100-01'] }));
    expect(vf1.status).toBe(409);
    expect(vf1.body.error.message).toMatch(/^VF-100-01 still holds HWL-\d{4}-\d{4}/);
  });

  it('a discarded record frees its flask', async () => {
    const s = await stock();
    const flask = (s as any).makeUp.flask.identifier as string;
    const disc = await send('qa', 'post', `/api/preparations/${s.identifier}/signatures`, { meaning: 'discarded', password: DEMO_PASSWORD, acknowledgeResponsibility: true, reason: 'spilled while mixing' });
    expect(disc.status, JSON.stringify(disc.body)).toBe(201);
    const w = (await send('chemist', 'get', '/api/volumetric-ware?kind=volumetric_flask&pageSize=200')).body.items.find((x: any) => x.identifier === flask);
    expect(w.holds).toBeNull();
  });

  it('unknown series → 404; an unverified parent → 422', async () => {
    expect((await send('chemist', 'get', '/api/series/HWL-2026-S999')).status).toBe(404);
    const planned = await stock();
    const res = await send('chemist', 'post', '/api/series/proposal', { parentKey: planned.identifier, levels });
    expect(res.status).toBe(422);
    expect(res.body.error.fields.parentKey).toMatch(/not verified/);
  });
});

describe('route × role (REQUIREMENTS AC-02)', () => {
  const WHO: Who[] = ['signedOut', 'technician', 'qa', 'admin', 'chemist'];
  const routes: Array<{ method: 'get' | 'post'; path: () => string; allowed: Who[] | 'signedIn'; ok: number; body?: () => unknown }> = [
    { method: 'post', path: () => `/api/preparations/${parent.identifier}/dilutions`, allowed: ['chemist'], ok: 201, body: () => dilutionBody() },
    { method: 'post', path: () => '/api/series/proposal', allowed: ['chemist'], ok: 200, body: () => ({ parentKey: parent.identifier, levels: [{ value: '10', unit: 'mg/L' }] }) },
    { method: 'post', path: () => '/api/series', allowed: ['chemist'], ok: 201, body: () => ({ parentKey: parent.identifier, levels: [{ target: { value: '10', unit: 'mg/L' }, pipetteId: ids.ware['BP-1-01'], flaskId: ids.ware['VF-100-02'] }] }) },
  ];
  it.each(routes.flatMap((r) => WHO.map((who) => [r, who] as const)))('%#', async (r, who) => {
    const res = await send(who, r.method, r.path(), r.body?.());
    const want = who === 'signedOut' ? 401 : r.allowed === 'signedIn' || r.allowed.includes(who) ? r.ok : 403;
    expect(res.status, `${who} ${r.path()} ${JSON.stringify(res.body)}`).toBe(want);
  });

  it('POST /api/preparations/:key/aliquots: chemist and technician 201, qa and admin 403, signed out 401', async () => {
    for (const [who, want] of [['signedOut', 401], ['qa', 403], ['admin', 403], ['technician', 201], ['chemist', 201]] as const) {
      const d = (await send('chemist', 'post', `/api/preparations/${parent.identifier}/dilutions`, dilutionBody())).body;
      const res = await send(who, 'post', `/api/preparations/${d.identifier}/aliquots`, { pipetteIdentifier: 'BP-1-01' });
      expect(res.status, `${who} ${JSON.stringify(res.body)}`).toBe(want);
    }
  });

  it('GET /api/series/:key: every signed-in role 200, signed out 401', async () => {
    const s = (await send('chemist', 'post', '/api/series', { parentKey: parent.identifier, levels: [{ target: { value: '10', unit: 'mg/L' }, pipetteId: ids.ware['BP-1-01'], flaskId: ids.ware['VF-100-02'] }] })).body.series;
    for (const who of WHO) expect((await send(who, 'get', `/api/series/${s.identifier}`)).status, who).toBe(who === 'signedOut' ? 401 : 200);
  });
});
