// Permission matrix (REQUIREMENTS AC-02, DEVELOPERS.md "Roles are checked on the server"):
// every API route × { signed out, chemist, technician, qa, admin } → expected status.
// The table is checked against the routes Express actually registered, so a new route without a row fails.
// Then a matrix generated from that route list (every registered route × every role, ACCESS below) checks each
// route's role rule in this file, including the routes whose full feature matrix lives in a feature test.
import { readFileSync } from 'node:fs';
import type { Express } from 'express';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO, DEMO_PASSWORD, makeTestApp, sessionCookie, userIdByEmail, type TestApp } from './helpers/test-app.ts';
import { validCalcRequest } from './helpers/calc-request.ts';
import { fillPath, registeredRouteList, registeredRoutes } from './helpers/routes.ts';
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
  /** sends a session of its own (signed in for this request), e.g. logout, which ends the session it is sent with */
  ownSession?: boolean;
}

let t: TestApp;
const cookies: Partial<Record<Who, string>> = {};
let targetId: number;

const ROWS: Row[] = [
  { method: 'get', path: '/api/health', allowed: 'public', ok: 200 },
  { method: 'get', path: '/api/health/ready', allowed: 'public', ok: 200 },
  { method: 'post', path: '/api/auth/login', allowed: 'public', ok: 200, body: () => ({ email: DEMO.qa, password: DEMO_PASSWORD }) },
  { method: 'post', path: '/api/auth/logout', allowed: 'public', ok: 204, ownSession: true },
  { method: 'get', path: '/api/sessions', allowed: ['qa', 'admin'], ok: 200 },
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
  { method: 'get', path: '/api/calc/buoyancy-table', allowed: 'signedIn', ok: 200 },
  { method: 'get', path: '/api/calc/buoyancy-table.pdf', allowed: 'signedIn', ok: 200 },
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
  { method: 'get', path: '/api/worklists', allowed: 'signedIn', ok: 200 },
  { method: 'get', path: '/api/trace/:identifier', allowed: ['qa', 'admin', 'chemist'], ok: 200 },
  { method: 'get', path: '/api/trace/:identifier/report.pdf', allowed: ['qa', 'admin', 'chemist'], ok: 200 },
  { method: 'get', path: '/api/trace/:identifier/report.csv', allowed: ['qa', 'admin', 'chemist'], ok: 200 },
  { method: 'get', path: '/api/trace/:identifier/forward-report.pdf', allowed: ['qa', 'admin', 'chemist'], ok: 200 },
  { method: 'get', path: '/api/trace/:identifier/forward-report.csv', allowed: ['qa', 'admin', 'chemist'], ok: 200 },
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
  // these end sessions of the caller or someone else, so they get their own sessions there
  'POST /api/auth/logout-everywhere': 'sessions.test.ts',
  'POST /api/auth/password': 'sessions.test.ts',
  'POST /api/sessions/:id/end': 'sessions.test.ts',
  'GET /api/volume-checks': 'volume-checks.test.ts',
  'POST /api/volume-checks': 'volume-checks.test.ts',
  'GET /api/volume-checks/:key': 'volume-checks.test.ts',
  'POST /api/volume-checks/:key/readings': 'volume-checks.test.ts',
  'POST /api/volume-checks/:key/signatures': 'volume-checks.test.ts',
  'GET /api/volume-checks/:key/certificate.pdf': 'volume-checks.test.ts',
  'GET /api/volumetric-ware/:id/calibration': 'volume-checks.test.ts',
};

type Allowed = Row['allowed'];

/**
 * Who may call each route of COVERED_ELSEWHERE (the rows above state it for theirs). The generated matrix
 * below needs a rule for every registered route: a new route without one fails.
 */
const ACCESS_ELSEWHERE: Record<string, Allowed> = {
  ...Object.fromEntries(
    ['materials', 'balances', 'volumetric-ware', 'solvents'].flatMap((kind) => [
      [`GET /api/${kind}/:id`, 'signedIn'],
      [`POST /api/${kind}`, ['admin', 'chemist']],
      [`PATCH /api/${kind}/:id`, ['admin', 'chemist']],
      [`POST /api/${kind}/:id/retire`, ['admin', 'chemist']],
    ]),
  ),
  'GET /api/materials/:id/certificates': 'signedIn',
  'POST /api/materials/:id/certificates': ['admin', 'chemist'],
  'GET /api/certificates/:id/file': 'signedIn',
  'POST /api/preparations/preview': ['chemist', 'admin'],
  'POST /api/preparations': ['chemist'],
  'GET /api/preparations': 'signedIn',
  'GET /api/preparations/:key': 'signedIn',
  'POST /api/preparations/:key/weighings': ['chemist', 'technician'],
  'POST /api/preparations/:key/make-up': ['chemist', 'technician'],
  'POST /api/preparations/:key/signatures': ['chemist', 'qa'],
  'GET /api/preparations/:key/prep-sheet.pdf': 'signedIn',
  'GET /api/label-templates': 'signedIn',
  'POST /api/label-templates': ['admin'],
  'PATCH /api/label-templates/:id': ['admin'],
  'GET /api/preparations/:key/labels-preview.pdf': 'signedIn',
  'POST /api/preparations/:key/label-prints': ['chemist', 'technician'],
  'GET /api/preparations/:key/label-prints': 'signedIn',
  'GET /api/label-prints/:id/labels.pdf': 'signedIn',
  'GET /api/outbox/:id': ['admin'],
  'POST /api/trace/:identifier/review-flags': ['qa'],
  'POST /api/preparations/:key/dilutions': ['chemist'],
  'POST /api/preparations/:key/aliquots': ['chemist', 'technician'],
  'POST /api/preparations/:key/gravimetric-dilutions': ['chemist'],
  'POST /api/preparations/:key/gravimetric-readings': ['chemist', 'technician'],
  'POST /api/series/proposal': ['chemist'],
  'POST /api/series': ['chemist'],
  'GET /api/series/:key': 'signedIn',
  'GET /api/series/:key/sheet.pdf': 'signedIn',
  'POST /api/preparations/:key/expiry-extensions': ['qa'],
  'POST /api/mixes': ['chemist'],
  'POST /api/auth/logout-everywhere': 'signedIn',
  'POST /api/auth/password': 'signedIn',
  'POST /api/sessions/:id/end': ['admin'],
  'GET /api/volume-checks': 'signedIn',
  'POST /api/volume-checks': ['chemist', 'technician'],
  'GET /api/volume-checks/:key': 'signedIn',
  'POST /api/volume-checks/:key/readings': ['chemist', 'technician'],
  'POST /api/volume-checks/:key/signatures': ['chemist'],
  'GET /api/volume-checks/:key/certificate.pdf': 'signedIn',
  'GET /api/volumetric-ware/:id/calibration': 'signedIn',
};

