// Issue 10 §5: bad input is a clear 4xx naming the field, never a 500 and never stored silently.
// Text rule (shared/schemas/text.ts), plausible calculation ranges (shared/schemas/plausible.ts), literal search,
// inert CSV cells, uploads whose name and content agree, same-origin state changes, sign-in delay and per-IP limit,
// Cache-Control: no-store.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEntry, User, initModels } from '../../server/db/models/index.ts';
import { DEMO, DEMO_PASSWORD, expectErrorBody, makeTestApp, sessionCookie, userIdByEmail, type TestApp } from './helpers/test-app.ts';
import { validCalcRequest } from './helpers/calc-request.ts';

let t: TestApp;
let admin: string;
let chemist: string;
let qa: string;

beforeAll(async () => {
  t = await makeTestApp();
  admin = await sessionCookie(t.app, DEMO.admin);
  chemist = await sessionCookie(t.app, DEMO.chemist);
  qa = await sessionCookie(t.app, DEMO.qa);
});
afterAll(() => t.close());

const auditCount = () => AuditEntry.count();

/** A second app with other settings; the models are bound to one database at a time, so rebind to `t` after. */
async function withApp(env: Record<string, string>, fn: (other: TestApp) => Promise<void>) {
  const other = await makeTestApp({ env });
  try {
    await fn(other);
  } finally {
    await other.close();
    initModels(t.sequelize);
  }
}

describe('text rule: control characters, lone surrogates, direction overrides', () => {
  const material = (name: string) => ({
    name,
    formula: 'Pb(NO3)2',
    analytes: [{ name: 'Lead', formula: 'Pb' }],
    grade: 'CRM',
    producer: 'Harbourside Test Supplies',
    lot: 'LOT-T-1',
    purity: { value: '0.9995', expandedUncertainty: '0.0004', k: '2', basis: 'as-is' },
  });

  it.each([
    ['a NUL', '\u0000abc'],
    ['a line break in a one-line name', 'Lead\nnitrate'],
    ['a lone surrogate', 'Lead \ud800 nitrate'],
    ['a right-to-left override', 'Lead \u202enitrate'],
    ['an escape character', 'Lead \u001b[31m nitrate'],
  ])('when a material name holds %s, then 400 names the field and nothing is stored', async (_what, name) => {
    const before = await auditCount();
    const res = await request(t.app).post('/api/materials').set('Cookie', admin).send(material(name));
    expect(res.status, JSON.stringify(res.body)).toBe(400);
    expectErrorBody(res.body, 'validation_failed');
    expect(res.body.error.fields.name).toMatch(/Remove|one line/);
    expect(await auditCount()).toBe(before);
  });

  it('when the same material has a clean name, then it is stored (the fixture is valid)', async () => {
    const res = await request(t.app).post('/api/materials').set('Cookie', admin).send(material('Lead nitrate (guard test)'));
    expect(res.status, JSON.stringify(res.body)).toBe(201);
  });

  it.each(['/api/materials', '/api/balances', '/api/volumetric-ware', '/api/solvents', '/api/preparations', '/api/audit', '/api/series', '/api/users'])(
    'when %s is searched for a NUL, then 400 on fields.search (today 500)',
    async (path) => {
      const res = await request(t.app).get(`${path}?search=%00`).set('Cookie', admin);
      expect(res.status, JSON.stringify(res.body)).toBe(400);
      expect(res.body.error.fields.search).toMatch(/control character/);
    },
  );

  it('when a path segment holds a NUL, then 400 (not a database error)', async () => {
    const res = await request(t.app).get('/api/preparations/%00').set('Cookie', admin);
    expect(res.status).toBe(400);
    expectErrorBody(res.body);
  });

  it('when a label template name or a review-flag reason holds a NUL, then 400 at the field', async () => {
    const list = await request(t.app).get('/api/label-templates').set('Cookie', admin);
    const id = list.body.items[0].id as number;
    const patch = await request(t.app).patch(`/api/label-templates/${id}`).set('Cookie', admin).send({ name: 'Shelf\u0000 labels' });
    expect(patch.status).toBe(400);
    expect(patch.body.error.fields.name).toMatch(/control character/);
    const flag = await request(t.app).post('/api/trace/HWL-2026-0001/review-flags').set('Cookie', qa).send({ reason: 'Under review\u0000' });
    expect(flag.status).toBe(400);
    expect(flag.body.error.fields.reason).toMatch(/control character/);
  });

  it('when a multi-line reason holds line breaks and a tab, then the text rule lets them through', async () => {
    const { multilineText } = await import('../../shared/schemas/text.ts');
    expect(multilineText().safeParse('line one\n\tline two\r\n').success).toBe(true);
  });
});

