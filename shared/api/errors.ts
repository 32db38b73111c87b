/**
 * The one error body every non-2xx API response carries (DEVELOPERS.md "Errors").
 * `fields` is keyed by the dotted path of the input (`weighings.0.reading.value`), the same names
 * react-hook-form uses, so the client can call `setError(path, …)` directly.
 */
import { z } from 'zod';

export const API_ERROR_CODES = [
  'validation_failed',
  'bad_request',
  'unauthenticated',
  'forbidden',
  'invalid_credentials',
  'account_locked',
  'account_inactive',
  'not_found',
  'conflict',
  'payload_too_large',
  'unsupported_media_type',
  'rate_limited',
  'internal',
] as const;

/** Codes the server itself uses; CalcError codes (e.g. `calc_out_of_range`) travel as plain strings. */
export type KnownApiErrorCode = (typeof API_ERROR_CODES)[number];

export const apiErrorSchema = z.object({
  error: z.object({
    message: z.string(),
    code: z.string(),
    fields: z.record(z.string(), z.string()).optional(),
  }),
});

export type ApiErrorBody = z.infer<typeof apiErrorSchema>;
