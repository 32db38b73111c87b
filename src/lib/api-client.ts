/**
 * Fetch wrapper for the Tarebook API.
 *
 * - Same origin, cookies included (the session is an httpOnly cookie).
 * - JSON in and out.
 * - Every non-2xx response becomes an `ApiError` carrying the server's
 *   `{ error: { message, code, fields } }` body. A body that does not have that shape
 *   (a proxy error page, a network failure) still becomes an ApiError with a generic message,
 *   so callers only ever handle one error type.
 */

import { apiErrorSchema } from '../../shared/api/errors.ts';

export type ApiFieldErrors = Record<string, string>;

export class ApiError extends Error {
  readonly status: number;
  readonly code: string;
  readonly fields: ApiFieldErrors;

  constructor(status: number, code: string, message: string, fields: ApiFieldErrors = {}) {
    super(message);
    this.name = 'ApiError';
    this.status = status;
    this.code = code;
    this.fields = fields;
  }
}

/** Reads the shared error body (`shared/api/errors.ts`); anything else gets a generic message. Never throws. */
export function toApiError(status: number, body: unknown): ApiError {
  const parsed = apiErrorSchema.safeParse(body);
  if (parsed.success) {
    const { message, code, fields } = parsed.data.error;
    return new ApiError(status, code, message.trim() || `The server answered with status ${status}.`, fields ?? {});
  }
  if (status === 0) {
    return new ApiError(0, 'network', 'The server could not be reached. Check the connection and try again.');
  }
  return new ApiError(status, 'internal', `The server answered with status ${status}.`);
}

type Method = 'GET' | 'POST' | 'PATCH' | 'PUT' | 'DELETE';

async function request<T>(method: Method, path: string, body?: unknown): Promise<T> {
  let res: Response;
  try {
    res = await fetch(path, {
      method,
      credentials: 'include',
      headers: {
        Accept: 'application/json',
        ...(body !== undefined ? { 'Content-Type': 'application/json' } : {}),
      },
      body: body !== undefined ? JSON.stringify(body) : undefined,
    });
  } catch {
    throw toApiError(0, undefined);
  }

  const text = await res.text();
  let parsed: unknown = undefined;
  if (text !== '') {
    try {
      parsed = JSON.parse(text);
    } catch {
      parsed = undefined;
    }
  }
  if (!res.ok) throw toApiError(res.status, parsed);
  return parsed as T;
}

export const api = {
  get: <T>(path: string) => request<T>('GET', path),
  post: <T>(path: string, body?: unknown) => request<T>('POST', path, body ?? {}),
  patch: <T>(path: string, body: unknown) => request<T>('PATCH', path, body),
  put: <T>(path: string, body: unknown) => request<T>('PUT', path, body),
  delete: <T>(path: string) => request<T>('DELETE', path),
};
