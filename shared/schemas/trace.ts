/**
 * Traceability API (REQUIREMENTS §0.1 principles 5–6, TR-04, TR-07): backward and forward trace of any
 * identifier, QA review flags on everything a trace reaches, the traceability report of one standard, and
 * the daily expiry digest. Dates in queries are lab-local calendar days (settings.timeZone), both included;
 * times in responses are UTC ISO.
 *
 *   GET  /api/trace/:identifier?from=&to=&sinceLastGoodCheck=1     qa, admin, chemist -> TraceResponse
 *   POST /api/trace/:identifier/review-flags  reviewFlagsInputSchema  qa           -> ReviewFlagsCreated (201)
 *   GET  /api/trace/:identifier/report.pdf                          qa, admin, chemist -> application/pdf (preparation only)
 *   GET  /api/trace/:identifier/report.csv                          qa, admin, chemist -> text/csv (preparation only)
 *   GET  /api/preparations/:key/review-flags                        any signed-in      -> ReviewFlagList
 *   POST /api/admin/expiry-digest                                   admin              -> ExpiryDigestResult
 *
 * `:identifier` is a preparation identifier (HWL-2026-0042), a balance or volumetric-ware identifier
 * (BAL-SM1, VF-100-01), a reference-material lot (NRM-24-0931) or a solvent lot (UPW-S1-2026-W49).
 * Graph node ids are "<type>:<key>", e.g. "preparation:12", "balance:3", "user:2".
 */
import { z } from 'zod';
import { multilineText } from './text.ts';
import { isIsoDate } from '../prep/dates.ts';

export const TRACE_SUBJECT_TYPES = ['preparation', 'material_lot', 'balance', 'volumetric_ware', 'solvent_lot'] as const;
export type TraceSubjectType = (typeof TRACE_SUBJECT_TYPES)[number];

export const TRACE_NODE_TYPES = [...TRACE_SUBJECT_TYPES, 'certificate', 'user', 'label_print', 'volume_check'] as const;
export type TraceNodeType = (typeof TRACE_NODE_TYPES)[number];

export interface TraceNode {
  id: string;
  type: TraceNodeType;
  label: string;
  /** status at the time of use where a snapshot exists (balance calibration, material status), else now */
  status: string;
  detail: Record<string, unknown>;
}

export interface TraceEdge {
  from: string;
  to: string;
  /** e.g. analyte source, certificate, weighed on, made up in, solvent, aliquot pipette, diluted into, planned by, signed prepared, labels printed */
  relation: string;
  /** UTC ISO time of the use, or null when it has none */
  at: string | null;
  /** the status of the `from` item at this use, from the snapshot taken then (balances, ware, lots) */
  statusAtUse?: string;
}

export interface TraceGraph {
  nodes: TraceNode[];
  edges: TraceEdge[];
}

export interface TraceSubject {
  type: TraceSubjectType;
  id: number;
  identifier: string;
  label: string;
}

export interface TraceResponse {
  subject: TraceSubject;
  /** the applied use-time limit of the forward set (lab dates), after sinceLastGoodCheck */
  range: { from: string | null; to: string | null };
  backward: TraceGraph;
  forward: TraceGraph;
  /** identifiers of every preparation in the forward set (what a review flag would flag), oldest first */
  forwardPreparations: string[];
}

const emptyToUndefined = (v: unknown) => (v === '' || v === null ? undefined : v);
const labDay = (what: string) =>
  z.preprocess(
    emptyToUndefined,
    z
      .string({ error: `Enter the ${what} date as YYYY-MM-DD` })
      .trim()
      .refine((s) => isIsoDate(s), `Enter the ${what} date as a real calendar date, YYYY-MM-DD`)
      .optional(),
  );
const flag = z.preprocess(
  (v) => (v === '' || v === undefined || v === null ? undefined : v === true || v === '1' || v === 'true' ? true : v === false || v === '0' || v === 'false' ? false : v),
  z.boolean({ error: 'Use 1 or 0' }).optional(),
);

