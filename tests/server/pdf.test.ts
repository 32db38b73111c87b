// Prep sheet and label PDFs read back the way a person or a scanner would: text extracted with pdf-parse,
// pages rasterised with poppler's pdftoppm, and the Data Matrix / QR codes decoded with @zxing/library.
// REQUIREMENTS 1B (LB-01, LB-03, LB-05, LB-07) and the printing issue: identifier, concentration with
// U (k = 2), status and the unverified mark on every page, signatures, "Page x of N", codes that scan.
// Each PDF is rendered once in beforeAll and shared by the checks below.
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import bwipjs from 'bwip-js/node';
import { BarcodeFormat, BinaryBitmap, DecodeHintType, HybridBinarizer, MultiFormatReader, RGBLuminanceSource } from '@zxing/library';
import { PDFParse } from 'pdf-parse';
import { PNG } from 'pngjs';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { PREVIEW_MARK, REPRINT_MARK, UNVERIFIED_MARK } from '../../shared/schemas/printing.ts';
import { VERIFICATION_CHECKLIST } from '../../shared/schemas/preparations.ts';
import { dataMatrixOptions } from '../../server/pdf/barcodes.ts';
import { DEMO, DEMO_PASSWORD, makeTestApp, sessionCookie, type TestApp } from './helpers/test-app.ts';
import { freeFlask } from './helpers/free-flask.ts';

let t: TestApp;
let work: string;
const cookie: Record<string, string> = {};
const templateId: Record<string, number> = {};

/** Two lead standards made in beforeAll through the API: one left unsigned, one signed and verified. */
let UNVERIFIED_KEY = '';
let VERIFIED_KEY = '';

const pdfs: Record<string, Buffer> = {};
const texts: Record<string, { pages: string[]; all: string }> = {};
let unverifiedDetail: any;
let verifiedDetail: any;

async function pdfText(buf: Buffer): Promise<{ pages: string[]; all: string }> {
  const parser = new PDFParse({ data: new Uint8Array(buf) });
  try {
    const r = await parser.getText();
    // pdf-parse keeps each line; collapse whitespace so phrases wrapped across lines still match
    const pages = r.pages.map((p) => p.text.replace(/\s+/g, ' '));
    return { pages, all: pages.join(' ') };
  } finally {
    await parser.destroy();
  }
}

async function getPdf(path: string, who = 'chemist'): Promise<Buffer> {
  const res = await request(t.app)
    .get(path)
    .set('Cookie', cookie[who]!)
    .buffer(true)
    .parse((r, cb) => {
      const chunks: Buffer[] = [];
      r.on('data', (c: Buffer) => chunks.push(c));
      r.on('end', () => cb(null, Buffer.concat(chunks)));
    });
  expect(res.status, res.status === 200 ? '' : res.body.toString()).toBe(200);
  expect(res.headers['content-type']).toMatch(/^application\/pdf/);
  const body = res.body as Buffer;
  expect(body.subarray(0, 5).toString()).toBe('%PDF-');
  return body;
}

// ------------------------------------------------------------------ barcode decoding (zxing)

/** Grey levels of an RGBA PNG (alpha composited on white), with a white quiet zone of `pad` px around it. */
function luminance(png: PNG, pad: number, crop?: { x: number; y: number; w: number; h: number }) {
  const c = crop ?? { x: 0, y: 0, w: png.width, h: png.height };
  const w = c.w + 2 * pad;
  const h = c.h + 2 * pad;
  const lum = new Uint8ClampedArray(w * h).fill(255);
  for (let y = 0; y < c.h; y++) {
    for (let x = 0; x < c.w; x++) {
      const i = ((c.y + y) * png.width + (c.x + x)) * 4;
      const a = png.data[i + 3]! / 255;
      const grey = (png.data[i]! * 299 + png.data[i + 1]! * 587 + png.data[i + 2]! * 114) / 1000;
      lum[(y + pad) * w + (x + pad)] = Math.round(grey * a + 255 * (1 - a));
    }
  }
  return { lum, w, h };
}

