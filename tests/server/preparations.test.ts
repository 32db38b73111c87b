// Preparations API: plan → weigh → make up → recompute, kept for good.
// Sources of the check values are named beside each check (METROLOGY.md sections, QUAM A1, REQUIREMENTS rows).
import { join } from 'node:path';
import request from 'supertest';
import { freeFlask } from './helpers/free-flask.ts';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../server/app.ts';
import { migrateUp } from '../../server/db/migrate.ts';
import { AuditEntry, Balance, MakeUp, ReferenceMaterial, Weighing } from '../../server/db/models/index.ts';
import { WEIGHINGS_APPEND_ONLY, MAKE_UPS_APPEND_ONLY } from '../../server/db/migrations/0005-preparations.ts';
import { openDatabase } from '../../server/db/sequelize.ts';
import { calculatePreparation, type PreparationRequest } from '../../shared/calc/index.ts';
import { DEMO, expectErrorBody, makeTestApp, sessionCookie, type TestApp } from './helpers/test-app.ts';
import { demoDay, demoInstant } from '../../seed/demo-clock.ts';

type Who = 'signedOut' | 'chemist' | 'chemist2' | 'technician' | 'qa' | 'admin';

let t: TestApp;
const cookie: Partial<Record<Who, string>> = {};
const ids = { material: {} as Record<string, number>, balance: {} as Record<string, number>, ware: {} as Record<string, number>, solvent: {} as Record<string, { id: number; lot: string }> };

const PB_CONDITIONS = { source: 'measured', temperatureC: '21', pressureHPa: '985', relativeHumidityPct: '45' } as const; // METROLOGY §5.4

function planBody(over: Record<string, unknown> = {}) {
  return {
    materialId: ids.material['Pb(NO3)2'],
    analyteFormula: 'Pb',
    target: { value: '1000', unit: 'mg/L' },
    flaskId: ids.ware['VF-100-01'],
    balanceId: ids.balance['BAL-SM1'],
    conditions: PB_CONDITIONS,
    ...over,
  };
}

const send = (who: Who, method: 'get' | 'post', path: string, body?: unknown) => {
  const r = request(t.app)[method](path);
  if (who !== 'signedOut') r.set('Cookie', cookie[who]!);
  return body === undefined ? r : r.send(body as object);
};

async function plan(over: Record<string, unknown> = {}, who: Who = 'chemist') {
  const res = await send(who, 'post', '/api/preparations', planBody(over));
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body as { id: number; identifier: string; [k: string]: any };
}

const weighingBody = (over: Record<string, unknown> = {}) => ({ mode: 'direct', reading: '160.07', unit: 'mg', conditions: { temperatureC: '21', pressureHPa: '985', relativeHumidityPct: '45' }, ...over });
const water = () => ids.solvent['Ultrapure water']!;
/** A make-up in a flask that holds no open solution (VF-100-01 holds the demo Pb stock: one flask, one open solution). */
const makeUpBody = async (over: Record<string, unknown> = {}) => ({
  flaskIdentifier: (await freeFlask(t.app, cookie.chemist!)).identifier,
  solventId: water().id,
  solventLot: water().lot,
  solutionTemperatureC: '20.0',
  applyTemperatureCorrection: false,
  ...over,
});

beforeAll(async () => {
  t = await makeTestApp();
  cookie.chemist = await sessionCookie(t.app, DEMO.chemist);
  cookie.chemist2 = await sessionCookie(t.app, DEMO.chemist2);
  cookie.technician = await sessionCookie(t.app, DEMO.technician);
  cookie.qa = await sessionCookie(t.app, DEMO.qa);
  cookie.admin = await sessionCookie(t.app, DEMO.admin);
  const get = async (p: string) => (await send('chemist', 'get', p)).body.items as any[];
  for (const m of await get('/api/materials')) ids.material[m.formula] = m.id;
  for (const b of await get('/api/balances')) ids.balance[b.identifier] = b.id;
  for (const w of await get('/api/volumetric-ware')) ids.ware[w.identifier] = w.id;
  for (const s of await get('/api/solvents')) ids.solvent[s.name] = { id: s.id, lot: s.lot };
}, 60_000);

afterAll(() => t.close());

