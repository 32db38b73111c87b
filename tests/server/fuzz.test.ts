// Issue 10 §6: a bounded fuzz test of every state-changing route × every role (fast-check, fixed seed, fixed count).
// Each request is a valid body with one part made hostile (NUL, direction overrides, lone surrogates, formulas,
// absurd magnitudes, wrong types, prototype keys …) or random JSON, sent with hostile or ordinary path parameters.
// Asserted: no 5xx, every error has the API error body, and a refused request (4xx) stores nothing: the row count,
// highest rowid and latest updated_at of every table are the same before and after it, except the entries the
// product records on purpose for a refusal (a wrong password and its failure counter, a refused signature or parent).
import fc from 'fast-check';
import type { Sequelize } from 'sequelize';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO, DEMO_PASSWORD, demoPasswordHash, makeTestApp, sessionCookie, type TestApp } from './helpers/test-app.ts';
import { validCalcRequest } from './helpers/calc-request.ts';
import { validBalance, validMaterial, validSolvent, validWare } from './helpers/inventory-fixtures.ts';
import { fillPath, registeredRouteList, type RegisteredRoute } from './helpers/routes.ts';

const SEED = 20261205;
const PER_ROUTE_AND_ROLE = 10; // × 40 state-changing routes × 5 roles = 2,000 requests
type Who = 'signedOut' | 'chemist' | 'technician' | 'qa' | 'admin';
const WHO: Who[] = ['signedOut', 'chemist', 'technician', 'qa', 'admin'];

/**
 * What the product records on purpose when it refuses: a wrong password (sign-in or signing) with its failure
 * counter and a lockout, a refused signature, and a parent refused for a dilution or mix (REQUIREMENTS AT-08).
 */
const REFUSAL_AUDIT_ACTIONS = new Set(['sign_in_failed', 'account_locked', 'signature_failed', 'signature_refused', 'parent_refused']);
const REFUSAL_TABLES = new Set(['audit_entries', 'users']);
/** Tables a request may touch just by being made (a server-side session's "last seen"). */
const isSessionTable = (name: string) => /session/i.test(name);

let t: TestApp;
const cookies: Partial<Record<Who, string>> = {};

// ---------------------------------------------------------------- hostile values

const HOSTILE_STRINGS = [
  '\u0000abc',
  'abc\u0000',
  'Lead \u202enitrate',
  'x\u2066y',
  '\ud800',
  'a\udc00b',
  '\u001b[31m',
  'line\nbreak',
  '\t',
  '=HYPERLINK("http://evil.example","x")',
  '+SUM(1)',
  '-2+3',
  '@cmd',
  '%',
  '_',
  '%_%',
  "'; DROP TABLE users;--",
  '<script>alert(1)</script>',
  '../../etc/passwd',
  'x'.repeat(3000),
  '',
  ' ',
  '1e400',
  '1e-400',
  '-1e308',
  '1e308',
  '0',
  '-0',
  'NaN',
  'Infinity',
  '0x10',
  '1,5',
  '١٢٣',
  '9'.repeat(400),
  '__proto__',
];
const hostileString = fc.constantFrom(...HOSTILE_STRINGS);
const hostileValue: fc.Arbitrary<unknown> = fc.oneof(
  { weight: 5, arbitrary: hostileString },
  { weight: 2, arbitrary: fc.constantFrom<unknown>(null, true, false, 0, -1, 1e308, -1e308, 2 ** 53 + 1, 0.1, [], {}, [[]], { a: { b: { c: {} } } }) },
  { weight: 1, arbitrary: fc.string({ maxLength: 30 }) },
  { weight: 1, arbitrary: fc.integer() },
  { weight: 1, arbitrary: fc.jsonValue({ maxDepth: 2 }) },
);

/** Path parameters: real records, missing ones and hostile text (sent percent-encoded). */
const PARAMS = {
  id: ['1', '2', '3', '999999', '0', '-1', 'abc', '1e400', '\u0000', '\u202e1', '9'.repeat(30)],
  key: ['HWL-2026-0001', 'HWL-2026-0002', 'HWL-2026-0003', '1', 'HWL-0000-9999', '\u0000', '%', '_', '..', '\u202eHWL'],
  identifier: ['HWL-2026-0001', 'BAL-A1', 'HWL-0000-9999', '\u0000', '%', '_', 'x\u2066y'],
  entity: ['preparation', 'user', '\u0000'],
  entityId: ['1', '\u0000'],
};