describe('plausible ranges of calculation inputs', () => {
  const calc = (edit: (b: ReturnType<typeof validCalcRequest> & Record<string, any>) => void) => {
    const body = validCalcRequest() as ReturnType<typeof validCalcRequest> & Record<string, any>;
    edit(body);
    return request(t.app).post('/api/calc/preparation').set('Cookie', chemist).send(body);
  };

  it('when the demo request is sent, then 200 (the ranges refuse no ordinary value)', async () => {
    expect((await calc(() => undefined)).status).toBe(200);
  });

  it.each([
    ['material.purity.value', (b: any) => (b.material.purity.value = '1e-400'), /purity between 0.5 and 1/],
    ['material.purity.value', (b: any) => (b.material.purity.value = '0.3'), /purity between 0.5 and 1/],
    ['volume.value', (b: any) => (b.volume.value = '1e308'), /between 0.01 mL and 10000 mL/],
    ['volume.value', (b: any) => ((b.volume.value = '0.5'), (b.volume.unit = 'µL')), /between 0.01 mL/],
    ['target.value', (b: any) => (b.target.value = '1e400'), /2500000 mg\/L/],
    ['target.value', (b: any) => (b.target.value = '1e-400'), /1e-9 mg\/L/],
    [
      'material.purity.standardUncertainty',
      (b: any) => ((b.material.purity = { value: '0.9995', standardUncertainty: '1e308' })),
      /between 0 and 0.5/,
    ],
    ['material.density.value', (b: any) => (b.material.density.value = '4530'), /between 0.5 g\/mL and 23 g\/mL/],
    ['balance.weightDensity.value', (b: any) => (b.balance.weightDensity.value = '8000'), /between 2 g\/mL and 22 g\/mL/],
    ['weighing.reading.value', (b: any) => (b.weighing.reading.value = '1e30'), /balance reading between/],
  ])('when %s is absurd, then 400 on that field', async (field, edit, message) => {
    const res = await calc(edit);
    expect(res.status, JSON.stringify(res.body)).toBe(400);
    expect(res.body.error.fields[field], JSON.stringify(res.body.error.fields)).toMatch(message);
  });

  it('when the air density equals the weight density, then the refusal names the air density (not the material density)', async () => {
    const res = await calc((b: any) => (b.air = { density: { value: '8.0', unit: 'g/mL' } }));
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.fields)).toEqual(['air.density.value']);
  });

  it('when a planned preparation asks for an impossible target, then 400 on target.value and nothing is stored', async () => {
    const before = await auditCount();
    const res = await request(t.app)
      .post('/api/preparations')
      .set('Cookie', chemist)
      .send({ materialId: 1, analyteFormula: 'Pb', target: { value: '1e400', unit: 'mg/L' }, flaskId: 1, balanceId: 1, conditions: { source: 'lab-default' } });
    expect(res.status).toBe(400);
    expect(res.body.error.fields['target.value']).toMatch(/what a solution can hold|2500000/);
    expect(await auditCount()).toBe(before);
  });

  it('when the core itself refuses air denser than the sample, then the field is the given air density', async () => {
    const { calculatePreparation } = await import('../../shared/calc/preparation.ts');
    const body = validCalcRequest() as any;
    body.air = { density: { value: '5', unit: 'g/mL' } }; // past the schema: the core's own check
    expect(() => calculatePreparation(body)).toThrow(expect.objectContaining({ field: 'air.density.value' }));
  });
});

