// Issue 12: a preparation's budget may use the calibrated volume of its ware (lab setting useCalibratedVolumes).
// With the setting on, a flask or pipette whose latest verified volume check passed, is in date and tested the
// volume used gives V = the check's mean at 20 °C and u(V) = U/k (JCGM 100 §4.3.3: a stated expanded uncertainty
// divided by its coverage factor) instead of the nominal volume and the class tolerance; the record's snapshot of the
// ware freezes the check, the budget row names it, the prep sheet and the trace show it. Records already written
// (and records made with the setting off) keep their budgets, calc versions and hashes.
// Fixture checks below are stored rows with round numbers so the expected values can be worked by hand; the
// pipette's check is the demo lab's BP-10-01 check, made through the real services (seed/demo-volume-checks.ts).
import { PDFParse } from 'pdf-parse';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEntry, Balance, Preparation, User, VolumeCheck, VolumetricWare } from '../../server/db/models/index.ts';
import { calibratedVolumeOf } from '../../server/services/calibrated-volume.ts';
import { verifySignatures } from '../../server/services/signatures.service.ts';
import { D } from '../../shared/calc/decimal.ts';
import { rectangular, triangular } from '../../shared/calc/index.ts';
import { expectClose } from '../helpers/decimal.ts';
import { DEMO, DEMO_PASSWORD, makeTestApp, sessionCookie, type TestApp } from './helpers/test-app.ts';
import { emptyFlask } from './helpers/free-flask.ts';

type Who = 'chemist' | 'chemist2' | 'technician' | 'admin' | 'qa';
let t: TestApp;
const cookie: Partial<Record<Who, string>> = {};
const send = (who: Who, method: 'get' | 'post' | 'put', path: string, body?: unknown) => {
  const r = request(t.app)[method](path).set('Cookie', cookie[who]!);
  return body === undefined ? r : r.send(body as object);
};
const ware: Record<string, number> = {};
const ids: { material: Record<string, number>; balance: Record<string, number> } = { material: {}, balance: {} };
let water: { id: number; lot: string; beta: string };
let pb: Preparation;

const PB_CONDITIONS = { source: 'measured', temperatureC: '21', pressureHPa: '985', relativeHumidityPct: '45' } as const;
const planBody = (flask: string) => ({ materialId: ids.material['Pb(NO3)2'], analyteFormula: 'Pb', target: { value: '1000', unit: 'mg/L' }, flaskId: ware[flask], balanceId: ids.balance['BAL-SM1'], conditions: PB_CONDITIONS });
const weighingBody = { mode: 'direct', reading: '160.07', unit: 'mg', conditions: { temperatureC: '21', pressureHPa: '985', relativeHumidityPct: '45' } };
const makeUpBody = (flask: string) => ({ flaskIdentifier: flask, solventId: water.id, solventLot: water.lot, solutionTemperatureC: '20.0', applyTemperatureCorrection: false });

/** A verified check of a ware item as the volume-check service stores it (only the fields the budget reads differ from a real one). */
async function storedCheck(identifier: string, wareIdentifier: string, r: { testedMl: string; mean: string; U: string; k: string; s: string; verdict: 'pass' | 'fail'; nextDueOn: string }): Promise<VolumeCheck> {
  const w = (await VolumetricWare.findOne({ where: { identifier: wareIdentifier } }))!;
  const b = (await Balance.findOne({ where: { identifier: 'BAL-A1' } }))!;
  const u = (await User.findOne({ where: { email: DEMO.technician } }))!;
  const at = new Date().toISOString();
  return VolumeCheck.create({
    identifier,
    wareId: w.id,
    wareSnapshot: w.toJSON() as Record<string, unknown>,
    balanceId: b.id,
    balanceSnapshot: b.toJSON() as Record<string, unknown>,
    plan: { kind: w.kind, class: 'A', material: 'borosilicate_3_3', mode: 'content', nominal: { value: w.nominalVolumeMl, unit: 'mL' }, tested: [{ value: r.testedMl, unit: 'mL', replicates: 10 }], intervalMonths: 12 } as never,
    gates: [],
    conditions: { waterTemperatureC: '20.0', waterAirSaturated: false, air: { temperatureC: '20.0', pressureHPa: '1013', relativeHumidityPct: '50' } } as never,
    result: {
      verdict: r.verdict,
      tested: [
        {
          testedVolume: { value: r.testedMl, unit: 'mL' },
          mean: { value: r.mean, unit: 'mL' },
          randomError: { standardDeviation: { value: r.s, unit: 'mL' }, cvPercent: '0' },
          uncertainty: { standardUncertainty: new D(r.U).div(r.k).toFixed(), expandedUncertainty: r.U, k: r.k, unit: 'mL', budget: [] },
          verdict: { result: r.verdict },
        },
      ],
    },
    calcVersion: 'volume-check/1',
    status: 'verified',
    version: 1,
    notes: null,
    nextDueOn: r.nextDueOn,
    createdBy: u.id,
    createdByName: u.fullName,
    createdAt: at,
    updatedAt: at,
  } as never);
}

