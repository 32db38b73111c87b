// Stored volume checks: plan from a ware item with balance gates, readings at the bench (append-only, corrections
// with a reason), the stored result, "prepared" and "verified" signatures with separation of duties, the ware's
// calibration status, and the planning gate that refuses ware whose latest verified check failed.
// Role matrix of /api/volume-checks routes: chemist and technician plan and record; only a chemist signs; qa and
// admin read only (checked below).
import { PDFParse } from 'pdf-parse';
import { D } from '../../shared/calc/decimal.ts';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEntry, Balance, Preparation, Solvent, VolumeCheckReading, VolumetricWare } from '../../server/db/models/index.ts';
import { VOLUME_CHECK_READINGS_APPEND_ONLY } from '../../server/db/migrations/0020-volume-checks.ts';
import { DEMO, DEMO_PASSWORD, expectErrorBody, makeTestApp, sessionCookie, type TestApp } from './helpers/test-app.ts';

type Who = 'signedOut' | 'chemist' | 'chemist2' | 'technician' | 'qa' | 'admin';
let t: TestApp;
const cookie: Partial<Record<Who, string>> = {};
const ware: Record<string, number> = {};
const bal: Record<string, number> = {};

beforeAll(async () => {
  t = await makeTestApp();
  for (const who of ['chemist', 'chemist2', 'technician', 'qa', 'admin'] as const) cookie[who] = await sessionCookie(t.app, DEMO[who]);
  for (const w of await VolumetricWare.findAll()) ware[w.identifier] = w.id;
  for (const b of await Balance.findAll()) bal[b.identifier] = b.id;
});
afterAll(() => t.close());

const send = (who: Who, method: 'get' | 'post', path: string, body?: unknown) => {
  let r = request(t.app)[method](path);
  if (who !== 'signedOut') r = r.set('Cookie', cookie[who]!);
  return body === undefined ? r : r.send(body as object);
};

const CONDITIONS = { waterTemperatureC: '20.4', air: { temperatureC: '20.8', pressureHPa: '1009', relativeHumidityPct: '46' } };
const plan = (wareId: number, balanceId: number, over: Record<string, unknown> = {}) => ({ wareId, balanceId, replicates: 3, conditions: CONDITIONS, ...over });

async function readAll(key: string, who: Who, values: string[], testedIndex = 0) {
  let res;
  for (let i = 0; i < values.length; i++) {
    res = await send(who, 'post', `/api/volume-checks/${key}/readings`, { testedIndex, replicate: i + 1, value: values[i], unit: 'g' });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
  }
  return res!.body;
}

const signBody = (meaning: string, extra: Record<string, unknown> = {}) => ({ meaning, password: DEMO_PASSWORD, acknowledgeResponsibility: true, ...extra });
const allTicked = { balance_fit: true, conditions: true, readings: true, limits: true };