const rangeShape = { from: labDay('from'), to: labDay('to'), sinceLastGoodCheck: flag };
const rangeOrder = (q: { from?: string; to?: string }) => !q.from || !q.to || q.from <= q.to;

/** GET /api/trace/:identifier query. sinceLastGoodCheck (balances only) sets `from` to the last calibration date. */
export const traceQuerySchema = z
  .object(rangeShape)
  .refine(rangeOrder, { path: ['to'], message: 'The "to" date must not be before the "from" date' })
  .refine((q) => !(q.sinceLastGoodCheck && q.from), { path: ['from'], message: 'Give either a "from" date or "since last good check", not both' });
export type TraceQuery = z.output<typeof traceQuerySchema>;

/** POST /api/trace/:identifier/review-flags body. */
export const reviewFlagsInputSchema = z
  .object({
    reason: multilineText({ error: 'Say why these records need review' }).trim().min(3, 'Say why these records need review').max(1000, 'Use at most 1000 characters'),
    ...rangeShape,
  })
  .refine(rangeOrder, { path: ['to'], message: 'The "to" date must not be before the "from" date' })
  .refine((q) => !(q.sinceLastGoodCheck && q.from), { path: ['from'], message: 'Give either a "from" date or "since last good check", not both' });
export type ReviewFlagsInput = z.output<typeof reviewFlagsInputSchema>;

export interface ReviewFlagsCreated {
  flagged: number;
  identifiers: string[];
  source: string;
}

export interface ReviewFlagDto {
  id: number;
  reason: string;
  /** what the flag came from, e.g. "balance BAL-A2 (trace 2026-11-01 to 2026-11-30)" or "amended HWL-2026-0003" */
  source: string | null;
  flaggedAt: string;
  flaggedBy: { id: number; fullName: string } | null;
  cleared: { at: string; by: { id: number; fullName: string }; reason: string } | null;
}

export interface ReviewFlagList {
  items: ReviewFlagDto[];
}

/** Report rows (CSV columns, in this order). */
export const TRACE_REPORT_COLUMNS = ['level', 'link', 'identifier', 'description', 'relation', 'used_at', 'status_when_used', 'status_now', 'detail'] as const;

export interface TraceReportRow {
  /** 0 = the standard itself, 1 = its parent, … */
  level: number;
  link: TraceNodeType;
  identifier: string;
  description: string;
  relation: string;
  usedAt: string | null;
  statusWhenUsed: string;
  statusNow: string;
  detail: string;
}

export interface ExpiryDigestResult {
  /** e-mails queued (one per preparer with at least one standard expiring in the notice period) */
  sent: number;
  recipients: Array<{ email: string; fullName: string; identifiers: string[] }>;
  noticeDays: number;
  /** the lab date the digest was run for */
  on: string;
}

/**
 * The forward traceability report of any traced item (a lot, a balance, ware, a standard), for a recall:
 *   GET /api/trace/:identifier/forward-report.pdf?from=&to=&sinceLastGoodCheck=1   qa, admin, chemist
 *   GET /api/trace/:identifier/forward-report.csv?from=&to=&sinceLastGoodCheck=1   qa, admin, chemist
 * One row per preparation the forward trace reaches (the same set and order as `forwardPreparations`).
 */
export const FORWARD_REPORT_COLUMNS = ['identifier', 'kind', 'analyte', 'concentration', 'status_now', 'made_on', 'expires_on', 'reached_via', 'used_at', 'label_prints', 'label_copies'] as const;

export interface ForwardReportRow {
  identifier: string;
  kind: string;
  analyte: string;
  /** the result as displayed, or the target marked "(planned)" */
  concentration: string;
  /** the status shown today (expired when past its expiry date) */
  statusNow: string;
  /** lab date the record was planned */
  madeOn: string;
  expiresOn: string;
  /** how the trace reached it, e.g. "NRM-24-0931 (analyte source)", "HWL-2026-0001 (diluted into)" */
  reachedVia: string;
  /** UTC ISO time of that use, when it has one */
  usedAt: string | null;
  labelPrints: number;
  labelCopies: number;
}
