// Structured request logs (server/logger.ts): what a line holds, and what it must never hold (REQUIREMENTS: no
// credentials or session tokens in logs; common practice for web services).
import { Writable } from 'node:stream';
import express from 'express';
import { pino } from 'pino';
import request from 'supertest';
import { describe, expect, it } from 'vitest';
import { httpLogger, logLevel } from '../../server/logger.ts';

function capture() {
  const lines: string[] = [];
  const stream = new Writable({
    write(chunk, _enc, cb) {
      lines.push(...String(chunk).split('\n').filter(Boolean));
      cb();
    },
  });
  return { log: pino({ level: 'info' }, stream), lines };
}

describe('request log', () => {
  it('when a signed-in request ends, then one JSON line has the request id, method, path, status, duration and user id, and no cookie, body or query', async () => {
    const { log, lines } = capture();
    const app = express();
    app.use(express.json());
    app.use(httpLogger(log));
    app.post('/api/auth/password', (req, res) => {
      (req as unknown as { user: { id: number } }).user = { id: 42 };
      res.status(204).end();
    });
    const res = await request(app)
      .post('/api/auth/password?password=query-secret-1')
      .set('Cookie', 'tarebook_session=cookie-secret-2')
      .set('Authorization', 'Bearer header-secret-3')
      .send({ password: 'body-secret-4' });
    expect(res.status).toBe(204);
    expect(lines).toHaveLength(1);
    const line = JSON.parse(lines[0]!) as { req: { id: string; method: string; path: string }; res: { statusCode: number }; userId: number; responseTime: number };
    expect(line.req).toEqual({ id: res.headers['x-request-id'], method: 'POST', path: '/api/auth/password' });
    expect(line.res).toEqual({ statusCode: 204 });
    expect(line.userId).toBe(42);
    expect(typeof line.responseTime).toBe('number');
    for (const secret of ['query-secret-1', 'cookie-secret-2', 'header-secret-3', 'body-secret-4']) expect(lines[0]).not.toContain(secret);
  });

  it('when a load balancer asks /api/health, then nothing is logged; an error status is logged at level error', async () => {
    const { log, lines } = capture();
    const app = express();
    app.use(httpLogger(log));
    app.get('/api/health', (_req, res) => void res.json({ status: 'ok' }));
    app.get('/api/boom', (_req, res) => void res.status(500).json({ error: { code: 'internal' } }));
    await request(app).get('/api/health');
    expect(lines).toHaveLength(0);
    await request(app).get('/api/boom');
    expect(lines).toHaveLength(1);
    expect((JSON.parse(lines[0]!) as { level: number }).level).toBe(50); // pino's number for "error"
  });

  it('then the level comes from LOG_LEVEL when it is one of pino\'s, else info (silent under NODE_ENV=test)', () => {
    expect(logLevel({ LOG_LEVEL: 'warn' })).toBe('warn');
    expect(logLevel({ LOG_LEVEL: 'loud' })).toBe('info');
    expect(logLevel({})).toBe('info');
    expect(logLevel({ NODE_ENV: 'test' })).toBe('silent');
  });
});
