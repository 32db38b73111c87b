// A calibration series read back: the list (newest first, parent filter), one series with every level in full
// (planned aliquot, pipette and flask, planned and recomputed concentration ± U, status, expiry and its basis,
// who prepared and verified), bad keys, and the printed series sheet (A4 PDF) read the way a person or a
// scanner would: text with pdf-parse, the QR code rasterised with poppler's pdftoppm and decoded with zxing.
// Issue: "N levels from one parent; each level becomes its own preparation …; a printed series sheet lists them".
// The expected numbers are the API's own (the same stored decimal strings and display texts, METROLOGY §5.5
// for how they are computed; lineage.test.ts checks the arithmetic); here they must arrive unchanged.
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { BarcodeFormat, BinaryBitmap, DecodeHintType, HybridBinarizer, MultiFormatReader, RGBLuminanceSource } from '@zxing/library';
import { PDFParse } from 'pdf-parse';
import { PNG } from 'pngjs';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEntry } from '../../server/db/models/index.ts';
import { STANDING_NOTE } from '../../server/services/preparation-hazards.ts';
import { VERIFICATION_CHECKLIST } from '../../shared/schemas/preparations.ts';
import { UNVERIFIED_MARK } from '../../shared/schemas/printing.ts';
import { DEMO, DEMO_PASSWORD, expectErrorBody, makeTestApp, sessionCookie, type TestApp } from './helpers/test-app.ts';
import { freeFlask } from './helpers/free-flask.ts';

type Who = 'signedOut' | 'chemist' | 'chemist2' | 'technician' | 'qa' | 'admin';
let t: TestApp;
let work: string;
const cookie: Partial<Record<Who, string>> = {};
const ids = { material: {} as Record<string, number>, balance: {} as Record<string, number>, ware: {} as Record<string, number>, solvent: {} as Record<string, { id: number; lot: string }> };

const send = (who: Who, method: 'get' | 'post', path: string, body?: unknown) => {
  const r = request(t.app)[method](path);
  if (who !== 'signedOut') r.set('Cookie', cookie[who]!);
  return body === undefined ? r : r.send(body as object);
};
const CONDITIONS = { temperatureC: '21', pressureHPa: '985', relativeHumidityPct: '45' };
const CHECKLIST = Object.fromEntries(VERIFICATION_CHECKLIST.map((c) => [c.key, true]));
const signAs = (who: Who, key: string, meaning: 'prepared' | 'verified') =>
  send(who, 'post', `/api/preparations/${key}/signatures`, { meaning, password: DEMO_PASSWORD, acknowledgeResponsibility: true, ...(meaning === 'verified' ? { checklist: CHECKLIST } : {}) });

/** The verified demo lead stock (seeded, signed prepared and verified by two chemists). */
const DEMO_PB = 'HWL-2026-0001';

/** A second verified lead stock made through the API (planned, weighed, made up, prepared, verified). */
async function verifiedStock(): Promise<string> {
  const p = await send('chemist', 'post', '/api/preparations', {
    materialId: ids.material['Pb(NO3)2'],
    analyteFormula: 'Pb',
    target: { value: '1000', unit: 'mg/L' },
    flaskId: ids.ware['VF-100-01'],
    balanceId: ids.balance['BAL-SM1'],
    conditions: { source: 'measured', ...CONDITIONS },
  });
  expect(p.status, JSON.stringify(p.body)).toBe(201);
  const key = p.body.identifier as string;
  expect((await send('chemist', 'post', `/api/preparations/${key}/weighings`, { mode: 'direct', reading: '160.07', unit: 'mg', conditions: CONDITIONS })).status).toBe(201);
  const water = ids.solvent['Ultrapure water']!;
  expect((await send('chemist', 'post', `/api/preparations/${key}/make-up`, { flaskIdentifier: (await freeFlask(t.app, cookie.chemist!)).identifier, solventId: water.id, solventLot: water.lot, solutionTemperatureC: '20.0', applyTemperatureCorrection: false })).status).toBe(201);
  expect((await signAs('chemist', key, 'prepared')).status).toBe(201);
  expect((await signAs('chemist2', key, 'verified')).status).toBe(201);
  return key;
}

