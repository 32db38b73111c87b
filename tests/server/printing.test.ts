// Printing API: label templates (admin), label prints with reprint reason and counting (REQUIREMENTS LB-07),
// previews that are not records, refusals for expired and discarded records, and the route × role matrix
// for every printing route (technician and chemist print; QA and admin cannot; everyone signed in reads).
import { QueryTypes } from 'sequelize';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { LABEL_PRINTS_APPEND_ONLY } from '../../server/db/migrations/0007-printing.ts';
import { DEMO, DEMO_PASSWORD, expectErrorBody, makeTestApp, sessionCookie, type TestApp } from './helpers/test-app.ts';
import { freeFlask } from './helpers/free-flask.ts';

type Who = 'signedOut' | 'chemist' | 'technician' | 'qa' | 'admin';
const ROLES: Who[] = ['signedOut', 'chemist', 'technician', 'qa', 'admin'];

let t: TestApp;
const cookie: Partial<Record<Who, string>> = {};
const tpl: Record<string, number> = {};
const ids = { material: 0, balance: 0, flask: 0, solvent: { id: 0, lot: '' } };
const conditions = { temperatureC: '21', pressureHPa: '985', relativeHumidityPct: '45' };

function send(who: Who, method: 'get' | 'post' | 'patch', path: string, body?: object) {
  let r = request(t.app)[method](path);
  if (who !== 'signedOut') r = r.set('Cookie', cookie[who]!);
  return body ? r.send(body) : r;
}

/** Planned, weighed and made up by the chemist through the API. */
async function completePreparation(): Promise<string> {
  const p = await send('chemist', 'post', '/api/preparations', {
    materialId: ids.material,
    analyteFormula: 'Pb',
    target: { value: '1000', unit: 'mg/L' },
    flaskId: ids.flask,
    balanceId: ids.balance,
    conditions: { source: 'measured', ...conditions },
  });
  expect(p.status, JSON.stringify(p.body)).toBe(201);
  const key = p.body.identifier as string;
  expect((await send('chemist', 'post', `/api/preparations/${key}/weighings`, { mode: 'direct', reading: '160.07', unit: 'mg', conditions })).status).toBe(201);
  const m = await send('chemist', 'post', `/api/preparations/${key}/make-up`, { flaskIdentifier: (await freeFlask(t.app, cookie.chemist!)).identifier, solventId: ids.solvent.id, solventLot: ids.solvent.lot, solutionTemperatureC: '20.0', applyTemperatureCorrection: false });
  expect(m.status, JSON.stringify(m.body)).toBe(201);
  return key;
}

async function auditPrints(preparationId: number) {
  return t.sequelize.query<{ actor_name: string; changes: string; reason: string | null }>(
    "SELECT actor_name, changes, reason FROM audit_entries WHERE action = 'print' AND entity = 'preparation' AND entity_id = :id ORDER BY id",
    { replacements: { id: String(preparationId) }, type: QueryTypes.SELECT },
  );
}

const validTemplate = (name: string) => ({
  name,
  widthMm: '50',
  heightMm: '30',
  layout: { kind: 'sheet', pageSize: 'A4', rows: 9, columns: 4, marginTopMm: '10', marginLeftMm: '4', gapXMm: '2', gapYMm: '2' },
  content: 'full',
});

beforeAll(async () => {
  t = await makeTestApp();
  for (const who of ['chemist', 'technician', 'qa', 'admin'] as const) cookie[who] = await sessionCookie(t.app, DEMO[who]);
  const items = async (path: string) => (await send('chemist', 'get', path)).body.items as any[];
  ids.material = (await items('/api/materials?pageSize=100')).find((m) => m.formula === 'Pb(NO3)2').id;
  ids.balance = (await items('/api/balances?pageSize=100')).find((b) => b.identifier === 'BAL-SM1').id;
  ids.flask = (await items('/api/volumetric-ware?pageSize=100')).find((w) => w.identifier === 'VF-100-01').id;
  const water = (await items('/api/solvents?pageSize=100')).find((x) => x.name === 'Ultrapure water');
  ids.solvent = { id: water.id, lot: water.lot };
  for (const x of await items('/api/label-templates')) tpl[x.name] = x.id;
}, 120_000);
afterAll(() => t.close());