describe('routes × roles (REQUIREMENTS AC-02: roles checked on the server)', () => {
  it('when each role previews, then chemist and admin get 200, technician and QA 403, signed out 401', async () => {
    const expected: Record<Who, number> = { signedOut: 401, chemist: 200, chemist2: 200, technician: 403, qa: 403, admin: 200 };
    for (const [who, status] of Object.entries(expected) as [Who, number][]) {
      const res = await send(who, 'post', '/api/preparations/preview', planBody());
      expect(res.status, who).toBe(status);
      if (status !== 200) expectErrorBody(res.body);
    }
  });

  it('when each role plans, then only chemists may (201); technician, QA and admin 403; signed out 401', async () => {
    const expected: Record<Who, number> = { signedOut: 401, chemist: 201, chemist2: 201, technician: 403, qa: 403, admin: 403 };
    for (const [who, status] of Object.entries(expected) as [Who, number][]) {
      const res = await send(who, 'post', '/api/preparations', planBody());
      expect(res.status, who).toBe(status);
      if (status === 201) expect(res.body.status).toBe('planned');
      else expectErrorBody(res.body);
    }
  });

  it('when each role reads the list and a record, then every signed-in role gets 200 and signed out 401', async () => {
    const p = await plan();
    for (const who of ['chemist', 'chemist2', 'technician', 'qa', 'admin'] as Who[]) {
      expect((await send(who, 'get', '/api/preparations')).status, who).toBe(200);
      expect((await send(who, 'get', `/api/preparations/${p.identifier}`)).status, who).toBe(200);
    }
    expect((await send('signedOut', 'get', '/api/preparations')).status).toBe(401);
    expect((await send('signedOut', 'get', `/api/preparations/${p.id}`)).status).toBe(401);
  });

  it('when each role records a weighing and a make-up, then chemist and technician get 201, QA and admin 403, signed out 401', async () => {
    const expected: Record<Who, number> = { signedOut: 401, chemist: 201, chemist2: 201, technician: 201, qa: 403, admin: 403 };
    for (const [who, status] of Object.entries(expected) as [Who, number][]) {
      const p = await plan();
      const w = await send(who, 'post', `/api/preparations/${p.id}/weighings`, weighingBody());
      expect(w.status, `weighing ${who}`).toBe(status);
      const m = await send(who, 'post', `/api/preparations/${p.id}/make-up`, await makeUpBody());
      expect(m.status, `make-up ${who}`).toBe(status);
      if (status === 201) expect(m.body.stage).toBe('complete');
    }
  });

  it('when someone tries to edit or delete a weighing over HTTP, then there is no such route (404)', async () => {
    const p = await plan();
    const w = await send('chemist', 'post', `/api/preparations/${p.id}/weighings`, weighingBody());
    const wid = w.body.weighings[0].id;
    for (const method of ['patch', 'put', 'delete'] as const) {
      const res = await request(t.app)[method](`/api/preparations/${p.id}/weighings/${wid}`).set('Cookie', cookie.chemist!).send({ reading: '1.00' });
      expect(res.status, method).toBe(404);
    }
  });
});

describe('bad input → 400 with field paths', () => {
  it.each([
    ['unknown material', { materialId: 99999 }, 'materialId'],
    ['volume zero', { flaskId: undefined, volume: { value: '0', unit: 'mL' } }, 'volume.value'],
    ['volume negative', { flaskId: undefined, volume: { value: '-5', unit: 'mL' } }, 'volume.value'],
    ['neither flask nor volume', { flaskId: undefined }, 'flaskId'],
    ['analyte not in the material', { analyteFormula: 'Cd' }, 'analyteFormula'],
    ['temperature outside CIPM-2007', { conditions: { ...PB_CONDITIONS, temperatureC: '31' } }, 'conditions.temperatureC'],
    ['missing humidity', { conditions: { temperatureC: '21', pressureHPa: '985' } }, 'conditions.relativeHumidityPct'],
    ['comma decimal', { target: { value: '1000,0', unit: 'mg/L' } }, 'target.value'],
    ['unknown unit', { target: { value: '1000', unit: 'mg/dL' } }, 'target.unit'],
    ['unknown balance', { balanceId: 4242 }, 'balanceId'],
  ])('when the plan has %s, then 400 names %s', async (_what, over, field) => {
    const res = await send('chemist', 'post', '/api/preparations', planBody(over as Record<string, unknown>));
    expect(res.status, JSON.stringify(res.body)).toBe(400);
    expectErrorBody(res.body, 'validation_failed');
    expect(res.body.error.fields).toHaveProperty([field]);
  });

  it('when the body is not JSON, then 400 (never 500)', async () => {
    const res = await request(t.app).post('/api/preparations').set('Cookie', cookie.chemist!).set('Content-Type', 'application/json').send('{"materialId":');
    expect(res.status).toBe(400);
    expectErrorBody(res.body);
  });

  it('when an unknown or malformed key is read, then 404', async () => {
    expect((await send('qa', 'get', '/api/preparations/HWL-2026-9999')).status).toBe(404);
    expect((await send('qa', 'get', '/api/preparations/99999')).status).toBe(404);
    expect((await send('qa', 'get', '/api/preparations/not-an-id')).status).toBe(404);
  });
});