describe('search matches % and _ literally', () => {
  it('when materials and preparations are searched for % or _, then only rows holding that character come back', async () => {
    for (const path of ['/api/materials', '/api/preparations']) {
      const all = await request(t.app).get(path).set('Cookie', admin);
      expect(all.body.total).toBeGreaterThan(0);
      for (const ch of ['%25', '_']) {
        const res = await request(t.app).get(`${path}?search=${ch}`).set('Cookie', admin);
        expect(res.status).toBe(200);
        expect(res.body.total, `${path} ${ch}`).toBe(0); // no demo row holds % or _
      }
    }
    const made = await request(t.app).post('/api/materials').set('Cookie', admin).send({
      name: 'Cd_std 100%',
      formula: 'Cd(NO3)2',
      analytes: [{ name: 'Cadmium', formula: 'Cd' }],
      grade: 'RM',
      producer: 'Harbourside Test Supplies',
      lot: 'LOT-PCT',
      purity: { value: '0.999', basis: 'as-is' },
    });
    expect(made.status, JSON.stringify(made.body)).toBe(201);
    for (const ch of ['%25', '_', 'd_s']) {
      const res = await request(t.app).get(`/api/materials?search=${ch}`).set('Cookie', admin);
      expect(res.body.items.map((m: { name: string }) => m.name)).toEqual(['Cd_std 100%']);
    }
  });
});

describe('CSV exports: formula cells are inert', () => {
  it('when an anonymous sign-in uses a formula as the e-mail, then the audit export holds it with a leading apostrophe', async () => {
    const formula = '=HYPERLINK("http://evil.example","x")'; // the service stores the address in lower case
    const res = await request(t.app).post('/api/auth/login').send({ email: formula, password: 'whatever-it-is' });
    expect(res.status).toBe(401);
    const csv = await request(t.app).get('/api/audit/export.csv?action=sign_in_failed').set('Cookie', qa);
    expect(csv.status).toBe(200);
    expect(csv.text).toContain(`"'=hyperlink(""http://evil.example"",""x"")"`);
    expect(csv.text).not.toMatch(/(^|,)"?=hyperlink/im);
  });

  it('csvField: each dangerous first character is made inert, and the apostrophe rule reverses', async () => {
    const { csvField, csvStoredValue } = await import('../../server/services/audit.service.ts');
    for (const v of ['=1+1', '+1', '-1', '@SUM(A1)', '\tx', '\rx', "'quoted"]) {
      const cell = csvField(v);
      expect(cell.replace(/^"/, '').startsWith("'"), JSON.stringify(v)).toBe(true);
    }
    expect(csvField('Pb 1000 mg/L')).toBe('Pb 1000 mg/L');
    expect(csvStoredValue(csvField('=1+1'))).toBe('=1+1');
    expect(csvStoredValue(csvField("'quoted"))).toBe("'quoted");
  });
});

describe('uploads: name and content agree; no markup behind a header', () => {
  const PDF = Buffer.from('%PDF-1.4\n1 0 obj << /Type /Catalog >> endobj\ntrailer << >>\n%%EOF\n');
  const upload = (bytes: Buffer, name: string) =>
    request(t.app).post('/api/materials/1/certificates').set('Cookie', chemist).attach('file', bytes, name);

  it('when a PDF is named evil.html, then 415 on fields.file and nothing is stored', async () => {
    const before = await auditCount();
    const res = await upload(PDF, 'evil.html');
    expect(res.status).toBe(415);
    expect(res.body.error.fields.file).toMatch(/rename the file to end in \.pdf/);
    expect(await auditCount()).toBe(before);
  });

  it('when HTML or SVG hides behind the PDF or PNG header, then 415', async () => {
    const html = Buffer.concat([Buffer.from('%PDF-1.4\n'), Buffer.from('<html><script>alert(1)</script></html>')]);
    expect((await upload(html, 'cert.pdf')).status).toBe(415);
    const svg = Buffer.concat([Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]), Buffer.from('<?xml version="1.0"?><svg onload="x"/>')]);
    expect((await upload(svg, 'cert.png')).status).toBe(415);
  });

  it('when the name has a direction override, then 400 on fields.file', async () => {
    const res = await upload(PDF, 'cert\u202Efdp.html');
    expect(res.status).toBe(400);
    expect(res.body.error.fields.file).toMatch(/text-direction/);
  });

  it('when a PDF has no extension, then it is stored and served with .pdf', async () => {
    const res = await upload(PDF, 'certificate-2026');
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.originalName).toBe('certificate-2026.pdf');
    const file = await request(t.app).get(`/api/certificates/${res.body.id}/file`).set('Cookie', chemist);
    expect(file.headers['content-disposition']).toMatch(/^attachment; filename="?certificate-2026\.pdf"?$/);
  });
});

