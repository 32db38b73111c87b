/** Audit trail: the list/export filters and the entry shape the client reads (REQUIREMENTS AT-02, AT-07). */
import { z } from 'zod';
import { lineText } from './text.ts';

const isoDate = (what: string) =>
  z
    .string()
    .trim()
    .regex(/^\d{4}-\d{2}-\d{2}$/, `Enter the ${what} date as YYYY-MM-DD`)
    .refine((s) => {
      const d = new Date(`${s}T00:00:00Z`);
      return !Number.isNaN(d.getTime()) && d.toISOString().slice(0, 10) === s;
    }, `Enter a real ${what} date`);

/** Query-string text filter: empty means "no filter". */
const textFilter = (max: number) =>
  lineText()
    .trim()
    .max(max, `Use at most ${max} characters`)
    .optional()
    .transform((s) => (s === '' ? undefined : s));

const emptyToUndefined = (v: unknown) => (v === '' || v === null ? undefined : v);

/** Filters for GET /api/audit and /api/audit/export.csv. `from`/`to` are lab days (the lab's time zone), both included. */
export const auditFilterSchema = z
  .object({
    entity: textFilter(64),
    entityId: textFilter(128),
    actorId: z.preprocess(
      emptyToUndefined,
      z.coerce.number({ error: 'Choose a user' }).int('Choose a user').positive('Choose a user').optional(),
    ),
    action: textFilter(64),
    from: z.preprocess(emptyToUndefined, isoDate('from').optional()),
    to: z.preprocess(emptyToUndefined, isoDate('to').optional()),
    search: textFilter(200),
  })
  .refine((q) => !q.from || !q.to || q.from <= q.to, { path: ['to'], message: 'The "to" date must not be before the "from" date' });
export type AuditFilter = z.output<typeof auditFilterSchema>;

export const AUDIT_PAGE_SIZES = [25, 50, 100] as const;

export const auditListQuerySchema = z.intersection(
  auditFilterSchema,
  z.object({
    page: z.preprocess(emptyToUndefined, z.coerce.number({ error: 'Page must be a whole number' }).int('Page must be a whole number').min(1, 'Page starts at 1').max(1_000_000, 'Page is too large').default(1)),
    pageSize: z.preprocess(emptyToUndefined, z.coerce.number({ error: 'Page size must be a whole number' }).int('Page size must be a whole number').min(1, 'Page size must be 1 to 200').max(200, 'Page size must be 1 to 200').default(50)),
  }),
);
export type AuditListQuery = z.output<typeof auditListQuerySchema>;

export const auditChangeSchema = z.object({ field: z.string(), oldValue: z.unknown(), newValue: z.unknown() });
export type AuditChange = z.infer<typeof auditChangeSchema>;

/** One audit entry. occurredAt is the server's UTC clock (ISO with ms). */
export const auditEntrySchema = z.object({
  id: z.number().int(),
  occurredAt: z.string(),
  actorId: z.number().int().nullable(),
  actorName: z.string().nullable(),
  action: z.string(),
  entity: z.string(),
  entityId: z.string().nullable(),
  changes: z.array(auditChangeSchema),
  reason: z.string().nullable(),
  prevHash: z.string(),
  hash: z.string(),
  /** The session the entry was written in; null for older entries, anonymous events and scheduled jobs. */
  sessionId: z.string().nullable().optional(),
});
export type AuditEntryDto = z.infer<typeof auditEntrySchema>;

export const auditPageSchema = z.object({
  items: z.array(auditEntrySchema),
  total: z.number().int(),
  page: z.number().int(),
  pageSize: z.number().int(),
});
export type AuditPage = z.infer<typeof auditPageSchema>;

export const auditTrailSchema = z.object({ items: z.array(auditEntrySchema) });

/** "not keyed": unkeyed entries with no switch to the keyed chain; "anchor mismatch": the entry named by the latest anchor is gone or differs. */
export const AUDIT_BREAK_REASONS = ['hash mismatch', 'previous hash mismatch', 'gap in ids', 'not keyed', 'anchor mismatch'] as const;
export type AuditBreakReason = (typeof AUDIT_BREAK_REASONS)[number];

export const auditVerifyResultSchema = z.object({
  ok: z.boolean(),
  checked: z.number().int(),
  firstBroken: z.object({ id: z.number().int(), reason: z.enum(AUDIT_BREAK_REASONS) }).optional(),
  /** the latest anchor (chain head written outside the database) the check compared with */
  anchor: z.object({ id: z.number().int(), at: z.string(), hash: z.string() }).optional(),
});
export type AuditVerifyResult = z.infer<typeof auditVerifyResultSchema>;

/** Record types and actions the filter form offers (the trail may hold others; the API accepts any text). */
export const AUDIT_ENTITY_LABELS: Record<string, string> = {
  user: 'User',
  session: 'Session',
  setting: 'Setting',
  reference_material: 'Reference material',
  certificate: 'Certificate',
  balance: 'Balance',
  volumetric_ware: 'Volumetric ware',
  solvent: 'Solvent',
  preparation: 'Preparation',
  weighing: 'Weighing',
  make_up: 'Make-up',
  audit_trail: 'Audit trail',
};

export const AUDIT_ACTION_LABELS: Record<string, string> = {
  create: 'Created',
  update: 'Updated',
  retire: 'Retired',
  upload: 'Uploaded',
  plan: 'Planned',
  weighing_recorded: 'Weighing recorded',
  weighing_superseded: 'Weighing superseded',
  make_up_recorded: 'Make-up recorded',
  sign_in: 'Signed in',
  sign_in_failed: 'Sign-in failed',
  sign_out: 'Signed out',
  sign_out_everywhere: 'Signed out everywhere',
  session_ended: 'Session ended',
  password_change_failed: 'Password change refused',
  account_locked: 'Account locked',
  account_unlocked: 'Account unlocked',
  password_changed: 'Password changed',
  setting_change: 'Setting changed',
  print: 'Printed',
  sign: 'Signed',
  verify_chain: 'Chain checked',
};