describe('planning gates (shared/prep/gates.ts; REQUIREMENTS EQ-01/02/04, TR-03, TR-11)', () => {
  const blockedBy = async (over: Record<string, unknown>, code: string) => {
    const res = await send('chemist', 'post', '/api/preparations', planBody(over));
    expect(res.status, JSON.stringify(res.body)).toBe(422);
    expect(res.body.error.code).toBe('gate_blocked');
    const gate = (res.body.error.gates as any[]).find((g) => g.code === code);
    expect(gate, JSON.stringify(res.body.error.gates)).toBeDefined();
    expect(gate.severity).toBe('block');
    expect(gate.message.length).toBeGreaterThan(10);
    expect(gate.action.length).toBeGreaterThan(10);
    return gate;
  };

  it('when the material expired (NaF, 2026-06-30), then material_expired blocks with the date', async () => {
    const g = await blockedBy({ materialId: ids.material['NaF'], analyteFormula: 'F', target: { value: '1000', unit: 'mg/L' } }, 'material_expired');
    expect(g.message).toContain(demoDay('2026-06-30')); // demo dates move with the seeding day (seed/demo-clock.ts)
  });

  it('when the material is quarantined (KNO3), then material_not_accepted blocks', async () => {
    await blockedBy({ materialId: ids.material['KNO3'], analyteFormula: 'NO3' }, 'material_not_accepted');
  });

  it('when the balance calibration is overdue (BAL-A2, due 2026-05-20), then calibration_overdue blocks', async () => {
    const g = await blockedBy({ balanceId: ids.balance['BAL-A2'] }, 'calibration_overdue');
    expect(g.message).toContain(demoDay('2026-05-20'));
  });

  it('when the balance is out of service (BAL-T1), then balance_out_of_service blocks', async () => {
    await blockedBy({ balanceId: ids.balance['BAL-T1'], target: { value: '100', unit: 'g/L' }, flaskId: ids.ware['VF-1000-01'] }, 'balance_out_of_service');
  });

  it('when the reading is below the minimum weight (≈16 mg on BAL-A1, m_min 160 mg), then below_min_weight blocks and suggests BAL-SM1 or a larger flask', async () => {
    const g = await blockedBy({ balanceId: ids.balance['BAL-A1'], flaskId: ids.ware['VF-10-01'] }, 'below_min_weight');
    expect(g.message).toMatch(/160/);
    expect(g.suggestion).toBeDefined();
    expect(g.suggestion.balanceIdentifier ?? g.suggestion.volumeMl).toBeDefined();
    expect(`${g.action}`).toMatch(/BAL-SM1|mL/);
  });

  it('when the flask is out of service, then flask_not_in_service blocks (shared/prep/plan-gates.ts)', async () => {
    const ware = await (await import('../../server/db/models/index.ts')).VolumetricWare.findByPk(ids.ware['VF-250-01']);
    ware!.status = 'out_of_service';
    await ware!.save();
    try {
      await blockedBy({ flaskId: ids.ware['VF-250-01'], target: { value: '400', unit: 'mg/L' } }, 'flask_not_in_service');
    } finally {
      ware!.status = 'in_service';
      await ware!.save();
    }
  });

  it('when a blocking gate fires, then preview still answers 200 and shows the same gates', async () => {
    const res = await send('chemist', 'post', '/api/preparations/preview', planBody({ balanceId: ids.balance['BAL-A2'] }));
    expect(res.status).toBe(200);
    expect(res.body.gates.map((g: any) => g.code)).toContain('calibration_overdue');
  });
});