async function pdfText(buf: Buffer): Promise<string> {
  const parser = new PDFParse({ data: new Uint8Array(buf) });
  try {
    return (await parser.getText()).pages.map((p) => p.text).join(' ').replace(/\s+/g, ' ');
  } finally {
    await parser.destroy();
  }
}
async function prepSheet(key: string): Promise<string> {
  const res = await send('chemist', 'get', `/api/preparations/${key}/prep-sheet.pdf`).buffer(true).parse((r, cb) => {
    const chunks: Buffer[] = [];
    r.on('data', (c: Buffer) => chunks.push(c));
    r.on('end', () => cb(null, Buffer.concat(chunks)));
  });
  expect(res.status).toBe(200);
  return pdfText(res.body as Buffer);
}

async function madeUpStock(flask: string): Promise<any> {
  const p = await send('chemist', 'post', '/api/preparations', planBody(flask));
  expect(p.status, JSON.stringify(p.body)).toBe(201);
  expect((await send('chemist', 'post', `/api/preparations/${p.body.id}/weighings`, weighingBody)).status).toBe(201);
  await emptyFlask(t.app, cookie.qa!, flask, DEMO_PASSWORD); // one flask, one open solution: the test reuses the checked flask
  const m = await send('chemist', 'post', `/api/preparations/${p.body.id}/make-up`, makeUpBody(flask));
  expect(m.status, JSON.stringify(m.body)).toBe(201);
  return m.body;
}

const row = (budget: Array<{ input: string }>, input: string) => budget.find((b) => b.input === input) as { input: string; label: string; value: string; standardUncertainty: string; contribution: string };

const FUTURE = '2099-12-31';

beforeAll(async () => {
  t = await makeTestApp();
  for (const who of ['chemist', 'chemist2', 'technician', 'admin', 'qa'] as const) cookie[who] = await sessionCookie(t.app, DEMO[who]);
  // the checked flask is the test's own: the demo flasks hold the demo's open solutions (one flask, one open solution)
  const reg = await send('chemist', 'post', '/api/volumetric-ware', { identifier: 'VF-100-T91', kind: 'volumetric_flask', nominalVolumeMl: '100', class: 'A', toleranceMl: '0.10', material: 'borosilicate 3.3', status: 'in_service' });
  expect(reg.status, JSON.stringify(reg.body)).toBe(201);
  for (const w of await VolumetricWare.findAll()) ware[w.identifier] = w.id;
  for (const m of (await send('chemist', 'get', '/api/materials')).body.items) ids.material[m.formula] = m.id;
  for (const b of await Balance.findAll()) ids.balance[b.identifier] = b.id;
  const s = (await send('chemist', 'get', '/api/solvents')).body.items.find((x: { name: string }) => x.name === 'Ultrapure water');
  water = { id: s.id, lot: s.lot, beta: s.expansionCoefficientPerK };
  pb = (await Preparation.findOne({ where: { analyteFormula: 'Pb', status: 'verified' } }))!; // the demo's verified Pb stock
  // VF-100-T91: content 100.030 mL at 20 °C, U = 0.020 mL (k = 2), s = 0.012 mL; VF-100-02: 99.980 mL, U = 0.030 mL, s = 0.015 mL
  await storedCheck('VC-2026-0901', 'VF-100-T91', { testedMl: '100', mean: '100.030', U: '0.020', k: '2', s: '0.012', verdict: 'pass', nextDueOn: FUTURE });
  await storedCheck('VC-2026-0902', 'VF-100-02', { testedMl: '100', mean: '99.980', U: '0.030', k: '2', s: '0.015', verdict: 'pass', nextDueOn: FUTURE });
}, 90_000);
afterAll(() => t.close());

let nominal: any; // a stock made with the setting off
let calibrated: any; // the same stock with the setting on