describe('label templates', () => {
  it('when listed, then the three starting templates have our own names, sizes in mm and labels per page', async () => {
    const res = await send('technician', 'get', '/api/label-templates');
    expect(res.status).toBe(200);
    const byName = Object.fromEntries(res.body.items.map((x: any) => [x.name, x]));
    expect(byName['Bench vial 38×25 full']).toMatchObject({ widthMm: '38', heightMm: '25', layout: { kind: 'roll' }, content: 'full', labelsPerPage: 1, active: true });
    expect(byName['Autosampler vial 25×12 small']).toMatchObject({ widthMm: '25', heightMm: '12', content: 'small', labelsPerPage: 1 });
    expect(byName['A4 sheet 3×8 full']).toMatchObject({ layout: { kind: 'sheet', pageSize: 'A4', rows: 8, columns: 3 }, labelsPerPage: 24 });
  });

  it('when an admin creates a template, then 201 and the creation is audited; other roles 403, signed out 401', async () => {
    for (const who of ROLES) {
      const res = await send(who, 'post', '/api/label-templates', validTemplate(`Rack tag 50×30 (${who})`));
      const want = who === 'admin' ? 201 : who === 'signedOut' ? 401 : 403;
      expect(res.status, `${who}: ${JSON.stringify(res.body)}`).toBe(want);
      if (want !== 201) expectErrorBody(res.body, who === 'signedOut' ? 'unauthenticated' : 'forbidden');
      else expect(res.body).toMatchObject({ name: 'Rack tag 50×30 (admin)', labelsPerPage: 36, active: true });
    }
    const [row] = await t.sequelize.query<{ n: number }>("SELECT count(*) AS n FROM audit_entries WHERE entity = 'label_template' AND action = 'create'", { type: QueryTypes.SELECT });
    expect(Number(row!.n)).toBe(1);
  });

  it.each([
    ['width 0', { widthMm: '0' }, 'widthMm'],
    ['height not a number', { heightMm: 'twelve' }, 'heightMm'],
    ['negative margin', { layout: { ...validTemplate('x').layout, marginTopMm: '-1' } }, 'layout.marginTopMm'],
    ['unknown page size', { layout: { ...validTemplate('x').layout, pageSize: 'A5' } }, 'layout.pageSize'],
    ['0 columns', { layout: { ...validTemplate('x').layout, columns: 0 } }, 'layout.columns'],
    // 4 + 5 × 50 + 4 × 2 = 262 mm > 210 mm (ISO 216 A4 width)
    ['labels wider than the page', { layout: { ...validTemplate('x').layout, columns: 5 } }, 'layout.columns'],
    // 10 + 10 × 30 + 9 × 2 = 328 mm > 297 mm (A4 height)
    ['labels taller than the page', { layout: { ...validTemplate('x').layout, rows: 10 } }, 'layout.rows'],
    ['unknown layout kind', { layout: { kind: 'fanfold' } }, 'layout.kind'],
    ['unknown content', { content: 'tiny' }, 'content'],
    ['no name', { name: '  ' }, 'name'],
  ])('when a template has %s, then 400 names %s', async (_what, over, field) => {
    const res = await send('admin', 'post', '/api/label-templates', { ...validTemplate('Invalid one'), ...over });
    expect(res.status, JSON.stringify(res.body)).toBe(400);
    expectErrorBody(res.body);
    expect(Object.keys(res.body.error.fields)).toContain(field);
  });

  it('when a name is taken, then 409 with fields.name', async () => {
    const res = await send('admin', 'post', '/api/label-templates', validTemplate('Bench vial 38×25 full'));
    expect(res.status).toBe(409);
    expect(res.body.error.fields.name).toBeDefined();
  });

  it('when an admin edits a template, then the merged template is checked and the change audited field by field', async () => {
    const created = await send('admin', 'post', '/api/label-templates', validTemplate('Freezer box 50×30'));
    expect(created.status).toBe(201);
    const id = created.body.id as number;
    const tooMany = await send('admin', 'patch', `/api/label-templates/${id}`, { layout: { ...validTemplate('x').layout, rows: 12 } });
    expect(tooMany.status).toBe(400);
    expect(tooMany.body.error.fields['layout.rows']).toMatch(/297 mm high/);
    const narrower = await send('admin', 'patch', `/api/label-templates/${id}`, { widthMm: '45', active: false });
    expect(narrower.status, JSON.stringify(narrower.body)).toBe(200);
    expect(narrower.body).toMatchObject({ widthMm: '45', active: false });
    const [row] = await t.sequelize.query<{ changes: string }>("SELECT changes FROM audit_entries WHERE entity = 'label_template' AND action = 'update' AND entity_id = :id", {
      replacements: { id: String(id) },
      type: QueryTypes.SELECT,
    });
    expect(JSON.parse(row!.changes)).toEqual(
      expect.arrayContaining([
        { field: 'widthMm', oldValue: '50', newValue: '45' },
        { field: 'active', oldValue: true, newValue: false },
      ]),
    );
    for (const who of ['chemist', 'technician', 'qa'] as const) expect((await send(who, 'patch', `/api/label-templates/${id}`, { widthMm: '40' })).status).toBe(403);
    expect((await send('signedOut', 'patch', `/api/label-templates/${id}`, { widthMm: '40' })).status).toBe(401);
    expect((await send('admin', 'patch', '/api/label-templates/99999', { widthMm: '40' })).status).toBe(404);
    // an inactive template cannot be used for a print
    const key = await completePreparation();
    const res = await send('chemist', 'post', `/api/preparations/${key}/label-prints`, { templateId: id, copies: 1 });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.templateId).toBeDefined();
  });
});

