// What is printed is what was measured: every PDF kind, fetched over HTTP from the server started the way the
// README starts it (fresh database, demo lab), first all at the same time (as the Print page does when it opens)
// and then one by one. Each document's text is read twice, by poppler's pdftotext (the glyphs as drawn) and by
// pdf-parse (pdf.js), and every number the API returns for the record that the document prints must be on the page
// digit for digit: verbatim, or rounded to the places the page shows (never a number that lost its first digit or
// its decimal point). The documents rendered concurrently must read exactly as the ones rendered alone.
//
// Regression: concurrent renders once left fontkit's cached full-stop glyph without its character, and every
// later document of the process printed "4.53" as ".53" and "0.9995" as "9995" (server/pdf/fonts.ts).
import { execFileSync } from 'node:child_process';
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import Decimal from 'decimal.js';
import { PDFParse } from 'pdf-parse';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_PASSWORD } from '../../seed/demo-data.ts';
import { ARTIFACTS, startServer, type RunningServer } from './harness.ts';

type Json = any; // eslint-disable-line @typescript-eslint/no-explicit-any
type Who = 'chemist' | 'chemist2' | 'technician' | 'qa';
const EMAIL: Record<Who, string> = {
  chemist: 'chemist@harbourside.example',
  chemist2: 'chemist2@harbourside.example',
  technician: 'technician@harbourside.example',
  qa: 'qa@harbourside.example',
};

let server: RunningServer;
const cookie: Partial<Record<Who, string>> = {};

