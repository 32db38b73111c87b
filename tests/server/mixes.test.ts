// Mixes over HTTP: several verified parent standards pipetted into one flask, each analyte with its own
// concentration and GUM budget (METROLOGY §5.5 per component), only verified in-date parents with distinct analytes
// (REQUIREMENTS TR-11), expiry capped by every parent (EX-01), one aliquot per component at the bench (append-only),
// signed and verified through the real signature flow (ES-03, RV-02), traced from each parent's lot (TR-04), route × role.
import { PDFParse } from 'pdf-parse';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEntry, Preparation } from '../../server/db/models/index.ts';
import { labelSnapshotOf } from '../../server/services/printing.service.ts';
import { currentRecordHash } from '../../server/services/signatures.service.ts';
import { D, triangular } from '../../shared/calc/index.ts';
import { volumetricDilution } from '../../shared/calc/dilution.ts';
import { addDays } from '../../shared/prep/dates.ts';
import { VERIFICATION_CHECKLIST } from '../../shared/schemas/preparations.ts';
import { DEMO, DEMO_PASSWORD, makeTestApp, sessionCookie, type TestApp } from './helpers/test-app.ts';
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
const CHECKLIST = Object.fromEntries(VERIFICATION_CHECKLIST.map((c) => [c.key, true]));
const signAs = (who: Who, key: string, meaning: 'prepared' | 'verified') =>
  send(who, 'post', `/api/preparations/${key}/signatures`, { meaning, password: DEMO_PASSWORD, acknowledgeResponsibility: true, ...(meaning === 'verified' ? { checklist: CHECKLIST } : {}) });
const setExpiry = (id: number, expiresOn: string) => Preparation.sequelize!.query('UPDATE preparations SET expires_on = :e WHERE id = :id', { replacements: { e: expiresOn, id } });

type Stock = { id: number; identifier: string; expiresOn: string; result: { concentration: { value: string; unit: string; standardUncertainty: string } } };

/** A 1000 mg/L stock of `analyte` weighed at the planned reading on BAL-SM1 (0.01 mg) and made up to 100 mL. */
async function stock(formula: string, analyte: string, solvent: string): Promise<Stock> {
  const p = await send('chemist', 'post', '/api/preparations', {
    materialId: ids.material[formula],
    analyteFormula: analyte,
    target: { value: '1000', unit: 'mg/L' },
    flaskId: ids.ware['VF-100-01'],
    balanceId: ids.balance['BAL-SM1'],
    conditions: { source: 'measured', ...CONDITIONS },
  });
  expect(p.status, JSON.stringify(p.body)).toBe(201);
  const reading = new D(p.body.plan.targetReading.value).toFixed(2);
  const w = await send('chemist', 'post', `/api/preparations/${p.body.identifier}/weighings`, { mode: 'direct', reading, unit: 'mg', conditions: CONDITIONS });
  expect(w.status, JSON.stringify(w.body)).toBe(201);
  const s = ids.solvent[solvent]!;
  const m = await send('chemist', 'post', `/api/preparations/${p.body.identifier}/make-up`, { flaskIdentifier: (await freeFlask(t.app, cookie.chemist!)).identifier, solventId: s.id, solventLot: s.lot, solutionTemperatureC: '20.0', applyTemperatureCorrection: false });
  expect(m.status, JSON.stringify(m.body)).toBe(201);
  return m.body as Stock;
}

/** Verified through the real signature flow: chemist signs "prepared", chemist2 "verified". */
async function verified(s: Stock): Promise<Stock> {
  expect((await signAs('chemist', s.identifier, 'prepared')).status).toBe(201);
  const v = await signAs('chemist2', s.identifier, 'verified');
  expect(v.status, JSON.stringify(v.body)).toBe(201);
  expect(v.body.status).toBe('verified');
  return v.body as Stock;
}

let pb: Stock;
let cd: Stock;
const mixBody = (over: Record<string, unknown> = {}) => ({
  components: [
    { parentKey: pb.identifier, pipetteId: ids.ware['BP-1-01'] },
    { parentKey: cd.identifier, pipetteId: ids.ware['BP-2-01'] },
  ],
  flaskId: ids.ware['VF-100-02'],
  ...over,
});