describe('state-changing requests from another origin', () => {
  let lockedId: number;
  beforeAll(async () => {
    lockedId = await userIdByEmail(t.app, admin, DEMO.inactive);
  });

  it('when a body-less POST (unlock) carries another origin, then 403 cross_origin and nothing is audited', async () => {
    const before = await auditCount();
    const res = await request(t.app).post(`/api/users/${lockedId}/unlock`).set('Cookie', admin).set('Host', '127.0.0.1:3000').set('Origin', 'http://127.0.0.1:5174');
    expect(res.status).toBe(403);
    expectErrorBody(res.body, 'cross_origin');
    expect(await auditCount()).toBe(before);
  });

  it.each([
    ['Origin null', { Origin: 'null' }],
    ['Origin of another site', { Origin: 'https://evil.example' }],
    ['Sec-Fetch-Site cross-site', { 'Sec-Fetch-Site': 'cross-site' }],
    ['Sec-Fetch-Site same-site (another port)', { 'Sec-Fetch-Site': 'same-site' }],
  ])('when a POST has %s, then 403', async (_what, headers) => {
    for (const path of ['/api/audit/verify', '/api/admin/expiry-digest', '/api/auth/logout']) {
      const res = await request(t.app).post(path).set('Cookie', admin).set(headers);
      expect(res.status, path).toBe(403);
    }
    const multipart = await request(t.app).post('/api/materials/1/certificates').set('Cookie', chemist).set(headers).attach('file', Buffer.from('%PDF-1.4\n'), 'a.pdf');
    expect(multipart.status).toBe(403);
  });

  it('when the Origin is our own (the Host), or Sec-Fetch-Site is same-origin, or neither is sent, then the request goes through', async () => {
    const own = await request(t.app).post('/api/audit/verify').set('Cookie', admin).set('Host', 'lab.example:8443').set('Origin', 'http://lab.example:8443');
    expect(own.status).toBe(200);
    const sameOrigin = await request(t.app).post('/api/audit/verify').set('Cookie', admin).set('Sec-Fetch-Site', 'same-origin');
    expect(sameOrigin.status).toBe(200);
    const plain = await request(t.app).post('/api/audit/verify').set('Cookie', admin);
    expect(plain.status).toBe(200);
    const read = await request(t.app).get('/api/auth/me').set('Cookie', admin).set('Origin', 'https://evil.example');
    expect(read.status).toBe(200); // reads are not state changes (and CORS keeps their answers from the other site)
  });

  it('when PUBLIC_URL is set, then its origin is accepted behind a proxy that rewrites Host', async () => {
    await withApp({ PUBLIC_URL: 'https://tarebook.harbourside.example/' }, async (p) => {
      const cookie = await sessionCookie(p.app, DEMO.admin);
      const ok = await request(p.app).post('/api/audit/verify').set('Cookie', cookie).set('Host', '127.0.0.1:3000').set('Origin', 'https://tarebook.harbourside.example');
      expect(ok.status).toBe(200);
      const foreign = await request(p.app).post('/api/audit/verify').set('Cookie', cookie).set('Host', '127.0.0.1:3000').set('Origin', 'https://other.example');
      expect(foreign.status).toBe(403);
    });
  });
});

