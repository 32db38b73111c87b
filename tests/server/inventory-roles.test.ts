// Inventory and certificate routes × { signed out, chemist, technician, qa, admin } (REQUIREMENTS AC-02,
// DEVELOPERS.md "Roles are checked on the server"): reads for every signed-in role, writes for admin and
// chemist only; technicians and QA get 403, signed out 401.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO, makeTestApp, sessionCookie, type TestApp } from './helpers/test-app.ts';
import { PDF_BYTES, validBalance, validMaterial, validSolvent, validWare } from './helpers/inventory-fixtures.ts';

type Who = 'signedOut' | 'chemist' | 'technician' | 'qa' | 'admin';
const WHO: Who[] = ['signedOut', 'chemist', 'technician', 'qa', 'admin'];
const EDITORS: Who[] = ['chemist', 'admin'];

let t: TestApp;
const cookies: Partial<Record<Who, string>> = {};
const ids: Record<string, number> = {};
let certificateId: number;
let n = 0;

interface Row {
  method: 'get' | 'post' | 'patch';
  path: string;
  write: boolean;
  ok: number;
  body?: () => object;
  /** multipart upload instead of JSON */
  upload?: boolean;
}

const KINDS = [
  { path: '/api/materials', key: 'material', create: () => validMaterial({ lot: `ROLE-${++n}` }), patch: () => ({ storage: `shelf ${++n}` }) },
  { path: '/api/balances', key: 'balance', create: () => validBalance({ identifier: `ROLE-BAL-${++n}` }), patch: () => ({ location: `room ${++n}` }) },
  { path: '/api/volumetric-ware', key: 'ware', create: () => validWare({ identifier: `ROLE-VF-${++n}` }), patch: () => ({ material: `glass ${++n}` }) },
  { path: '/api/solvents', key: 'solvent', create: () => validSolvent({ lot: `ROLE-S-${++n}` }), patch: () => ({ grade: `grade ${++n}` }) },
] as const;

const ROWS: Row[] = [
  ...KINDS.flatMap((k): Row[] => [
    { method: 'get', path: k.path, write: false, ok: 200 },
    { method: 'get', path: `${k.path}/:${k.key}`, write: false, ok: 200 },
    { method: 'post', path: k.path, write: true, ok: 201, body: k.create },
    { method: 'patch', path: `${k.path}/:${k.key}`, write: true, ok: 200, body: k.patch },
    // each allowed role retires its own fresh item (see below), so the second retire is not a 409
    { method: 'post', path: `${k.path}/:${k.key}/retire`, write: true, ok: 200, body: () => ({ reason: 'Broken during cleaning' }) },
  ]),
  { method: 'get', path: '/api/materials/:material/certificates', write: false, ok: 200 },
  { method: 'post', path: '/api/materials/:material/certificates', write: true, ok: 201, upload: true },
  { method: 'get', path: '/api/certificates/:certificate/file', write: false, ok: 200 },
];

beforeAll(async () => {
  t = await makeTestApp();
  for (const who of ['chemist', 'technician', 'qa', 'admin'] as const) cookies[who] = await sessionCookie(t.app, DEMO[who]);
  for (const k of KINDS) {
    const res = await request(t.app).post(k.path).set('Cookie', cookies.admin!).send(k.create());
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    ids[k.key] = res.body.id;
  }
  const up = await request(t.app)
    .post(`/api/materials/${ids.material}/certificates`)
    .set('Cookie', cookies.admin!)
    .attach('file', PDF_BYTES, 'cert.pdf');
  expect(up.status, JSON.stringify(up.body)).toBe(201);
  certificateId = up.body.id;
});
afterAll(() => t.close());

function expected(row: Row, who: Who): number {
  if (who === 'signedOut') return 401;
  if (!row.write) return row.ok;
  return EDITORS.includes(who) ? row.ok : 403;
}

describe('inventory permission matrix', () => {
  const cases = ROWS.flatMap((row) => WHO.map((who) => [`${row.method.toUpperCase()} ${row.path}`, who, row] as const));
  it.each(cases)('%s as %s', async (_name, who, row) => {
    let target = { ...ids, certificate: certificateId };
    if (row.path.endsWith('/retire') && expected(row, who) === 200) {
      // a fresh item for each allowed role, so retiring twice never meets "already retired"
      const kind = KINDS.find((k) => row.path.startsWith(`${k.path}/`))!;
      const res = await request(t.app).post(kind.path).set('Cookie', cookies.admin!).send(kind.create());
      target = { ...target, [kind.key]: res.body.id };
    }
    const url = row.path.replace(/:(\w+)/g, (_m, key: string) => String(target[key as keyof typeof target]));
    let req = request(t.app)[row.method](url);
    if (who !== 'signedOut') req = req.set('Cookie', cookies[who]!);
    if (row.upload) req = req.attach('file', PDF_BYTES, 'cert.pdf');
    else if (row.body) req = req.send(row.body());
    const res = await req;
    const want = expected(row, who);
    expect(res.status, JSON.stringify(res.body)).toBe(want);
    if (want === 401) expect(res.body.error.code).toBe('unauthenticated');
    if (want === 403) {
      expect(res.body.error.code).toBe('forbidden');
      expect(res.body.error.message).toMatch(/needs the admin or chemist role/);
    }
  });

  it('then no inventory route deletes anything (items are retired, never deleted)', async () => {
    for (const k of KINDS) {
      const res = await request(t.app).delete(`${k.path}/${ids[k.key]}`).set('Cookie', cookies.admin!);
      expect(res.status, k.path).toBe(404);
      const still = await request(t.app).get(`${k.path}/${ids[k.key]}`).set('Cookie', cookies.admin!);
      expect(still.status).toBe(200);
    }
  });
});
