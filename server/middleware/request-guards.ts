/**
 * Guards that run on every /api request before any route:
 *  - noStore: API answers are records of the moment and may hold personal data; no browser or proxy cache keeps
 *    them (`Cache-Control: no-store`; a route may set its own, e.g. a certificate file).
 *  - sameOrigin: a state-changing request (anything but GET, HEAD, OPTIONS) that a browser sent from another
 *    origin is refused with 403, so a page on another site or another port cannot post a form, an upload or a
 *    body-less POST (unlock, run digest, check chain, sign out) with the user's cookie. Our own origin is the
 *    request's Host (as the browser addressed us; behind a proxy with TRUST_PROXY, X-Forwarded-Proto/Host) or
 *    PUBLIC_URL when set. Requests with neither Origin nor Sec-Fetch-Site (curl, scripts, tests) pass: they
 *    cannot carry a victim's cookie from another site.
 *  - inputGuard: every string in the query and the JSON body, and the decoded path, follows the text rule of
 *    shared/schemas/text.ts (no control characters other than tab and line breaks, no lone surrogates, no
 *    direction overrides): 400 naming the field, before any route or the database sees it.
 */
import type { Request, RequestHandler } from 'express';
import { textProblem } from '../../shared/schemas/text.ts';
import type { Config } from '../config.ts';
import { AppError } from '../errors/app-error.ts';

export const noStore: RequestHandler = (_req, res, next) => {
  res.setHeader('Cache-Control', 'no-store');
  next();
};

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);

function originOf(url: string): string | null {
  try {
    return new URL(url).origin;
  } catch {
    return null;
  }
}

/** The origins this server answers as: the Host the request was sent to, and PUBLIC_URL when set. */
export function ownOrigins(req: Request, publicUrl: string | null): string[] {
  const out: string[] = [];
  const host = req.get('host');
  if (host) {
    const own = originOf(`${req.protocol}://${host}`);
    if (own) out.push(own);
  }
  if (publicUrl) {
    const pub = originOf(publicUrl);
    if (pub) out.push(pub);
  }
  return out;
}

export function sameOrigin(config: Pick<Config, 'publicUrl'>): RequestHandler {
  return (req, _res, next) => {
    if (SAFE_METHODS.has(req.method)) return next();
    const origin = req.get('origin');
    const fetchSite = req.get('sec-fetch-site')?.toLowerCase();
    let foreign = false;
    if (origin !== undefined) {
      const given = origin === 'null' ? null : originOf(origin);
      foreign = given === null || !ownOrigins(req, config.publicUrl).includes(given);
    } else if (fetchSite !== undefined) {
      // "same-site" is another port or subdomain of our host: still another origin
      foreign = fetchSite === 'cross-site' || fetchSite === 'same-site';
    }
    if (foreign) {
      return next(
        new AppError('cross_origin', 403, 'This request came from a page of another site or port and was refused; open Tarebook itself and try again'),
      );
    }
    next();
  };
}

/** The first string (or key) that breaks the text rule, with its dotted path. */
function findProblem(value: unknown, path: string, depth = 0): { path: string; message: string } | null {
  if (typeof value === 'string') {
    const message = textProblem(value, { multiline: true });
    return message ? { path: path || 'body', message } : null;
  }
  if (depth > 32 || value === null || typeof value !== 'object') return null;
  for (const [key, child] of Object.entries(value as Record<string, unknown>)) {
    const childPath = path ? `${path}.${key}` : key;
    const keyMessage = textProblem(key, { multiline: false });
    if (keyMessage) return { path: childPath, message: keyMessage };
    const found = findProblem(child, childPath, depth + 1);
    if (found) return found;
  }
  return null;
}

export const inputGuard: RequestHandler = (req, _res, next) => {
  let decodedPath: string;
  try {
    decodedPath = decodeURIComponent(req.path);
  } catch {
    return next(new AppError('bad_request', 400, 'The address is not valid (bad % escape)', { fields: { path: 'The address is not valid' } }));
  }
  const inPath = textProblem(decodedPath, { multiline: false });
  const found = inPath ? { path: 'path', message: inPath } : (findProblem(req.query, '') ?? findProblem(req.body, ''));
  if (found) return next(AppError.validation(found.message, { [found.path]: found.message }));
  next();
};