describe('label prints', () => {
  let key = '';
  let prepId = 0;
  beforeAll(async () => {
    key = await completePreparation();
    prepId = (await send('chemist', 'get', `/api/preparations/${key}`)).body.id;
  }, 60_000);

  it('when each role prints labels, then chemist and technician get 201; QA and admin 403; signed out 401', async () => {
    const expected: Record<Who, number> = { signedOut: 401, qa: 403, admin: 403, technician: 201, chemist: 201 };
    const own = await completePreparation(); // the record below gets its original print in the next test
    for (const who of ROLES) {
      const res = await send(who, 'post', `/api/preparations/${own}/label-prints`, { templateId: tpl['Autosampler vial 25×12 small'], copies: 4, reason: `role check ${who}` });
      expect(res.status, `${who}: ${JSON.stringify(res.body)}`).toBe(expected[who]);
      if (res.status !== 201) expectErrorBody(res.body, who === 'signedOut' ? 'unauthenticated' : 'forbidden');
    }
  });

  it('when labels are printed a first time, then number 1, not a reprint, with who/when/template/copies, and a pdfUrl', async () => {
    const res = await send('technician', 'post', `/api/preparations/${key}/label-prints`, { templateId: tpl['Bench vial 38×25 full'], copies: 2 });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.print).toMatchObject({ number: 1, isReprint: false, copies: 2, templateId: tpl['Bench vial 38×25 full'], templateName: 'Bench vial 38×25 full', identifier: key, printedBy: { fullName: expect.any(String) }, reason: null });
    expect(new Date(res.body.print.printedAt).toISOString()).toBe(res.body.print.printedAt);
    expect(res.body.pdfUrl).toBe(`/api/label-prints/${res.body.print.id}/labels.pdf`);
  });

  it('when the same labels are printed again without a reason, then 400 fields.reason and nothing is recorded', async () => {
    const before = (await auditPrints(prepId)).length;
    const res = await send('chemist', 'post', `/api/preparations/${key}/label-prints`, { templateId: tpl['Bench vial 38×25 full'], copies: 1 });
    expect(res.status).toBe(400);
    expectErrorBody(res.body, 'validation_failed');
    expect(res.body.error.fields.reason).toMatch(/reason/);
    expect(res.body.error.message).toMatch(/already printed/);
    const short = await send('chemist', 'post', `/api/preparations/${key}/label-prints`, { templateId: tpl['Bench vial 38×25 full'], copies: 1, reason: 'x' });
    expect(short.status).toBe(400);
    expect((await auditPrints(prepId)).length).toBe(before);
  });

  it('when the labels are printed again with another template, then it is a reprint all the same: 400 fields.reason without one', async () => {
    const res = await send('technician', 'post', `/api/preparations/${key}/label-prints`, { templateId: tpl['Autosampler vial 25×12 small'], copies: 1 });
    expect(res.status, JSON.stringify(res.body)).toBe(400);
    expect(res.body.error.fields.reason).toMatch(/reason/);
    expect(res.body.error.message).toMatch(/already printed \(1 time\)/);
  });

  it('when reprinted with a reason, then numbers 2 and 3 are reprints whatever the template, audited with the reason, and the history counts them', async () => {
    const r2 = await send('chemist', 'post', `/api/preparations/${key}/label-prints`, { templateId: tpl['Autosampler vial 25×12 small'], copies: 1, reason: 'label smudged by solvent' });
    expect(r2.status, JSON.stringify(r2.body)).toBe(201);
    expect(r2.body.print).toMatchObject({ number: 2, isReprint: true, reason: 'label smudged by solvent' });
    const r3 = await send('technician', 'post', `/api/preparations/${key}/label-prints`, { templateId: tpl['Bench vial 38×25 full'], copies: 3, reason: 'vials moved to a new rack' });
    expect(r3.body.print).toMatchObject({ number: 3, isReprint: true });

    const hist = await send('qa', 'get', `/api/preparations/${key}/label-prints`);
    expect(hist.status).toBe(200);
    expect(hist.body.items.map((p: any) => [p.number, p.isReprint])).toEqual([[3, true], [2, true], [1, false]]); // newest first
    expect(hist.body.counts).toEqual({ originals: 1, reprints: 2, labels: 2 + 1 + 3 });

    const audit = await auditPrints(prepId);
    const last = audit.at(-1)!;
    expect(last.reason).toBe('vials moved to a new rack');
    expect(JSON.parse(last.changes)).toEqual(
      expect.arrayContaining([
        { field: 'kind', oldValue: null, newValue: 'labels' },
        { field: 'number', oldValue: null, newValue: 3 },
        { field: 'isReprint', oldValue: null, newValue: true },
        { field: 'copies', oldValue: null, newValue: 3 },
      ]),
    );
  });

  it.each([
    ['0 copies', { copies: 0 }, 'copies'],
    ['501 copies', { copies: 501 }, 'copies'],
    ['1.5 copies', { copies: 1.5 }, 'copies'],
    ['no template', { templateId: undefined }, 'templateId'],
    ['an unknown template', { templateId: 9999 }, 'templateId'],
  ])('when a print asks for %s, then 400 names %s', async (_what, over, field) => {
    const res = await send('chemist', 'post', `/api/preparations/${key}/label-prints`, { templateId: tpl['A4 sheet 3×8 full'], copies: 1, ...over });
    expect(res.status, JSON.stringify(res.body)).toBe(400);
    expect(Object.keys(res.body.error.fields)).toContain(field);
  });

  it('when the preparation does not exist, then 404', async () => {
    const res = await send('chemist', 'post', '/api/preparations/HWL-2026-9999/label-prints', { templateId: tpl['A4 sheet 3×8 full'], copies: 1 });
    expect(res.status).toBe(404);
    expectErrorBody(res.body, 'not_found');
  });

  it('then label_prints refuses UPDATE and DELETE (append-only triggers)', async () => {
    const refused = async (sql: string) => {
      try {
        await t.sequelize.query(sql);
      } catch (e) {
        const err = e as { message: string; original?: { message?: string } };
        return `${err.original?.message ?? ''} ${err.message}`;
      }
      return 'not refused';
    };
    expect(await refused('UPDATE label_prints SET copies = 99')).toContain(LABEL_PRINTS_APPEND_ONLY);
    expect(await refused('DELETE FROM label_prints')).toContain(LABEL_PRINTS_APPEND_ONLY);
    const [row] = await t.sequelize.query<{ n: number }>('SELECT count(*) AS n FROM label_prints WHERE copies = 99', { type: QueryTypes.SELECT });
    expect(Number(row!.n)).toBe(0);
  });

  it('when a preview is requested by any signed-in role, then a PDF comes back and no print is recorded', async () => {
    const before = { prints: (await send('chemist', 'get', `/api/preparations/${key}/label-prints`)).body.items.length, audit: (await auditPrints(prepId)).length };
    for (const who of ROLES) {
      const res = await send(who, 'get', `/api/preparations/${key}/labels-preview.pdf?templateId=${tpl['Autosampler vial 25×12 small']}&copies=2`);
      expect(res.status, who).toBe(who === 'signedOut' ? 401 : 200);
      if (res.status === 200) expect(res.headers['content-type']).toMatch(/^application\/pdf/);
    }
    expect((await send('chemist', 'get', `/api/preparations/${key}/label-prints`)).body.items.length).toBe(before.prints);
    expect((await auditPrints(prepId)).length).toBe(before.audit);
    const bad = await send('chemist', 'get', `/api/preparations/${key}/labels-preview.pdf?templateId=abc&copies=0`);
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fields).sort()).toEqual(['copies', 'templateId']);
  });

  it('when a stored print PDF or the history is read, then every signed-in role gets 200 and signed out 401; an unknown print is 404', async () => {
    const id = (await send('chemist', 'get', `/api/preparations/${key}/label-prints`)).body.items[0].id;
    for (const who of ROLES) {
      expect((await send(who, 'get', `/api/label-prints/${id}/labels.pdf`)).status, who).toBe(who === 'signedOut' ? 401 : 200);
      expect((await send(who, 'get', `/api/preparations/${key}/label-prints`)).status, who).toBe(who === 'signedOut' ? 401 : 200);
    }
    expect((await send('chemist', 'get', '/api/label-prints/99999/labels.pdf')).status).toBe(404);
    expect((await send('chemist', 'get', '/api/label-prints/abc/labels.pdf')).status).toBe(404);
  });

  it('when a technician tries to change the record, then 403 (plan, template edit, prepared signature); printing does not change the record', async () => {
    const before = (await send('chemist', 'get', `/api/preparations/${key}`)).body;
    expect((await send('technician', 'post', '/api/preparations', { materialId: ids.material })).status).toBe(403);
    expect((await send('technician', 'post', '/api/label-templates', validTemplate('Technician template'))).status).toBe(403);
    expect((await send('technician', 'post', `/api/preparations/${key}/signatures`, { meaning: 'prepared', password: DEMO_PASSWORD, acknowledgeResponsibility: true })).status).toBe(403);
    const after = (await send('chemist', 'get', `/api/preparations/${key}`)).body;
    expect({ version: after.version, status: after.status, result: after.result }).toEqual({ version: before.version, status: before.status, result: before.result });
  });
});

