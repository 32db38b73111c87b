/**
 * Structured logs: one JSON line per event (pino), and one per API request (pino-http) with its request id,
 * method, path, status, duration and the signed-in user's id. Never headers, bodies or query strings, so no
 * password, cookie or session id reaches a log. LOG_LEVEL sets the level (default info; silent under NODE_ENV=test).
 */
import { randomUUID } from 'node:crypto';
import type { IncomingMessage } from 'node:http';
import { pino, type Logger } from 'pino';
import { pinoHttp } from 'pino-http';

const LEVELS = ['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent'];

export function logLevel(env: NodeJS.ProcessEnv = process.env): string {
  const given = env.LOG_LEVEL?.trim().toLowerCase();
  if (given && LEVELS.includes(given)) return given;
  return env.NODE_ENV === 'test' ? 'silent' : 'info';
}

export const logger: Logger = pino({ level: logLevel(), base: { service: 'tarebook' } });

/** A request id from the load balancer is kept when it is plain (letters, digits, - _ .; ≤ 100), else a new UUID. */
export function requestIdOf(req: IncomingMessage): string {
  const given = req.headers['x-request-id'];
  return typeof given === 'string' && /^[A-Za-z0-9._-]{1,100}$/.test(given) ? given : randomUUID();
}

type LoggedRequest = IncomingMessage & { id?: unknown; originalUrl?: string; user?: { id: number } };

/** The request logger for /api (health checks are not logged: a load balancer asks every few seconds). */
export function httpLogger(log: Logger = logger) {
  return pinoHttp({
    logger: log,
    genReqId: (req, res) => {
      const id = requestIdOf(req);
      res.setHeader('X-Request-Id', id);
      return id;
    },
    autoLogging: { ignore: (req) => ((req as LoggedRequest).originalUrl ?? req.url ?? '').startsWith('/api/health') },
    customProps: (req) => ({ userId: (req as LoggedRequest).user?.id ?? null }),
    customLogLevel: (_req, res, err) => (err || res.statusCode >= 500 ? 'error' : 'info'),
    serializers: {
      req: (req: { id: unknown; method: string; url: string }) => ({ id: req.id, method: req.method, path: String(req.url ?? '').split('?')[0] }),
      res: (res: { statusCode: number }) => ({ statusCode: res.statusCode }),
    },
    wrapSerializers: true,
  });
}

