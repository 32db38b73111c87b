// The forward traceability report of a lot (a recall): the same preparations as the forward trace, in PDF and
// CSV, with status now, how each was reached and the labels printed; each export audited; CSV cells inert.
import { execFileSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEntry } from '../../server/db/models/index.ts';
import { inertCell } from '../../server/services/trace.service.ts';
import { FORWARD_REPORT_COLUMNS } from '../../shared/schemas/trace.ts';
import { DEMO, makeTestApp, sessionCookie, type TestApp } from './helpers/test-app.ts';

let t: TestApp;
let qa: string;
let chemist: string;
let dilution: string;
const binary = (res: request.Response, cb: (err: Error | null, body: Buffer) => void) => {
  const chunks: Buffer[] = [];
  res.on('data', (c: Buffer) => chunks.push(c));
  res.on('end', () => cb(null, Buffer.concat(chunks)));
};

beforeAll(async () => {
  t = await makeTestApp();
  qa = await sessionCookie(t.app, DEMO.qa);
  chemist = await sessionCookie(t.app, DEMO.chemist);
  const ware = (await request(t.app).get('/api/volumetric-ware?pageSize=200').set('Cookie', chemist)).body.items as Array<{ id: number; identifier: string }>;
  const id = (ident: string) => ware.find((w) => w.identifier === ident)!.id;
  const d = await request(t.app)
    .post('/api/preparations/HWL-2026-0001/dilutions')
    .set('Cookie', chemist)
    .send({ method: 'volumetric', target: { value: '10', unit: 'mg/L' }, pipetteId: id('BP-1-01'), flaskId: id('VF-100-02') });
  expect(d.status, JSON.stringify(d.body)).toBe(201);
  dilution = d.body.identifier;
  const templates = (await request(t.app).get('/api/label-templates').set('Cookie', chemist)).body.items as Array<{ id: number }>;
  const printed = await request(t.app).post('/api/preparations/HWL-2026-0001/label-prints').set('Cookie', chemist).send({ templateId: templates[0]!.id, copies: 3 });
  expect(printed.status, JSON.stringify(printed.body)).toBe(201);
});
afterAll(() => t.close());

describe('forward report of a reference-material lot', () => {
  it('when QA asks for the CSV, then one row per preparation of the forward trace, same order, with status, route and labels; the export is audited', async () => {
    const trace = await request(t.app).get('/api/trace/NRM-24-0931').set('Cookie', qa);
    expect(trace.status).toBe(200);
    expect(trace.body.forwardPreparations).toEqual(['HWL-2026-0001', dilution]);
    const before = ((await AuditEntry.max('id')) as number) ?? 0;
    const res = await request(t.app).get('/api/trace/NRM-24-0931/forward-report.csv').set('Cookie', qa);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/text\/csv/);
    expect(res.headers['content-disposition']).toContain('NRM-24-0931-forward-trace.csv');
    const lines = res.text.trim().split('\r\n');
    expect(lines[0]).toBe(FORWARD_REPORT_COLUMNS.join(','));
    expect(lines.slice(1).map((l) => l.split(',')[0])).toEqual(trace.body.forwardPreparations);
    expect(lines[1]).toContain('verified');
    expect(lines[1]).toContain('NRM-24-0931 (analyte source)');
    expect(lines[1]).toMatch(/,1,3$/); // one print of three labels
    expect(lines[2]).toContain('planned');
    expect(lines[2]).toContain('HWL-2026-0001 (diluted into)');
    const audit = await AuditEntry.findAll({ where: { action: 'export' }, order: [['id', 'ASC']] });
    const mine = audit.filter((a) => a.id > before);
    expect(mine).toHaveLength(1);
    expect(mine[0]!.entity).toBe('reference_material');
    expect(mine[0]!.changes).toContain('forward_report_csv');
  });

  it('when QA asks for the PDF, then every preparation of the forward trace is in its text (pdftotext)', async () => {
    const res = await request(t.app).get('/api/trace/NRM-24-0931/forward-report.pdf').set('Cookie', qa).buffer(true).parse(binary);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/application\/pdf/);
    const body = res.body as Buffer;
    expect(body.subarray(0, 5).toString()).toBe('%PDF-');
    const dir = mkdtempSync(join(tmpdir(), 'fwd-'));
    writeFileSync(join(dir, 'r.pdf'), body);
    const text = execFileSync('pdftotext', ['-layout', join(dir, 'r.pdf'), '-']).toString();
    expect(text).toContain('NRM-24-0931');
    expect(text).toContain('HWL-2026-0001');
    expect(text).toContain(dilution);
  });

  it('when a date range is given, then uses outside it are left out; a technician is refused', async () => {
    const res = await request(t.app).get('/api/trace/NRM-24-0931/forward-report.csv?from=2000-01-01&to=2000-01-31').set('Cookie', qa);
    expect(res.status).toBe(200);
    expect(res.text.trim().split('\r\n')).toHaveLength(1);
    const tech = await sessionCookie(t.app, DEMO.technician);
    expect((await request(t.app).get('/api/trace/NRM-24-0931/forward-report.csv').set('Cookie', tech)).status).toBe(403);
  });

  it('then a cell that a spreadsheet would run is made inert with a leading quote', () => {
    for (const bad of ['=1+1', '+A1', '-3', '@SUM(A1)', '\tx', '\rx']) expect(inertCell(bad)).toBe(`'${bad}`);
    expect(inertCell('HWL-2026-0001')).toBe('HWL-2026-0001');
    expect(inertCell(3)).toBe('3');
    expect(inertCell(null)).toBe('');
  });
});