describe('plan numbers (METROLOGY §5.4 Pb(NO3)2 example)', () => {
  it('when 1000 mg/L Pb in 100 mL is planned at 21 °C / 985 hPa / 45 %, then the reading to aim for is 159.91 mg (§5.4: 159.912 mg) in a ±5 % window', async () => {
    const res = await send('chemist', 'post', '/api/preparations/preview', planBody());
    expect(res.status).toBe(200);
    expect(res.body.targetReading).toEqual({ value: '159.91', unit: 'mg' }); // METROLOGY §5.4: read 159.912 mg
    expect(Number(res.body.calc.trueMass.value)).toBeCloseTo(159.929, 3); // METROLOGY §5.4: true mass 159.929 mg
    expect(Number(res.body.calc.airDensity.value) * 1000).toBeCloseTo(1.162, 3); // METROLOGY §5.4: ρa = 1.162 kg/m³
    // REQUIREMENTS OT-01 style window: target ± 5 % (lab default readingWindowPct), rounded inwards to d = 0.01 mg
    expect(res.body.window).toEqual({ low: '151.92', high: '167.90', unit: 'mg', pct: '5' });
    expect(res.body.gates).toEqual([]);
    expect(res.body.snapshot.balance.identifier).toBe('BAL-SM1');
    expect(res.body.snapshot.flask.identifier).toBe('VF-100-01');
  });

  it('when lab-default conditions are chosen, then the settings defaults are used and recorded as such', async () => {
    const p = await plan({ conditions: { source: 'lab-default' } });
    expect(p.conditionsUsed).toMatchObject({ source: 'lab-default', temperatureC: '20.0', pressureHPa: '1013', relativeHumidityPct: '50' });
  });

  it('when planned, then the record carries hazards from the material for weighing the solid (GHS08/H360 caution, the SDS line apart), expiry and the plan event', async () => {
    const p = await plan({ notes: 'for the ICP calibration' });
    expect(p.identifier).toMatch(/^HWL-\d{4}-\d{4}$/);
    expect(p.stage).toBe('planned');
    expect(p.hazards.cautions).toContain('May damage fertility or the unborn child: weigh the solid in a ventilated balance enclosure or fume hood, with gloves; do not breathe the dust');
    expect(p.hazards.task).toMatch(/^Weighing the solid/);
    expect(p.hazards.sdsNote).toBe('Follow the SDS, local regulations and the laboratory’s own procedures.');
    expect(p.hazards.cautions).not.toContain(p.hazards.sdsNote);
    expect(p.statusHistory).toEqual([expect.objectContaining({ status: 'planned', by: expect.objectContaining({ fullName: 'Dr. Maren Tollefsen' }), note: 'for the ICP calibration' })]);
    expect(p.expiry.reason).toMatch(/stability period|reference material/);
    expect(p.plan.targetReading.value).toBe('159.91');
  });
});