describe('refusals for records that cannot be labelled', () => {
  it('when the record is discarded, then label prints are 409 (previews still work)', async () => {
    const key = await completePreparation();
    const d = await send('chemist', 'post', `/api/preparations/${key}/signatures`, { meaning: 'discarded', reason: 'spilled during transfer', password: DEMO_PASSWORD, acknowledgeResponsibility: true });
    expect(d.status, JSON.stringify(d.body)).toBe(201);
    expect(d.body.status).toBe('discarded');
    const res = await send('technician', 'post', `/api/preparations/${key}/label-prints`, { templateId: tpl['Bench vial 38×25 full'], copies: 1 });
    expect(res.status).toBe(409);
    expectErrorBody(res.body, 'conflict');
    expect(res.body.error.message).toMatch(/discarded/);
  });

  it('when the record is past its expiry date, then label prints are 409', async () => {
    const key = await completePreparation();
    // a record planned long ago: move its expiry into the past (test set-up; the app never edits it so)
    await t.sequelize.query("UPDATE preparations SET expires_on = '2020-01-31' WHERE identifier = :key", { replacements: { key } });
    const res = await send('chemist', 'post', `/api/preparations/${key}/label-prints`, { templateId: tpl['Bench vial 38×25 full'], copies: 1 });
    expect(res.status).toBe(409);
    expect(res.body.error.message).toMatch(/expired on 2020-01-31/);
  });
});