/** Proposal → creation, as the series page does it. */
async function makeSeries(parentKey: string, targets: string[]) {
  const prop = await send('chemist', 'post', '/api/series/proposal', { parentKey, levels: targets.map((value) => ({ value, unit: 'mg/L' })) });
  expect(prop.status, JSON.stringify(prop.body)).toBe(200);
  const created = await send('chemist', 'post', '/api/series', {
    parentKey,
    levels: prop.body.levels.map((l: any) => ({ target: l.target, pipetteId: l.choice.pipette.id, flaskId: l.choice.flask.id, ...(l.choice.pipette.kind === 'piston_pipette' ? { aliquotMl: l.choice.aliquotMl } : {}) })),
    notes: 'Calibration for the Pb run',
  });
  expect(created.status, JSON.stringify(created.body)).toBe(201);
  return created.body as { series: { id: number; identifier: string }; preparations: any[] };
}

async function getPdf(path: string, who: Who = 'chemist'): Promise<Buffer> {
  const res = await send(who, 'get', path)
    .buffer(true)
    .parse((r, cb) => {
      const chunks: Buffer[] = [];
      r.on('data', (c: Buffer) => chunks.push(c));
      r.on('end', () => cb(null, Buffer.concat(chunks)));
    });
  expect(res.status, res.status === 200 ? '' : String(res.body)).toBe(200);
  expect(res.headers['content-type']).toMatch(/^application\/pdf/);
  expect(res.headers['content-disposition']).toMatch(/series-sheet\.pdf/);
  const body = res.body as Buffer;
  expect(body.subarray(0, 5).toString()).toBe('%PDF-');
  return body;
}

async function pdfText(buf: Buffer): Promise<{ pages: string[]; all: string }> {
  const parser = new PDFParse({ data: new Uint8Array(buf) });
  try {
    const r = await parser.getText();
    const pages = r.pages.map((p) => p.text.replace(/\s+/g, ' '));
    return { pages, all: pages.join(' ') };
  } finally {
    await parser.destroy();
  }
}

const hasPoppler = (() => {
  try {
    execFileSync('pdftoppm', ['-v'], { stdio: 'ignore' });
    return true;
  } catch {
    return false;
  }
})();

/** First page at `dpi` (poppler's pdftoppm), decoded as a QR code with zxing (white quiet zone added). */
function decodeQr(pdf: Buffer, dpi = 150): string {
  const file = join(work, 'sheet.pdf');
  writeFileSync(file, pdf);
  execFileSync('pdftoppm', ['-r', String(dpi), '-png', '-f', '1', '-l', '1', file, join(work, 'sheet')]);
  const png = PNG.sync.read(readFileSync(join(work, readdirSync(work).find((f) => f.startsWith('sheet-') && f.endsWith('.png'))!)));
  const pad = 10;
  const w = png.width + 2 * pad;
  const h = png.height + 2 * pad;
  const lum = new Uint8ClampedArray(w * h).fill(255);
  for (let y = 0; y < png.height; y++) {
    for (let x = 0; x < png.width; x++) {
      const i = (y * png.width + x) * 4;
      const a = png.data[i + 3]! / 255;
      const grey = (png.data[i]! * 299 + png.data[i + 1]! * 587 + png.data[i + 2]! * 114) / 1000;
      lum[(y + pad) * w + (x + pad)] = Math.round(grey * a + 255 * (1 - a));
    }
  }
  const hints = new Map<DecodeHintType, unknown>([
    [DecodeHintType.POSSIBLE_FORMATS, [BarcodeFormat.QR_CODE]],
    [DecodeHintType.TRY_HARDER, true],
  ]);
  const reader = new MultiFormatReader();
  reader.setHints(hints);
  return reader.decode(new BinaryBitmap(new HybridBinarizer(new RGBLuminanceSource(lum, w, h))), hints).getText();
}

let first: Awaited<ReturnType<typeof makeSeries>>;
let second: Awaited<ReturnType<typeof makeSeries>>;
let otherParent: string;
let level1: any;

