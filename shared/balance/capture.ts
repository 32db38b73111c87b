/**
 * How a reading came in (issue 15), shared by the API schemas, the server's check and the bench forms.
 * A reading input is either the value as typed ("12.3456", flagged "typed") or
 *   { value, unit?, capture: { method, rawLine } }
 * where rawLine is the balance's print as received (framing characters such as STX/ETX removed, line endings
 * kept). The server parses the raw line again with the one parser (output-line.ts) and refuses, at the field, a
 * line whose value or unit is not the one sent, an unstable reading (unless the lab allows them: then flagged),
 * and a print naming another balance than the one selected.
 */
import { z } from 'zod';
import { parsePrintout, sameBalanceId, type LineShapeSetting, type Stability } from './output-line.ts';

export const CAPTURE_METHODS = ['typed', 'keyboard_burst', 'serial', 'bridge'] as const;
export type CaptureMethod = (typeof CAPTURE_METHODS)[number];

/** How each method is named to people (record page, prep sheet, audit). */
export const CAPTURE_METHOD_TEXT: Record<CaptureMethod, string> = {
  typed: 'typed',
  keyboard_burst: 'from the balance (keyboard output)',
  serial: 'from the balance (serial, in the browser)',
  bridge: 'from the balance (bench bridge)',
};

export const CAPTURE_FLAGS = ['typed', 'unstable_allowed', 'not_recorded'] as const;
export type CaptureFlag = (typeof CAPTURE_FLAGS)[number];

/** What is stored beside each reading (weighings.captures / gravimetric_readings.captures, migration 0021). */
export interface StoredCapture {
  method: CaptureMethod;
  /** the print as received; null when typed */
  rawLine: string | null;
  stability: Stability | null;
  /** the identity the balance printed, when its print has one */
  balancePrintId: string | null;
  capturedAt: string;
  flags: CaptureFlag[];
}

/** A reading stored before capture was recorded (migration 0021): shown as typed, said so. */
export const LEGACY_CAPTURE: StoredCapture = { method: 'typed', rawLine: null, stability: null, balancePrintId: null, capturedAt: '', flags: ['typed', 'not_recorded'] };

export const captureInputSchema = z.object({
  method: z.enum(CAPTURE_METHODS, { error: `How the reading came in is one of: ${CAPTURE_METHODS.join(', ')}` }),
  rawLine: z.string({ error: 'Send the balance print as received' }).max(2000, 'A balance print is at most 2000 characters').optional(),
});
export type CaptureInput = z.infer<typeof captureInputSchema>;

/** A reading as the forms and the bridge send it: the value as shown, its unit, and how it came in. */
export const capturedReadingSchema = z.object({
  value: z.unknown(),
  unit: z.enum(['g', 'mg'], { error: 'Give the unit the balance showed: g or mg' }).optional(),
  capture: captureInputSchema.optional(),
});

/**
 * Body preprocessing for the reading fields of a form: `{ value, unit, capture }` becomes the plain value at the
 * field, and the capture goes to `captures[field]` (checked by the server). A plain string is a typed reading.
 * A unit inside a reading that differs from the body's unit is refused at the field.
 */
export function splitCapturedReadings(fieldsWithReadings: readonly string[]) {
  return (body: unknown): unknown => {
    if (!body || typeof body !== 'object' || Array.isArray(body)) return body;
    const out: Record<string, unknown> = { ...(body as Record<string, unknown>) };
    const captures: Record<string, unknown> = {};
    for (const f of fieldsWithReadings) {
      const v = out[f];
      if (!v || typeof v !== 'object' || Array.isArray(v)) continue;
      const r = v as Record<string, unknown>;
      out[f] = r.value;
      if (r.capture !== undefined) captures[f] = r.capture;
      if (r.unit !== undefined) {
        if (out.unit === undefined) out.unit = r.unit;
        else if (out.unit !== r.unit) captures[f] = { ...(typeof r.capture === 'object' && r.capture ? r.capture : { method: 'typed' }), unitMismatch: r.unit };
      }
    }
    if (Object.keys(captures).length) out.captures = { ...((out.captures as Record<string, unknown> | undefined) ?? {}), ...captures };
    return out;
  };
}

/** `captures` on a body after splitCapturedReadings: field -> capture input. */
export const capturesSchema = (fieldsWithReadings: readonly [string, ...string[]]) =>
  z
    .partialRecord(
      z.enum(fieldsWithReadings, { error: `Captures are given for: ${fieldsWithReadings.join(', ')}` }),
      captureInputSchema.extend({ unitMismatch: z.string().optional() }).superRefine((c, ctx) => {
        if (c.unitMismatch !== undefined) ctx.addIssue({ code: 'custom', path: [], message: 'Each reading of one entry is in the same unit as the entry' });
      }),
    )
    .optional();

export interface CaptureContext {
  /** the value sent at the field (the plain reading) */
  value: string;
  unit: 'g' | 'mg';
  /** the selected balance */
  balance: { identifier: string; printedId: string | null; outputShape: LineShapeSetting };
  allowUnstable: boolean;
  now: string;
}

export type CaptureCheck = { ok: true; stored: StoredCapture } | { ok: false; message: string };

/** The server's check of one reading's capture (a typed or absent capture is stored flagged "typed"). */
export function checkCapture(capture: CaptureInput | undefined, c: CaptureContext): CaptureCheck {
  if (!capture || capture.method === 'typed') {
    if (capture?.rawLine) return { ok: false, message: 'A typed reading has no balance print: send the method the print came by, or leave the raw line out' };
    return { ok: true, stored: { method: 'typed', rawLine: null, stability: null, balancePrintId: null, capturedAt: c.now, flags: ['typed'] } };
  }
  if (!capture.rawLine || capture.rawLine.trim() === '') return { ok: false, message: 'A reading from the balance carries the print as received: send rawLine, or enter it as typed' };
  const print = parsePrintout(capture.rawLine, c.balance.outputShape);
  const r = print.reading;
  if (r.kind !== 'reading') return { ok: false, message: `The balance print is not a reading: ${r.message}` };
  if (r.value !== c.value) return { ok: false, message: `The value ${c.value} is not the one the balance printed (${r.value} ${r.unit}): take the reading again` };
  if (r.unit !== c.unit) return { ok: false, message: `The balance printed ${r.value} ${r.unit}, but the entry is in ${c.unit}: set the unit to ${r.unit} or the balance to ${c.unit}` };
  const flags: CaptureFlag[] = [];
  if (r.stability === 'unstable') {
    if (!c.allowUnstable) return { ok: false, message: 'The balance marked this reading unstable: wait until it settles and print again (the lab does not accept unstable readings)' };
    flags.push('unstable_allowed');
  }
  if (print.balanceId) {
    const own = [c.balance.identifier, ...(c.balance.printedId ? [c.balance.printedId] : [])];
    if (!own.some((id) => sameBalanceId(id, print.balanceId!))) {
      return { ok: false, message: `The print comes from balance "${print.balanceId}", not the selected ${c.balance.identifier}: weigh on the selected balance or select the one you used` };
    }
  }
  return { ok: true, stored: { method: capture.method, rawLine: capture.rawLine, stability: r.stability, balancePrintId: print.balanceId, capturedAt: c.now, flags } };
}

/** The stored capture of a reading, or the legacy one for rows written before capture was recorded. */
export function captureOf(captures: Record<string, StoredCapture> | null | undefined, field: string): StoredCapture {
  return captures?.[field] ?? LEGACY_CAPTURE;
}

/** true when the reading was typed (entered by hand, or stored before capture was recorded). */
export const isTyped = (c: StoredCapture) => c.method === 'typed';