function decode(png: PNG, format: BarcodeFormat, pad = 40, crop?: { x: number; y: number; w: number; h: number }): string {
  const { lum, w, h } = luminance(png, pad, crop);
  const hints = new Map<DecodeHintType, unknown>([
    [DecodeHintType.POSSIBLE_FORMATS, [format]],
    [DecodeHintType.TRY_HARDER, true],
  ]);
  const reader = new MultiFormatReader();
  reader.setHints(hints);
  return reader.decode(new BinaryBitmap(new HybridBinarizer(new RGBLuminanceSource(lum, w, h))), hints).getText();
}

/** Rasterises the first page of a PDF at `dpi` with poppler's pdftoppm (optionally only a region, in px). */
function rasterise(pdf: Buffer, name: string, dpi = 300, region?: { x: number; y: number; w: number; h: number }): PNG {
  const file = join(work, `${name}.pdf`);
  writeFileSync(file, pdf);
  const crop = region ? ['-x', String(region.x), '-y', String(region.y), '-W', String(region.w), '-H', String(region.h)] : [];
  execFileSync('pdftoppm', ['-r', String(dpi), '-png', '-f', '1', '-l', '1', ...crop, file, join(work, name)]);
  const out = readdirSync(work).find((f) => f.startsWith(`${name}-`) && f.endsWith('.png'))!;
  return PNG.sync.read(readFileSync(join(work, out)));
}

// ------------------------------------------------------------------ setup