describe('weighings (REQUIREMENTS TR-08: original observations, verbatim, append-only)', () => {
  it('when the reading has the wrong digits for BAL-SM1 (0.01 mg), then 400 fields.reading says how many decimals', async () => {
    const p = await plan();
    const res = await send('chemist', 'post', `/api/preparations/${p.id}/weighings`, weighingBody({ reading: '160.1' }));
    expect(res.status).toBe(400);
    expect(res.body.error.fields.reading).toMatch(/2 decimals/);
    const g = await send('chemist', 'post', `/api/preparations/${p.id}/weighings`, weighingBody({ reading: '0.1601', unit: 'g' }));
    expect(g.status).toBe(400);
    expect(g.body.error.fields.reading).toMatch(/5 decimals in g/);
  });

  it('when a reading is typed in g with the right digits, then it is stored verbatim and the net is in mg with the same digits', async () => {
    const p = await plan();
    const res = await send('technician', 'post', `/api/preparations/${p.id}/weighings`, weighingBody({ reading: '0.16007', unit: 'g' }));
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.weighings[0]).toMatchObject({ reading: { value: '0.16007', unit: 'g' }, net: { value: '160.07', unit: 'mg' }, inWindow: true, recordedBy: { fullName: 'Priya Lindqvist' } });
    expect(res.body.stage).toBe('weighed');
  });

  it('when weighed by difference, then net = before − after (shared/prep/reading.ts) with both readings kept', async () => {
    const p = await plan();
    const res = await send('chemist', 'post', `/api/preparations/${p.id}/weighings`, { ...weighingBody({ mode: 'difference', before: '10234.56', after: '10074.49' }), reading: undefined });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.weighings[0]).toMatchObject({ mode: 'difference', before: { value: '10234.56' }, after: { value: '10074.49' }, net: { value: '160.07', unit: 'mg' } });
    const bad = await send('chemist', 'post', `/api/preparations/${(await plan()).id}/weighings`, { ...weighingBody({ mode: 'difference', before: '100.00', after: '120.00' }), reading: undefined });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields).toHaveProperty('after');
  });

  it('when the reading is outside the window without confirmation, then 400 fields.outOfWindowReason gives the window; with confirmation and a reason it is stored', async () => {
    const p = await plan();
    const res = await send('chemist', 'post', `/api/preparations/${p.id}/weighings`, weighingBody({ reading: '172.40' }));
    expect(res.status).toBe(400);
    expect(res.body.error.fields.outOfWindowReason).toContain('151.92–167.90 mg');
    const ok = await send('chemist', 'post', `/api/preparations/${p.id}/weighings`, weighingBody({ reading: '172.40', confirmOutOfWindow: true, outOfWindowReason: 'overshot; concentration recalculated from the actual mass' }));
    expect(ok.status).toBe(201);
    expect(ok.body.weighings[0]).toMatchObject({ inWindow: false, outOfWindowReason: 'overshot; concentration recalculated from the actual mass' });
  });

  it('when the balance is out of service at weighing time, then 422 gate_blocked and nothing is stored', async () => {
    const p = await plan();
    const res = await send('chemist', 'post', `/api/preparations/${p.id}/weighings`, weighingBody({ balanceId: ids.balance['BAL-T1'], reading: '160' }));
    expect(res.status).toBe(422);
    expect(res.body.error.gates.map((g: any) => g.code)).toContain('balance_out_of_service');
    expect(await Weighing.count({ where: { preparationId: p.id } })).toBe(0);
  });

  it('when a weighing is corrected, then the new row supersedes the old one, the old one is still returned, and the result follows the new one', async () => {
    const p = await plan();
    const first = await send('chemist', 'post', `/api/preparations/${p.id}/weighings`, weighingBody({ reading: '160.70' }));
    const firstId = first.body.weighings[0].id;
    const again = await send('chemist', 'post', `/api/preparations/${p.id}/weighings`, weighingBody({ reading: '160.07' }));
    expect(again.status).toBe(409);
    expect(again.body.error.fields).toHaveProperty('supersedesId');
    const noReason = await send('chemist', 'post', `/api/preparations/${p.id}/weighings`, weighingBody({ reading: '160.07', supersedesId: firstId }));
    expect(noReason.status).toBe(400);
    expect(noReason.body.error.fields).toHaveProperty('correctionReason');
    const fixed = await send('chemist', 'post', `/api/preparations/${p.id}/weighings`, weighingBody({ reading: '160.07', supersedesId: firstId, correctionReason: 'transposed digits when typing' }));
    expect(fixed.status).toBe(201);
    const [old, next] = fixed.body.weighings;
    expect(old).toMatchObject({ id: firstId, reading: { value: '160.70' }, supersededById: next.id });
    expect(next).toMatchObject({ reading: { value: '160.07' }, supersedesId: firstId, correctionReason: 'transposed digits when typing' });
    const made = await send('chemist', 'post', `/api/preparations/${p.id}/make-up`, await makeUpBody());
    expect(made.body.result.basedOn.weighingId).toBe(next.id);
    const stale = await send('chemist', 'post', `/api/preparations/${p.id}/weighings`, weighingBody({ reading: '160.08', supersedesId: firstId, correctionReason: 'again' }));
    expect(stale.status).toBe(409);
    const audit = await AuditEntry.findAll({ where: { entity: 'weighing', action: ['weighing_recorded', 'weighing_superseded'] } });
    expect(audit.some((a) => a.action === 'weighing_superseded' && a.entityId === String(firstId) && a.reason === 'transposed digits when typing')).toBe(true);
  });

  it('when the database is asked to UPDATE or DELETE a weighing or make-up, then the triggers refuse', async () => {
    const p = await plan();
    await send('chemist', 'post', `/api/preparations/${p.id}/weighings`, weighingBody());
    await send('chemist', 'post', `/api/preparations/${p.id}/make-up`, await makeUpBody());
    const refused = async (sql: string) => {
      try {
        await t.sequelize.query(sql);
      } catch (e) {
        const err = e as { message: string; original?: { message?: string } };
        return `${err.original?.message ?? ''} ${err.message}`;
      }
      return 'not refused';
    };
    expect(await refused(`UPDATE weighings SET reading = '999.99' WHERE preparation_id = ${p.id}`)).toContain(WEIGHINGS_APPEND_ONLY);
    expect(await refused(`DELETE FROM weighings WHERE preparation_id = ${p.id}`)).toContain(WEIGHINGS_APPEND_ONLY);
    expect(await refused(`UPDATE make_ups SET solution_temperature_c = '25' WHERE preparation_id = ${p.id}`)).toContain(MAKE_UPS_APPEND_ONLY);
    expect(await refused(`DELETE FROM make_ups WHERE preparation_id = ${p.id}`)).toContain(MAKE_UPS_APPEND_ONLY);
    const w = await Weighing.findOne({ where: { preparationId: p.id } });
    expect(w!.reading).toBe('160.07');
    expect(await MakeUp.count({ where: { preparationId: p.id } })).toBe(1);
  });
});