describe('volume checks', () => {
  let key = '';

  it('the demo lab holds a passed, verified BP-10-01 check and a failed, verified PP-200-01 check (seeded through the services)', async () => {
    const bp = await send('qa', 'get', `/api/volumetric-ware/${ware['BP-10-01']}/calibration`);
    expect(bp.body).toMatchObject({ status: 'calibrated', check: { verdict: 'pass' } });
    const pp = await send('qa', 'get', `/api/volumetric-ware/${ware['PP-200-01']}/calibration`);
    expect(pp.body).toMatchObject({ status: 'failed', check: { verdict: 'fail' } });
    const detail = (await send('qa', 'get', `/api/volume-checks/${pp.body.check.identifier}`)).body;
    expect(detail.plan.tested.map((x: { value: string }) => x.value)).toEqual(['0.2', '0.1', '0.02']);
    expect(detail.readings).toHaveLength(30);
    expect(detail.signatures.map((s: { meaning: string; valid: boolean }) => [s.meaning, s.valid])).toEqual([['prepared', true], ['verified', true]]);
    expect(detail.result.tested[0].verdict.checks[0]).toMatchObject({ quantity: 'systematic', limit: '0.0016', pass: false });
  });

  it('a technician plans a 10 mL bulb pipette check on BAL-A1: plan, gates and conditions stored, audited', async () => {
    const res = await send('technician', 'post', '/api/volume-checks', plan(ware['BP-10-01']!, bal['BAL-A1']!));
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    key = res.body.identifier;
    expect(key).toMatch(/^VC-\d{4}-\d{4}$/);
    expect(res.body).toMatchObject({ status: 'planned', ware: { identifier: 'BP-10-01' }, balance: { identifier: 'BAL-A1' }, plan: { kind: 'bulb_pipette', class: 'A', material: 'borosilicate_3_3', mode: 'delivery', tested: [{ value: '10', unit: 'mL', replicates: 3 }] } });
    expect(res.body.gates.map((g: { code: string; pass: boolean }) => [g.code, g.pass])).toEqual([
      ['balance_calibration', true],
      ['balance_min_weight', true],
      ['balance_readability', true],
      ['balance_capacity', true],
    ]);
    expect(await AuditEntry.count({ where: { entity: 'volume_check', action: 'plan' } })).toBeGreaterThanOrEqual(1);
  });

  it('balance gates refuse at balanceId: an overdue calibration (BAL-A2); minimum weight at 10 % of a 1000 µL pipette on BAL-A1 (about 100 mg < 160 mg)', async () => {
    const a = await send('technician', 'post', '/api/volume-checks', plan(ware['BP-10-01']!, bal['BAL-A2']!));
    expect(a.status).toBe(400);
    expect(a.body.error.fields.balanceId).toMatch(/overdue/);
    const b = await send('technician', 'post', '/api/volume-checks', { wareId: ware['PP-1000-01'], balanceId: bal['BAL-A1'], conditions: CONDITIONS });
    expect(b.status).toBe(400);
    expect(b.body.error.fields.balanceId).toMatch(/minimum weight 160 mg/);
    // on the semi-micro balance the piston pipette is planned at nominal, 50 % and 10 % with 10 replicates each (ISO 8655-6)
    const c = await send('technician', 'post', '/api/volume-checks', { wareId: ware['PP-1000-01'], balanceId: bal['BAL-SM1'], conditions: CONDITIONS });
    expect(c.status, JSON.stringify(c.body)).toBe(201);
    expect(c.body.plan.tested).toEqual([{ value: '1', unit: 'mL', replicates: 10 }, { value: '0.5', unit: 'mL', replicates: 10 }, { value: '0.1', unit: 'mL', replicates: 10 }]);
    // a graduated pipette is not covered
    const d = await send('technician', 'post', '/api/volume-checks', plan(ware['GP-10-01']!, bal['BAL-A1']!));
    expect(d.status).toBe(400);
    expect(d.body.error.fields.wareId).toBeTruthy();
  });

  it('readings: verbatim, a second reading of a replicate is refused, a correction needs a reason and supersedes; rows are append-only', async () => {
    await readAll(key, 'technician', ['9.9721', '9.9753']);
    const dup = await send('technician', 'post', `/api/volume-checks/${key}/readings`, { testedIndex: 0, replicate: 2, value: '9.9735', unit: 'g' });
    expect(dup.status).toBe(409);
    expectErrorBody(dup.body, 'conflict');
    const current = (await send('technician', 'get', `/api/volume-checks/${key}`)).body.readings.find((r: { replicate: number }) => r.replicate === 2);
    const noReason = await send('technician', 'post', `/api/volume-checks/${key}/readings`, { testedIndex: 0, replicate: 2, value: '9.9735', unit: 'g', supersedesId: current.id });
    expect(noReason.status).toBe(400);
    expect(noReason.body.error.fields.correctionReason).toBeTruthy();
    const fixed = await send('technician', 'post', `/api/volume-checks/${key}/readings`, { testedIndex: 0, replicate: 2, value: '9.9735', unit: 'g', supersedesId: current.id, correctionReason: 'Digits transposed; balance printout reads 9.9735 g' });
    expect(fixed.status, JSON.stringify(fixed.body)).toBe(201);
    expect(fixed.body.result).toBeNull(); // the third replicate is missing
    const last = await send('technician', 'post', `/api/volume-checks/${key}/readings`, { testedIndex: 0, replicate: 3, value: '9.9718', unit: 'g' });
    expect(last.status).toBe(201);
    expect(last.body.readings.map((r: { value: string; current: boolean }) => [r.value, r.current])).toEqual([['9.9721', true], ['9.9753', false], ['9.9735', true], ['9.9718', true]]);
    expect(last.body.calcVersion).toBe('volume-check/1');
    expect(last.body.result.verdict).toBe('pass');
    expect(last.body.result.tested[0]).toMatchObject({ n: '3', verdict: { result: 'pass', limit: { systematic: { value: '0.020', unit: 'mL' } } }, uncertainty: { k: '2' } });
    const refused = async (sql: string) => {
      try {
        await t.sequelize.query(sql);
      } catch (e) {
        const err = e as { message?: string; parent?: { message?: string } };
        return `${err.message ?? ''} ${err.parent?.message ?? ''}`;
      }
      return 'not refused';
    };
    expect(await refused(`UPDATE volume_check_readings SET value = '1' WHERE check_id = ${last.body.id}`)).toContain(VOLUME_CHECK_READINGS_APPEND_ONLY);
    expect(await refused(`DELETE FROM volume_check_readings WHERE check_id = ${last.body.id}`)).toContain(VOLUME_CHECK_READINGS_APPEND_ONLY);
    expect(await VolumeCheckReading.count({ where: { checkId: last.body.id } })).toBe(4);
  });

  it('signing: technician cannot sign; a chemist signs prepared; the same chemist cannot verify; a second chemist verifies with the checklist; readings then refused', async () => {
    const tech = await send('technician', 'post', `/api/volume-checks/${key}/signatures`, signBody('prepared'));
    expect(tech.status).toBe(403);
    const wrong = await send('chemist', 'post', `/api/volume-checks/${key}/signatures`, { ...signBody('prepared'), password: 'not-the-password' });
    expect(wrong.status).toBe(401);
    const prep = await send('chemist', 'post', `/api/volume-checks/${key}/signatures`, signBody('prepared'));
    expect(prep.status, JSON.stringify(prep.body)).toBe(201);
    expect(prep.body.status).toBe('prepared');
    expect(prep.body.signatures[0]).toMatchObject({ meaning: 'prepared', valid: true, recordVersion: 1, recordHash: expect.stringMatching(/^[0-9a-f]{64}$/) });
    const self = await send('chemist', 'post', `/api/volume-checks/${key}/signatures`, signBody('verified', { checklist: allTicked }));
    expect(self.status).toBe(403);
    expect(self.body.error.code).toBe('self_verification');
    const unticked = await send('chemist2', 'post', `/api/volume-checks/${key}/signatures`, signBody('verified', { checklist: { balance_fit: true } }));
    expect(unticked.status).toBe(400);
    expect(unticked.body.error.fields['checklist.readings']).toBeTruthy();
    const ok = await send('chemist2', 'post', `/api/volume-checks/${key}/signatures`, signBody('verified', { checklist: allTicked }));
    expect(ok.status, JSON.stringify(ok.body)).toBe(201);
    expect(ok.body.status).toBe('verified');
    expect(ok.body.nextDueOn).toMatch(/^\d{4}-\d\d-\d\d$/);
    const late = await send('technician', 'post', `/api/volume-checks/${key}/readings`, { testedIndex: 0, replicate: 1, value: '9.9', unit: 'g' });
    expect(late.status).toBe(409);
    expect(await AuditEntry.count({ where: { entity: 'volume_check', action: 'sign' } })).toBeGreaterThanOrEqual(2);
    expect(await AuditEntry.count({ where: { entity: 'volume_check', action: 'signature_failed' } })).toBe(1);
  });

  it("the ware's calibration status follows from the verified check", async () => {
    const res = await send('qa', 'get', `/api/volumetric-ware/${ware['BP-10-01']}/calibration`);
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ status: 'calibrated', check: { identifier: key, verdict: 'pass' }, calibratedVolume: { unit: 'mL', k: '2' } });
    expect((await send('qa', 'get', `/api/volumetric-ware/${ware['BP-20-01']}/calibration`)).body.status).toBe('not_checked');
    expect((await send('qa', 'get', `/api/volumetric-ware/999999/calibration`)).status).toBe(404);
  });

  it('a failed verified check blocks the flask for a preparation; the gate names the check', async () => {
    const p = await send('technician', 'post', '/api/volume-checks', plan(ware['VF-50-01']!, bal['BAL-A1']!));
    expect(p.status, JSON.stringify(p.body)).toBe(201);
    const k = p.body.identifier;
    const done = await readAll(k, 'technician', ['49.62', '49.63', '49.61']); // ~49.75 mL, far outside ±0.06 mL
    expect(done.result.verdict).toBe('fail');
    expect((await send('chemist', 'post', `/api/volume-checks/${k}/signatures`, signBody('prepared'))).status).toBe(201);
    expect((await send('chemist2', 'post', `/api/volume-checks/${k}/signatures`, signBody('verified', { checklist: allTicked }))).status).toBe(201);
    expect((await send('qa', 'get', `/api/volumetric-ware/${ware['VF-50-01']}/calibration`)).body.status).toBe('failed');
    const material = (await send('chemist', 'get', '/api/materials?pageSize=100')).body.items.find((m: { formula: string }) => m.formula === 'NaCl');
    const prep = await send('chemist', 'post', '/api/preparations/preview', {
      materialId: material.id,
      analyteFormula: 'Cl',
      target: { value: '1000', unit: 'mg/L' },
      flaskId: ware['VF-50-01'],
      balanceId: bal['BAL-SM1'],
      conditions: { source: 'measured', temperatureC: '21', pressureHPa: '985', relativeHumidityPct: '45' },
    });
    expect(prep.status, JSON.stringify(prep.body)).toBe(200);
    expect(prep.body.gates).toEqual(expect.arrayContaining([expect.objectContaining({ code: 'ware_check_failed', severity: 'block', message: expect.stringContaining(k) })]));
  });

  it('the trace of a standard reaches the flask’s verified check and the balance the check weighed on', async () => {
    const p = await send('technician', 'post', '/api/volume-checks', plan(ware['VF-100-02']!, bal['BAL-A1']!));
    expect(p.status, JSON.stringify(p.body)).toBe(201);
    const k = p.body.identifier;
    expect((await readAll(k, 'technician', ['99.7021', '99.7035', '99.7012'])).result.verdict).toBe('pass');
    expect((await send('chemist', 'post', `/api/volume-checks/${k}/signatures`, signBody('prepared'))).status).toBe(201);
    expect((await send('chemist2', 'post', `/api/volume-checks/${k}/signatures`, signBody('verified', { checklist: allTicked }))).status).toBe(201);
    // the demo Cu stock was weighed into VF-100-02 and awaits its make-up
    const cu = (await Preparation.findOne({ where: { analyteFormula: 'Cu' } }))!;
    const water = (await Solvent.findOne({ where: { name: 'Ultrapure water' } }))!;
    const mu = await send('chemist2', 'post', `/api/preparations/${cu.identifier}/make-up`, { flaskIdentifier: 'VF-100-02', solventId: water.id, solventLot: water.lot, solutionTemperatureC: '20.5', applyTemperatureCorrection: false });
    expect(mu.status, JSON.stringify(mu.body)).toBe(201);
    const tr = await send('chemist', 'get', `/api/trace/${cu.identifier}`);
    expect(tr.status).toBe(200);
    const graph = tr.body.backward ?? tr.body.graph ?? tr.body;
    const nodes = JSON.stringify(graph);
    expect(nodes).toContain(`${k} volume check (pass)`);
    expect(nodes).toContain('check weighed on');
  });

  it('the calibration certificate PDF carries the identifier, the stored numbers and the verdict; printing is audited', async () => {
    const detail = (await send('qa', 'get', `/api/volume-checks/${key}`)).body;
    const res = await send('qa', 'get', `/api/volume-checks/${key}/certificate.pdf`).buffer(true).parse((r, cb) => {
      const chunks: Buffer[] = [];
      r.on('data', (c: Buffer) => chunks.push(c));
      r.on('end', () => cb(null, Buffer.concat(chunks)));
    });
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/application\/pdf/);
    const parser = new PDFParse({ data: new Uint8Array(res.body as Buffer) });
    let text = '';
    try {
      text = (await parser.getText()).pages.map((p) => p.text.replace(/\s+/g, ' ')).join(' ');
    } finally {
      await parser.destroy();
    }
    expect(text).toContain(`Calibration certificate ${key}`);
    expect(text).toContain('BP-10-01');
    expect(text).toContain('PASS');
    const mean = detail.result.tested[0].mean.value as string;
    expect(text).toContain(new D(mean).toFixed(5)); // shortened to 5 decimals (half-even) for display
    expect(await AuditEntry.count({ where: { entity: 'volume_check', action: 'print' } })).toBe(1);
  });

  it('list and detail are readable by every signed-in role; unknown keys 404', async () => {
    const list = await send('admin', 'get', `/api/volume-checks?wareId=${ware['BP-10-01']}`);
    expect(list.status).toBe(200);
    expect(list.body.items[0]).toMatchObject({ identifier: key, ware: 'BP-10-01', verdict: 'pass', status: 'verified' });
    expect((await send('qa', 'get', `/api/volume-checks/${key}`)).status).toBe(200);
    expect((await send('qa', 'get', '/api/volume-checks/VC-1999-0001')).status).toBe(404);
  });

  const matrix: Array<[string, 'get' | 'post', string, Who, number]> = [
    ['GET /api/volume-checks', 'get', '/api/volume-checks', 'signedOut', 401],
    ['POST /api/volume-checks', 'post', '/api/volume-checks', 'qa', 403],
    ['POST /api/volume-checks', 'post', '/api/volume-checks', 'admin', 403],
    ['POST /api/volume-checks/:key/readings', 'post', '/api/volume-checks/VC-2026-0001/readings', 'qa', 403],
    ['POST /api/volume-checks/:key/signatures', 'post', '/api/volume-checks/VC-2026-0001/signatures', 'technician', 403],
    ['POST /api/volume-checks/:key/signatures', 'post', '/api/volume-checks/VC-2026-0001/signatures', 'qa', 403],
    ['GET /api/volume-checks/:key', 'get', '/api/volume-checks/VC-2026-0001', 'signedOut', 401],
    ['GET /api/volume-checks/:key/certificate.pdf', 'get', '/api/volume-checks/VC-2026-0001/certificate.pdf', 'signedOut', 401],
    ['GET /api/volumetric-ware/:id/calibration', 'get', '/api/volumetric-ware/1/calibration', 'signedOut', 401],
  ];
  it.each(matrix)('%s as %s → %s', async (_n, method, path, who, status) => {
    expect((await send(who, method, path, method === 'post' ? {} : undefined)).status).toBe(status);
  });
});