beforeAll(async () => {
  t = await makeTestApp();
  work = mkdtempSync(join(tmpdir(), 'tarebook-pdf-'));
  for (const who of ['chemist', 'chemist2', 'technician', 'qa', 'admin'] as const) cookie[who] = await sessionCookie(t.app, DEMO[who]);
  const list = await request(t.app).get('/api/label-templates').set('Cookie', cookie.chemist!);
  for (const tpl of list.body.items) templateId[tpl.name] = tpl.id;

  // planned, weighed and made up by the chemist (the same steps as a bench user, through the API)
  const ids = { material: 0, balance: 0, flask: 0, solvent: { id: 0, lot: '' } };
  const items = async (path: string) => (await request(t.app).get(path).set('Cookie', cookie.chemist!)).body.items as any[];
  ids.material = (await items('/api/materials?pageSize=100')).find((m) => m.formula === 'Pb(NO3)2').id;
  ids.balance = (await items('/api/balances?pageSize=100')).find((b) => b.identifier === 'BAL-SM1').id;
  ids.flask = (await items('/api/volumetric-ware?pageSize=100')).find((w) => w.identifier === 'VF-100-01').id;
  const water = (await items('/api/solvents?pageSize=100')).find((x) => x.name === 'Ultrapure water');
  ids.solvent = { id: water.id, lot: water.lot };
  const conditions = { temperatureC: '21', pressureHPa: '985', relativeHumidityPct: '45' };
  const complete = async (): Promise<string> => {
    const send = (path: string, body: object) => request(t.app).post(path).set('Cookie', cookie.chemist!).send(body);
    const p = await send('/api/preparations', { materialId: ids.material, analyteFormula: 'Pb', target: { value: '1000', unit: 'mg/L' }, flaskId: ids.flask, balanceId: ids.balance, conditions: { source: 'measured', ...conditions } });
    expect(p.status, JSON.stringify(p.body)).toBe(201);
    const w = await send(`/api/preparations/${p.body.identifier}/weighings`, { mode: 'direct', reading: '160.07', unit: 'mg', conditions });
    expect(w.status, JSON.stringify(w.body)).toBe(201);
    const m = await send(`/api/preparations/${p.body.identifier}/make-up`, { flaskIdentifier: (await freeFlask(t.app, cookie.chemist!)).identifier, solventId: ids.solvent.id, solventLot: ids.solvent.lot, solutionTemperatureC: '20.0', applyTemperatureCorrection: false });
    expect(m.status, JSON.stringify(m.body)).toBe(201);
    return p.body.identifier as string;
  };
  UNVERIFIED_KEY = await complete();
  VERIFIED_KEY = await complete();

  // "prepared" by the preparer, "verified" by a second chemist who entered nothing
  const checklist = Object.fromEntries(VERIFICATION_CHECKLIST.map((i) => [i.key, true]));
  const prep = await request(t.app).post(`/api/preparations/${VERIFIED_KEY}/signatures`).set('Cookie', cookie.chemist!).send({ meaning: 'prepared', password: DEMO_PASSWORD, acknowledgeResponsibility: true });
  expect(prep.status, JSON.stringify(prep.body)).toBe(201);
  const ver = await request(t.app).post(`/api/preparations/${VERIFIED_KEY}/signatures`).set('Cookie', cookie.chemist2!).send({ meaning: 'verified', password: DEMO_PASSWORD, acknowledgeResponsibility: true, checklist });
  expect(ver.status, JSON.stringify(ver.body)).toBe(201);

  unverifiedDetail = (await request(t.app).get(`/api/preparations/${UNVERIFIED_KEY}`).set('Cookie', cookie.chemist!)).body;
  verifiedDetail = (await request(t.app).get(`/api/preparations/${VERIFIED_KEY}`).set('Cookie', cookie.chemist!)).body;
  expect(verifiedDetail.status).toBe('verified');

  pdfs.unverifiedSheet = await getPdf(`/api/preparations/${UNVERIFIED_KEY}/prep-sheet.pdf`, 'technician');
  pdfs.verifiedSheet = await getPdf(`/api/preparations/${VERIFIED_KEY}/prep-sheet.pdf`, 'qa');

  const print = async (key: string, tpl: string, body: Record<string, unknown> = {}) => {
    const r = await request(t.app).post(`/api/preparations/${key}/label-prints`).set('Cookie', cookie.technician!).send({ templateId: templateId[tpl], copies: 3, ...body });
    expect(r.status, JSON.stringify(r.body)).toBe(201);
    return getPdf(r.body.pdfUrl);
  };
  pdfs.fullUnverified = await print(UNVERIFIED_KEY, 'Bench vial 38×25 full');
  pdfs.fullReprint = await print(UNVERIFIED_KEY, 'Bench vial 38×25 full', { reason: 'first roll jammed in the printer' });
  pdfs.sheetVerified = await print(VERIFIED_KEY, 'A4 sheet 3×8 full', { copies: 30 });
  // a record's second label print is a reprint whatever the template: it needs a reason
  pdfs.smallVerified = await print(VERIFIED_KEY, 'Autosampler vial 25×12 small', { reason: 'vials for the autosampler rack' });
  pdfs.preview = await getPdf(`/api/preparations/${VERIFIED_KEY}/labels-preview.pdf?templateId=${templateId['Bench vial 38×25 full']}&copies=2`, 'qa');
  for (const [k, v] of Object.entries(pdfs)) texts[k] = await pdfText(v);
}, 240_000);

afterAll(async () => {
  await t.close();
  rmSync(work, { recursive: true, force: true });
});

// ------------------------------------------------------------------ prep sheet