describe('sign-in: per-account delay, per-IP limit, lockout kept', () => {
  it('when an account fails to sign in, then the next attempt within the delay is 429 with Retry-After and is not counted', async () => {
    await withApp({ LOGIN_DELAY_MS: '60000' }, async (d) => {
      const first = await request(d.app).post('/api/auth/login').send({ email: DEMO.chemist, password: 'wrong-password-1' });
      expect(first.status).toBe(401);
      const second = await request(d.app).post('/api/auth/login').send({ email: DEMO.chemist, password: DEMO_PASSWORD });
      expect(second.status).toBe(429);
      expectErrorBody(second.body, 'rate_limited');
      expect(second.body.error.fields.email).toMatch(/Wait 60 s/);
      expect(second.headers['retry-after']).toBe('60');
      expect((await User.findOne({ where: { email: DEMO.chemist } }))!.failedLoginCount).toBe(1);
      // unknown addresses are delayed alike (the answer does not tell whether the account exists)
      expect((await request(d.app).post('/api/auth/login').send({ email: 'nobody@harbourside.example', password: 'x' })).status).toBe(401);
      expect((await request(d.app).post('/api/auth/login').send({ email: 'nobody@harbourside.example', password: 'x' })).status).toBe(429);
      // another account is not delayed
      expect((await request(d.app).post('/api/auth/login').send({ email: DEMO.qa, password: DEMO_PASSWORD })).status).toBe(200);
    });
  });

  it('LoginThrottle: the delay doubles per failure, is capped, and a success clears it', async () => {
    const { LoginThrottle, LOGIN_DELAY_CAP_MS } = await import('../../server/middleware/login-throttle.ts');
    let now = 0;
    const th = new LoginThrottle(1000, () => now);
    th.failed('A@x');
    expect(th.waitMs('a@x')).toBe(1000);
    th.failed('a@x');
    expect(th.waitMs('a@x')).toBe(2000);
    for (let i = 0; i < 20; i++) th.failed('a@x');
    expect(th.waitMs('a@x')).toBe(LOGIN_DELAY_CAP_MS);
    now += LOGIN_DELAY_CAP_MS;
    expect(th.waitMs('a@x')).toBe(0);
    th.succeeded('a@x');
    th.failed('a@x');
    expect(th.waitMs('a@x')).toBe(1000);
  });

  it('when TRUST_PROXY is set, then the per-IP limit counts each forwarded client separately', async () => {
    await withApp({ TRUST_PROXY: '1', LOGIN_RATE_LIMIT: '2' }, async (p) => {
      const fail = (ip: string, n: number) =>
        request(p.app).post('/api/auth/login').set('X-Forwarded-For', ip).send({ email: `nobody${n}@harbourside.example`, password: 'guess-guess' });
      expect((await fail('203.0.113.7', 1)).status).toBe(401);
      expect((await fail('203.0.113.7', 2)).status).toBe(401);
      expect((await fail('203.0.113.7', 3)).status).toBe(429);
      expect((await fail('203.0.113.8', 4)).status).toBe(401); // another client behind the same proxy
    });
  });

  it('when wrong passwords reach the threshold, then the account is still locked (423)', async () => {
    await withApp({}, async (p) => {
      let last = 0;
      for (let i = 0; i < 5; i++) last = (await request(p.app).post('/api/auth/login').send({ email: DEMO.technician, password: `wrong-${i}` })).status;
      expect(last).toBe(423);
    });
  });
});

describe('Cache-Control', () => {
  it('when the API answers (data, error or 404), then Cache-Control is no-store', async () => {
    for (const res of [
      await request(t.app).get('/api/auth/me').set('Cookie', chemist),
      await request(t.app).get('/api/materials?page=0').set('Cookie', chemist),
      await request(t.app).get('/api/nothing-here'),
      await request(t.app).get('/api/health'),
    ]) {
      expect(res.headers['cache-control']).toBe('no-store');
    }
  });
});