describe('make-up and recomputation (REQUIREMENTS TR-09)', () => {
  it('when Pb(NO3)2 reads 160.07 mg into 100 mL, then c ≈ 1000.99 mg/L (METROLOGY §5.4) and the stored request reproduces the result with the core', async () => {
    const p = await plan();
    await send('chemist', 'post', `/api/preparations/${p.id}/weighings`, weighingBody());
    const res = await send('chemist', 'post', `/api/preparations/${p.id}/make-up`, await makeUpBody());
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const r = res.body.result;
    expect(r.calcVersion).toBe('tarebook-calc/1');
    expect(Number(r.concentration.value)).toBeCloseTo(1000.99, 2); // METROLOGY §5.4: c = 1000.99 mg/L
    expect(Number(r.trueMass.value)).toBeCloseTo(160.0878, 4); // METROLOGY §5.4: m = 160.0878 mg
    expect(r.volume).toEqual({ value: '100', unit: 'mL' });
    // U: §5.4 gives 2.6 mg/L without a temperature term; the QUAM A1 ±4 °C term (water, 2.07e-4 /K) adds
    // u_r = 4·2.07e-4/√3 = 4.8e-4 in quadrature: u_r = √(1.30e-3² + 4.8e-4²) ≈ 1.39e-3 → U ≈ 2.8 mg/L [arithmetic from §5.3/§5.4]
    expect(Number(r.concentration.expandedUncertainty)).toBeGreaterThan(2.5);
    expect(Number(r.concentration.expandedUncertainty)).toBeLessThan(3.0);
    expect(r.concentration.display).toMatch(/^1001\.0 ± 2\.\d mg\/L \(k = 2\)$/);
    const inputs = r.budget.map((b: any) => b.input);
    for (const i of ['reading', 'purity', 'airDensity', 'materialDensity', 'weightDensity', 'volume', 'temperature', 'atomicWeight.Pb']) expect(inputs).toContain(i);
    const shares = r.budget.reduce((s: number, b: any) => s + Number(b.share), 0);
    expect(shares).toBeCloseTo(1, 6); // GUM eq. (10): shares of the combined variance add to 1
    // recompute with the core from the stored request: same concentration, digit for digit (TR-09)
    const again = calculatePreparation(r.calcRequest as PreparationRequest);
    expect(again.actual!.concentration.value).toBe(r.concentration.value); // factor 1 when not corrected
    expect(res.body.stage).toBe('complete');
    expect(res.body.concentrationDisplay).toBe(r.concentration.display);
  });

  it('when 100.28 mg of Cd (P 0.9999) is made up to 100 mL, then c ≈ 1002.7 mg/L and the temperature term is ≈ 0.48 mg/L (QUAM A1)', async () => {
    const p = await plan({ materialId: ids.material['Cd'], analyteFormula: 'Cd', conditions: { source: 'lab-default' } });
    const w = await send('chemist', 'post', `/api/preparations/${p.id}/weighings`, weighingBody({ reading: '100.28', conditions: { source: 'lab-default' } }));
    expect(w.status, JSON.stringify(w.body)).toBe(201);
    const res = await send('chemist', 'post', `/api/preparations/${p.id}/make-up`, await makeUpBody());
    const r = res.body.result;
    expect(Number(r.concentration.value)).toBeCloseTo(1002.7, 1); // QUAM A1: c = 1002.7 mg/L (buoyancy of Cd vs 8.0 g/mL weights is −1e-5)
    const temp = r.budget.find((b: any) => b.input === 'temperature');
    // QUAM A1 (METROLOGY §5.3): V_T contributes 0.486 mg/L with β = 2.1e-4; with water's 2.07e-4: 0.486·2.07/2.1 = 0.479
    expect(Number(temp.contribution)).toBeCloseTo(0.479, 2);
  });

  it('when the temperature correction is applied (methanol β = 1.2e-3 at 25 °C), then c(20 °C) = c·[1 + β(t − 20)] = c·1.006 (METROLOGY §9)', async () => {
    const p = await plan();
    await send('chemist', 'post', `/api/preparations/${p.id}/weighings`, weighingBody());
    const plain = await send('chemist', 'post', `/api/preparations/${p.id}/make-up`, await makeUpBody());
    const meoh = ids.solvent['Methanol']!;
    const res = await send('chemist', 'post', `/api/preparations/${p.id}/make-up`, await makeUpBody({ solventId: meoh.id, solventLot: meoh.lot, solutionTemperatureC: '25.0', applyTemperatureCorrection: true, correctionReason: 'made up again in methanol' }));
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.result.temperatureCorrection).toEqual({ factor: '1.006', temperatureC: '25.0' }); // METROLOGY §9: 1 + 1.2e-3·5 = 1.006
    expect(Number(res.body.result.concentration.value) / Number(plain.body.result.concentration.value)).toBeCloseTo(1.006, 9);
    expect(res.body.makeUpHistory).toHaveLength(1);
    expect(res.body.makeUp.supersedesId).toBe(res.body.makeUpHistory[0].id);
  });

  it('when the make-up flask is wrong, the lot does not match, or a second make-up has no reason, then 400 with the field', async () => {
    const p = await plan();
    const wrong = await send('chemist', 'post', `/api/preparations/${p.id}/make-up`, await makeUpBody({ flaskIdentifier: 'VF-50-01' }));
    expect(wrong.status).toBe(400);
    expect(wrong.body.error.fields.flaskIdentifier).toContain('VF-100-01');
    const unknown = await send('chemist', 'post', `/api/preparations/${p.id}/make-up`, await makeUpBody({ flaskIdentifier: 'VF-999' }));
    expect(unknown.body.error.fields).toHaveProperty('flaskIdentifier');
    const lot = await send('chemist', 'post', `/api/preparations/${p.id}/make-up`, await makeUpBody({ solventLot: 'NOT-THE-LOT' }));
    expect(lot.status).toBe(400);
    expect(lot.body.error.fields).toHaveProperty('solventLot');
    // the refusal never gives away the registered lot (it must be read from the bottle)
    const registeredLot = water().lot;
    expect(JSON.stringify(lot.body)).not.toContain(registeredLot);
    const sub = await send('chemist', 'post', `/api/preparations/${p.id}/make-up`, await makeUpBody({ flaskIdentifier: 'VF-100-02' }));
    expect(sub.status).toBe(201);
    expect(sub.body.makeUp.flask).toMatchObject({ identifier: 'VF-100-02', substituted: true, snapshot: { identifier: 'VF-100-02', nominalVolumeMl: '100' } });
    const second = await send('chemist', 'post', `/api/preparations/${p.id}/make-up`, await makeUpBody());
    expect(second.status).toBe(400);
    expect(second.body.error.fields).toHaveProperty('correctionReason');
  });
});

