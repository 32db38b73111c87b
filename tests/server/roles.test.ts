// Permission matrix (REQUIREMENTS AC-02, DEVELOPERS.md "Roles are checked on the server"):
// every API route × { signed out, chemist, technician, qa, admin } → expected status.
// The table is checked against the routes Express actually registered, so a new route without a row fails.
import { readFileSync } from 'node:fs';
import type { Express } from 'express';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO, DEMO_PASSWORD, makeTestApp, sessionCookie, userIdByEmail, type TestApp } from './helpers/test-app.ts';
import { validCalcRequest } from './helpers/calc-request.ts';
import { validVolumeCheckRequest } from './helpers/volume-check-request.ts';

type Who = 'signedOut' | 'chemist' | 'technician' | 'qa' | 'admin';
const WHO: Who[] = ['signedOut', 'chemist', 'technician', 'qa', 'admin'];

interface Row {
  method: 'get' | 'post' | 'put' | 'patch' | 'delete';
  path: string; // Express pattern
  /** roles that succeed; others get 403, signed out gets 401 */
  allowed: 'public' | 'signedIn' | Exclude<Who, 'signedOut'>[];
  ok: number;
  body?: (who: Who) => unknown;
}

let t: TestApp;
const cookies: Partial<Record<Who, string>> = {};
let targetId: number;

const ROWS: Row[] = [
  { method: 'get', path: '/api/health', allowed: 'public', ok: 200 },
  { method: 'post', path: '/api/auth/login', allowed: 'public', ok: 200, body: () => ({ email: DEMO.qa, password: DEMO_PASSWORD }) },
  { method: 'post', path: '/api/auth/logout', allowed: 'public', ok: 204 },
  { method: 'get', path: '/api/auth/me', allowed: 'signedIn', ok: 200 },
  { method: 'get', path: '/api/users', allowed: ['admin'], ok: 200 },
  {
    method: 'post',
    path: '/api/users',
    allowed: ['admin'],
    ok: 201,
    body: (who) => ({ email: `new.${who}@harbourside.example`, fullName: 'New Analyst', initials: 'NA', role: 'chemist', password: 'long-enough-pass' }),
  },
  { method: 'get', path: '/api/users/:id', allowed: ['admin'], ok: 200 },
  { method: 'patch', path: '/api/users/:id', allowed: ['admin'], ok: 200, body: () => ({ fullName: 'Jonas Vireo' }) },
  { method: 'post', path: '/api/users/:id/unlock', allowed: ['admin'], ok: 200 },
  { method: 'post', path: '/api/users/:id/password', allowed: ['admin'], ok: 200, body: () => ({ password: 'another-long-pass' }) },
  { method: 'get', path: '/api/settings', allowed: 'signedIn', ok: 200 },
  { method: 'put', path: '/api/settings', allowed: ['admin'], ok: 200, body: () => ({ readingWindowPct: '5' }) },
  { method: 'post', path: '/api/calc/preparation', allowed: 'signedIn', ok: 200, body: () => validCalcRequest() },
  { method: 'post', path: '/api/calc/volume-check', allowed: 'signedIn', ok: 200, body: () => validVolumeCheckRequest() },
  { method: 'get', path: '/api/materials', allowed: 'signedIn', ok: 200 },
  { method: 'get', path: '/api/balances', allowed: 'signedIn', ok: 200 },
  { method: 'get', path: '/api/volumetric-ware', allowed: 'signedIn', ok: 200 },
  { method: 'get', path: '/api/solvents', allowed: 'signedIn', ok: 200 },
  { method: 'get', path: '/api/audit', allowed: ['qa', 'admin'], ok: 200 },
  { method: 'get', path: '/api/audit/export.csv', allowed: ['qa', 'admin'], ok: 200 },
  { method: 'get', path: '/api/audit/actors', allowed: ['qa', 'admin'], ok: 200 },
  { method: 'post', path: '/api/audit/verify', allowed: ['qa', 'admin'], ok: 200 },
  { method: 'get', path: '/api/audit/records/:entity/:entityId', allowed: 'signedIn', ok: 200 },
  { method: 'get', path: '/api/outbox', allowed: ['admin'], ok: 200 },
  { method: 'get', path: '/api/trace/:identifier', allowed: ['qa', 'admin', 'chemist'], ok: 200 },
  { method: 'get', path: '/api/trace/:identifier/report.pdf', allowed: ['qa', 'admin', 'chemist'], ok: 200 },
  { method: 'get', path: '/api/trace/:identifier/report.csv', allowed: ['qa', 'admin', 'chemist'], ok: 200 },
  { method: 'get', path: '/api/preparations/:key/review-flags', allowed: 'signedIn', ok: 200 },
  { method: 'post', path: '/api/admin/expiry-digest', allowed: ['admin'], ok: 200 },
  { method: 'get', path: '/api/series', allowed: 'signedIn', ok: 200 },
];

