/**
 * Preparations API: request schemas (zod, shared with the forms) and the response DTO types.
 * Every measured value is a decimal string exactly as typed; readings are stored verbatim.
 * Times are UTC ISO strings; dates are "YYYY-MM-DD" (lab calendar dates).
 *
 *   POST /api/preparations/preview        planInputSchema              -> PreparationPreview
 *   POST /api/preparations                createPreparationInputSchema -> PreparationDetail (201) | 422 gate_blocked
 *   GET  /api/preparations                listPreparationsQuerySchema  -> PreparationList
 *   GET  /api/preparations/:key           key = id or identifier       -> PreparationDetail
 *   POST /api/preparations/:key/weighings weighingInputSchema          -> PreparationDetail (201)
 *   POST /api/preparations/:key/make-up   makeUpInputSchema            -> PreparationDetail (201)
 */
import { z } from 'zod';
import { capturesSchema, splitCapturedReadings, type StoredCapture } from '../balance/capture.ts';
import { PLAUSIBLE, checkConcentration, checkQuantity } from './plausible.ts';
import { lineText, multilineText } from './text.ts';
import Decimal from 'decimal.js';
import { CONCENTRATION_UNITS, VOLUME_UNITS, isConcentrationUnit, isVolumeUnit } from '../calc/units.ts';
import type { CalcPreparationResponse } from '../calc/preparation.ts';
import type { GateCode, GateSeverity, GateSuggestion } from '../prep/gates.ts';
import type { PlanGate, PlanGateCode } from '../prep/plan-gates.ts';
import type { TaskHazards } from '../prep/cautions.ts';
import type { Balance, ReferenceMaterial, VolumetricWare } from './inventory.ts';
import { DECIMAL_TEXT } from './decimal-text.ts';
import type { ExpirySection } from './expiry.ts';

export type { CalcPreparationResponse, GateCode, GateSeverity, GateSuggestion, PlanGateCode };
/** A planning gate: the codes of shared/prep/gates.ts plus the flask/density gates of shared/prep/plan-gates.ts. */
export type Gate = PlanGate;

// ---------------------------------------------------------------- helpers

const asDecimal = (s: string): Decimal | null => (DECIMAL_TEXT.test(s) ? new Decimal(s) : null);

const decimalString = (what: string) =>
  z
    .string({ error: `Enter ${what} as a number, e.g. 100.0` })
    .trim()
    .min(1, `Enter ${what}`)
    .regex(DECIMAL_TEXT, { error: `Enter ${what} as a decimal number such as 100.0 (use a point, not a comma)`, abort: true });

const positiveDecimal = (what: string) =>
  decimalString(what).refine((s) => asDecimal(s)?.gt(0) ?? true, `${what.charAt(0).toUpperCase() + what.slice(1)} must be greater than 0`);

const rangedDecimal = (what: string, min: string, max: string, unit: string) =>
  decimalString(what).refine(
    (s) => {
      const d = asDecimal(s);
      return d === null || (d.gte(min) && d.lte(max));
    },
    `${what.charAt(0).toUpperCase() + what.slice(1)} must be between ${min} and ${max} ${unit}`,
  );

/** A balance reading as typed: plain decimal text, no sign, no exponent ("0.1600", "160.07"). */
export const READING_TEXT = /^(\d+(\.\d*)?|\.\d+)$/;
/** A reading as a balance display shows it: digits and a point, with a minus sign when the display shows one. */
export const SIGNED_READING_TEXT = /^-?(\d+(\.\d*)?|\.\d+)$/;
/**
 * The sign and size are checked on the server against the balance (checkReadingRange: 422 at the field), so
 * a reading the balance cannot show (above its capacity, or a direct reading of zero or below) is refused
 * with the balance named.
 */
const readingString = (what: string) =>
  z
    .string({ error: `Enter ${what} exactly as the balance shows it, e.g. 160.07` })
    .trim()
    .min(1, `Enter ${what}`)
    .regex(SIGNED_READING_TEXT, { error: `Enter ${what} exactly as the balance shows it, e.g. 160.07 (digits and a point only)` });