describe('GET /api/preparations/:key/prep-sheet.pdf', () => {
  it('when any signed-in role opens the sheet, then 200 PDF and a "print" audit entry with kind prep_sheet; signed out 401; unknown 404', async () => {
    const key = await completePreparation();
    const id = (await send('chemist', 'get', `/api/preparations/${key}`)).body.id;
    for (const who of ROLES) {
      const res = await send(who, 'get', `/api/preparations/${key}/prep-sheet.pdf`);
      expect(res.status, who).toBe(who === 'signedOut' ? 401 : 200);
      if (res.status === 200) {
        expect(res.headers['content-type']).toMatch(/^application\/pdf/);
        expect(res.headers['content-disposition']).toMatch(new RegExp(`inline; filename="${key}-v\\d+-prep-sheet.pdf"`));
      }
    }
    const audit = await auditPrints(id);
    expect(audit).toHaveLength(4);
    expect(JSON.parse(audit[0]!.changes)).toEqual(expect.arrayContaining([{ field: 'kind', oldValue: null, newValue: 'prep_sheet' }]));
    expect((await send('chemist', 'get', '/api/preparations/HWL-2026-9999/prep-sheet.pdf')).status).toBe(404);
  }, 120_000);

  it('when the sheet is shown as a preview (?preview=1, the Print page), then 200 PDF for every signed-in role and nothing is recorded; a bad preview value is 400', async () => {
    const key = await completePreparation();
    const id = (await send('chemist', 'get', `/api/preparations/${key}`)).body.id;
    for (const who of ROLES) {
      const res = await send(who, 'get', `/api/preparations/${key}/prep-sheet.pdf?preview=1`);
      expect(res.status, who).toBe(who === 'signedOut' ? 401 : 200);
      if (res.status === 200) expect(res.headers['content-disposition']).toMatch(new RegExp(`inline; filename="${key}-v\\d+-prep-sheet-preview.pdf"`));
    }
    expect(await auditPrints(id)).toHaveLength(0);
    const bad = await send('chemist', 'get', `/api/preparations/${key}/prep-sheet.pdf?preview=yes`);
    expect(bad.status).toBe(400);
    expectErrorBody(bad.body);
    expect(Object.keys(bad.body.error.fields)).toEqual(['preview']);
    expect(await auditPrints(id)).toHaveLength(0);
    // asking to print records exactly one entry per print
    expect((await send('technician', 'get', `/api/preparations/${key}/prep-sheet.pdf?preview=0`)).status).toBe(200);
    expect(await auditPrints(id)).toHaveLength(1);
  }, 120_000);
});