async function api(who: Who, method: 'GET' | 'POST', path: string, body?: unknown): Promise<Json> {
  const res = await fetch(`${server.baseUrl}/api${path}`, {
    method,
    headers: { cookie: cookie[who]!, ...(body === undefined ? {} : { 'content-type': 'application/json' }) },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  const json = await res.json();
  expect(res.ok, `${method} ${path}: ${res.status} ${JSON.stringify(json)}`).toBe(true);
  return json;
}

async function pdf(who: Who, path: string): Promise<Buffer> {
  const res = await fetch(`${server.baseUrl}/api${path}`, { headers: { cookie: cookie[who]! } });
  expect(res.status, `GET ${path}`).toBe(200);
  expect(res.headers.get('content-type')).toMatch(/application\/pdf/);
  return Buffer.from(await res.arrayBuffer());
}

/** Both extractors' text of one PDF. */
async function read(body: Buffer): Promise<{ drawn: string; parsed: string }> {
  const drawn = execFileSync('pdftotext', ['-layout', '-', '-'], { input: body }).toString();
  const parser = new PDFParse({ data: new Uint8Array(body) });
  try {
    return { drawn, parsed: (await parser.getText()).text };
  } finally {
    await parser.destroy();
  }
}

/** Number tokens as a reader sees them: an optional sign, digits, and decimals after a point. */
const numberTokens = (text: string) => text.match(/-?\d+(?:\.\d+)?/g) ?? [];

/** `value` is on the page verbatim or rounded (half-up or half-even) to the decimal places a page number shows. */
function printedAs(value: string, tokens: Set<string>): boolean {
  if (tokens.has(value)) return true;
  const v = new Decimal(value);
  for (const t of tokens) {
    const places = t.includes('.') ? t.split('.')[1]!.length : 0;
    if (places === 0 && !v.isInteger()) continue; // "0" or "1001" is not a printing of 0.9995 or 1000.99
    if (v.toFixed(places, Decimal.ROUND_HALF_UP) === t || v.toFixed(places, Decimal.ROUND_HALF_EVEN) === t) return true;
  }
  return false;
}

/** A JSON value at a dotted path; `[]` maps over an array. */
function at(obj: Json, path: string): Json[] {
  let cur: Json[] = [obj];
  for (const part of path.split('.')) {
    const next: Json[] = [];
    for (const c of cur) {
      if (c == null) continue;
      if (part.endsWith('[]')) {
        const arr = c[part.slice(0, -2)];
        if (Array.isArray(arr)) next.push(...arr);
      } else next.push(c[part]);
    }
    cur = next;
  }
  return cur.filter((x) => x !== undefined && x !== null);
}

type Expect = { path: string; as?: 'percent' | 'text' };
type Doc = { name: string; who: Who; url: string; record: Json; expects: Expect[] };

/** The numbers of a record that a document prints: every path must resolve, and every value be on the page. */
function check(doc: Doc, text: { drawn: string; parsed: string }): string[] {
  const problems: string[] = [];
  for (const [extractor, raw] of Object.entries(text)) {
    const flat = raw.replace(/\s+/g, ' ');
    const tokens = new Set(numberTokens(flat));
    if (/(^|[\s(±=:])\.\d/.test(flat)) problems.push(`${extractor}: a number lost the digit before its point: …${flat.match(/.{0,30}(^|[\s(±=:])\.\d.{0,20}/)?.[0]}…`);
    for (const e of doc.expects) {
      const values = at(doc.record, e.path);
      if (values.length === 0) problems.push(`${doc.name}: the record has no ${e.path}`);
      for (const v of values) {
        const s = String(v);
        if (e.as === 'text') {
          if (!flat.includes(s)) problems.push(`${extractor}: ${e.path} "${s}" is not on the page`);
        } else {
          const value = e.as === 'percent' ? new Decimal(s).times(100).toString() : s;
          if (!printedAs(value, tokens)) problems.push(`${extractor}: ${e.path} = ${s} is not on the page (digit for digit or rounded)`);
        }
      }
    }
  }
  return problems;
}

const CONDITIONS = { temperatureC: '21', pressureHPa: '985', relativeHumidityPct: '45' };
const ROOM = { temperatureC: '20', pressureHPa: '1013.25', humidityPct: '50' };
const sign = (who: Who, key: string, meaning: 'prepared' | 'verified', checklist?: Record<string, boolean>) =>
  api(who, 'POST', `/preparations/${key}/signatures`, { meaning, password: DEMO_PASSWORD, acknowledgeResponsibility: true, ...(checklist ? { checklist } : {}) });

const docs: Doc[] = [];

beforeAll(async () => {
  server = await startServer(); // `npx tsx server/index.ts` on a fresh database: the demo lab is seeded
  for (const who of Object.keys(EMAIL) as Who[]) {
    const res = await fetch(`${server.baseUrl}/api/auth/login`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email: EMAIL[who], password: DEMO_PASSWORD }) });
    expect(res.status, `sign in ${who}`).toBe(200);
    cookie[who] = res.headers.getSetCookie().find((c) => c.startsWith('tarebook_session='))!.split(';')[0]!;
  }
  const ids = { material: {} as Record<string, number>, balance: {} as Record<string, number>, ware: {} as Record<string, number>, solvent: {} as Record<string, { id: number; lot: string }> };
  for (const m of (await api('chemist', 'GET', '/materials')).items) ids.material[m.formula] = m.id;
  for (const b of (await api('chemist', 'GET', '/balances')).items) ids.balance[b.identifier] = b.id;
  for (const w of (await api('chemist', 'GET', '/volumetric-ware?pageSize=100')).items) ids.ware[w.identifier] = w.id;
  for (const s of (await api('chemist', 'GET', '/solvents')).items) ids.solvent[s.name] = { id: s.id, lot: s.lot };
  const checklist = Object.fromEntries((await import('../../shared/schemas/preparations.ts')).VERIFICATION_CHECKLIST.map((c) => [c.key, true]));
  const water = ids.solvent['Ultrapure water']!;
  const nitric = ids.solvent['Nitric acid 2 % (v/v)']!;

  // The demo's verified lead stock, and a copper stock made and verified here (a mix needs two analytes).
  const pbKey = 'HWL-2026-0001';
  const cuPlan = await api('chemist', 'POST', '/preparations', {
    materialId: ids.material['CuSO4(H2O)5'],
    analyteFormula: 'Cu',
    target: { value: '1000', unit: 'mg/L' },
    flaskId: ids.ware['VF-1000-01'],
    balanceId: ids.balance['BAL-A1'],
    conditions: { source: 'measured', ...CONDITIONS },
  });
  const cu = cuPlan.identifier as string;
  await api('chemist', 'POST', `/preparations/${cu}/weighings`, { mode: 'direct', reading: new Decimal(cuPlan.plan.targetReading.value).toFixed(1), unit: 'mg', conditions: CONDITIONS });
  await api('chemist', 'POST', `/preparations/${cu}/make-up`, { flaskIdentifier: 'VF-1000-01', solventId: nitric.id, solventLot: nitric.lot, solutionTemperatureC: '20.6', applyTemperatureCorrection: false });
  await sign('chemist', cu, 'prepared');
  await sign('chemist2', cu, 'verified', checklist);

  // A dilution by volume of the lead stock, made up and signed prepared.
  const dil = await api('chemist', 'POST', `/preparations/${pbKey}/dilutions`, { method: 'volumetric', target: { value: '20', unit: 'mg/L' }, pipetteId: ids.ware['BP-1-01'], flaskId: ids.ware['VF-50-01'] });
  await api('technician', 'POST', `/preparations/${dil.identifier}/aliquots`, { pipetteIdentifier: 'BP-1-01' });
  await api('technician', 'POST', `/preparations/${dil.identifier}/make-up`, { flaskIdentifier: 'VF-50-01', solventId: nitric.id, solventLot: nitric.lot, solutionTemperatureC: '20.2', applyTemperatureCorrection: false });
  await sign('chemist', dil.identifier, 'prepared');

  // A dilution by mass of the lead stock: both readings as planned.
  const grav = await api('chemist', 'POST', `/preparations/${pbKey}/gravimetric-dilutions`, { target: { value: '10', unit: 'mg/kg' }, balanceId: ids.balance['BAL-A1'], plannedFinalMassG: '100', parentDensity: '1.0091', finalDensity: '0.998' });
  await api('technician', 'POST', `/preparations/${grav.identifier}/gravimetric-readings`, { aliquotReading: grav.gravimetric.plan.aliquot.readingShownG, finalReading: new Decimal(grav.gravimetric.plan.final.readingG).toFixed(4), room: ROOM });
  await sign('chemist', grav.identifier, 'prepared');

  // A two-analyte mix of the lead and copper stocks.
  const mix = await api('chemist', 'POST', '/mixes', { components: [{ parentKey: pbKey, pipetteId: ids.ware['BP-1-01'] }, { parentKey: cu, pipetteId: ids.ware['BP-2-01'] }], flaskId: ids.ware['VF-25-01'] });
  for (const c of mix.mix.components) await api('technician', 'POST', `/preparations/${mix.identifier}/aliquots`, { pipetteIdentifier: c.plannedAliquot.pipette.identifier, componentId: c.linkId });
  await api('technician', 'POST', `/preparations/${mix.identifier}/make-up`, { flaskIdentifier: 'VF-25-01', solventId: nitric.id, solventLot: nitric.lot, solutionTemperatureC: '20.0', applyTemperatureCorrection: false });
  await sign('chemist', mix.identifier, 'prepared');

  // A three-level calibration series from the lead stock, as the series page proposes it.
  const prop = await api('chemist', 'POST', '/series/proposal', { parentKey: pbKey, levels: ['1', '2', '5'].map((value) => ({ value, unit: 'mg/L' })) });
  const series = await api('chemist', 'POST', '/series', {
    parentKey: pbKey,
    levels: prop.levels.map((l: Json) => ({ target: l.target, pipetteId: l.choice.pipette.id, flaskId: l.choice.flask.id, ...(l.choice.pipette.kind === 'piston_pipette' ? { aliquotMl: l.choice.aliquotMl } : {}) })),
  });
  void water;

  const record = (key: string) => api('qa', 'GET', `/preparations/${key}`);
  const STOCK: Expect[] = [
    { path: 'identifier', as: 'text' },
    { path: 'expiresOn', as: 'text' },
    { path: 'snapshot.material.lot', as: 'text' },
    { path: 'snapshot.material.purity.value' },
    { path: 'snapshot.material.purity.expandedUncertainty' },
    { path: 'snapshot.material.densityGPerMl' },
    { path: 'snapshot.balance.readabilityMg' },
    { path: 'snapshot.balance.weightDensityGPerMl' },
    { path: 'snapshot.flask.nominalVolumeMl' },
    { path: 'snapshot.flask.toleranceMl' },
    { path: 'weighings[].reading.value' },
    { path: 'weighings[].conditions.temperatureC' },
    { path: 'weighings[].conditions.pressureHPa' },
    { path: 'weighings[].conditions.relativeHumidityPct' },
    { path: 'makeUp.solutionTemperatureC' },
    { path: 'result.concentration.display', as: 'text' },
    { path: 'result.budget[].value' },
    { path: 'result.budget[].standardUncertainty' },
    { path: 'result.budget[].sensitivity' },
    { path: 'result.budget[].contribution' },
    { path: 'result.budget[].share', as: 'percent' },
  ];
  const DILUTION: Expect[] = [
    { path: 'identifier', as: 'text' },
    { path: 'expiresOn', as: 'text' },
    { path: 'dilution.parent.identifier', as: 'text' },
    { path: 'dilution.aliquots[].volumeMl' },
    { path: 'makeUp.solutionTemperatureC' },
    { path: 'dilution.result.display', as: 'text' },
    { path: 'dilution.result.budget[].value' },
    { path: 'dilution.result.budget[].standardUncertainty' },
  ];
  const GRAVIMETRIC: Expect[] = [
    { path: 'identifier', as: 'text' },
    { path: 'expiresOn', as: 'text' },
    { path: 'gravimetric.parent.identifier', as: 'text' },
    { path: 'gravimetric.readings[].aliquotReading' },
    { path: 'gravimetric.readings[].finalReading' },
    { path: 'gravimetric.result.massFraction.display', as: 'text' },
    { path: 'gravimetric.result.massConcentration.display', as: 'text' },
  ];
  const MIX: Expect[] = [
    { path: 'identifier', as: 'text' },
    { path: 'expiresOn', as: 'text' },
    { path: 'mix.components[].parent.identifier', as: 'text' },
    { path: 'mix.components[].aliquots[].volumeMl' },
    { path: 'mix.components[].result.display', as: 'text' },
  ];
  // a full label prints the concentration with its uncertainty; a small one the value only
  const label = (full: boolean): Expect[] => [
    { path: 'identifier', as: 'text' },
    { path: 'expiresOn', as: 'text' },
    full ? { path: 'concentrationDisplay', as: 'text' } : { path: 'result.concentration.value' },
  ];

  const pb = await record(pbKey);
  const cuRecord = await record(cu);
  docs.push({ name: 'prep sheet of the verified lead stock', who: 'qa', url: `/preparations/${pbKey}/prep-sheet.pdf`, record: pb, expects: STOCK });
  docs.push({ name: 'prep sheet of the copper stock', who: 'qa', url: `/preparations/${cu}/prep-sheet.pdf`, record: cuRecord, expects: STOCK });
  docs.push({ name: 'prep sheet of a dilution', who: 'qa', url: `/preparations/${dil.identifier}/prep-sheet.pdf`, record: await record(dil.identifier), expects: DILUTION });
  docs.push({ name: 'prep sheet of a dilution by mass', who: 'qa', url: `/preparations/${grav.identifier}/prep-sheet.pdf`, record: await record(grav.identifier), expects: GRAVIMETRIC });
  docs.push({ name: 'prep sheet of a mix', who: 'qa', url: `/preparations/${mix.identifier}/prep-sheet.pdf`, record: await record(mix.identifier), expects: MIX });
  const seriesDetail = await api('qa', 'GET', `/series/${series.series.identifier}`);
  docs.push({
    name: 'series sheet',
    who: 'qa',
    url: `/series/${series.series.identifier}/sheet.pdf`,
    record: seriesDetail,
    expects: [
      { path: 'identifier', as: 'text' },
      { path: 'levels[].identifier', as: 'text' },
      { path: 'levels[].planned.display', as: 'text' },
      { path: 'levels[].aliquot.volumeMl' },
      { path: 'parent.identifier', as: 'text' },
    ],
  });
  for (const t of (await api('qa', 'GET', '/label-templates')).items) {
    const expects = label(t.content !== 'small');
    docs.push({ name: `labels "${t.name}" of the lead stock`, who: 'chemist', url: `/preparations/${pbKey}/labels-preview.pdf?templateId=${t.id}`, record: pb, expects });
    docs.push({ name: `labels "${t.name}" of the copper stock`, who: 'chemist', url: `/preparations/${cu}/labels-preview.pdf?templateId=${t.id}`, record: cuRecord, expects });
  }
  docs.push({
    name: 'traceability report of the lead stock',
    who: 'qa',
    url: `/trace/${pbKey}/report.pdf`,
    record: pb,
    expects: [
      { path: 'identifier', as: 'text' },
      { path: 'snapshot.material.lot', as: 'text' },
      { path: 'snapshot.balance.identifier', as: 'text' },
      { path: 'concentrationDisplay', as: 'text' },
    ],
  });
}, 300_000);