const id = (what: string) =>
  z.number({ error: `Choose ${what}` }).int(`Choose ${what}`).positive(`Choose ${what}`);

const isoInstant = z.iso.datetime({ offset: true, error: 'Enter the time as an ISO date-time, e.g. 2026-11-20T09:30:00Z' });

const reason = (what: string) => multilineText({ error: `Give ${what}` }).trim().min(3, `Give ${what} (at least 3 characters)`).max(500, 'Use at most 500 characters');

// ---------------------------------------------------------------- inputs

export const CONDITION_SOURCES = ['measured', 'lab-default'] as const;
export type ConditionSource = (typeof CONDITION_SOURCES)[number];

/**
 * Room conditions: measured (t, p, RH, optional time of measurement) or the lab defaults from settings.
 * `source` may be omitted for measured values. Ranges are those of CIPM-2007 (15–27 °C, 600–1100 hPa).
 */
export const conditionsInputSchema = z
  .object({
    source: z.enum(CONDITION_SOURCES, { error: 'Choose measured or lab-default conditions' }).optional(),
    temperatureC: rangedDecimal('the air temperature', '15', '27', '°C').optional(),
    pressureHPa: rangedDecimal('the air pressure', '600', '1100', 'hPa').optional(),
    relativeHumidityPct: rangedDecimal('the relative humidity', '0', '100', '%').optional(),
    measuredAt: isoInstant.optional(),
  })
  .superRefine((c, ctx) => {
    if (c.source === 'lab-default') return;
    const names = { temperatureC: 'Enter the air temperature (°C)', pressureHPa: 'Enter the air pressure (hPa)', relativeHumidityPct: 'Enter the relative humidity (%)' };
    for (const [k, msg] of Object.entries(names)) {
      if (c[k as keyof typeof names] === undefined) ctx.addIssue({ code: 'custom', path: [k], message: `${msg}, or choose the lab defaults` });
    }
  });
export type ConditionsInput =
  | { source: 'lab-default' }
  | { source?: 'measured'; temperatureC: string; pressureHPa: string; relativeHumidityPct: string; measuredAt?: string };

const planInputObject = z.object({
  materialId: id('a reference material'),
  analyteFormula: lineText({ error: 'Choose the analyte' }).trim().min(1, 'Choose the analyte').max(200, 'Use at most 200 characters'),
  target: z
    .object({
      value: positiveDecimal('the target concentration'),
      unit: z
        .string({ error: 'Choose a unit for the target concentration' })
        .trim()
        .refine(isConcentrationUnit, `Use one of ${CONCENTRATION_UNITS.join(', ')} for the target concentration`),
    })
    .superRefine((t, ctx) => checkConcentration(t, ctx)),
  flaskId: id('a volumetric flask').optional(),
  volume: z
    .object({
      value: positiveDecimal('the volume'),
      unit: z.string({ error: 'Choose a unit for the volume' }).trim().refine(isVolumeUnit, `Use one of ${VOLUME_UNITS.join(', ')} for the volume`),
    })
    .superRefine(checkQuantity('volume', PLAUSIBLE.volume, 'the volume'))
    .optional(),
  balanceId: id('a balance'),
  conditions: conditionsInputSchema,
});

const planRefine = (p: { flaskId?: number; volume?: unknown }, ctx: z.RefinementCtx) => {
  if (p.flaskId === undefined && p.volume === undefined) {
    ctx.addIssue({ code: 'custom', path: ['flaskId'], message: 'Choose a volumetric flask or enter the volume' });
  }
  if (p.flaskId !== undefined && p.volume !== undefined) {
    ctx.addIssue({ code: 'custom', path: ['volume'], message: 'Choose a flask or enter a volume, not both (the flask sets the volume)' });
  }
};