/** Independent recomputation with the dilution core (METROLOGY §5.5; class A tolerances triangular a/√6, QUAM A1 / §4.4). */
const core = (parent: Stock, aliquotMl: string, pipetteTol: string) =>
  volumetricDilution({
    parent: { value: parent.result.concentration.value, unit: 'mg/L', standardUncertainty: parent.result.concentration.standardUncertainty },
    aliquot: { volumeMl: aliquotMl, standardUncertainty: triangular(pipetteTol) },
    final: { volumeMl: '100', standardUncertainty: triangular('0.10') },
  });

beforeAll(async () => {
  t = await makeTestApp();
  for (const who of ['chemist', 'chemist2', 'technician', 'qa', 'admin'] as const) cookie[who] = await sessionCookie(t.app, DEMO[who]);
  const get = async (p: string) => (await send('chemist', 'get', p)).body.items as any[];
  for (const m of await get('/api/materials')) ids.material[m.formula] = m.id;
  for (const b of await get('/api/balances')) ids.balance[b.identifier] = b.id;
  for (const w of await get('/api/volumetric-ware?pageSize=100')) ids.ware[w.identifier] = w.id;
  for (const s of await get('/api/solvents')) ids.solvent[s.name] = { id: s.id, lot: s.lot };
  pb = await verified(await stock('Pb(NO3)2', 'Pb', 'Ultrapure water'));
  cd = await verified(await stock('Cd', 'Cd', 'Nitric acid 2 % (v/v)'));
}, 120_000);
afterAll(() => t.close());