afterAll(async () => {
  await server?.stop();
});

describe('every printed number is the measured one', () => {
  it('in every PDF kind, rendered at the same time and one by one, by both text extractors', async () => {
    // On a process that has rendered nothing yet: first what a freshly opened Print page asks for at once (the prep
    // sheet and a preview of each label template), then every document at once, then each one alone.
    const printPage = docs.filter((d) => d.name.startsWith('labels') || d.name === 'prep sheet of the verified lead stock').filter((d) => !d.name.includes('copper'));
    const first = await Promise.all(printPage.map((d) => pdf(d.who, d.url)));
    const together = await Promise.all(docs.map((d) => pdf(d.who, d.url)));
    for (const [i, d] of printPage.entries()) {
      const problems = check(d, await read(first[i]!));
      expect(problems, `${d.name}, rendered with the Print page's other documents:\n${problems.join('\n')}`).toEqual([]);
    }
    const alone: Buffer[] = [];
    for (const d of docs) alone.push(await pdf(d.who, d.url));

    const problems: string[] = [];
    let checked = 0;
    mkdirSync(join(ARTIFACTS, 'pdf-numbers'), { recursive: true });
    for (const [i, d] of docs.entries()) {
      const a = await read(together[i]!);
      const b = await read(alone[i]!);
      const file = join(ARTIFACTS, 'pdf-numbers', `${i}-${d.name.replace(/[^a-z0-9]+/gi, '-')}`);
      writeFileSync(`${file}.together.txt`, a.drawn);
      writeFileSync(`${file}.alone.txt`, b.drawn);
      problems.push(...check(d, a).map((p) => `${d.name} (rendered together): ${p}`));
      problems.push(...check(d, b).map((p) => `${d.name} (rendered alone): ${p}`));
      // the same numbers, in the same order, whichever way the document was rendered (but the print count and the
      // audit entries that the first fetch itself added)
      const strip = (s: string) => numberTokens(s.replace(/^.*(\bprinted\b|\bgenerated\b|audit entries|\bexport \(|\bprint(ed)? \().*$/gim, ''));
      if (strip(a.drawn).join(' ') !== strip(b.drawn).join(' ')) problems.push(`${d.name}: numbers differ between the concurrent and the lone render`);
      checked += d.expects.length;
    }
    expect(problems, problems.join('\n')).toEqual([]);
    expect(docs.length).toBeGreaterThanOrEqual(12);
    expect(checked).toBeGreaterThan(60);
  });
});
