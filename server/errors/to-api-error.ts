/**
 * Converts anything thrown into the API error body (shared/api/errors.ts) and a status.
 * Only AppError, ZodError, CalcError, body-parser and Sequelize errors carry their message to the client;
 * anything else becomes a generic 500 "internal" without stack or detail.
 */
import { UniqueConstraintError, ValidationError as SequelizeValidationError } from 'sequelize';
import { ZodError } from 'zod';
import type { ApiErrorBody } from '../../shared/api/errors.ts';
import { CalcError } from '../../shared/calc/errors.ts';
import { AppError } from './app-error.ts';

export interface ConvertedError {
  status: number;
  body: ApiErrorBody;
  /** true for 5xx: the caller logs these. */
  unexpected: boolean;
}

const body = (message: string, code: string, fields?: Record<string, string>): ApiErrorBody => ({
  error: fields && Object.keys(fields).length ? { message, code, fields } : { message, code },
});

export function zodToApiError(err: ZodError): ApiErrorBody {
  const fields: Record<string, string> = {};
  const rootMessages: string[] = [];
  for (const issue of err.issues) {
    const path = issue.path.map(String).join('.');
    if (!path) {
      rootMessages.push(issue.code === 'invalid_type' ? 'Send the request body as a JSON object' : issue.message);
    } else if (!(path in fields)) {
      fields[path] = issue.message; // first message per field is the most specific
    }
  }
  const count = Object.keys(fields).length;
  const message = rootMessages.length
    ? rootMessages.join('; ')
    : count === 1
      ? Object.values(fields)[0]!
      : `${count} fields need attention`;
  return body(message, 'validation_failed', fields);
}

/** body-parser / http-errors style errors: a client-caused 4xx with a `type`. */
function httpClientError(err: unknown): { status: number; type?: string } | undefined {
  if (typeof err !== 'object' || err === null) return undefined;
  const e = err as { status?: unknown; statusCode?: unknown; type?: unknown };
  const status = typeof e.status === 'number' ? e.status : typeof e.statusCode === 'number' ? e.statusCode : undefined;
  if (status === undefined || status < 400 || status > 499) return undefined;
  return { status, type: typeof e.type === 'string' ? e.type : undefined };
}

export function toApiError(err: unknown): ConvertedError {
  if (err instanceof AppError) {
    return { status: err.status, body: body(err.message, err.code, err.fields), unexpected: err.status >= 500 };
  }
  if (err instanceof ZodError) {
    return { status: 400, body: zodToApiError(err), unexpected: false };
  }
  if (err instanceof CalcError || (err instanceof Error && err.name === 'CalcError')) {
    const calc = err as CalcError;
    const fields = calc.field ? { [calc.field]: calc.message } : undefined;
    return { status: 400, body: body(calc.message, calc.code ?? 'calc_error', fields), unexpected: false };
  }
  if (err instanceof UniqueConstraintError) {
    const fields: Record<string, string> = {};
    for (const item of err.errors ?? []) {
      if (item.path) fields[item.path] = `This ${item.path} is already in use`;
    }
    return { status: 409, body: body('A record with this value already exists', 'conflict', fields), unexpected: false };
  }
  if (err instanceof SequelizeValidationError) {
    const fields: Record<string, string> = {};
    for (const item of err.errors ?? []) if (item.path) fields[item.path] = item.message;
    return { status: 400, body: body('Some values are not valid', 'validation_failed', fields), unexpected: false };
  }
  // decimal.js only throws on text that is not a number, which comes from the request.
  if (err instanceof Error && err.message.startsWith('[DecimalError]')) {
    return { status: 400, body: body('A number in the request could not be read; use digits and a decimal point, e.g. 1.5', 'invalid_number'), unexpected: false };
  }
  const client = httpClientError(err);
  if (client) {
    switch (client.type) {
      case 'entity.parse.failed':
        return { status: 400, body: body('The request body is not valid JSON', 'bad_request'), unexpected: false };
      case 'entity.too.large':
        return { status: 413, body: body('The request body is too large (limit 1 MB)', 'payload_too_large'), unexpected: false };
      case 'encoding.unsupported':
      case 'charset.unsupported':
        return { status: 415, body: body('The request body encoding is not supported; send UTF-8 JSON', 'unsupported_media_type'), unexpected: false };
      default:
        return { status: client.status, body: body('The request could not be understood', 'bad_request'), unexpected: false };
    }
  }
  return { status: 500, body: body('Something went wrong on the server', 'internal'), unexpected: true };
}