describe('POST /api/mixes', () => {
  it('two verified stocks into one flask: one record, one parent link per component, each analyte with its own planned concentration and budget', async () => {
    const res = await send('chemist', 'post', '/api/mixes', mixBody());
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const m = res.body;
    expect(m.kind).toBe('mix');
    expect(m.status).toBe('planned');
    expect(m.identifier).toMatch(/^HWL-\d{4}-\d{4}$/);
    expect(m.analyteFormula).toBe('Pb+Cd');
    expect(m.volume).toEqual({ value: '100', unit: 'mL' });
    expect(m.mix.plannedFinalMl).toBe('100');
    const [cPb, cCd] = m.mix.components;
    expect(cPb.parent.identifier).toBe(pb.identifier);
    expect(cPb.parent.snapshot.status).toBe('verified');
    expect(cPb.analyteFormula).toBe('Pb');
    expect(cPb.plannedAliquot).toMatchObject({ volumeMl: '1', pipette: { identifier: 'BP-1-01' } });
    expect(cCd.parent.identifier).toBe(cd.identifier);
    expect(cCd.plannedAliquot).toMatchObject({ volumeMl: '2', pipette: { identifier: 'BP-2-01' } });
    expect(cPb.linkId).not.toBe(cCd.linkId);

    // against the core computed here [METROLOGY §5.5: c_i = c_parent,i·V_aliquot,i/V_flask]
    const ePb = core(pb, '1', '0.008'); // ISO 648 class A 1 mL bulb pipette ±0.008 mL (from memory, METROLOGY §4.4)
    const eCd = core(cd, '2', '0.010'); // ISO 648 class A 2 mL ±0.010 mL; flask ISO 1042 class A 100 mL ±0.10 mL
    expectClose(cPb.planned.value, ePb.value, '1e-15');
    expectClose(cPb.planned.standardUncertainty, ePb.standardUncertainty, '1e-15');
    expectClose(cCd.planned.value, eCd.value, '1e-15');
    expectClose(cCd.planned.standardUncertainty, eCd.standardUncertainty, '1e-15');
    expect(cPb.planned.budget.map((b: { input: string }) => b.input)).toEqual(['parent', 'aliquot', 'final']);

    // against hand-worked numbers: c_Pb = c_Pb,stock/100, c_Cd = 2·c_Cd,stock/100; the glassware part of u_r²
    // (triangular u = a/√6, QUAM A1): Pb (0.008)²/6/1² + (0.10)²/6/100² = 1.066 667e-5 + 1.666 67e-7 = 1.083 333e-5;
    // Cd (0.010)²/6/2² + 1.666 67e-7 = 4.166 667e-6 + 1.666 67e-7 = 4.333 333e-6 [worked by hand]
    expectClose(cPb.planned.value, new D(pb.result.concentration.value).div(100), '1e-15');
    expectClose(cCd.planned.value, new D(cd.result.concentration.value).mul(2).div(100), '1e-15');
    const urParent = (s: Stock) => new D(s.result.concentration.standardUncertainty).div(s.result.concentration.value).pow(2);
    expectClose(new D(cPb.planned.relative).pow(2).minus(urParent(pb)), '1.0833333e-5', '1e-12');
    expectClose(new D(cCd.planned.relative).pow(2).minus(urParent(cd)), '4.3333333e-6', '1e-12');

    // the parents' detail lists the mix as made from them; QA's trace labels it a mix
    for (const s of [pb, cd]) {
      const p = await send('qa', 'get', `/api/preparations/${s.identifier}`);
      expect(p.body.children).toContainEqual(expect.objectContaining({ identifier: m.identifier, kind: 'mix' }));
    }
    // the plan is audited with every component
    const audit = await AuditEntry.findOne({ where: { entity: 'preparation', entityId: m.id, action: 'plan' } });
    expect(JSON.stringify(audit?.changes)).toContain(pb.identifier);
    expect(JSON.stringify(audit?.changes)).toContain(cd.identifier);
    // the hazard cautions cover both materials (GHS statements united: Cd metal H350, lead nitrate H360Df)
    expect(m.hazards.statements).toEqual(expect.arrayContaining(['H350']));
    expect(m.hazards.statements.some((h: string) => h.startsWith('H360'))).toBe(true);
  });

  it('expiry is the earliest of the stability rule and every parent, and the reason names the limiting parent [EX-01]', async () => {
    const soon = addDays(today(), 5);
    await setExpiry(cd.id, soon);
    try {
      const res = await send('chemist', 'post', '/api/mixes', mixBody());
      expect(res.status, JSON.stringify(res.body)).toBe(201);
      expect(res.body.expiry.expiresOn).toBe(soon);
      expect(res.body.expiry.reason).toContain(cd.identifier);
    } finally {
      await setExpiry(cd.id, cd.expiresOn);
    }
    const res = await send('chemist', 'post', '/api/mixes', mixBody());
    expect(res.body.expiry.expiresOn <= pb.expiresOn && res.body.expiry.expiresOn <= cd.expiresOn).toBe(true);
  });

  it('refuses an unverified parent and an expired parent (422 at the component, attempt audited)', async () => {
    const planned = await stock('Pb(NO3)2', 'Pb', 'Ultrapure water');
    const r1 = await send('chemist', 'post', '/api/mixes', mixBody({ components: [{ parentKey: planned.identifier, pipetteId: ids.ware['BP-1-01'] }, { parentKey: cd.identifier, pipetteId: ids.ware['BP-2-01'] }] }));
    expect(r1.status, JSON.stringify(r1.body)).toBe(422);
    expect(r1.body.error.code).toBe('parent_not_usable');
    expect(r1.body.error.fields['components.0.parentKey']).toMatch(/not verified/);
    expect(await AuditEntry.count({ where: { action: 'parent_refused', entityId: planned.id } })).toBeGreaterThan(0);

    await setExpiry(cd.id, addDays(today(), -1));
    try {
      const r2 = await send('chemist', 'post', '/api/mixes', mixBody());
      expect(r2.status, JSON.stringify(r2.body)).toBe(422);
      expect(r2.body.error.fields['components.1.parentKey']).toMatch(/expired/);
    } finally {
      await setExpiry(cd.id, cd.expiresOn);
    }
  });

  it('refuses a repeated analyte, aliquots that do not fit the flask, an unknown pipette and a single component (400 at the field)', async () => {
    const twice = await send('chemist', 'post', '/api/mixes', mixBody({ components: [{ parentKey: pb.identifier, pipetteId: ids.ware['BP-1-01'] }, { parentKey: pb.identifier, pipetteId: ids.ware['BP-2-01'] }] }));
    expect(twice.status, JSON.stringify(twice.body)).toBe(400);
    expect(twice.body.error.fields['components.1.parentKey']).toMatch(/Pb.*once/);

    // 50 mL + 50 mL into a 100 mL flask leaves no room for the solvent
    const full = await send('chemist', 'post', '/api/mixes', mixBody({ components: [{ parentKey: pb.identifier, pipetteId: ids.ware['BP-50-01'] }, { parentKey: cd.identifier, pipetteId: ids.ware['BP-50-01'] }], flaskId: ids.ware['VF-100-02'] }));
    expect(full.status, JSON.stringify(full.body)).toBe(400);
    expect(full.body.error.fields.flaskId).toMatch(/100 mL/);

    const unknown = await send('chemist', 'post', '/api/mixes', mixBody({ components: [{ parentKey: pb.identifier, pipetteId: ids.ware['BP-1-01'] }, { parentKey: cd.identifier, pipetteId: 99999 }] }));
    expect(unknown.status, JSON.stringify(unknown.body)).toBe(400);
    expect(unknown.body.error.fields['components.1.pipetteId']).toMatch(/No volumetric ware/);

    const notPipette = await send('chemist', 'post', '/api/mixes', mixBody({ components: [{ parentKey: pb.identifier, pipetteId: ids.ware['BP-1-01'] }, { parentKey: cd.identifier, pipetteId: ids.ware['VF-10-01'] }] }));
    expect(notPipette.status).toBe(400);
    expect(notPipette.body.error.fields['components.1.pipetteId']).toMatch(/choose a bulb or piston pipette/);

    const one = await send('chemist', 'post', '/api/mixes', mixBody({ components: [{ parentKey: pb.identifier, pipetteId: ids.ware['BP-1-01'] }] }));
    expect(one.status).toBe(400);
    expect(one.body.error.fields.components).toMatch(/at least two/);

    const noParent = await send('chemist', 'post', '/api/mixes', mixBody({ components: [{ parentKey: pb.identifier, pipetteId: ids.ware['BP-1-01'] }, { parentKey: 'HWL-2026-9999', pipetteId: ids.ware['BP-2-01'] }] }));
    expect(noParent.status).toBe(400);
    expect(noParent.body.error.fields['components.1.parentKey']).toMatch(/No preparation/);
  });
});