// ---------------------------------------------------------------- valid bodies to start from

const conditions = { temperatureC: '20.0', pressureHPa: '1013', relativeHumidityPct: '50' };
const TEMPLATES: Record<string, () => unknown> = {
  'POST /api/auth/login': () => ({ email: 'nobody@harbourside.example', password: 'not-the-password' }),
  'POST /api/users': () => ({ email: 'fuzz@harbourside.example', fullName: 'Fuzz Analyst', initials: 'FA', role: 'chemist', password: 'long-enough-pass-1' }),
  'PATCH /api/users/:id': () => ({ fullName: 'Jonas Vireo' }),
  'POST /api/users/:id/password': () => ({ password: 'another-long-pass-1' }),
  'PUT /api/settings': () => ({ readingWindowPct: '5' }),
  'POST /api/calc/preparation': () => validCalcRequest(),
  'POST /api/materials': () => validMaterial(),
  'PATCH /api/materials/:id': () => ({ storage: 'Cabinet 4' }),
  'POST /api/balances': () => validBalance(),
  'PATCH /api/balances/:id': () => ({ location: 'Room 2' }),
  'POST /api/volumetric-ware': () => validWare(),
  'PATCH /api/volumetric-ware/:id': () => ({ location: 'Drawer 3' }),
  'POST /api/solvents': () => validSolvent(),
  'PATCH /api/solvents/:id': () => ({ grade: 'LC-MS' }),
  'POST /api/materials/:id/retire': () => ({ reason: 'Lot used up' }),
  'POST /api/balances/:id/retire': () => ({ reason: 'Out of service' }),
  'POST /api/volumetric-ware/:id/retire': () => ({ reason: 'Chipped' }),
  'POST /api/solvents/:id/retire': () => ({ reason: 'Expired' }),
  'POST /api/preparations/preview': () => ({ materialId: 1, analyteFormula: 'Pb', target: { value: '1000', unit: 'mg/L' }, volume: { value: '100', unit: 'mL' }, balanceId: 1, conditions }),
  'POST /api/preparations': () => ({ materialId: 1, analyteFormula: 'Pb', target: { value: '1000', unit: 'mg/L' }, volume: { value: '100', unit: 'mL' }, balanceId: 1, conditions, notes: 'fuzz' }),
  'POST /api/preparations/:key/weighings': () => ({ mode: 'direct', reading: '160.07', unit: 'mg', conditions }),
  'POST /api/preparations/:key/make-up': () => ({ flaskIdentifier: 'VF-100-01', solventId: 1, solventLot: 'W-1', solutionTemperatureC: '20.0', applyTemperatureCorrection: false }),
  'POST /api/preparations/:key/signatures': () => ({ meaning: 'prepared', password: DEMO_PASSWORD }),
  'POST /api/label-templates': () => ({
    name: 'Fuzz 50×30',
    widthMm: '50',
    heightMm: '30',
    layout: { kind: 'sheet', pageSize: 'A4', rows: 9, columns: 4, marginTopMm: '10', marginLeftMm: '4', gapXMm: '2', gapYMm: '2' },
    content: 'full',
  }),
  'PATCH /api/label-templates/:id': () => ({ name: 'Shelf labels', widthMm: '45' }),
  'POST /api/preparations/:key/label-prints': () => ({ templateId: 1, copies: 1 }),
  'POST /api/trace/:identifier/review-flags': () => ({ reason: 'Under investigation (fuzz)' }),
  'POST /api/preparations/:key/dilutions': () => ({ method: 'volumetric', target: { value: '10', unit: 'mg/L' }, pipetteId: 1, flaskId: 1 }),
  'POST /api/preparations/:key/aliquots': () => ({ pipetteIdentifier: 'PP-1', volumeMl: '1' }),
  'POST /api/preparations/:key/gravimetric-dilutions': () => ({ target: { value: '10', unit: 'mg/kg' }, balanceId: 1, plannedFinalMassG: '100' }),
  'POST /api/preparations/:key/gravimetric-readings': () => ({ aliquotReading: '1.0234', finalReading: '100.1234', unit: 'g' }),
  'POST /api/series/proposal': () => ({ parentKey: 'HWL-2026-0001', levels: [{ value: '1', unit: 'mg/L' }] }),
  'POST /api/series': () => ({ parentKey: 'HWL-2026-0001', levels: [{ target: { value: '1', unit: 'mg/L' }, pipetteId: 1, flaskId: 1 }] }),
  'POST /api/preparations/:key/expiry-extensions': () => ({ newExpiresOn: '2027-06-01', reason: 'Stability study ST-9', password: DEMO_PASSWORD }),
  'POST /api/mixes': () => ({ components: [{ parentKey: 'HWL-2026-0001', pipetteId: 1 }, { parentKey: 'HWL-2026-0002', pipetteId: 1 }], flaskId: 1 }),
};

