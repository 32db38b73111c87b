/**
 * What the audit trail needs to know about the request it runs in, without passing it through every service:
 * the id of the session that was authenticated (server/middleware/session.ts sets it). Scheduled jobs and
 * anonymous requests run without one (null).
 */
import { AsyncLocalStorage } from 'node:async_hooks';

interface RequestContext {
  sessionId: string | null;
}

const storage = new AsyncLocalStorage<RequestContext>();

/** Runs the rest of the request (`next`) with an empty context that authentication fills in. */
export function runInRequestContext<T>(fn: () => T): T {
  return storage.run({ sessionId: null }, fn);
}

export function setRequestSessionId(sessionId: string | null): void {
  const ctx = storage.getStore();
  if (ctx) ctx.sessionId = sessionId;
}

/** The authenticated session of the current request, or null (job, anonymous, outside a request). */
export function currentSessionId(): string | null {
  return storage.getStore()?.sessionId ?? null;
}
