import { AppError } from '../errors/app-error.ts';

/** A route id: a positive whole number; anything else identifies nothing (404). */
export function parseId(raw: string | string[] | undefined, what: string): number {
  const s = Array.isArray(raw) ? raw[0] : raw;
  if (!s || !/^[1-9]\d{0,15}$/.test(s)) throw AppError.notFound(what);
  return Number(s);
}