/**
 * Routes whose route × role matrix lives in the feature's own test file, because they need that feature's
 * fixtures (an item to patch or retire, a preparation to weigh). Each entry names the file; the check below
 * makes sure the file exists and exercises the path, so a new route still needs a row here or there.
 */
const COVERED_ELSEWHERE: Record<string, string> = {
  ...Object.fromEntries(
    ['materials', 'balances', 'volumetric-ware', 'solvents'].flatMap((kind) => [
      [`GET /api/${kind}/:id`, 'inventory-roles.test.ts'],
      [`POST /api/${kind}`, 'inventory-roles.test.ts'],
      [`PATCH /api/${kind}/:id`, 'inventory-roles.test.ts'],
      [`POST /api/${kind}/:id/retire`, 'inventory-roles.test.ts'],
    ]),
  ),
  'GET /api/materials/:id/certificates': 'inventory-roles.test.ts',
  'POST /api/materials/:id/certificates': 'inventory-roles.test.ts',
  'GET /api/certificates/:id/file': 'inventory-roles.test.ts',
  'POST /api/preparations/preview': 'preparations.test.ts',
  'POST /api/preparations': 'preparations.test.ts',
  'GET /api/preparations': 'preparations.test.ts',
  'GET /api/preparations/:key': 'preparations.test.ts',
  'POST /api/preparations/:key/weighings': 'preparations.test.ts',
  'POST /api/preparations/:key/make-up': 'preparations.test.ts',
  'POST /api/preparations/:key/signatures': 'signatures.test.ts',
  'GET /api/preparations/:key/prep-sheet.pdf': 'printing.test.ts',
  'GET /api/label-templates': 'printing.test.ts',
  'POST /api/label-templates': 'printing.test.ts',
  'PATCH /api/label-templates/:id': 'printing.test.ts',
  'GET /api/preparations/:key/labels-preview.pdf': 'printing.test.ts',
  'POST /api/preparations/:key/label-prints': 'printing.test.ts',
  'GET /api/preparations/:key/label-prints': 'printing.test.ts',
  'GET /api/label-prints/:id/labels.pdf': 'printing.test.ts',
  'GET /api/outbox/:id': 'mail.test.ts',
  'POST /api/trace/:identifier/review-flags': 'trace.test.ts',
  'POST /api/preparations/:key/dilutions': 'lineage.test.ts',
  'POST /api/preparations/:key/aliquots': 'lineage.test.ts',
  'POST /api/preparations/:key/gravimetric-dilutions': 'gravimetric-dilution.test.ts',
  'POST /api/preparations/:key/gravimetric-readings': 'gravimetric-dilution.test.ts',
  'POST /api/series/proposal': 'lineage.test.ts',
  'POST /api/series': 'lineage.test.ts',
  'GET /api/series/:key': 'lineage.test.ts',
  'GET /api/series/:key/sheet.pdf': 'series.test.ts',
  'POST /api/preparations/:key/expiry-extensions': 'expiry-extension.test.ts',
  'POST /api/mixes': 'mixes.test.ts',
  'GET /api/volume-checks': 'volume-checks.test.ts',
  'POST /api/volume-checks': 'volume-checks.test.ts',
  'GET /api/volume-checks/:key': 'volume-checks.test.ts',
  'POST /api/volume-checks/:key/readings': 'volume-checks.test.ts',
  'POST /api/volume-checks/:key/signatures': 'volume-checks.test.ts',
  'GET /api/volume-checks/:key/certificate.pdf': 'volume-checks.test.ts',
  'GET /api/volumetric-ware/:id/calibration': 'volume-checks.test.ts',
};

