// Regression: the prep sheet of a seeded record keeps every digit and decimal point of its numbers.
// "0.9995" once printed as ".9995" and "160.07" as "160 07" on the demo lead record in the running server (seen with
// pdftotext). The cause, a glyph cache that depended on the order of renders, is reproduced deterministically in
// pdf-glyphs.test.tsx; every PDF kind over HTTP is checked in tests/e2e/pdf-numbers.e2e.test.ts.
import { execFileSync } from 'node:child_process';
import { PDFParse } from 'pdf-parse';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO, makeTestApp, sessionCookie, type TestApp } from './helpers/test-app.ts';

let t: TestApp;
let cookie: string;
beforeAll(async () => {
  t = await makeTestApp();
  cookie = await sessionCookie(t.app, DEMO.qa);
});
afterAll(() => t.close());

async function text(path: string): Promise<string> {
  const res = await request(t.app)
    .get(path)
    .set('Cookie', cookie)
    .buffer(true)
    .parse((r, cb) => {
      const chunks: Buffer[] = [];
      r.on('data', (c: Buffer) => chunks.push(c));
      r.on('end', () => cb(null, Buffer.concat(chunks)));
    });
  expect(res.status).toBe(200);
  const body = res.body as Buffer;
  // Both extractors: pdf-parse (npm) and poppler's pdftotext (installed by .ci/run), which reads the
  // glyphs as drawn; the lost digits showed in pdftotext's text.
  const parser = new PDFParse({ data: new Uint8Array(body) });
  let parsed: string;
  try {
    parsed = (await parser.getText()).text;
  } finally {
    await parser.destroy();
  }
  const drawn = execFileSync('pdftotext', ['-', '-'], { input: body }).toString();
  return `${parsed}\n${drawn}`.replace(/\s+/g, ' ');
}

describe('prep sheet digits', () => {
  it('when the demo lead record is printed, then its purity, densities and reading keep their digits and decimal points', async () => {
    const list = await request(t.app).get('/api/preparations?search=lead&pageSize=50').set('Cookie', cookie);
    const lead = list.body.items.find((p: { materialName: string }) => /lead/i.test(p.materialName));
    expect(lead, 'a seeded lead(II) nitrate preparation').toBeTruthy();
    const d = (await request(t.app).get(`/api/preparations/${lead.identifier}`).set('Cookie', cookie)).body;
    const all = await text(`/api/preparations/${lead.identifier}/prep-sheet.pdf`);
    const m = d.snapshot.material;
    expect(all).toContain(`${m.purity.value} ± ${m.purity.expandedUncertainty}`); // e.g. 0.9995 ± 0.0004
    expect(all).toContain(`${m.densityGPerMl} g/mL`); // 4.53 g/mL
    expect(all).toContain(`${d.snapshot.balance.weightDensityGPerMl} g/mL`); // 8.0 g/mL
    const w = d.weighings.find((x: { supersededById?: number }) => !x.supersededById);
    if (w?.reading) expect(all).toContain(`${w.reading.value} ${w.reading.unit}`); // 160.07 mg
    expect(all).not.toMatch(/(^|[\s(])\.\d/); // no number that lost the digit before its point
  });
});