/** The rule of every route: its row, else its ACCESS_ELSEWHERE entry. */
const ACCESS: Record<string, Allowed> = { ...ACCESS_ELSEWHERE, ...Object.fromEntries(ROWS.map((r) => [`${r.method.toUpperCase()} ${r.path}`, r.allowed])) };

function expected(row: Row, who: Who): number {
  if (row.allowed === 'public') return row.ok;
  if (who === 'signedOut') return 401;
  if (row.allowed === 'signedIn') return row.ok;
  return row.allowed.includes(who) ? row.ok : 403;
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
    if (who !== 'signedOut') req = req.set('Cookie', row.ownSession ? await sessionCookie(t.app, DEMO[who]) : cookies[who]!);
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

  it('when the matrix is generated from the router, then every registered route has a role rule and every rule a route', () => {
    const routes = registeredRoutes(t.app);
    expect(routes.filter((r) => !(r in ACCESS)), 'routes without a rule').toEqual([]);
    expect(Object.keys(ACCESS).filter((r) => !routes.includes(r)), 'rules without a route').toEqual([]);
  });

  it('then no route deletes users (accounts are deactivated, never deleted)', async () => {
    const res = await request(t.app).delete(`/api/users/${targetId}`).set('Cookie', cookies.admin!);
    expect(res.status).toBe(404);
  });
});

/**
 * The generated matrix: every route Express registered × { signed out, chemist, technician, QA, admin }.
 * Parameters name records that do not exist and the body is empty, so nothing is changed: a role outside the
 * rule must get 401 (signed out) or 403 forbidden before anything else is looked at; a role inside it must get
 * past the role check (anything but 401/403) and never a 5xx.
 */
describe('route × role matrix generated from the router', () => {
  const NONE = { id: '999999', key: 'HWL-0000-9999', identifier: 'HWL-0000-9999', entity: 'preparation', entityId: '999999' };
  const SKIP_FOR_ALLOWED = new Set(['POST /api/auth/login']); // public: its answers are covered by the rows above
  let routes: ReturnType<typeof registeredRouteList> = [];
  const results: { route: string; who: Who; status: number }[] = [];

  beforeAll(() => {
    routes = registeredRouteList(t.app);
  });

  it('when every route is called by every role, then the role rule holds in each cell', async () => {
    expect(routes.length).toBeGreaterThan(60);
    const failures: string[] = [];
    for (const route of routes) {
      const allowed = ACCESS[route.name];
      if (allowed === undefined) {
        failures.push(`${route.name}: no rule`);
        continue;
      }
      for (const who of WHO) {
        const isAllowed = allowed === 'public' || (who !== 'signedOut' && (allowed === 'signedIn' || allowed.includes(who)));
        if (isAllowed && SKIP_FOR_ALLOWED.has(route.name)) continue;
        // signing out ends the session: use a session of its own so the others stay signed in
        const cookie = who === 'signedOut' ? undefined : route.name === 'POST /api/auth/logout' ? await sessionCookie(t.app, DEMO[who]) : cookies[who];
        let req = request(t.app)[route.method](fillPath(route.path, NONE));
        if (cookie) req = req.set('Cookie', cookie);
        if (route.method !== 'get') req = req.send({});
        const res = await req;
        // signing out everywhere ends the role's other sessions too: sign it in again
        if (who !== 'signedOut' && route.name === 'POST /api/auth/logout-everywhere') cookies[who] = await sessionCookie(t.app, DEMO[who]);
        results.push({ route: route.name, who, status: res.status });
        const cell = `${route.name} as ${who}: ${res.status} ${JSON.stringify(res.body).slice(0, 160)}`;
        if (res.status >= 500) failures.push(cell);
        else if (!isAllowed && who === 'signedOut' && (res.status !== 401 || res.body?.error?.code !== 'unauthenticated')) failures.push(`${cell} (want 401)`);
        else if (!isAllowed && who !== 'signedOut' && (res.status !== 403 || res.body?.error?.code !== 'forbidden')) failures.push(`${cell} (want 403)`);
        else if (isAllowed && (res.status === 401 || (res.status === 403 && res.body?.error?.code === 'forbidden'))) failures.push(`${cell} (want past the role check)`);
      }
    }
    expect(failures).toEqual([]);
    const denied = results.filter((r) => r.status === 401 || r.status === 403).length;
    console.log(`[roles] generated matrix: ${routes.length} routes × ${WHO.length} roles, ${results.length} cells, ${denied} refused by role, 0 5xx`);
  }, 120_000);
});
