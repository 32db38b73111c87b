// express-rate-limit on POST /api/auth/login: per IP, failed attempts only (limit lowered for the test).
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO, DEMO_PASSWORD, expectErrorBody, makeTestApp, type TestApp } from './helpers/test-app.ts';

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp({ env: { LOGIN_RATE_LIMIT: '3' } });
});
afterAll(() => t.close());

describe('POST /api/auth/login rate limit', () => {
  it('when successful sign-ins repeat, then they are not counted', async () => {
    for (let i = 0; i < 4; i++) {
      const res = await request(t.app).post('/api/auth/login').send({ email: DEMO.chemist, password: DEMO_PASSWORD });
      expect(res.status).toBe(200);
    }
  });

  it('when an address exceeds the failed-attempt limit, then 429 with the JSON error body and RateLimit headers', async () => {
    const emails = ['nobody1@harbourside.example', 'nobody2@harbourside.example', 'nobody3@harbourside.example'];
    for (const email of emails) {
      const res = await request(t.app).post('/api/auth/login').send({ email, password: 'guess-guess' });
      expect(res.status).toBe(401);
    }
    const blocked = await request(t.app).post('/api/auth/login').send({ email: DEMO.chemist, password: DEMO_PASSWORD });
    expect(blocked.status).toBe(429);
    expectErrorBody(blocked.body, 'rate_limited');
    expect(blocked.headers['ratelimit-policy']).toMatch(/q=3/);
    // other routes are not limited
    expect((await request(t.app).get('/api/health')).status).toBe(200);
  });
});