describe('calibrated volumes in budgets (lab setting useCalibratedVolumes)', () => {
  it('with the setting off (the default), a flask with a passed check is used at its nominal volume and tolerance, as before', async () => {
    expect((await send('chemist', 'get', '/api/settings')).body.useCalibratedVolumes).toBeUndefined();
    nominal = await madeUpStock('VF-100-T91');
    expect(nominal.snapshot.flask.calibratedVolume).toBeUndefined();
    expect(nominal.makeUp.flask.snapshot.calibratedVolume).toBeUndefined();
    expect(nominal.result.calcVersion).toBe('tarebook-calc/1');
    expect(nominal.result.volume).toEqual({ value: '100', unit: 'mL' });
    const v = row(nominal.result.budget, 'volume');
    expect(v.label).toBe('Volume (tolerance ±0.10 mL of VF-100-T91, triangular)');
    expectClose(v.standardUncertainty, triangular('0.10'), '1e-15'); // QUAM A1: a/√6
  });

  it('only an admin turns it on; the change is audited with the old and new value', async () => {
    expect((await send('chemist', 'put', '/api/settings', { useCalibratedVolumes: true })).status).toBe(403);
    const bad = await send('admin', 'put', '/api/settings', { useCalibratedVolumes: 'yes' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields.useCalibratedVolumes).toBe('Choose on or off');
    const res = await send('admin', 'put', '/api/settings', { useCalibratedVolumes: true });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.useCalibratedVolumes).toBe(true);
    const audit = await AuditEntry.findOne({ where: { action: 'setting_change', entityId: 'useCalibratedVolumes' }, order: [['id', 'DESC']] });
    expect(audit).not.toBeNull();
    const changes = typeof audit!.changes === 'string' ? JSON.parse(audit!.changes) : audit!.changes;
    expect(changes).toEqual([{ field: 'useCalibratedVolumes', oldValue: null, newValue: true }]);
  });

  it('a stock made up in VF-100-T91 then uses V = 100.030 mL and u(V) = 0.020/2 = 0.010 mL from VC-2026-0901; c and u_c change as worked by hand', async () => {
    calibrated = await madeUpStock('VF-100-T91');
    expect(calibrated.snapshot.flask.calibratedVolume).toMatchObject({ checkIdentifier: 'VC-2026-0901', volumeMl: '100', meanMl: '100.03', expandedUncertaintyMl: '0.02', k: '2', standardUncertaintyMl: '0.01', nextDueOn: FUTURE });
    expect(calibrated.makeUp.flask.snapshot.calibratedVolume.checkIdentifier).toBe('VC-2026-0901');
    const r = calibrated.result;
    expect(r.calcVersion).toMatch(/^tarebook-calc\/2/);
    expect(r.volume).toEqual({ value: '100.03', unit: 'mL' });
    const v = row(r.budget, 'volume');
    expect(v.label).toBe('Flask volume, calibrated (VC-2026-0901): mean 100.030 mL at 20 °C, u = U/k = 0.020 mL/2');
    expect(v.value).toBe('100.03');
    expect(v.standardUncertainty).toBe('0.01');
    // hand-worked: same reading, air and material, so c ∝ 1/V: c_cal = c_nom × 100/100.030
    const ratio = new D(100).div('100.030');
    const cNom = new D(nominal.result.concentration.value);
    const cCal = cNom.mul(ratio);
    expectClose(r.concentration.value, cCal, cCal.mul('1e-12'));
    // every other budget row is relative to c (reading, purity, buoyancy, temperature ±4 °C): it scales by the same ratio;
    // the volume row changes from c·(0.10/√6)/100 to c_cal·0.010/100.030 [GUM eq. 10, sensitivity ∂c/∂V = −c/V]
    const uNom = new D(nominal.result.concentration.standardUncertainty);
    const volNom = cNom.mul(triangular('0.10')).div(100);
    const volCal = cCal.mul('0.010').div('100.030');
    const uCal = uNom.pow(2).minus(volNom.pow(2)).mul(ratio.pow(2)).plus(volCal.pow(2)).sqrt();
    expectClose(v.contribution, volCal, volCal.mul('1e-6'));
    expectClose(r.concentration.standardUncertainty, uCal, uCal.mul('1e-6'));
    expect(new D(r.concentration.standardUncertainty).lt(uNom)).toBe(true); // 0.010 mL < 0.041 mL
    // the plan's expected budget names the check too
    const stored = (await Preparation.findByPk(calibrated.id))!.plan as unknown as { calcVersion: string; calc: { planned: { budget: Array<{ input: string }> } } };
    expect(stored.calcVersion).toMatch(/^tarebook-calc\/2/);
    expect(row(stored.calc.planned.budget, 'volume').label).toMatch(/^Flask volume, calibrated \(VC-2026-0901\)/);
  });

  it('a dilution uses the calibrated volumes of its pipette (the demo BP-10-01 check) and flask (VC-2026-0902): c2 and u_r as worked by hand', async () => {
    const bpCheck = (await send('qa', 'get', `/api/volumetric-ware/${ware['BP-10-01']}/calibration`)).body;
    const check = (await send('qa', 'get', `/api/volume-checks/${bpCheck.check.identifier}`)).body.result.tested[0];
    const d = await send('chemist', 'post', `/api/preparations/${pb.identifier}/dilutions`, { method: 'volumetric', target: { value: '100', unit: 'mg/L' }, pipetteId: ware['BP-10-01'], flaskId: ware['VF-100-02'] });
    expect(d.status, JSON.stringify(d.body)).toBe(201);
    expect(d.body.dilution.plannedAliquot.pipette.snapshot.calibratedVolume.checkIdentifier).toBe(bpCheck.check.identifier);
    expect(d.body.snapshot.flask.calibratedVolume.checkIdentifier).toBe('VC-2026-0902');
    expect((await send('technician', 'post', `/api/preparations/${d.body.identifier}/aliquots`, { pipetteIdentifier: 'BP-10-01' })).status).toBe(201);
    const m = await send('technician', 'post', `/api/preparations/${d.body.identifier}/make-up`, makeUpBody('VF-100-02'));
    expect(m.status, JSON.stringify(m.body)).toBe(201);
    const r = m.body.dilution.result;
    expect(r.calcVersion).toMatch(/^dilution-3/);
    expect(r.budget.map((b: { input: string }) => b.input)).toEqual(['parent', 'aliquot', 'final', 'aliquotRepeatability', 'finalRepeatability', 'temperature']);
    const a = row(r.budget, 'aliquot');
    const f = row(r.budget, 'final');
    expect(a.label).toMatch(new RegExp(`^Aliquot volume, calibrated \\(${bpCheck.check.identifier}\\)`));
    expect(f.label).toMatch(/^Flask volume, calibrated \(VC-2026-0902\): mean 99\.980 mL at 20 °C/);
    expect(row(r.budget, 'finalRepeatability').label).toBe('Flask filling repeatability (s = 0.015 mL of fills to the mark in VC-2026-0902)');
    // hand-worked (METROLOGY §5.5): Vp = the check's mean, u(Vp) = U/k; Vf = 99.980 mL, u(Vf) = 0.030/2 = 0.015 mL
    const vp = new D(check.mean.value);
    const up = new D(check.uncertainty.expandedUncertainty).div(check.uncertainty.k);
    const sp = new D(check.randomError.standardDeviation.value);
    expect(a.value).toBe(vp.toSignificantDigits(20).toFixed());
    expectClose(a.standardUncertainty, up, '1e-18');
    const c1 = pb.result!.concentration;
    const c2 = new D(c1.value).mul(vp).div('99.980');
    expectClose(r.value, c2, c2.mul('1e-15'));
    // u_r² = u_r(c1)² + (u(Vp)/Vp)² + (u(Vf)/Vf)² + (s_p/Vp)² + (s_f/Vf)² + (β·4/√3)², β of the make-up water (seed)
    const ur2 = new D(c1.standardUncertainty).div(c1.value).pow(2)
      .plus(up.div(vp).pow(2))
      .plus(new D('0.015').div('99.980').pow(2))
      .plus(sp.div(vp).pow(2))
      .plus(new D('0.015').div('99.980').pow(2))
      .plus(new D(water.beta).mul(rectangular('4')).pow(2));
    expectClose(r.relative, ur2.sqrt(), ur2.sqrt().mul('1e-6'));
    const sheet = await prepSheet(d.body.identifier);
    expect(sheet).toContain('Flask volume, calibrated (VC-2026-0902)');
    expect(sheet).toContain(`calibrated, ${bpCheck.check.identifier}`);
    expect(sheet).toMatch(/dilution-3/);
  });

  it('the prep sheet names the check: the inputs, the flask, the calculation step and the budget row', async () => {
    const text = await prepSheet(calibrated.identifier);
    expect(text).toContain('Volume (calibrated)');
    expect(text).toContain('VF-100-T91: calibrated volume 100.030 mL at 20 °C, u = 0.010 mL (U = 0.020 mL, k = 2) from volume check VC-2026-0901');
    expect(text).toContain('Divided by the calibrated volume V = 100.030 mL at 20 °C');
    expect(text).toContain('Flask volume, calibrated (VC-2026-0901)');
    // the nominal record's sheet does not
    expect(await prepSheet(nominal.identifier)).not.toContain('VC-2026-0901');
  });

  it('the trace reaches the check used, as an input of the standard', async () => {
    const res = await send('chemist', 'get', `/api/trace/${calibrated.identifier}`);
    expect(res.status).toBe(200);
    const check = (await VolumeCheck.findOne({ where: { identifier: 'VC-2026-0901' } }))!;
    const edges = res.body.backward.edges as Array<{ from: string; to: string; relation: string }>;
    const input = edges.find((e) => e.from === `volume_check:${check.id}` && /^calibrated volume of the flask/.test(e.relation));
    expect(input, JSON.stringify(edges)).toBeTruthy();
    expect(input!.relation).toBe('calibrated volume of the flask (100.030 mL, u = 0.010 mL)');
  });

  it('a newer check does not change a record already written: the snapshot, result and signature stay; new records take the newer check', async () => {
    const signed = await send('chemist', 'post', `/api/preparations/${calibrated.identifier}/signatures`, { meaning: 'prepared', password: DEMO_PASSWORD, acknowledgeResponsibility: true });
    expect(signed.status, JSON.stringify(signed.body)).toBe(201);
    const before = (await send('chemist', 'get', `/api/preparations/${calibrated.identifier}`)).body;
    await storedCheck('VC-2026-0903', 'VF-100-T91', { testedMl: '100', mean: '100.050', U: '0.040', k: '2', s: '0.020', verdict: 'pass', nextDueOn: FUTURE });
    const after = (await send('chemist', 'get', `/api/preparations/${calibrated.identifier}`)).body;
    expect(after.makeUp.flask.snapshot.calibratedVolume.checkIdentifier).toBe('VC-2026-0901');
    expect(after.result).toEqual(before.result);
    expect((await verifySignatures(calibrated.id)).every((c) => c.ok)).toBe(true);
    const next = await madeUpStock('VF-100-T91');
    expect(next.makeUp.flask.snapshot.calibratedVolume).toMatchObject({ checkIdentifier: 'VC-2026-0903', meanMl: '100.05', standardUncertaintyMl: '0.02' });
  });

  it('an expired check, or one that did not test the volume used, is not used: the class tolerance applies', async () => {
    await storedCheck('VC-2026-0904', 'VF-50-01', { testedMl: '50', mean: '50.010', U: '0.020', k: '2', s: '0.010', verdict: 'pass', nextDueOn: '2020-01-01' });
    const p = await send('chemist', 'post', '/api/preparations', planBody('VF-50-01'));
    expect(p.status, JSON.stringify(p.body)).toBe(201);
    expect(p.body.snapshot.flask.calibratedVolume).toBeUndefined();
    const stored = (await Preparation.findByPk(p.body.id))!.plan as unknown as { calcVersion: string; calc: { planned: { budget: Array<{ input: string }> } } };
    expect(stored.calcVersion).toBe('tarebook-calc/1');
    expect(row(stored.calc.planned.budget, 'volume').label).toBe('Volume (given)');
    // a check at 0.5 mL does not give a calibrated volume at 1 mL (no interpolation between tested volumes)
    await storedCheck('VC-2026-0905', 'BP-1-01', { testedMl: '0.5', mean: '0.5004', U: '0.0010', k: '2', s: '0.0004', verdict: 'pass', nextDueOn: FUTURE });
    expect(await calibratedVolumeOf(ware['BP-1-01']!, '1', '2026-12-01')).toBeNull();
    expect(await calibratedVolumeOf(ware['BP-1-01']!, '0.5', '2026-12-01')).toMatchObject({ checkIdentifier: 'VC-2026-0905', standardUncertaintyMl: '0.0005' });
  });

  it('a failed check is never used, and the failed-ware gate still refuses the flask', async () => {
    const failed = await storedCheck('VC-2026-0906', 'VF-250-01', { testedMl: '250', mean: '249.70', U: '0.05', k: '2', s: '0.02', verdict: 'fail', nextDueOn: FUTURE });
    expect(await calibratedVolumeOf(failed.wareId, '250', '2026-12-01')).toBeNull();
    const p = await send('chemist', 'post', '/api/preparations', planBody('VF-250-01'));
    expect(p.status).toBe(422);
    expect(JSON.stringify(p.body)).toContain('VC-2026-0906');
  });
});