/** Body of POST /api/preparations/preview. */
export const planInputSchema = planInputObject.superRefine(planRefine);
export type PlanInput = Omit<z.output<typeof planInputSchema>, 'conditions'> & { conditions: ConditionsInput };

/** Body of POST /api/preparations: the plan plus optional notes. */
export const createPreparationInputSchema = planInputObject
  .extend({ notes: multilineText().trim().max(2000, 'Use at most 2000 characters').optional() })
  .superRefine(planRefine);
export type CreatePreparationInput = PlanInput & { notes?: string };

export const WEIGHING_MODES = ['direct', 'difference'] as const;
export type WeighingMode = (typeof WEIGHING_MODES)[number];
export const READING_UNITS = ['mg', 'g'] as const;
export type ReadingUnit = (typeof READING_UNITS)[number];

/**
 * Body of POST /api/preparations/:key/weighings. Direct (tared vessel): `reading`. By difference:
 * `before` (vessel with material) and `after` (vessel after transfer). The digits of every reading must
 * match the balance's readability (checked on the server → 400 fields.reading / before / after).
 */
export const WEIGHING_READING_FIELDS = ['reading', 'before', 'after'] as const;

export const weighingInputSchema = z.preprocess(
  splitCapturedReadings(WEIGHING_READING_FIELDS),
  z
  .object({
    mode: z.enum(WEIGHING_MODES, { error: 'Choose direct or by difference' }),
    /** how each reading came in (a reading sent as { value, unit, capture } lands here; absent: typed, flagged) */
    captures: capturesSchema(WEIGHING_READING_FIELDS),
    reading: readingString('the balance reading').optional(),
    before: readingString('the reading before transfer').optional(),
    after: readingString('the reading after transfer').optional(),
    unit: z.enum(READING_UNITS, { error: 'Choose mg or g' }),
    balanceId: id('a balance').optional(),
    conditions: conditionsInputSchema,
    confirmOutOfWindow: z.boolean({ error: 'confirmOutOfWindow is true or false' }).optional(),
    outOfWindowReason: multilineText().trim().max(500, 'Use at most 500 characters').optional(),
    supersedesId: id('the weighing to correct').optional(),
    correctionReason: multilineText().trim().max(500, 'Use at most 500 characters').optional(),
    /** required (server-checked, 400 fields["signature.password"]) when the record is prepared, returned or verified */
    signature: z.lazy(() => changeSignatureSchema).optional(),
  })
  .superRefine((w, ctx) => {
    if (w.mode === 'direct') {
      if (w.reading === undefined) ctx.addIssue({ code: 'custom', path: ['reading'], message: 'Enter the balance reading' });
      if (w.before !== undefined || w.after !== undefined) {
        ctx.addIssue({ code: 'custom', path: ['before'], message: 'A direct weighing has one reading; use mode "difference" for before and after' });
      }
    } else {
      if (w.before === undefined) ctx.addIssue({ code: 'custom', path: ['before'], message: 'Enter the reading before transfer' });
      if (w.after === undefined) ctx.addIssue({ code: 'custom', path: ['after'], message: 'Enter the reading after transfer' });
      if (w.reading !== undefined) ctx.addIssue({ code: 'custom', path: ['reading'], message: 'A weighing by difference has before and after readings, not one reading' });
    }
    if (w.supersedesId !== undefined && (w.correctionReason === undefined || w.correctionReason.length < 3)) {
      ctx.addIssue({ code: 'custom', path: ['correctionReason'], message: 'Give the reason for the correction (at least 3 characters)' });
    }
  }),
);
export type WeighingInput = Omit<z.output<typeof weighingInputSchema>, 'conditions'> & { conditions: ConditionsInput };