describe('records kept for good', () => {
  it('when the inventory is edited after planning and weighing, then the stored snapshots and result do not change', async () => {
    const p = await plan();
    await send('chemist', 'post', `/api/preparations/${p.id}/weighings`, weighingBody());
    const before = (await send('chemist', 'post', `/api/preparations/${p.id}/make-up`, await makeUpBody())).body;
    const m = await ReferenceMaterial.findByPk(ids.material['Pb(NO3)2']);
    const b = await Balance.findByPk(ids.balance['BAL-SM1']);
    const [purity, status] = [m!.purityValue, b!.status];
    m!.purityValue = '0.9900';
    await m!.save();
    b!.status = 'out_of_service';
    await b!.save();
    try {
      const after = (await send('qa', 'get', `/api/preparations/${p.id}`)).body;
      expect(after.snapshot).toEqual(before.snapshot);
      expect(after.snapshot.material.purity.value).toBe('0.9995');
      expect(after.weighings[0].balance.snapshot.status).toBe('in_service');
      expect(after.result).toEqual(before.result);
    } finally {
      m!.purityValue = purity;
      await m!.save();
      b!.status = status;
      await b!.save();
    }
  });

  it('when many preparations are created at the same moment, then every identifier is different and consecutive (REQUIREMENTS TR-01)', async () => {
    const results = await Promise.all(Array.from({ length: 8 }, (_, i) => send(i % 2 ? 'chemist' : 'chemist2', 'post', '/api/preparations', planBody())));
    for (const r of results) expect(r.status).toBe(201);
    const seqs = results.map((r) => Number(r.body.identifier.split('-')[2])).sort((a, b) => a - b);
    expect(new Set(seqs).size).toBe(8);
    expect(seqs.at(-1)! - seqs[0]!).toBe(7);
  });

  it('when writes happen, then each is audited with the server-side actor (REQUIREMENTS AT-01)', async () => {
    const p = await plan();
    await send('technician', 'post', `/api/preparations/${p.id}/weighings`, weighingBody());
    await send('technician', 'post', `/api/preparations/${p.id}/make-up`, await makeUpBody());
    const planned = await AuditEntry.findOne({ where: { entity: 'preparation', entityId: String(p.id), action: 'plan' } });
    expect(planned!.actorName).toBe('Dr. Maren Tollefsen');
    const w = await AuditEntry.findOne({ where: { entity: 'weighing', action: 'weighing_recorded' }, order: [['id', 'DESC']] });
    expect(w!.actorName).toBe('Priya Lindqvist');
    expect(w!.changes).toContain('160.07');
    expect(await AuditEntry.count({ where: { entity: 'make_up', action: 'make_up_recorded' } })).toBeGreaterThan(0);
  });

  it('when listing, then mine, today, search and paging filter as asked', async () => {
    const mine = await plan({}, 'chemist2');
    const list = (await send('chemist2', 'get', '/api/preparations?mine=1&pageSize=100')).body;
    expect(list.items.every((i: any) => i.createdBy.fullName === 'Idris Okonkwo-Baptiste')).toBe(true);
    expect(list.items.some((i: any) => i.identifier === mine.identifier)).toBe(true);
    expect(list.items[0]).toMatchObject({ createdBy: { initials: 'IOB' }, materialName: 'Lead(II) nitrate', stage: 'planned' });
    const today = (await send('qa', 'get', '/api/preparations?today=1&pageSize=1')).body;
    expect(today.total).toBeGreaterThan(1);
    expect(today.items).toHaveLength(1);
    const byId = (await send('qa', 'get', `/api/preparations?search=${mine.identifier}`)).body;
    expect(byId.items.map((i: any) => i.identifier)).toEqual([mine.identifier]);
    const byName = (await send('qa', 'get', '/api/preparations?search=lead(ii)&pageSize=1&page=2')).body;
    expect(byName).toMatchObject({ page: 2, pageSize: 1 });
    expect(byName.items).toHaveLength(1);
    expect((await send('qa', 'get', '/api/preparations?search=no-such-thing%25')).body.total).toBe(0);
    const bad = await send('qa', 'get', '/api/preparations?pageSize=1000');
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields).toHaveProperty('pageSize');
  });

  it('when the database is closed and reopened, then the record reads back byte-identical', async () => {
    const p = await plan();
    await send('chemist', 'post', `/api/preparations/${p.id}/weighings`, weighingBody());
    await send('chemist', 'post', `/api/preparations/${p.id}/make-up`, await makeUpBody());
    const before = (await send('qa', 'get', `/api/preparations/${p.identifier}`)).text;
    await t.sequelize.close();
    const sequelize = await openDatabase(t.dbPath);
    await migrateUp(sequelize);
    const app = createApp({ sequelize, config: t.config, distDir: join(t.dir, 'no-dist') });
    const after = (await request(app).get(`/api/preparations/${p.identifier}`).set('Cookie', cookie.qa!)).text;
    expect(after).toBe(before);
    t = { ...t, app, sequelize, close: async () => { await sequelize.close(); } };
  });
});