beforeAll(async () => {
  t = await makeTestApp();
  work = mkdtempSync(join(tmpdir(), 'tarebook-series-'));
  for (const who of ['chemist', 'chemist2', 'technician', 'qa', 'admin'] as const) cookie[who] = await sessionCookie(t.app, DEMO[who]);
  const get = async (p: string) => (await send('chemist', 'get', p)).body.items as any[];
  for (const m of await get('/api/materials?pageSize=100')) ids.material[m.formula] = m.id;
  for (const b of await get('/api/balances?pageSize=100')) ids.balance[b.identifier] = b.id;
  for (const w of await get('/api/volumetric-ware?pageSize=100')) ids.ware[w.identifier] = w.id;
  for (const s of await get('/api/solvents?pageSize=100')) ids.solvent[s.name] = { id: s.id, lot: s.lot };

  first = await makeSeries(DEMO_PB, ['1', '2', '5', '10', '20']);
  // level 1 made at the bench: aliquot with its planned pipette, make-up in its planned flask, prepared, verified
  const l1 = first.preparations[0];
  const pipette = l1.dilution.plannedAliquot.pipette;
  const aliquot = await send('chemist', 'post', `/api/preparations/${l1.identifier}/aliquots`, { pipetteIdentifier: pipette.identifier, ...(pipette.snapshot.kind === 'piston_pipette' ? { volumeMl: l1.dilution.plannedAliquot.volumeMl } : {}) });
  expect(aliquot.status, JSON.stringify(aliquot.body)).toBe(201);
  const water = ids.solvent['Ultrapure water']!;
  const made = await send('chemist', 'post', `/api/preparations/${l1.identifier}/make-up`, { flaskIdentifier: l1.snapshot.flask.identifier, solventId: water.id, solventLot: water.lot, solutionTemperatureC: '20.0', applyTemperatureCorrection: false });
  expect(made.status, JSON.stringify(made.body)).toBe(201);
  expect((await signAs('chemist', l1.identifier, 'prepared')).status).toBe(201);
  const verified = await signAs('chemist2', l1.identifier, 'verified');
  expect(verified.status, JSON.stringify(verified.body)).toBe(201);
  level1 = verified.body;

  otherParent = await verifiedStock();
  second = await makeSeries(otherParent, ['2', '4', '6', '8', '10']);
}, 120_000);
afterAll(async () => {
  await t.close();
  rmSync(work, { recursive: true, force: true });
});

describe('GET /api/series', () => {
  it('lists every series newest first with its parent and levels (any signed-in role)', async () => {
    const res = await send('qa', 'get', '/api/series');
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.total).toBe(2);
    expect(res.body.items.map((s: any) => s.identifier)).toEqual([second.series.identifier, first.series.identifier]);
    const [b, a] = res.body.items;
    expect(a.parent.identifier).toBe(DEMO_PB);
    expect(b.parent.identifier).toBe(otherParent);
    expect(a.levels.map((l: any) => l.identifier)).toEqual(first.preparations.map((p) => p.identifier));
    expect(a.levels.map((l: any) => l.target.value)).toEqual(['1', '2', '5', '10', '20']);
    expect(a.levels[0].status).toBe('verified');
    expect(a.levels[1].status).toBe('planned');
    expect(a.createdBy.fullName).toBeTruthy();
  });

  it('filters by parent (identifier or id); a parent with no series gives an empty list', async () => {
    const byId = (await send('technician', 'get', `/api/series?parent=${otherParent}`)).body;
    expect(byId.items.map((s: any) => s.identifier)).toEqual([second.series.identifier]);
    const parentId = first.preparations[0].dilution.parent.id;
    const byNumber = (await send('technician', 'get', `/api/series?parent=${parentId}`)).body;
    expect(byNumber.items.map((s: any) => s.identifier)).toEqual([first.series.identifier]);
    const none = await send('technician', 'get', '/api/series?parent=HWL-2026-0002');
    expect(none.status).toBe(200);
    expect(none.body).toMatchObject({ items: [], total: 0 });
  });

  it('pages: pageSize 1 gives the newest, page 2 the next', async () => {
    const p1 = (await send('chemist', 'get', '/api/series?pageSize=1')).body;
    const p2 = (await send('chemist', 'get', '/api/series?pageSize=1&page=2')).body;
    expect(p1.items.map((s: any) => s.identifier)).toEqual([second.series.identifier]);
    expect(p2.items.map((s: any) => s.identifier)).toEqual([first.series.identifier]);
    expect(p1.total).toBe(2);
  });

  it('bad filters are a 400 at the field', async () => {
    const bad = await send('chemist', 'get', '/api/series?parent=lead%20stock');
    expect(bad.status).toBe(400);
    expectErrorBody(bad.body);
    expect(bad.body.error.fields.parent).toMatch(/identifier such as HWL-2026-0001/);
    const size = await send('chemist', 'get', '/api/series?pageSize=0');
    expect(size.status).toBe(400);
    expect(size.body.error.fields.pageSize).toMatch(/1 to 100/);
  });
});

