// API basics: health, the error body for unknown routes and bad bodies, no 500 from client input.
import { mkdirSync, readdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../server/app.ts';
import { DEMO, expectErrorBody, makeTestApp, sessionCookie, type TestApp } from './helpers/test-app.ts';

let t: TestApp;
let chemist: string;
let admin: string;
beforeAll(async () => {
  t = await makeTestApp();
  chemist = await sessionCookie(t.app, DEMO.chemist);
  admin = await sessionCookie(t.app, DEMO.admin);
});
afterAll(() => t.close());

describe('GET /api/health', () => {
  it('when called signed out, then it returns 200 with the database answering and the latest migration applied', async () => {
    const res = await request(t.app).get('/api/health');
    expect(res.status).toBe(200);
    const latest = readdirSync(join(import.meta.dirname, '../../server/db/migrations')).filter((f) => /^\d{4}-.*\.ts$/.test(f)).sort().at(-1);
    expect(res.body).toEqual({ status: 'ok', database: 'ok', migration: latest, pending: 0 });
  });

  it('then /api/health/ready is 200 for a load balancer, and 503 with the reason while the server shuts down', async () => {
    const ready = await request(t.app).get('/api/health/ready');
    expect(ready.status).toBe(200);
    expect(ready.body).toEqual({ ready: true });
    t.app.locals.shuttingDown = true;
    try {
      const draining = await request(t.app).get('/api/health/ready');
      expect(draining.status).toBe(503);
      expect(draining.body).toEqual({ ready: false, reason: 'shutting down' });
    } finally {
      t.app.locals.shuttingDown = false;
    }
  });

  it('then every API answer carries a request id, and a plain one from the load balancer is kept', async () => {
    const fresh = await request(t.app).get('/api/health');
    expect(fresh.headers['x-request-id']).toMatch(/^[0-9a-f-]{36}$/);
    const kept = await request(t.app).get('/api/health').set('X-Request-Id', 'lb-7f3a.42');
    expect(kept.headers['x-request-id']).toBe('lb-7f3a.42');
    const odd = await request(t.app).get('/api/health').set('X-Request-Id', 'a b<script>');
    expect(odd.headers['x-request-id']).toMatch(/^[0-9a-f-]{36}$/);
  });

  it('then helmet security headers are present', async () => {
    const res = await request(t.app).get('/api/health');
    expect(res.headers['x-content-type-options']).toBe('nosniff');
    expect(res.headers['content-security-policy']).toBeDefined();
    expect(res.headers['x-powered-by']).toBeUndefined();
  });
});

describe('unknown API routes', () => {
  it.each([
    ['get', '/api/nope'],
    ['post', '/api/nope/deeper'],
    ['delete', '/api/users/1'],
    ['get', '/api'],
  ] as const)('when %s %s, then 404 with the JSON error body', async (method, path) => {
    const res = await request(t.app)[method](path).set('Cookie', admin);
    expect(res.status).toBe(404);
    expect(res.headers['content-type']).toMatch(/application\/json/);
    expectErrorBody(res.body, 'not_found');
  });

  it('when the user id is not a number, then 404', async () => {
    const res = await request(t.app).patch('/api/users/abc').set('Cookie', admin).send({ fullName: 'X' });
    expect(res.status).toBe(404);
    expectErrorBody(res.body, 'not_found');
  });

  it('when a path has a malformed percent escape, then 4xx, not 500', async () => {
    const res = await request(t.app).patch('/api/users/%E0%A4%A').set('Cookie', admin).send({ fullName: 'X' });
    expect(res.status).toBeGreaterThanOrEqual(400);
    expect(res.status).toBeLessThan(500);
    expectErrorBody(res.body);
  });
});

describe('bad request bodies never produce a 500', () => {
  const cases: [string, string, string, string][] = [
    ['POST', '/api/auth/login', '{"email": "a@b.c", ', 'application/json'],
    ['POST', '/api/users', '{not json', 'application/json'],
    ['PUT', '/api/settings', '[1,2', 'application/json'],
    ['POST', '/api/calc/preparation', '{"target":', 'application/json'],
  ];
  it.each(cases)('when %s %s gets malformed JSON, then 400 bad_request', async (method, path, raw, type) => {
    const res = await request(t.app)
      [method.toLowerCase() as 'post'](path)
      .set('Cookie', admin)
      .set('Content-Type', type)
      .send(raw);
    expect(res.status).toBe(400);
    expectErrorBody(res.body, 'bad_request');
    expect(res.body.error.message).toMatch(/not valid JSON/);
  });

  it.each([
    ['/api/auth/login', null],
    ['/api/users', null],
    ['/api/calc/preparation', null],
    ['/api/auth/login', '"just a string"'],
    ['/api/users', '[]'],
    ['/api/calc/preparation', '42'],
    ['/api/calc/preparation', 'null'],
  ])('when POST %s has body %s, then 400 validation_failed', async (path, raw) => {
    let req = request(t.app).post(path).set('Cookie', admin);
    if (raw !== null) req = req.set('Content-Type', 'application/json').send(raw);
    const res = await req;
    expect(res.status).toBe(400);
    expectErrorBody(res.body, 'validation_failed');
  });

  it('when the body is sent as text/plain, then 400 (the body is not read)', async () => {
    const res = await request(t.app).post('/api/auth/login').set('Content-Type', 'text/plain').send('email=x');
    expect(res.status).toBe(400);
    expectErrorBody(res.body, 'validation_failed');
  });

  it('when fields have the wrong types, then 400 with a message per field', async () => {
    const res = await request(t.app)
      .post('/api/users')
      .set('Cookie', admin)
      .send({ email: 42, fullName: ['x'], initials: {}, role: 7, password: true });
    expect(res.status).toBe(400);
    expectErrorBody(res.body, 'validation_failed');
    expect(Object.keys(res.body.error.fields).sort()).toEqual(['email', 'fullName', 'initials', 'password', 'role']);
  });

  it('when the body is larger than 1 MB, then 413 payload_too_large', async () => {
    const res = await request(t.app)
      .post('/api/calc/preparation')
      .set('Cookie', chemist)
      .send({ padding: 'x'.repeat(1_100_000) });
    expect(res.status).toBe(413);
    expectErrorBody(res.body, 'payload_too_large');
  });

  it('when the JSON body has an unsupported charset, then 415', async () => {
    const res = await request(t.app)
      .post('/api/auth/login')
      .set('Content-Type', 'application/json; charset=klingon')
      .send('{}');
    expect(res.status).toBe(415);
    expectErrorBody(res.body, 'unsupported_media_type');
  });

  it('when a session cookie is forged, then 401 (not 500)', async () => {
    const res = await request(t.app).get('/api/auth/me').set('Cookie', 'tarebook_session=Fe26.2**garbage**');
    expect(res.status).toBe(401);
    expectErrorBody(res.body, 'unauthenticated');
  });
});

describe('serving the built client', () => {
  it('when dist/index.html exists, then static files are served and unknown pages fall back to index.html', async () => {
    const dist = join(t.dir, 'fake-dist');
    mkdirSync(join(dist, 'assets'), { recursive: true });
    writeFileSync(join(dist, 'index.html'), '<!doctype html><title>Tarebook</title>');
    writeFileSync(join(dist, 'assets', 'app.js'), 'console.log(1)');
    const app = createApp({ sequelize: t.sequelize, config: t.config, distDir: dist });

    const page = await request(app).get('/preparations/42');
    expect(page.status).toBe(200);
    expect(page.text).toContain('<title>Tarebook</title>');
    const asset = await request(app).get('/assets/app.js');
    expect(asset.status).toBe(200);
    expect(asset.text).toBe('console.log(1)');
    // /api still answers JSON, never the SPA page
    const api = await request(app).get('/api/unknown');
    expect(api.status).toBe(404);
    expectErrorBody(api.body, 'not_found');
  });
});