/** Every leaf path of a JSON value (objects and arrays walked). */
function leafPaths(v: unknown, path: (string | number)[] = []): (string | number)[][] {
  if (v === null || typeof v !== 'object') return [path];
  const entries = Array.isArray(v) ? v.map((x, i) => [i, x] as const) : Object.entries(v as object);
  if (entries.length === 0) return [path];
  return entries.flatMap(([k, x]) => leafPaths(x, [...path, k]));
}

function setAt(root: any, path: (string | number)[], shared: unknown, op: 'replace' | 'delete' | 'add'): unknown {
  const value = shared !== null && typeof shared === 'object' ? structuredClone(shared) : shared; // constants are shared between samples
  if (path.length === 0) return op === 'delete' ? {} : value;
  let node = root;
  for (const k of path.slice(0, -1)) node = node[k];
  const last = path.at(-1)!;
  if (op === 'delete') delete node[last];
  else if (op === 'add' && node && typeof node === 'object' && !Array.isArray(node)) node[String(value).slice(0, 20) || 'extra'] = value;
  else node[last] = value;
  return root;
}

interface Spec {
  body: unknown;
  params: Record<string, string>;
}

function specArbitrary(route: RegisteredRoute): fc.Arbitrary<Spec> {
  const params = fc.record(Object.fromEntries(Object.entries(PARAMS).map(([k, pool]) => [k, fc.constantFrom(...pool)]))) as fc.Arbitrary<Record<string, string>>;
  const template = TEMPLATES[route.name] ?? (() => ({}));
  const mutated = fc
    .record({ pick: fc.nat(), value: hostileValue, op: fc.constantFrom<'replace' | 'delete' | 'add'>('replace', 'replace', 'replace', 'delete', 'add'), times: fc.integer({ min: 1, max: 3 }) })
    .map(({ pick, value, op, times }) => {
      let body: unknown = template();
      for (let i = 0; i < times; i++) {
        const paths = leafPaths(body);
        body = setAt(body, paths[(pick + i) % paths.length]!, value, op);
      }
      return body;
    });
  const body = fc.oneof(
    { weight: 1, arbitrary: fc.constant(null).map(() => template()) },
    { weight: 6, arbitrary: mutated },
    { weight: 2, arbitrary: fc.jsonValue({ maxDepth: 3 }) },
    { weight: 1, arbitrary: fc.dictionary(hostileString, hostileValue, { maxKeys: 4 }) },
  );
  return fc.record({ body, params });
}

// ---------------------------------------------------------------- the database fingerprint

let TABLES: { name: string; updatedAt: boolean }[] = [];

async function loadTables(sequelize: Sequelize) {
  const rows = await sequelize.query<{ name: string }>(
    "SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' AND name <> 'schema_migrations' ORDER BY name",
    { type: 'SELECT' as never },
  );
  TABLES = [];
  for (const { name } of rows) {
    const cols = await sequelize.query<{ name: string }>(`PRAGMA table_info(\`${name}\`)`, { type: 'SELECT' as never });
    TABLES.push({ name, updatedAt: cols.some((c) => c.name === 'updated_at') });
  }
}

/** Per table: row count, highest rowid and latest updated_at, in one query. */
async function fingerprint(sequelize: Sequelize): Promise<Record<string, string>> {
  const parts = TABLES.map(
    ({ name, updatedAt }, i) =>
      `(SELECT count(*) || '/' || ifnull(max(rowid), 0) || '/' || ${updatedAt ? 'ifnull(max(updated_at), \'\')' : "''"} FROM \`${name}\`) AS t${i}`,
  );
  const [row] = await sequelize.query<Record<string, string>>(`SELECT ${parts.join(', ')}`, { type: 'SELECT' as never });
  return Object.fromEntries(TABLES.map(({ name }, i) => [name, row![`t${i}`]!]));
}

// ---------------------------------------------------------------- the run