describe('prep sheet text (pdf-parse)', () => {
  it('when a complete but unsigned record is printed, then every page has the lab, identifier and version, status and the unverified mark', () => {
    const { pages } = texts.unverifiedSheet!;
    expect(pages.length).toBeGreaterThanOrEqual(2);
    pages.forEach((p, i) => {
      expect(p, `page ${i + 1}`).toContain('Harbourside Water Laboratory');
      expect(p, `page ${i + 1}`).toContain(`${UNVERIFIED_KEY} v${unverifiedDetail.version}`);
      expect(p, `page ${i + 1}`).toContain('Status: planned');
      expect(p, `page ${i + 1}`).toContain(UNVERIFIED_MARK);
      expect(p, `page ${i + 1}`).toContain(`Page ${i + 1} of ${pages.length}`);
    });
  });

  it('then it shows the concentration with its expanded uncertainty (k = 2) and unit, as the record displays it', () => {
    const display = unverifiedDetail.result.concentration.display as string;
    expect(display).toMatch(/± .* mg\/L \(k = 2\)$/);
    expect(texts.unverifiedSheet!.all).toContain(display);
  });

  it('then it lists the reference material, the weighing as read with the balance and its calibration, the flask and solvent, the budget, expiry, hazards and an audit summary', () => {
    const all = texts.unverifiedSheet!.all;
    const d = unverifiedDetail;
    const m = d.snapshot.material;
    expect(all).toContain(m.lot);
    expect(all).toContain(m.certificateNumber);
    expect(all).toContain(`${m.purity.value} ± ${m.purity.expandedUncertainty}`);
    for (const w of d.weighings) {
      expect(all).toContain(w.mode === 'direct' ? `${w.reading.value} ${w.reading.unit}` : `before ${w.before.value} ${w.before.unit}`);
      expect(all).toContain(`${w.balance.identifier}: in service; calibrated ${w.balance.snapshot.calibratedOn}, due ${w.balance.snapshot.calibrationDueOn}`);
    }
    expect(all).toContain(d.makeUp.flask.identifier);
    expect(all).toContain(`lot ${d.makeUp.solvent.lot}`);
    expect(all).toContain('Uncertainty budget (GUM)');
    expect(all).toContain('Purity (mass fraction)');
    expect(all).toContain(`Expires on ${d.expiry.expiresOn}`);
    for (const p of d.hazards.pictograms) expect(all).toContain(p);
    // the cautions of the task, the solvent's own hazards named, the SDS line once (issue 16 §4)
    expect(all).toContain(d.hazards.task);
    for (const sv of d.hazards.solvents.filter((x: { hazards: string | null }) => x.hazards)) expect(all).toContain(`${sv.name}: ${sv.hazards}`);
    expect(all.split(d.hazards.sdsNote).length - 1).toBe(1);
    expect(all).toContain('Audit summary');
    expect(all).toMatch(/\d+ audit entries for this record/);
    expect(all).toContain('No signatures yet');
  });

  it('when the record is verified, then the sheet shows VERIFIED, no unverified mark, and each signature with name, meaning, date-time with zone and version', () => {
    const { pages, all } = texts.verifiedSheet!;
    for (const p of pages) {
      expect(p).not.toContain(UNVERIFIED_MARK);
      expect(p).toContain('VERIFIED');
      expect(p).toContain('Status: verified');
    }
    expect(verifiedDetail.signatures.length).toBeGreaterThanOrEqual(2);
    for (const s of verifiedDetail.signatures) {
      expect(all).toContain(s.signer.fullName);
      expect(all).toContain(s.meaningText.split(' (')[0]); // "Prepared by", "Verified by"
    }
    expect(all).toContain('Prepared by (authorship and responsibility)');
    // times in the lab zone (Europe/London) with the offset, e.g. "2026-12-01 23:41 GMT (UTC+00:00)"
    expect(all).toMatch(/\d{4}-\d{2}-\d{2} \d{2}:\d{2} (GMT|BST) \(UTC[+-]\d{2}:\d{2}\)/);
    expect(all).toContain(`v${verifiedDetail.version}, valid`);
  });

  it('then the QR code on page 1 decodes to "<identifier>;v<version>"', () => {
    const page = rasterise(pdfs.verifiedSheet!, 'sheet-qr', 150);
    expect(decode(page, BarcodeFormat.QR_CODE, 10)).toBe(`${VERIFIED_KEY};v${verifiedDetail.version}`);
  });
});

// ------------------------------------------------------------------ labels