/** Body of POST /api/preparations/:key/make-up. */
export const makeUpInputSchema = z.object({
  flaskIdentifier: lineText({ error: 'Scan or type the flask identifier' }).trim().min(1, 'Scan or type the flask identifier').max(100, 'Use at most 100 characters'),
  solventId: id('the solvent'),
  solventLot: lineText({ error: 'Enter the solvent lot' }).trim().min(1, 'Enter the solvent lot').max(100, 'Use at most 100 characters'),
  /** 0–40 °C: the range of the linear expansion laws in shared/prep/volume.ts */
  solutionTemperatureC: rangedDecimal('the solution temperature', '0', '40', '°C'),
  applyTemperatureCorrection: z.boolean({ error: 'Say whether to correct the concentration to 20 °C' }),
  /** required (server-checked) when a make-up is already recorded */
  correctionReason: reason('the reason for the new make-up').optional(),
  /** required (server-checked) when the record is prepared, returned or verified: an "amended" signature */
  signature: z.lazy(() => changeSignatureSchema).optional(),
});
export type MakeUpInput = z.output<typeof makeUpInputSchema>;

/**
 * Record status (server-enforced state machine, server/services/preparation-status.ts):
 * planned → prepared (preparer signs) → verified | returned (verifier's reason) → prepared (new signature);
 * any live state → discarded (reason); a live record past its expiry is shown as expired (statusBeforeExpiry keeps
 * the stored status; shared/schemas/expiry.ts) until QA extends it. A correction after signing sets
 * the status back to planned with amendedFromVersion.
 */
export const PREPARATION_STATUSES = ['planned', 'prepared', 'verified', 'returned', 'expired', 'discarded'] as const;
export type PreparationStatus = (typeof PREPARATION_STATUSES)[number] | (string & {});
export const PREPARATION_STAGES = ['planned', 'weighed', 'made_up', 'complete'] as const;
export type PreparationStage = (typeof PREPARATION_STAGES)[number];

const flag = z
  .enum(['1', '0', 'true', 'false'], { error: 'Use 1 or 0' })
  .optional()
  .transform((v) => v === '1' || v === 'true');

/** Query of GET /api/preparations. */
export const listPreparationsQuerySchema = z.object({
  mine: flag,
  today: flag,
  status: lineText().trim().max(40).optional(),
  search: lineText().trim().max(100, 'Use at most 100 characters').optional(),
  page: z.coerce.number({ error: 'page is a whole number ≥ 1' }).int('page is a whole number ≥ 1').min(1, 'page is a whole number ≥ 1').default(1),
  pageSize: z.coerce.number({ error: 'pageSize is 1 to 100' }).int('pageSize is 1 to 100').min(1, 'pageSize is 1 to 100').max(100, 'pageSize is 1 to 100').default(25),
});
export type ListPreparationsQuery = z.output<typeof listPreparationsQuerySchema>;

// ---------------------------------------------------------------- responses

export interface Quantity<U extends string = string> {
  value: string;
  unit: U;
}

export interface PersonRef {
  id: number;
  fullName: string;
}

export interface ConditionsUsed {
  source: ConditionSource;
  temperatureC: string;
  pressureHPa: string;
  relativeHumidityPct: string;
  /** UTC ISO; for lab defaults, the time the defaults were applied */
  measuredAt: string;
}

export interface ReadingWindowDto {
  low: string;
  high: string;
  unit: 'mg';
  pct: string;
}

export interface ExpectedUncertainty {
  standardUncertainty: string;
  /** k = 2 */
  expandedUncertainty: string;
  /** relative standard uncertainty u/c */
  relative: string;
  display: string;
}

export interface PreparationSnapshot {
  material: ReferenceMaterial;
  balance: Balance;
  /** null when a volume was entered instead of a flask */
  flask: VolumetricWare | null;
}

/** 200 body of POST /api/preparations/preview. */
export interface PreparationPreview {
  calc: CalcPreparationResponse;
  targetReading: Quantity<'mg'>;
  window: ReadingWindowDto;
  expectedUncertainty: ExpectedUncertainty;
  gates: Gate[];
  conditionsUsed: ConditionsUsed;
  snapshot: PreparationSnapshot;
}

