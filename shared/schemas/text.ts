/**
 * The one rule for text that people type (names, reasons, notes, identifiers, file names) and for every
 * query parameter. Refused, with a message at the field:
 *  - control characters (C0 U+0000–U+001F, DEL U+007F, C1 U+0080–U+009F): a NUL ends a C string and broke the
 *    SQL of the list searches; others are invisible. Tab and line breaks are allowed only in multi-line text
 *    (notes, reasons), never in one-line fields such as names and lots;
 *  - lone UTF-16 surrogates: not a character; SQLite would store U+FFFD and the record would not be what was sent;
 *  - bidirectional embeddings, overrides and isolates (U+202A–U+202E, U+2066–U+2069): they make a name or a
 *    file name read differently from what is stored ("Trojan Source", CVE-2021-42574).
 * The server applies `textProblem(…, { multiline: true })` to every string of every JSON body and query as a
 * backstop (server/middleware/input-guard.ts); the schemas below add the one-line rule and the form message.
 */
import { z } from 'zod';

const CONTROL = /[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f-\u009f]/;
const LINE_BREAK_OR_TAB = /[\t\n\r\u2028\u2029\u000b\u000c]/;
const LONE_SURROGATE = /[\ud800-\udbff](?![\udc00-\udfff])|(?<![\ud800-\udbff])[\udc00-\udfff]/;
const BIDI_CONTROL = /[\u202a-\u202e\u2066-\u2069]/;

export const TEXT_MESSAGES = {
  control: 'Remove the control character (such as NUL); it cannot be stored or shown',
  lineBreak: 'Keep this on one line: remove the line break or tab',
  surrogate: 'Remove the broken character (an unpaired UTF-16 surrogate)',
  bidi: 'Remove the text-direction control character (U+202A–U+202E, U+2066–U+2069); it makes the text read differently from what is stored',
} as const;

/** The message for the first problem in `s`, or null when the text is clean. */
export function textProblem(s: string, opts: { multiline?: boolean } = {}): string | null {
  if (!opts.multiline && LINE_BREAK_OR_TAB.test(s.trim())) return TEXT_MESSAGES.lineBreak;
  if (CONTROL.test(s.replace(/[\t\n\r]/g, ''))) return TEXT_MESSAGES.control;
  if (LONE_SURROGATE.test(s)) return TEXT_MESSAGES.surrogate;
  if (BIDI_CONTROL.test(s)) return TEXT_MESSAGES.bidi;
  return null;
}

type StringParams = Parameters<typeof z.string>[0];

/** A one-line text field (names, lots, identifiers, search terms, file names): chain .trim().min().max() as usual. */
export const lineText = (params?: StringParams) =>
  z.string(params).check((ctx) => {
    const problem = textProblem(ctx.value);
    if (problem) ctx.issues.push({ code: 'custom', message: problem, input: ctx.value });
  });

/** Multi-line text (notes, reasons): tab and line breaks are allowed, the rest of the rule applies. */
export const multilineText = (params?: StringParams) =>
  z.string(params).check((ctx) => {
    const problem = textProblem(ctx.value, { multiline: true });
    if (problem) ctx.issues.push({ code: 'custom', message: problem, input: ctx.value });
  });