beforeAll(async () => {
  t = await makeTestApp({ env: { LOGIN_RATE_LIMIT: '100000' } }); // the per-IP limit is tested in input-guards.test.ts
  for (const who of WHO) if (who !== 'signedOut') cookies[who] = await sessionCookie(t.app, DEMO[who]);
  await loadTables(t.sequelize);
});
afterAll(() => t.close());

describe('fuzz: every state-changing route × every role', () => {
  it('when hostile requests are sent, then none is a 5xx and no refused request stores anything', async () => {
    const routes = registeredRouteList(t.app).filter((r) => r.method !== 'get');
    expect(routes.length).toBeGreaterThanOrEqual(40);
    const failures: string[] = [];
    let requests = 0;
    let fiveXx = 0;
    let refused = 0;
    const statuses = new Map<number, number>();

    for (const [ri, route] of routes.entries()) {
      for (const [wi, who] of WHO.entries()) {
        const specs = fc.sample(specArbitrary(route), { seed: SEED + ri * 31 + wi, numRuns: PER_ROUTE_AND_ROLE });
        for (const spec of specs) {
          // signing out ends a session: give it one of its own so the others stay signed in
          const cookie = who === 'signedOut' ? undefined : route.name === 'POST /api/auth/logout' ? await sessionCookie(t.app, DEMO[who]) : cookies[who];
          const path = fillPath(route.path, Object.fromEntries(Object.entries(spec.params).map(([k, v]) => [k, encodeURIComponent(v)])));
          const before = await fingerprint(t.sequelize);
          const auditBefore = Number(before.audit_entries!.split('/')[1]);
          let req = request(t.app)[route.method](path);
          if (cookie) req = req.set('Cookie', cookie);
          req = req.set('Content-Type', 'application/json');
          const res = await req.send(JSON.stringify(spec.body ?? null));
          requests++;
          statuses.set(res.status, (statuses.get(res.status) ?? 0) + 1);
          const label = `${route.name} as ${who} → ${res.status} ${path} ${JSON.stringify(spec.body)?.slice(0, 200)} :: ${JSON.stringify(res.body)?.slice(0, 200)}`;
          if (res.status >= 500) {
            fiveXx++;
            failures.push(`5xx: ${label}`);
            continue;
          }
          if (res.status >= 400) {
            refused++;
            if (typeof res.body?.error?.message !== 'string' || typeof res.body?.error?.code !== 'string') failures.push(`no error body: ${label}`);
            const after = await fingerprint(t.sequelize);
            const changed = Object.keys(after).filter((k) => after[k] !== before[k] && !isSessionTable(k));
            const unexpected = changed.filter((k) => !REFUSAL_TABLES.has(k));
            if (unexpected.length) failures.push(`stored ${unexpected.join(', ')}: ${label}`);
            if (changed.includes('audit_entries')) {
              const actions = await t.sequelize.query<{ action: string }>('SELECT action FROM audit_entries WHERE rowid > :id', {
                replacements: { id: auditBefore },
                type: 'SELECT' as never,
              });
              const odd = actions.map((a) => a.action).filter((a) => !REFUSAL_AUDIT_ACTIONS.has(a));
              if (odd.length) failures.push(`audited ${odd.join(', ')} on a refused request: ${label}`);
            }
          }
          // keep the roles signed in: a fuzzed wrong signing password may lock an account or end its sessions, and an
          // admin's accepted password reset (temporary) or sign-out everywhere ends them too
          if (who !== 'signedOut' && ((res.status === 401 && res.body?.error?.code === 'unauthenticated') || (res.status === 403 && res.body?.error?.code === 'password_change_required'))) {
            await t.sequelize.query('UPDATE users SET locked_at = NULL, failed_login_count = 0, must_change_password = 0, password_hash = :hash WHERE email = :email', {
              replacements: { email: DEMO[who], hash: await demoPasswordHash() },
            });
            cookies[who] = await sessionCookie(t.app, DEMO[who]);
          }
        }
      }
    }

    const summary = [...statuses.entries()].sort((a, b) => a[0] - b[0]).map(([s, n]) => `${s}×${n}`).join(' ');
    console.log(`[fuzz] seed ${SEED}: ${requests} requests over ${routes.length} state-changing routes × ${WHO.length} roles; ${fiveXx} 5xx; ${refused} refused; statuses ${summary}`);
    expect(failures.slice(0, 20)).toEqual([]);
    expect(requests).toBeGreaterThanOrEqual(2000);
  }, 180_000);
});
