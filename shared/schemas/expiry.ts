/**
 * Expiry on read and QA expiry extensions (REQUIREMENTS EX-01 caps, EX-04 expiry enforced, EX-05 extension with
 * documented evidence and a QA e-signature, ES-02 meaning "Expiry extension approved (QA)").
 *
 *   POST /api/preparations/:key/expiry-extensions  (qa)  expiryExtensionInputSchema -> PreparationDetail (201)
 *
 * Dates are lab calendar dates "YYYY-MM-DD". A record may be used through its expiresOn; it is expired when the
 * lab date (settings time zone) is after expiresOn. The pure rules here are shared by the server and the form.
 */
import { z } from 'zod';
import { multilineText } from './text.ts';
import { isIsoDate } from '../prep/dates.ts';

// ---------------------------------------------------------------- expired on read

/** Stored statuses in which the record is in use: past its expiry it is shown (and treated) as expired. */
export const LIVE_STATUSES = ['planned', 'prepared', 'returned', 'verified'] as const;

export const isLiveStatus = (s: string): boolean => (LIVE_STATUSES as readonly string[]).includes(s);

/** True when a record that may be used through `expiresOn` is past it on the lab date `today`. */
export const isPastExpiry = (expiresOn: string, today: string): boolean => expiresOn < today;

/**
 * The status the API shows: 'expired' for a live record past its expiry, with the stored status kept as
 * statusBeforeExpiry; otherwise the stored status. Discarded (and stored 'expired') records are unchanged.
 */
export function shownStatus(stored: string, expiresOn: string, today: string): { status: string; statusBeforeExpiry?: string } {
  if (isLiveStatus(stored) && isPastExpiry(expiresOn, today)) return { status: 'expired', statusBeforeExpiry: stored };
  return { status: stored };
}

// ---------------------------------------------------------------- the cap (EX-01)

export type ExpiryCapKind = 'parent' | 'material';

/** One input that caps the expiry: a parent solution or the reference material lot. */
export interface ExpiryLimitInput {
  kind: ExpiryCapKind;
  /** "parent HWL-2026-0001", "reference material Lead(II) nitrate lot PB-2291" */
  label: string;
  /** null when the input has no expiry recorded (it caps nothing) */
  expiresOn: string | null;
}

/** The latest date an extension may set, and what sets it; null when no input has an expiry. */
export interface ExpiryCap {
  date: string;
  limitedBy: string;
  kind: ExpiryCapKind;
}

/** The earliest expiry among the inputs (on a tie, the first listed: parents are listed before the material). */
export function expiryCapOf(limits: ExpiryLimitInput[]): ExpiryCap | null {
  let cap: ExpiryCap | null = null;
  for (const l of limits) {
    if (!l.expiresOn) continue;
    if (!cap || l.expiresOn < cap.date) cap = { date: l.expiresOn, limitedBy: l.label, kind: l.kind };
  }
  return cap;
}

/**
 * Checks a proposed new expiry: later than the current one, not already past, and not later than the cap.
 * Returns the message for the newExpiresOn field, or null when the date is acceptable.
 */
export function extensionDateProblem(newExpiresOn: string, currentExpiresOn: string, cap: ExpiryCap | null, today: string): string | null {
  if (newExpiresOn <= currentExpiresOn) return `The new expiry must be later than the current expiry ${currentExpiresOn}`;
  if (newExpiresOn < today) return `The new expiry ${newExpiresOn} is already past (today is ${today})`;
  if (cap && newExpiresOn > cap.date) return `The new expiry cannot be later than ${cap.date}, limited by ${cap.limitedBy}`;
  return null;
}

/** "extended by QA <name> on <date>: <reason>" (stored as preparations.expiry_reason). */
export const extensionReasonText = (signerName: string, lab: string, reason: string) => `extended by QA ${signerName} on ${lab}: ${reason}`;

// ---------------------------------------------------------------- input

/** The signature meaning of an extension, shown before signing and stored with it (ES-02). */
export const EXPIRY_EXTENSION_MEANING_TEXT = 'Expiry extension approved (QA): the documented evaluation supports the new expiry date';

/** Body of POST /api/preparations/:key/expiry-extensions. */
export const expiryExtensionInputSchema = z.object({
  newExpiresOn: z
    .string({ error: 'Enter the new expiry date' })
    .trim()
    .min(1, { error: 'Enter the new expiry date', abort: true })
    .refine(isIsoDate, 'Enter the new expiry as a calendar date YYYY-MM-DD, e.g. 2027-03-01'),
  reason: multilineText({ error: 'Give the reason and the evidence for the extension' })
    .trim()
    .min(3, 'Give the reason and the evidence for the extension (at least 3 characters)')
    .max(500, 'Use at most 500 characters'),
  password: z.string({ error: 'Enter your password to sign the extension' }).min(1, 'Enter your password to sign the extension').max(200, 'Use at most 200 characters'),
  /** required the first time a user ever signs (ES-08) */
  acknowledgeResponsibility: z.literal(true, { error: 'Tick the statement to acknowledge it' }).optional(),
});
export type ExpiryExtensionInput = z.output<typeof expiryExtensionInputSchema>;

// ---------------------------------------------------------------- responses (fields of PreparationDetail)

export interface ExpiryExtensionDto {
  id: number;
  previousExpiresOn: string;
  newExpiresOn: string;
  reason: string;
  /** printed name at signing */
  signedBy: { id: number; fullName: string };
  /** UTC ISO */
  signedAt: string;
  meaningText: string;
  recordVersion: number;
  /** SHA-256 hex of the canonical record at signing */
  recordHash: string;
  /** the cap in force at signing (null: nothing capped it) */
  cap: { date: string; limitedBy: string } | null;
}

/** What PreparationDetail gains. */
export interface ExpirySection {
  /** oldest first */
  expiryExtensions: ExpiryExtensionDto[];
  /** the latest expiry an extension may set now, and what limits it (null: no input has an expiry) */
  expiryCap: ExpiryCap | null;
  /** whether the record can be extended at all, and why not */
  canExtendExpiry: { allowed: boolean; reason?: string };
}