describe('labels (text and Data Matrix)', () => {
  it('when the Data Matrix is rendered exactly as the label does (bwip-js), then zxing decodes the identifier', async () => {
    const png = PNG.sync.read(await bwipjs.toBuffer(dataMatrixOptions(UNVERIFIED_KEY) as bwipjs.RenderOptions));
    expect(decode(png, BarcodeFormat.DATA_MATRIX)).toBe(UNVERIFIED_KEY);
  });

  it('when a full label printed from the PDF page at 300 dpi is scanned, then the Data Matrix decodes to the identifier', () => {
    const page = rasterise(pdfs.fullUnverified!, 'full-label');
    // the roll page is the label (38 × 25 mm ≈ 449 × 295 px); the code sits in its left part
    expect(page.width).toBeGreaterThan(400);
    expect(decode(page, BarcodeFormat.DATA_MATRIX, 20, { x: 0, y: 0, w: Math.round(page.width * 0.45), h: page.height })).toBe(UNVERIFIED_KEY);
  });

  it('when the first label of an A4 sheet is cropped from the 300 dpi page, then its Data Matrix decodes to the identifier', () => {
    // A4 3×8 template: left margin 7.2 mm, top 12.9 mm, label 63.5 × 33.9 mm (migration 0007 defaults)
    const px = (mm: number) => Math.round((mm / 25.4) * 300);
    const firstLabel = rasterise(pdfs.sheetVerified!, 'sheet-labels', 300, { x: px(7.2), y: px(12.9), w: px(63.5 * 0.5), h: px(33.9) });
    expect(decode(firstLabel, BarcodeFormat.DATA_MATRIX, 20)).toBe(VERIFIED_KEY);
  });

  it('when a full label is printed before verification, then each copy has identifier, name, concentration, solvent, dates, initials, storage, pictograms and the unverified mark', () => {
    const { pages } = texts.fullUnverified!;
    const d = unverifiedDetail;
    expect(pages).toHaveLength(3); // 3 copies, one per roll page
    for (const p of pages) {
      expect(p).toContain(UNVERIFIED_KEY);
      expect(p).toContain(`${d.analyteFormula} standard from ${d.materialName}`);
      expect(p).toContain(d.result.concentration.display);
      expect(p).toContain(`in ${d.makeUp.solvent.name}`);
      expect(p).toMatch(/Prep \d{4}-\d{2}-\d{2}/);
      expect(p).toContain(d.createdBy.initials);
      expect(p).toContain(`Exp ${d.expiry.expiresOn}`);
      expect(p).toContain(UNVERIFIED_MARK);
      for (const g of d.hazards.pictograms) expect(p).toContain(g);
      expect(p).not.toContain(REPRINT_MARK);
      expect(p).not.toContain(PREVIEW_MARK);
    }
  });

  it('when the same labels are printed again, then every copy says "REPRINT 1"', () => {
    for (const p of texts.fullReprint!.pages) expect(p).toContain(`${REPRINT_MARK} 1`);
  });

  it('when a small-vial label of a verified record is printed, then it has identifier, short name, concentration and expiry, and no unverified mark', () => {
    const d = verifiedDetail;
    const short = `${/^(\S+) ±/.exec(d.result.concentration.display)![1]} ${d.result.concentration.unit}`;
    for (const p of texts.smallVerified!.pages) {
      expect(p).toContain(VERIFIED_KEY);
      expect(p).toContain(d.analyteFormula);
      expect(p).toContain(short);
      expect(p).toContain(`Exp ${d.expiry.expiresOn}`);
      expect(p).not.toContain(UNVERIFIED_MARK);
    }
  });

  it('when 30 copies go on the 3×8 A4 sheet, then there are 2 pages with 24 and 6 labels', () => {
    const { pages } = texts.sheetVerified!;
    expect(pages).toHaveLength(2);
    const count = (p: string) => p.split(VERIFIED_KEY).length - 1;
    expect(count(pages[0]!)).toBe(24);
    expect(count(pages[1]!)).toBe(6);
  });

  it('when a preview is requested, then every label carries the preview mark', () => {
    const { pages } = texts.preview!;
    expect(pages).toHaveLength(2);
    for (const p of pages) expect(p).toContain(PREVIEW_MARK);
  });

  it('when a stored print is fetched twice, then the PDF bytes are identical (rendered from the stored row)', async () => {
    const hist = await request(t.app).get(`/api/preparations/${UNVERIFIED_KEY}/label-prints`).set('Cookie', cookie.qa!);
    const id = hist.body.items[0].id as number;
    const a = await getPdf(`/api/label-prints/${id}/labels.pdf`);
    const b = await getPdf(`/api/label-prints/${id}/labels.pdf`, 'admin');
    expect(a.equals(b)).toBe(true);
  });
});