describe('GET /api/series/:key', () => {
  it('every level in full: plan, ware, planned and recomputed concentration, state, expiry and signatures, as each record shows them', async () => {
    const res = await send('technician', 'get', `/api/series/${first.series.identifier}`);
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const s = res.body;
    expect(s.identifier).toBe(first.series.identifier);
    expect(s.levels.map((l: any) => l.levelNo)).toEqual([1, 2, 3, 4, 5]);
    expect(s.notes).toBe('Calibration for the Pb run');
    for (const [i, l] of s.levels.entries()) {
      const p = i === 0 ? level1 : (await send('technician', 'get', `/api/preparations/${first.preparations[i].identifier}`)).body;
      expect(l.identifier).toBe(p.identifier);
      expect(l.status).toBe(p.status);
      expect(l.version).toBe(p.version);
      expect(l.target).toEqual(p.target);
      // the plan, exactly as stored (decimal strings, display from plan.dilution.planned)
      expect(l.aliquot.volumeMl).toBe(p.dilution.plannedAliquot.volumeMl);
      expect(l.aliquot.pipette.identifier).toBe(p.dilution.plannedAliquot.pipette.identifier);
      expect(l.pipetteIdentifier).toBe(p.dilution.plannedAliquot.pipette.identifier);
      expect(l.flask.identifier).toBe(p.snapshot.flask.identifier);
      expect(l.flaskIdentifier).toBe(p.snapshot.flask.identifier);
      expect(l.flask.nominalVolumeMl).toBe(p.dilution.plannedFinalMl);
      expect(l.planned.display).toBe(p.dilution.planned.display);
      expect(l.planned.value).toBe(p.dilution.planned.value);
      expect(l.planned.expandedUncertainty).toBe(p.dilution.planned.expandedUncertainty);
      expect(l.plannedConcentration).toBe(p.dilution.planned.value);
      expect(l.expiresOn).toBe(p.expiry.expiresOn);
      expect(l.expiryReason).toBe(p.expiry.reason);
      expect(l.planned.display).toMatch(/^\d+\.\d+ ± \d+\.\d+ mg\/L/);
    }
    const [l1, l2] = s.levels;
    // level 1: aliquot and make-up recorded, so the recomputed result is there; prepared and verified
    expect(l1.result.display).toBe(level1.dilution.result.display);
    expect(l1.result.value).toBe(level1.dilution.result.value);
    expect(l1.result.basedOn).toEqual(level1.dilution.result.basedOn);
    expect(l1.aliquotRecorded).toEqual({ pipetteIdentifier: level1.dilution.aliquots[0].pipette.identifier, volumeMl: level1.dilution.aliquots[0].volumeMl });
    expect(l1.stage).toBe('complete');
    expect(l1.status).toBe('verified');
    const sigs = level1.signatures.filter((g: any) => g.valid);
    expect(l1.preparedBy).toEqual({ id: sigs[0].signer.id, fullName: sigs[0].signer.fullName, signedAt: sigs[0].signedAt });
    expect(l1.verifiedBy.fullName).toBe(sigs.find((g: any) => g.meaning === 'verified').signer.fullName);
    expect(l1.preparedBy.fullName).not.toBe(l1.verifiedBy.fullName);
    // level 2: planned only
    expect(l2.result).toBeUndefined();
    expect(l2.aliquotRecorded).toBeUndefined();
    expect(l2.preparedBy).toBeUndefined();
    expect(l2.status).toBe('planned');
  });

  it('the parent as used: identifier, concentration ± U and expiry, the reference material lot; the cautions for pipetting its nitric-acid solution', async () => {
    const s = (await send('qa', 'get', `/api/series/${first.series.identifier}`)).body;
    const pb = (await send('qa', 'get', `/api/preparations/${DEMO_PB}`)).body;
    expect(s.parent).toMatchObject({ identifier: DEMO_PB, version: pb.version, concentrationDisplay: pb.result.concentration.display, expiresOn: pb.expiry.expiresOn, status: 'verified' });
    expect(s.parent.material).toMatchObject({ name: pb.snapshot.material.name, lot: pb.snapshot.material.lot, certificateNumber: pb.snapshot.material.certificateNumber });
    // the stock weighs the solid; the series pipettes its solution: no dust, and the stock's matrix (2 % nitric acid) named
    expect(pb.hazards.cautions.some((c: string) => /dust/.test(c))).toBe(true);
    expect(s.hazards.cautions.some((c: string) => /dust/.test(c))).toBe(false);
    expect(s.hazards.task).toMatch(/^Pipetting a solution/);
    expect(s.hazards.solvents).toEqual(expect.arrayContaining([expect.objectContaining({ name: 'Nitric acid 2 % (v/v)', hazards: 'corrosive, oxidising' })]));
    expect(s.hazards.cautions.some((c: string) => /^Nitric acid is corrosive/.test(c))).toBe(true);
    expect(s.hazards.cautions).not.toContain(STANDING_NOTE);
    expect(s.hazards.sdsNote).toBe(STANDING_NOTE);
  });

  it('by numeric id as well as by identifier', async () => {
    const res = await send('chemist', 'get', `/api/series/${second.series.id}`);
    expect(res.status).toBe(200);
    expect(res.body.identifier).toBe(second.series.identifier);
    expect(res.body.parent.identifier).toBe(otherParent);
  });

  it('unknown series → 404; a key that is no series identifier → 400 (also for the sheet)', async () => {
    for (const path of ['/api/series/HWL-2026-S999', '/api/series/987654', '/api/series/HWL-2026-S999/sheet.pdf']) {
      const res = await send('chemist', 'get', path);
      expect(res.status, path).toBe(404);
      expectErrorBody(res.body);
    }
    for (const path of ['/api/series/not-a-series', `/api/series/${DEMO_PB}`, '/api/series/0', '/api/series/not-a-series/sheet.pdf']) {
      const res = await send('chemist', 'get', path);
      expect(res.status, path).toBe(400);
      expectErrorBody(res.body);
      expect(res.body.error.fields.key).toMatch(/HWL-2026-S001/);
    }
  });
});