describe('demo seed (seed/demo-preparations.ts)', () => {
  it('when the demo lab is seeded, then five November preparations by the two chemists cover every stage, a correction and an out-of-window reason', async () => {
    const list = (await send('qa', 'get', '/api/preparations?search=HWL-2026-000&pageSize=100')).body.items as any[];
    const seeded = list.filter((i) => i.createdAt < demoInstant('2026-12-01T00:00:00Z')).sort((a, b) => a.id - b.id);
    expect(seeded.map((i) => i.stage)).toEqual(['complete', 'complete', 'complete', 'weighed', 'planned']);
    expect(new Set(seeded.map((i) => i.createdBy.fullName))).toEqual(new Set(['Dr. Maren Tollefsen', 'Idris Okonkwo-Baptiste']));
    const cl = (await send('qa', 'get', `/api/preparations/${seeded[1].identifier}`)).body;
    expect(cl.weighings).toHaveLength(2);
    expect(cl.weighings[0].supersededById).toBe(cl.weighings[1].id);
    const toc = (await send('qa', 'get', `/api/preparations/${seeded[2].identifier}`)).body;
    expect(toc.weighings[0]).toMatchObject({ inWindow: false, outOfWindowReason: expect.stringContaining('Overshot') });
    const pb = (await send('qa', 'get', `/api/preparations/${seeded[0].identifier}`)).body;
    expect(Number(pb.result.concentration.value)).toBeCloseTo(1000.99, 2); // METROLOGY §5.4 (same reading and conditions)
    expect(pb.expiry.expiresOn).toBe(demoDay('2026-12-09')); // prepared 2026-11-09 + 30 days (lab default stability rule), both moved with the seeding day
  });
});