/** 422 body of POST /api/preparations when a blocking gate fires. */
export interface GateBlockedError {
  error: { code: 'gate_blocked'; message: string; gates: Gate[]; fields?: Record<string, string> };
}

export interface PreparationSummary {
  id: number;
  identifier: string;
  status: PreparationStatus;
  stage: PreparationStage;
  /** set when `status` is 'expired' only because the lab date is past expiresOn: the stored status (e.g. 'verified') */
  statusBeforeExpiry?: PreparationStatus;
  /**
   * set when `status` is 'seal_broken': the stored data no longer match what was signed (server/services/record-integrity.ts);
   * storedStatus is the status the record would otherwise show, problems say what differs
   */
  sealBroken?: { storedStatus: PreparationStatus; problems: string[] };
  materialName: string;
  analyteFormula: string;
  target: Quantity;
  volume: Quantity;
  concentrationDisplay?: string;
  createdBy: PersonRef & { initials: string };
  createdAt: string;
  expiresOn: string;
}

export interface PreparationList {
  items: PreparationSummary[];
  total: number;
  page: number;
  pageSize: number;
}

export interface Weighing {
  id: number;
  mode: WeighingMode;
  /** verbatim string as typed (direct mode) */
  reading?: Quantity<ReadingUnit>;
  before?: Quantity<ReadingUnit>;
  after?: Quantity<ReadingUnit>;
  net: Quantity<'mg'>;
  /** how each reading came in, by field (reading | before | after); rows from before issue 15 show as typed, not_recorded */
  captures: Partial<Record<(typeof WEIGHING_READING_FIELDS)[number], StoredCapture>>;
  /** snapshot = the balance row (status included) at the time of weighing */
  balance: { id: number; identifier: string; snapshot: Balance };
  conditions: { temperatureC: string; pressureHPa: string; relativeHumidityPct: string; measuredAt: string; source: ConditionSource };
  /** g/mL, CIPM-2007 from the weighing's conditions */
  airDensity: string;
  inWindow: boolean;
  outOfWindowReason?: string;
  supersedesId?: number;
  supersededById?: number;
  correctionReason?: string;
  recordedBy: PersonRef;
  recordedAt: string;
}

export interface MakeUp {
  id: number;
  flask: { id: number; identifier: string; snapshot: VolumetricWare; substituted: boolean };
  solvent: {
    id: number;
    name: string;
    lot: string;
    expansionCoefficientPerK: string | null;
    snapshot: import('./inventory.ts').Solvent;
  };
  solutionTemperatureC: string;
  applyTemperatureCorrection: boolean;
  correctionReason?: string;
  supersedesId?: number;
  recordedBy: PersonRef;
  recordedAt: string;
}

export interface BudgetEntry {
  input: string;
  label: string;
  value: string;
  unit: string;
  standardUncertainty: string;
  sensitivity: string;
  contribution: string;
  share: string;
}

export interface PreparationResult {
  calcVersion: string;
  computedAt: string;
  trueMass: Quantity<'mg'>;
  volume: Quantity<'mL'>;
  concentration: {
    value: string;
    unit: string;
    standardUncertainty: string;
    expandedUncertainty: string;
    k: string;
    display: string;
    significantFigures: { value: string; significantFigures: number; limitedBy: string };
  };
  budget: BudgetEntry[];
  temperatureCorrection?: { factor: string; temperatureC: string };
  basedOn: { weighingId: number; makeUpId: number };
  /** the exact request given to the metrology core (with calcVersion, enough to recompute and compare) */
  calcRequest?: unknown;
}
/** Alias with the contract's name. */
export type Result = PreparationResult;

export interface PreparationPlan {
  targetReading: Quantity<'mg'>;
  window: ReadingWindowDto;
  trueMass: Quantity<'mg'>;
  buoyancyFactor: string;
  gravimetricFactor: string;
  /** g/mL */
  airDensity: string;
  expectedUncertainty: ExpectedUncertainty;
}