function expected(row: Row, who: Who): number {
  if (row.allowed === 'public') return row.ok;
  if (who === 'signedOut') return 401;
  if (row.allowed === 'signedIn') return row.ok;
  return row.allowed.includes(who) ? row.ok : 403;
}

/** METHOD + path of every route registered in the app (walks nested routers; uses mount paths). */
function registeredRoutes(app: Express): string[] {
  const out: string[] = [];
  const walk = (stack: any[], prefix: string) => {
    for (const layer of stack) {
      if (layer.route) {
        for (const m of Object.keys(layer.route.methods)) out.push(`${m.toUpperCase()} ${prefix}${layer.route.path}`);
      } else if (layer.handle?.stack) {
        const mount = typeof layer.rawPath === 'string' && layer.rawPath !== '/' ? layer.rawPath : '';
        walk(layer.handle.stack, prefix + mount);
      }
    }
  };
  walk((app as any).router.stack, '');
  return out.filter((r) => r.includes(' /api')).sort();
}

beforeAll(async () => {
  t = await makeTestApp();
  cookies.chemist = await sessionCookie(t.app, DEMO.chemist);
  cookies.technician = await sessionCookie(t.app, DEMO.technician);
  cookies.qa = await sessionCookie(t.app, DEMO.qa);
  cookies.admin = await sessionCookie(t.app, DEMO.admin);
  targetId = await userIdByEmail(t.app, cookies.admin, DEMO.inactive);
});
afterAll(() => t.close());

describe('permission matrix', () => {
  it('when the app is built, then the table covers every registered /api route', () => {
    const table = [...ROWS.map((r) => `${r.method.toUpperCase()} ${r.path}`), ...Object.keys(COVERED_ELSEWHERE)].sort();
    expect(table).toEqual(registeredRoutes(t.app));
  });

  it.each(Object.entries(COVERED_ELSEWHERE))('%s: its role matrix is in %s', (route, file) => {
    const source = readFileSync(new URL(`./${file}`, import.meta.url), 'utf8');
    // the path up to its first parameter, e.g. "/api/materials" for "GET /api/materials/:id/retire"
    const path = route.split(' ')[1]!;
    const stem = path.split('/:')[0]!;
    expect(source).toContain(stem);
    expect(source).toMatch(/technician/);
    expect(source).toMatch(/qa/);
  });

  const cases = ROWS.flatMap((row) => WHO.map((who) => [`${row.method.toUpperCase()} ${row.path}`, who, row] as const));
  it.each(cases)('%s as %s', async (_name, who, row) => {
    const url = row.path.replace(':entity/:entityId', 'preparation/1').replace(':identifier', 'HWL-2026-0001').replace(':key', 'HWL-2026-0001').replace(':id', String(targetId));
    let req = request(t.app)[row.method](url);
    if (who !== 'signedOut') req = req.set('Cookie', cookies[who]!);
    if (row.body) req = req.send(row.body(who) as object);
    const res = await req;
    const want = expected(row, who);
    expect(res.status, JSON.stringify(res.body)).toBe(want);
    if (want === 403) {
      expect(res.body.error.code).toBe('forbidden');
      expect(res.body.error.message).toMatch(/needs the .* role/);
    }
    if (want === 401) expect(res.body.error.code).toBe('unauthenticated');
  });

  it('then no route deletes users (accounts are deactivated, never deleted)', async () => {
    const res = await request(t.app).delete(`/api/users/${targetId}`).set('Cookie', cookies.admin!);
    expect(res.status).toBe(404);
  });
});