describe('GET /api/series/:key/sheet.pdf', () => {
  let pdf: Buffer;
  let text: { pages: string[]; all: string };
  let series: any;
  let printsBefore: number;

  beforeAll(async () => {
    series = (await send('chemist', 'get', `/api/series/${first.series.identifier}`)).body;
    printsBefore = await AuditEntry.count({ where: { entity: 'series', entityId: String(first.series.id), action: 'print' } });
    pdf = await getPdf(`/api/series/${first.series.identifier}/sheet.pdf`, 'technician');
    text = await pdfText(pdf);
    if (process.env.SERIES_SHEET_OUT) writeFileSync(process.env.SERIES_SHEET_OUT, pdf); // to look at it by eye
  }, 60_000);

  it('is an A4 page (landscape) headed with the lab, the series identifier and the parent', () => {
    // A4 = 595.28 × 841.89 pt (ISO 216); landscape puts the long side across
    expect(pdf.toString('latin1')).toMatch(/\/MediaBox \[0 0 841\.89\d* 595\.28\d*\]/);
    expect(text.all).toContain('Harbourside Water Laboratory');
    expect(text.all).toContain(`Calibration series ${first.series.identifier}`);
    expect(text.all).toContain(series.parent.identifier);
    expect(text.all).toContain(series.parent.concentrationDisplay);
    expect(text.all).toContain(`lot ${series.parent.material.lot}`);
    expect(text.all).toContain(series.parent.expiresOn);
    expect(text.all).toContain(series.createdBy.fullName);
    expect(text.all).toMatch(/Page 1 of \d/);
  });

  it('lists every level with its identifier, target, aliquot, flask, planned concentration ± U (digits and decimal points as the API gives them), expiry and status', () => {
    for (const l of series.levels) {
      expect(text.all).toContain(l.identifier);
      expect(text.all).toContain(`${l.target.value} ${l.target.unit}`);
      expect(text.all).toContain(l.aliquot.pipette.identifier);
      expect(text.all).toContain(`${l.aliquot.volumeMl} mL`);
      expect(text.all).toContain(l.flask.identifier);
      expect(l.planned.display).toMatch(/\d\.\d/);
      expect(text.all, l.planned.display).toContain(l.planned.display);
      expect(text.all).toContain(l.expiresOn);
    }
    expect(text.all).toContain(series.levels[0].result.display); // level 1 recomputed
    expect(text.all).toContain(series.levels[0].verifiedBy.fullName);
    expect(text.all).toMatch(/\bverified\b/);
    expect(text.all).toMatch(/\bplanned\b/);
    expect(text.all).not.toMatch(/(^|[\s(])\.\d/); // no number lost the digit before its point
  });

  it('has write-in lines where no result is recorded yet, the cautions, the signature lines and the unverified mark', () => {
    expect((text.all.match(/write in:/g) ?? []).length).toBe(series.levels.filter((l: any) => !l.result).length);
    for (const c of series.hazards.cautions) expect(text.all).toContain(c);
    expect(text.all.split(series.hazards.sdsNote).length - 1).toBe(1); // the SDS line once
    expect(text.all).toContain('Nitric acid 2 % (v/v): corrosive, oxidising');
    expect(text.all).toContain('Prepared by (name)');
    expect(text.all).toContain('Checked / verified by (name)');
    expect(text.all).toContain(`${UNVERIFIED_MARK} (4 of 5 levels not verified)`);
  });

  it('is recorded in the audit trail as a print of the series', async () => {
    const after = await AuditEntry.findAll({ where: { entity: 'series', entityId: String(first.series.id), action: 'print' }, order: [['id', 'ASC']] });
    expect(after.length).toBe(printsBefore + 1);
    const changes = JSON.stringify(after.at(-1)!.changes);
    expect(changes).toContain('series_sheet');
    expect(changes).toContain(series.levels[0].identifier);
  });

  it.skipIf(!hasPoppler)('the glyphs as drawn keep the digits too (poppler pdftotext; the prep sheet once lost decimal points there)', () => {
    const drawn = execFileSync('pdftotext', ['-', '-'], { input: pdf }).toString().replace(/\s+/g, ' ');
    for (const l of series.levels) expect(drawn, l.planned.display).toContain(l.planned.display);
    expect(drawn).toContain(series.parent.concentrationDisplay);
    expect(drawn).not.toMatch(/(^|[\s(])\.\d/);
  });

  it.skipIf(!hasPoppler)('its QR code decodes to the series identifier (pdftoppm at 150 dpi, zxing)', () => {
    expect(decodeQr(pdf)).toBe(first.series.identifier);
  });
});

describe('route × role (REQUIREMENTS AC-02)', () => {
  const WHO: Who[] = ['signedOut', 'technician', 'qa', 'admin', 'chemist'];
  it('GET /api/series, /api/series/:key and /api/series/:key/sheet.pdf: every signed-in role 200, signed out 401', async () => {
    for (const who of WHO) {
      for (const path of ['/api/series', `/api/series/${second.series.identifier}`, `/api/series/${second.series.identifier}/sheet.pdf`]) {
        const res = await send(who, 'get', path);
        expect(res.status, `${who} ${path}`).toBe(who === 'signedOut' ? 401 : 200);
      }
    }
  }, 60_000);
});

describe('a level past its expiry', () => {
  it('reads as expired in the list and on the series page (the rule of the record itself, REQUIREMENTS EX-04)', async () => {
    const last = second.preparations.at(-1);
    await t.sequelize.query("UPDATE preparations SET expires_on = '2020-01-31' WHERE id = :id", { replacements: { id: last.id } });
    const record = (await send('qa', 'get', `/api/preparations/${last.identifier}`)).body;
    expect(record.status).toBe('expired');
    const listed = (await send('qa', 'get', `/api/series?parent=${otherParent}`)).body.items[0];
    expect(listed.levels.at(-1)).toMatchObject({ identifier: last.identifier, status: 'expired', expiresOn: '2020-01-31' });
    expect(listed.levels[0].status).toBe('planned');
    const detail = (await send('qa', 'get', `/api/series/${second.series.identifier}`)).body;
    expect(detail.levels.at(-1)).toMatchObject({ identifier: last.identifier, status: 'expired', expiresOn: '2020-01-31' });
  });
});