/** The cautions of a record for its task (shared/prep/cautions.ts). */
export type Hazards = TaskHazards;

export interface StatusEvent {
  status: string;
  at: string;
  by: PersonRef;
  note?: string;
}

export interface PreparationDetail extends PreparationSummary, ExpirySection {
  version: number;
  inputs: PlanInput;
  notes?: string;
  conditionsUsed: ConditionsUsed;
  snapshot: PreparationSnapshot;
  plan: PreparationPlan;
  gates: Gate[];
  weighings: Weighing[];
  makeUp?: MakeUp;
  makeUpHistory: MakeUp[];
  result?: PreparationResult;
  hazards: Hazards;
  statusHistory: StatusEvent[];
  expiry: { expiresOn: string; reason: string };
  /** electronic signatures, oldest first, including superseded ones (valid: false) */
  signatures: Signature[];
  /** set when the record was changed after signing: the version whose signatures were invalidated */
  amendedFromVersion?: number;
  /** set on records made from one that changed after signing (later: dilutions) */
  reviewFlag?: ReviewFlag;
  /** the items the verifier must tick (every key is required in `checklist` for "verified") */
  verificationChecklist: ChecklistItem[];
  /** computed for the requesting user; `reasons[action]` says why an action is not allowed */
  canSign: CanSign;
  /** set when the current result is outside what the plan could produce (shared/prep/plan-plausibility.ts) */
  resultOutOfPlan?: ResultOutOfPlan;
}

/**
 * A result outside what the plan could produce: "prepared" needs `outOfPlanReason` (422 fields.outOfPlanReason
 * without it), and the verifier's checklist starts with OUT_OF_PLAN_CHECK_KEY, showing the reason.
 */
export interface ResultOutOfPlan {
  messages: string[];
  /** the reason stated with the valid "prepared" signature of this version, when there is one */
  reason?: string;
  statedBy?: string;
  statedAt?: string;
}

export const OUT_OF_PLAN_CHECK_KEY = 'result_out_of_plan';

// ---------------------------------------------------------------- signatures

export const SIGNATURE_MEANINGS = ['prepared', 'verified', 'returned', 'discarded', 'amended'] as const;
export type SignatureMeaning = (typeof SIGNATURE_MEANINGS)[number];
/** Meanings a user can sign through POST /api/preparations/:key/signatures ("amended" comes with a change). */
export const SIGNABLE_MEANINGS = ['prepared', 'verified', 'returned', 'discarded'] as const;
export type SignableMeaning = (typeof SIGNABLE_MEANINGS)[number];

/** The meaning text stored with each signature and shown before signing and on every copy (ES-01, ES-02). */
export const SIGNATURE_MEANING_TEXT: Record<SignatureMeaning, string> = {
  prepared: 'Prepared by (authorship and responsibility)',
  verified: 'Verified by (second-person review of accuracy, completeness and compliance)',
  returned: 'Returned to the preparer by (second-person review, not accepted)',
  discarded: 'Discarded by (record withdrawn from use)',
  amended: 'Amended by (change to a signed record; earlier signatures no longer apply)',
};

/** Shown at a user's first signing; acknowledged once and stored (ES-08). */
export const SIGNATURE_RESPONSIBILITY_STATEMENT =
  'I understand that my electronic signature is the legally binding equivalent of my handwritten signature, ' +
  'that it is unique to me, and that I am accountable for every record I sign with it. I will not share my password.';

export interface ChecklistItem {
  key: string;
  label: string;
}

/** Verifier's checklist (REQUIREMENTS RV-03, W3). */
export const VERIFICATION_CHECKLIST: readonly ChecklistItem[] = [
  { key: 'planned_vs_actual', label: 'Planned and actual values compared (target reading, window, weighing, flask and volume)' },
  { key: 'inputs_valid', label: 'Reference material, solvent and certificate valid and unexpired at the time of use' },
  { key: 'equipment_ok', label: 'Balance and volumetric flask in service and within calibration at the time of use' },
  { key: 'calculation_matches', label: 'System-recomputed concentration and uncertainty match the record' },
  { key: 'flags_dispositioned', label: 'Out-of-window weighings, corrections and planning warnings are justified' },
  { key: 'entries_checked', label: 'Manually entered readings checked against the balance printout or log' },
  { key: 'audit_trail_reviewed', label: 'Record-level audit trail reviewed' },
];