describe('a mix at the bench, signed and verified', () => {
  it('one aliquot per component (append-only, corrections with a reason), the make-up, each analyte recomputed; prepared and verified; traced from both lots', async () => {
    const m = (await send('chemist', 'post', '/api/mixes', mixBody())).body;
    const [cPb, cCd] = m.mix.components;
    expect(m.canSign.prepare).toBe(false);

    // the aliquot needs its component
    const noComponent = await send('technician', 'post', `/api/preparations/${m.identifier}/aliquots`, { pipetteIdentifier: 'BP-1-01' });
    expect(noComponent.status).toBe(400);
    expect(noComponent.body.error.fields.componentId).toMatch(/Choose the component/);
    const foreign = await send('technician', 'post', `/api/preparations/${m.identifier}/aliquots`, { pipetteIdentifier: 'BP-1-01', componentId: 999999 });
    expect(foreign.status).toBe(400);
    expect(foreign.body.error.fields.componentId).toMatch(/not part of/);
    const wrongPipette = await send('technician', 'post', `/api/preparations/${m.identifier}/aliquots`, { pipetteIdentifier: 'BP-2-01', componentId: cPb.linkId });
    expect(wrongPipette.status).toBe(400);
    expect(wrongPipette.body.error.fields.pipetteIdentifier).toMatch(/BP-1-01/);

    const a1 = await send('technician', 'post', `/api/preparations/${m.identifier}/aliquots`, { pipetteIdentifier: 'BP-1-01', componentId: cPb.linkId });
    expect(a1.status, JSON.stringify(a1.body)).toBe(201);
    const first = a1.body.mix.components[0].aliquots[0];
    expect(first.volumeMl).toBe('1');
    expect(a1.body.mix.components[1].aliquots).toEqual([]);
    expect((await send('chemist', 'get', `/api/preparations/${m.identifier}`)).body.canSign.reasons.prepare).toMatch(/every component.*Cd/);
    const again = await send('technician', 'post', `/api/preparations/${m.identifier}/aliquots`, { pipetteIdentifier: 'BP-1-01', componentId: cPb.linkId });
    expect(again.status).toBe(409);
    const noReason = await send('technician', 'post', `/api/preparations/${m.identifier}/aliquots`, { pipetteIdentifier: 'BP-1-01', componentId: cPb.linkId, supersedesId: first.id });
    expect(noReason.status).toBe(400);
    expect(noReason.body.error.fields.correctionReason).toBeTruthy();
    const otherComponent = await send('technician', 'post', `/api/preparations/${m.identifier}/aliquots`, { pipetteIdentifier: 'BP-2-01', componentId: cCd.linkId, supersedesId: first.id, correctionReason: 'wrong row' });
    expect(otherComponent.status).toBe(400);
    expect(otherComponent.body.error.fields.supersedesId).toMatch(/does not belong/);
    const corrected = await send('technician', 'post', `/api/preparations/${m.identifier}/aliquots`, { pipetteIdentifier: 'BP-1-01', componentId: cPb.linkId, supersedesId: first.id, correctionReason: 'Drained into the wrong flask; pipetted again into the mix flask' });
    expect(corrected.status, JSON.stringify(corrected.body)).toBe(201);
    const pbAliquots = corrected.body.mix.components[0].aliquots;
    expect(pbAliquots).toHaveLength(2);
    expect(pbAliquots[0].supersededById).toBe(pbAliquots[1].id);
    expect(pbAliquots[1]).toMatchObject({ supersedesId: first.id, correctionReason: expect.stringMatching(/wrong flask/) });

    const a2 = await send('technician', 'post', `/api/preparations/${m.identifier}/aliquots`, { pipetteIdentifier: 'BP-2-01', componentId: cCd.linkId });
    expect(a2.status, JSON.stringify(a2.body)).toBe(201);
    expect(a2.body.mix.components.every((c: { result?: unknown }) => !c.result)).toBe(true); // not made up yet
    const weigh = await send('technician', 'post', `/api/preparations/${m.identifier}/weighings`, { mode: 'direct', reading: '100.00', unit: 'mg', conditions: CONDITIONS });
    expect(weigh.status).toBe(409);

    const nitric = ids.solvent['Nitric acid 2 % (v/v)']!;
    const mu = await send('technician', 'post', `/api/preparations/${m.identifier}/make-up`, { flaskIdentifier: (await freeFlask(t.app, cookie.chemist!)).identifier, solventId: nitric.id, solventLot: nitric.lot, solutionTemperatureC: '20.0', applyTemperatureCorrection: false });
    expect(mu.status, JSON.stringify(mu.body)).toBe(201);
    const [rPb, rCd] = mu.body.mix.components.map((c: { result: any }) => c.result);
    expect(rPb.basedOn).toEqual({ aliquotId: pbAliquots[1].id, makeUpId: mu.body.makeUp.id });
    // recomputed from the delivered aliquot and the make-up flask [METROLOGY §5.5], same as the core here
    expectClose(rPb.value, core(pb, '1', '0.008').value, '1e-15');
    expectClose(rPb.standardUncertainty, core(pb, '1', '0.008').standardUncertainty, '1e-15');
    expectClose(rCd.value, core(cd, '2', '0.010').value, '1e-15');
    expectClose(rCd.standardUncertainty, core(cd, '2', '0.010').standardUncertainty, '1e-15');
    // every analyte in the concentration the list and labels read
    const display = mu.body.concentrationDisplay as string;
    expect(display).toMatch(/^Pb \S+ ± \S+ mg\/L; Cd \S+ ± \S+ mg\/L \(k = 2\)$/);
    expect(display).toContain(rPb.display.replace(' (k = 2)', ''));
    const list = await send('qa', 'get', `/api/preparations?search=${m.identifier}`);
    expect(list.body.items[0].concentrationDisplay).toBe(display);

    // the hashed record carries every component's aliquots and results
    const content = JSON.parse((await currentRecordHash(m.id)).canonical);
    expect(content.aliquots).toHaveLength(3);
    expect(content.aliquots.map((a: { componentId: number }) => a.componentId)).toEqual([cPb.linkId, cPb.linkId, cCd.linkId]);
    expect(content.mixResults.map((r: { linkId: number; value: string }) => [r.linkId, r.value])).toEqual([
      [cPb.linkId, rPb.value],
      [cCd.linkId, rCd.value],
    ]);
    expect(content.weighings).toEqual([]);

    // signed prepared by the chemist; the planner cannot verify; a second chemist does
    const prepared = await signAs('chemist', m.identifier, 'prepared');
    expect(prepared.status, JSON.stringify(prepared.body)).toBe(201);
    expect(prepared.body.status).toBe('prepared');
    const self = await signAs('chemist', m.identifier, 'verified');
    expect(self.status).toBe(403);
    expect(self.body.error.code).toBe('self_verification');
    const v = await signAs('chemist2', m.identifier, 'verified');
    expect(v.status, JSON.stringify(v.body)).toBe(201);
    expect(v.body.status).toBe('verified');
    expect(v.body.signatures.every((s: { valid: boolean }) => s.valid)).toBe(true);
    // the stored results did not move with signing
    expect(v.body.mix.components[0].result.value).toBe(rPb.value);
    // an aliquot after signing is refused
    const late = await send('technician', 'post', `/api/preparations/${m.identifier}/aliquots`, { pipetteIdentifier: 'BP-2-01', componentId: cCd.linkId, supersedesId: a2.body.mix.components[1].aliquots[0].id, correctionReason: 'after signing' });
    expect(late.status).toBe(409);

    // labels print every analyte (the label content as stored with a print)
    const label = await labelSnapshotOf(v.body, 'Europe/London');
    expect(label.concentration).toBe(display);
    expect(label.concentrationShort).toMatch(/^Pb \S+ mg\/L; Cd \S+ mg\/L$/);
    // the prep sheet lists every analyte: its parent, its aliquot, its calculation and budget
    const sheet = await send('chemist', 'get', `/api/preparations/${m.identifier}/prep-sheet.pdf`)
      .buffer(true)
      .parse((r, cb) => {
        const chunks: Buffer[] = [];
        r.on('data', (c: Buffer) => chunks.push(c));
        r.on('end', () => cb(null, Buffer.concat(chunks)));
      });
    expect(sheet.status).toBe(200);
    const parser = new PDFParse({ data: new Uint8Array(sheet.body as Buffer) });
    const pdf = (await parser.getText()).text.replace(/\s+/g, ' ');
    await parser.destroy();
    for (const text of [`Pb (from ${pb.identifier})`, `Cd (from ${cd.identifier})`, 'Cd: planned aliquot Vp', 'Aliquots, one per analyte', rPb.display, rCd.display, 'Drained into the wrong flask', 'Purity per parent']) expect(pdf).toContain(text);

    // a verified mix is not a parent (a dilution takes one analyte): a clear 422
    const asParent = await send('chemist', 'post', `/api/preparations/${m.identifier}/dilutions`, { method: 'volumetric', target: { value: '0.1', unit: 'mg/L' }, pipetteId: ids.ware['BP-1-01'], flaskId: ids.ware['VF-100-02'] });
    expect(asParent.status).toBe(422);
    expect(asParent.body.error.fields.parent).toMatch(/mix/);

    // trace: forward from each parent's material lot reaches the mix; backward from the mix reaches both lots (TR-04)
    for (const lot of ['NRM-23-0072', pb.identifier]) {
      const fwd = await send('qa', 'get', `/api/trace/${lot}`);
      expect(fwd.status, JSON.stringify(fwd.body)).toBe(200);
      expect(fwd.body.forwardPreparations).toContain(m.identifier);
    }
    const pbLot = (await send('qa', 'get', `/api/preparations/${pb.identifier}`)).body.snapshot.material.lot;
    expect((await send('qa', 'get', `/api/trace/${pbLot}`)).body.forwardPreparations).toContain(m.identifier);
    const back = await send('qa', 'get', `/api/trace/${m.identifier}`);
    const lots = back.body.backward.nodes.filter((n: { type: string }) => n.type === 'material_lot').map((n: { detail: { identifier: string } }) => n.detail.identifier);
    expect(lots).toEqual(expect.arrayContaining(['NRM-23-0072', pbLot]));
  });

  it('whoever recorded a component aliquot cannot verify that version', async () => {
    const m = (await send('chemist', 'post', '/api/mixes', mixBody())).body;
    const [cPb, cCd] = m.mix.components;
    expect((await send('technician', 'post', `/api/preparations/${m.identifier}/aliquots`, { pipetteIdentifier: 'BP-1-01', componentId: cPb.linkId })).status).toBe(201);
    expect((await send('chemist2', 'post', `/api/preparations/${m.identifier}/aliquots`, { pipetteIdentifier: 'BP-2-01', componentId: cCd.linkId })).status).toBe(201);
    const water = ids.solvent['Ultrapure water']!;
    expect((await send('technician', 'post', `/api/preparations/${m.identifier}/make-up`, { flaskIdentifier: (await freeFlask(t.app, cookie.chemist!)).identifier, solventId: water.id, solventLot: water.lot, solutionTemperatureC: '20.0', applyTemperatureCorrection: false })).status).toBe(201);
    expect((await signAs('chemist', m.identifier, 'prepared')).status).toBe(201);
    const byRecorder = await signAs('chemist2', m.identifier, 'verified');
    expect(byRecorder.status).toBe(403);
    expect(byRecorder.body.error.message).toMatch(/aliquot/);
  });
});

describe('route × role (REQUIREMENTS AC-02)', () => {
  it('POST /api/mixes: chemist 201; technician, qa and admin 403; signed out 401', async () => {
    for (const [who, want] of [['signedOut', 401], ['technician', 403], ['qa', 403], ['admin', 403], ['chemist', 201]] as const) {
      const res = await send(who, 'post', '/api/mixes', mixBody());
      expect(res.status, `${who} ${JSON.stringify(res.body)}`).toBe(want);
    }
  });
});