export interface Signature {
  id: number;
  meaning: SignatureMeaning;
  meaningText: string;
  /** printed name at the time of signing */
  signer: PersonRef;
  /** UTC ISO with milliseconds */
  signedAt: string;
  recordVersion: number;
  /** SHA-256 hex of the canonical JSON of the record version signed (server/services/signatures.service.ts) */
  recordHash: string;
  reason?: string;
  /** "prepared" of a result outside the plan: the reason the signer stated */
  outOfPlanReason?: string;
  checklist?: Record<string, true>;
  /** false once the record has changed since; shown as "superseded: applied to v {recordVersion}" */
  valid: boolean;
}

export interface ReviewFlag {
  reason: string;
  flaggedAt: string;
}

export interface CanSign {
  prepare: boolean;
  verify: boolean;
  return: boolean;
  discard: boolean;
  /** keyed by prepare | verify | return | discard: why that action is not allowed for this user now */
  reasons: Record<string, string>;
  /** true until the user has acknowledged SIGNATURE_RESPONSIBILITY_STATEMENT (send acknowledgeResponsibility: true) */
  acknowledgementRequired?: boolean;
}

/** Body of POST /api/preparations/:key/signatures → PreparationDetail (201). */
export const signatureInputSchema = z
  .object({
    meaning: z.enum(SIGNABLE_MEANINGS, { error: 'Choose prepared, verified, returned or discarded' }),
    password: z.string({ error: 'Enter your password to sign' }).min(1, 'Enter your password to sign').max(200, 'Use at most 200 characters'),
    reason: multilineText().trim().max(500, 'Use at most 500 characters').optional(),
    checklist: z.record(z.string(), z.literal(true, { error: 'Tick the item (true)' })).optional(),
    acknowledgeResponsibility: z.literal(true, { error: 'Tick the statement to acknowledge it' }).optional(),
    /** "prepared" only: why a result outside what the plan could produce stands (required then, server-checked: 422) */
    outOfPlanReason: z.string().trim().max(500, 'Use at most 500 characters').optional(),
  })
  .superRefine((s, ctx) => {
    if ((s.meaning === 'returned' || s.meaning === 'discarded') && (s.reason === undefined || s.reason.length < 3)) {
      ctx.addIssue({ code: 'custom', path: ['reason'], message: `Give the reason the record is ${s.meaning} (at least 3 characters)` });
    }
  });
export type SignatureInput = z.output<typeof signatureInputSchema>;

/** `signature` next to `correctionReason` on a weighing or make-up that changes a signed record. */
export const changeSignatureSchema = z.object({
  password: z.string({ error: 'Enter your password to sign the change' }).min(1, 'Enter your password to sign the change').max(200, 'Use at most 200 characters'),
  /** required the first time a user ever signs */
  acknowledgeResponsibility: z.literal(true, { error: 'Tick the statement to acknowledge it' }).optional(),
});
export type ChangeSignatureInput = z.output<typeof changeSignatureSchema>;

/** 409 body when a status change is not allowed from the current state. */
export interface InvalidTransitionError {
  error: { code: 'invalid_transition'; message: string; fields?: Record<string, string> };
}

// ---------------------------------------------------------------- outbox (admin; the local fake SMTP server's mailbox)

/** GET /api/outbox */
export interface OutboxList {
  items: Array<{ id: number; to: string; subject: string; receivedAt: string }>;
}
/** GET /api/outbox/:id */
export interface OutboxMessage {
  id: number;
  from: string;
  to: string;
  subject: string;
  text: string;
  html: string;
  receivedAt: string;
}
