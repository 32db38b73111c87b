/**
 * Inventory DTOs, input schemas and list queries. Every measured value is a decimal string exactly as
 * stored; dates are "YYYY-MM-DD"; times are UTC ISO strings.
 */
import Decimal from 'decimal.js';
import { z } from 'zod';
import { lineText, multilineText } from './text.ts';
import { PLAUSIBLE, inRange } from './plausible.ts';
import { isIsoDate } from '../prep/dates.ts';
import { DECIMAL_TEXT, decimalCheck } from './decimal-text.ts';
import { LINE_SHAPES } from '../balance/output-line.ts';

export const MATERIAL_GRADES = ['CRM', 'RM', 'reagent'] as const;
export const PURITY_BASES = ['as-is', 'dried'] as const;
export const LOT_STATUSES = ['accepted', 'quarantined', 'retired'] as const;
export const BALANCE_STATUSES = ['in_service', 'out_of_service', 'retired'] as const;
/** How a balance's serial port is set (its own menu says the same); generic names of our own. */
export const SERIAL_BAUDS = [1200, 2400, 4800, 9600, 19200, 38400, 57600, 115200] as const;
export const SERIAL_DATA_BITS = [7, 8] as const;
export const SERIAL_PARITIES = ['none', 'even', 'odd'] as const;
export const SERIAL_STOP_BITS = [1, 2] as const;
export const SERIAL_LINE_ENDINGS = ['crlf', 'cr', 'lf'] as const;
export const WARE_KINDS = ['volumetric_flask', 'bulb_pipette', 'graduated_pipette', 'piston_pipette'] as const;
export const WARE_CLASSES = ['A', 'B', 'n/a'] as const;
export const WARE_STATUSES = ['in_service', 'out_of_service', 'retired'] as const;

const dec = z.string();
const optDec = z.string().nullable();
const date = z.string().nullable();

export const analyteSchema = z.object({ name: z.string(), formula: z.string() });

export const referenceMaterialSchema = z.object({
  id: z.number().int(),
  name: z.string(),
  formula: z.string(),
  analytes: z.array(analyteSchema),
  casNumber: z.string().nullable(),
  grade: z.enum(MATERIAL_GRADES),
  producer: z.string(),
  catalogueNumber: z.string().nullable(),
  lot: z.string(),
  certificateNumber: z.string().nullable(),
  purity: z.object({
    value: dec,
    expandedUncertainty: optDec,
    k: optDec,
    standardUncertainty: optDec,
    basis: z.enum(PURITY_BASES),
  }),
  densityGPerMl: optDec,
  receivedOn: date,
  openedOn: date,
  expiresOn: date,
  storage: z.string().nullable(),
  ghsHazardStatements: z.array(z.string()),
  ghsPictograms: z.array(z.string()),
  status: z.enum(LOT_STATUSES),
  /** Who accepted the quarantined lot, and when (null while quarantined). */
  acceptedBy: z.object({ id: z.number().int(), fullName: z.string() }).nullable(),
  acceptedAt: z.string().nullable(),
  retiredAt: z.string().nullable(),
  retiredReason: z.string().nullable(),
  createdAt: z.string(),
  updatedAt: z.string(),
});
export type ReferenceMaterial = z.infer<typeof referenceMaterialSchema>;

export const balanceSchema = z.object({
  id: z.number().int(),
  identifier: z.string(),
  description: z.string(),
  location: z.string().nullable(),
  capacityG: dec,
  readabilityMg: dec,
  minWeightMg: optDec,
  minWeightDeterminedOn: date,
  repeatabilitySdMg: optDec,
  minWeightSafetyFactor: optDec,
  calibratedOn: date,
  calibrationDueOn: date,
  calibrationUncertaintyMg: optDec,
  calibrationUncertaintyK: optDec,
  weightDensityGPerMl: dec,
  /** The readability d used when the minimum weight was determined (with s, safety factor and date above). */
  minWeightReadabilityMg: optDec,
  /** true when the server computed minWeightMg from s and d (USP <41>); false when it was entered. */
  minWeightComputed: z.boolean(),
  status: z.enum(BALANCE_STATUSES),
  /** The line shape the balance prints (shared/balance/output-line.ts); 'auto' tries each. */
  outputShape: z.enum(LINE_SHAPES),
  /** What to send to the balance for a stable reading (e.g. a print command), null: press Print on the balance. */
  printCommand: z.string().nullable(),
  /** The identity the balance prints on its readings (ID or serial number); null: its identifier here. */
  printedId: z.string().nullable(),
  serialBaud: z.number().int(),
  serialDataBits: z.number().int(),
  serialParity: z.enum(SERIAL_PARITIES),
  serialStopBits: z.number().int(),
  serialLineEnding: z.enum(SERIAL_LINE_ENDINGS),
  retiredAt: z.string().nullable(),
  retiredReason: z.string().nullable(),
  createdAt: z.string(),
  updatedAt: z.string(),
});
export type Balance = z.infer<typeof balanceSchema>;

/**
 * The calibrated volume of a ware item, frozen into a preparation's flask or pipette snapshot when the lab setting
 * `useCalibratedVolumes` is on and the item's latest verified volume check passed, is in date and tested the volume
 * used. The budget then takes V = the check's mean at 20 °C and u(V) = U/k of the check instead of the nominal
 * volume and the class tolerance; a later check never changes it (the snapshot keeps this one).
 */
export const calibratedVolumeSchema = z.object({
  checkId: z.number().int(),
  /** VC-YYYY-NNNN */
  checkIdentifier: z.string(),
  /** the volume the check tested and the record uses (nominal, or a piston pipette's setting), mL */
  volumeMl: dec,
  /** mean volume at 20 °C, mL, as the check stored it */
  meanMl: dec,
  /** expanded uncertainty U of the mean and its coverage factor k, as the check stored them */
  expandedUncertaintyMl: dec,
  k: dec,
  /** u(V) = U/k, mL */
  standardUncertaintyMl: dec,
  /** standard deviation s of single deliveries (or fills to the mark) in the check, mL */
  repeatabilitySdMl: dec,
  verifiedOn: z.string(),
  nextDueOn: z.string(),
});
export type CalibratedVolume = z.infer<typeof calibratedVolumeSchema>;

export const volumetricWareSchema = z.object({
  id: z.number().int(),
  identifier: z.string(),
  kind: z.enum(WARE_KINDS),
  nominalVolumeMl: dec,
  class: z.enum(WARE_CLASSES),
  toleranceMl: optDec,
  material: z.string().nullable(),
  status: z.enum(WARE_STATUSES),
  /** lists only, flasks: the identifier of the open preparation whose solution the flask still holds */
  holds: z.string().nullable().optional(),
  retiredAt: z.string().nullable(),
  retiredReason: z.string().nullable(),
  createdAt: z.string(),
  updatedAt: z.string(),
  /** only in a preparation's snapshot, only when a calibrated volume was used (absent in the register and in older snapshots) */
  calibratedVolume: calibratedVolumeSchema.optional(),
});
export type VolumetricWare = z.infer<typeof volumetricWareSchema>;

export const solventSchema = z.object({
  id: z.number().int(),
  name: z.string(),
  grade: z.string().nullable(),
  lot: z.string(),
  density20cGPerMl: optDec,
  expansionCoefficientPerK: optDec,
  expiresOn: date,
  status: z.enum(LOT_STATUSES),
  retiredAt: z.string().nullable(),
  retiredReason: z.string().nullable(),
  createdAt: z.string(),
  updatedAt: z.string(),
});
export type Solvent = z.infer<typeof solventSchema>;

export const listResponseSchema = <T extends z.ZodType>(item: T) => z.object({ items: z.array(item) });

// ---------------------------------------------------------------------------------------------------
// Paged lists: GET /api/materials | /api/balances | /api/volumetric-ware | /api/solvents
// ---------------------------------------------------------------------------------------------------

export const pagedResponseSchema = <T extends z.ZodType>(item: T) =>
  z.object({ items: z.array(item), total: z.number().int(), page: z.number().int(), pageSize: z.number().int() });
export type Paged<T> = { items: T[]; total: number; page: number; pageSize: number };

export const PAGE_SIZE_DEFAULT = 25;
export const PAGE_SIZE_MAX = 200;
export const SORT_DIRS = ['asc', 'desc'] as const;

export const MATERIAL_SORT_KEYS = ['name', 'lot', 'grade', 'producer', 'casNumber', 'receivedOn', 'expiresOn', 'status', 'updatedAt'] as const;
export const BALANCE_SORT_KEYS = ['identifier', 'description', 'location', 'calibratedOn', 'calibrationDueOn', 'status', 'updatedAt'] as const;
export const WARE_SORT_KEYS = ['identifier', 'kind', 'nominalVolumeMl', 'class', 'material', 'status', 'updatedAt'] as const;
export const SOLVENT_SORT_KEYS = ['name', 'grade', 'lot', 'expiresOn', 'status', 'updatedAt'] as const;

/** Query strings arrive as text; "" counts as not given. */
const blankToUndefined = (v: unknown) => (typeof v === 'string' && v.trim() === '' ? undefined : v);
const q = <T extends z.ZodType>(s: T) => z.preprocess(blankToUndefined, s.optional());

const listQueryBase = <K extends readonly [string, ...string[]]>(sortKeys: K, defaultSort: K[number]) =>
  z.object({
    search: q(lineText().trim().max(200, 'Use at most 200 characters')),
    sort: z.preprocess(blankToUndefined, z.enum(sortKeys, { error: `Sort by one of: ${sortKeys.join(', ')}` }).default(defaultSort as never)),
    dir: z.preprocess(blankToUndefined, z.enum(SORT_DIRS, { error: 'Use asc or desc' }).default('asc')),
    page: z.preprocess(
      blankToUndefined,
      z.coerce.number({ error: 'Page must be a whole number from 1' }).int('Page must be a whole number from 1').min(1, 'Page must be a whole number from 1').default(1),
    ),
    pageSize: z.preprocess(
      blankToUndefined,
      z.coerce
        .number({ error: `Page size must be a whole number from 1 to ${PAGE_SIZE_MAX}` })
        .int(`Page size must be a whole number from 1 to ${PAGE_SIZE_MAX}`)
        .min(1, `Page size must be a whole number from 1 to ${PAGE_SIZE_MAX}`)
        .max(PAGE_SIZE_MAX, `Page size must be a whole number from 1 to ${PAGE_SIZE_MAX}`)
        .default(PAGE_SIZE_DEFAULT),
    ),
    /** usable=1: only items a preparation may use (see each list). */
    usable: z.preprocess(blankToUndefined, z.enum(['0', '1'], { error: 'Use usable=1 or usable=0' }).optional()).transform((v) => v === '1'),
  });

export const materialListQuerySchema = listQueryBase(MATERIAL_SORT_KEYS, 'name').extend({
  status: q(z.enum(LOT_STATUSES, { error: `Status is one of: ${LOT_STATUSES.join(', ')}` })),
  grade: q(z.enum(MATERIAL_GRADES, { error: `Grade is one of: ${MATERIAL_GRADES.join(', ')}` })),
});
export const balanceListQuerySchema = listQueryBase(BALANCE_SORT_KEYS, 'identifier').extend({
  status: q(z.enum(BALANCE_STATUSES, { error: `Status is one of: ${BALANCE_STATUSES.join(', ')}` })),
});
export const wareListQuerySchema = listQueryBase(WARE_SORT_KEYS, 'identifier').extend({
  status: q(z.enum(WARE_STATUSES, { error: `Status is one of: ${WARE_STATUSES.join(', ')}` })),
  kind: q(z.enum(WARE_KINDS, { error: `Kind is one of: ${WARE_KINDS.join(', ')}` })),
});
export const solventListQuerySchema = listQueryBase(SOLVENT_SORT_KEYS, 'name').extend({
  status: q(z.enum(LOT_STATUSES, { error: `Status is one of: ${LOT_STATUSES.join(', ')}` })),
});
export type MaterialListQuery = z.infer<typeof materialListQuerySchema>;
export type BalanceListQuery = z.infer<typeof balanceListQuerySchema>;
export type WareListQuery = z.infer<typeof wareListQuerySchema>;
export type SolventListQuery = z.infer<typeof solventListQuerySchema>;

export const materialPageSchema = pagedResponseSchema(referenceMaterialSchema);
export const balancePageSchema = pagedResponseSchema(balanceSchema);
export const warePageSchema = pagedResponseSchema(volumetricWareSchema);
export const solventPageSchema = pagedResponseSchema(solventSchema);

// ---------------------------------------------------------------------------------------------------
// Input fields. Optional fields accept null or "" (a cleared form field) and store null.
// ---------------------------------------------------------------------------------------------------

const blankToNull = (v: unknown) => (typeof v === 'string' && v.trim() === '' ? null : v);
/** Optional, nullable: undefined = not given (kept on update), null / "" = cleared. */
const opt = <T extends z.ZodType>(s: T) => z.preprocess(blankToNull, s.nullable()).optional();

const requiredName = (label: string, max = 200) =>
  lineText({ error: `Enter the ${label}` })
    .trim()
    .min(1, `Enter the ${label}`)
    .max(max, `Use at most ${max} characters`);
const freeText = (max = 500) => lineText({ error: 'Enter text' }).trim().max(max, `Use at most ${max} characters`);

const positive = (message: string) => decimalCheck((d) => d.gt(0), message);

export const isoDateSchema = z
  .string({ error: 'Enter a date as YYYY-MM-DD' })
  .trim()
  .refine((s) => isIsoDate(s), 'Enter a real calendar date as YYYY-MM-DD, e.g. 2026-03-12');

/** CAS Registry Number: 2–7 digits, 2 digits, check digit (weighted digit sum mod 10, CAS "check digit verification"). */
export function isValidCasNumber(s: string): boolean {
  const m = /^(\d{2,7})-(\d{2})-(\d)$/.exec(s);
  if (!m) return false;
  const digits = (m[1] + m[2]).split('').reverse();
  const sum = digits.reduce((acc, ch, i) => acc + (i + 1) * Number(ch), 0);
  return sum % 10 === Number(m[3]);
}
export const casNumberSchema = z
  .string({ error: 'Enter a CAS number, e.g. 7778-77-0' })
  .trim()
  .regex(/^\d{2,7}-\d{2}-\d$/, { error: 'Write the CAS number as digits-digits-digit, e.g. 7778-77-0', abort: true })
  .refine(isValidCasNumber, 'The CAS number check digit does not match; check for a typing error');

/** GHS hazard statements (H200–H499, EUH…; combined as "H300+H310") and pictograms GHS01–GHS09 (UN GHS). */
export const GHS_HAZARD_RE = /^(EU)?H\d{3}[A-Za-z]{0,2}(\+(EU)?H\d{3}[A-Za-z]{0,2})*$/;
export const GHS_PICTOGRAM_RE = /^GHS0[1-9]$/;
const hazardList = z
  .array(z.string({ error: 'Enter a hazard statement code' }).trim()
      // Upper-case only the "H"/"EUH" prefix: the letters after the number carry meaning (H360Df ≠ H360DF).
      .overwrite((s) => s.replace(/^(eu)?h/i, (m) => m.toUpperCase()))
      .regex(GHS_HAZARD_RE, 'Use a hazard statement code such as H302 or H319'), {
    error: 'Give a list of hazard statement codes',
  })
  .max(40, 'At most 40 hazard statements');
const pictogramList = z
  .array(z.string({ error: 'Enter a pictogram code' }).trim().toUpperCase().regex(GHS_PICTOGRAM_RE, 'Use a pictogram code from GHS01 to GHS09'), {
    error: 'Give a list of pictogram codes',
  })
  .max(9, 'At most 9 pictograms');

export const analyteInputSchema = z.object({
  name: requiredName('analyte name', 120),
  formula: requiredName('analyte formula', 120),
});

const identifierSchema = z
  .string({ error: 'Enter the identifier' })
  .trim()
  .min(1, 'Enter the identifier')
  .max(40, 'Use at most 40 characters')
  .regex(/^[A-Za-z0-9][A-Za-z0-9 ._/-]*$/, 'Use letters, digits, space, dot, dash, underscore or slash, e.g. BAL-03');

export const retireInputSchema = z.object({
  reason: multilineText({ error: 'Give the reason for retiring it' }).trim().min(1, 'Give the reason for retiring it').max(500, 'Use at most 500 characters'),
});
export type RetireInput = z.infer<typeof retireInputSchema>;

/** Cross-field rule helper: add an issue at `path` (used by create, update and the server's merged check). */
type Ctx = z.RefinementCtx;
const issue = (ctx: Ctx, path: (string | number)[], message: string) => ctx.addIssue({ code: 'custom', path, message });
const decOk = (s: unknown): s is string => typeof s === 'string' && DECIMAL_TEXT.test(s.trim());
const dateOk = (s: unknown): s is string => typeof s === 'string' && isIsoDate(s);

// ---------------------------------------------------------------------------------------------------
// Reference materials
// ---------------------------------------------------------------------------------------------------

const purityFields = {
  /** Mass fraction, 0 < P ≤ 1 (e.g. "0.9995"). */
  value: decimalCheck((d) => d.gt(0) && d.lte(1), 'Purity is a mass fraction greater than 0 and at most 1, e.g. 0.9995').superRefine(
    inRange(PLAUSIBLE.purity, 'the purity'),
  ),
  expandedUncertainty: opt(
    positive('Expanded uncertainty must be greater than 0 (same unit as the purity, e.g. 0.0003)').superRefine(inRange(PLAUSIBLE.purityUncertainty, 'the expanded uncertainty')),
  ),
  k: opt(decimalCheck((d) => d.gt(0) && d.lte(10), 'Coverage factor k must be greater than 0 and at most 10, e.g. 2').superRefine(inRange(PLAUSIBLE.coverageFactor, 'the coverage factor k'))),
  standardUncertainty: opt(
    positive('Standard uncertainty must be greater than 0 (same unit as the purity)').superRefine(inRange(PLAUSIBLE.purityUncertainty, 'the standard uncertainty')),
  ),
  basis: z.enum(PURITY_BASES, { error: `Basis is one of: ${PURITY_BASES.join(', ')}` }),
};

/** Rules over a material's purity: U needs k; u and U not both; the uncertainty is smaller than the purity. */
function purityRules(p: Partial<Record<'value' | 'expandedUncertainty' | 'k' | 'standardUncertainty', unknown>>, grade: unknown, ctx: Ctx, full: boolean) {
  const hasU = p.expandedUncertainty != null;
  const hasK = p.k != null;
  const hasu = p.standardUncertainty != null;
  // A partial purity (PATCH) is checked here only where both members of a pair are given; the server
  // re-checks the merged record in full.
  const both = (a: keyof typeof p, b: keyof typeof p) => full || (p[a] !== undefined && p[b] !== undefined);
  if (both('expandedUncertainty', 'k')) {
    if (hasU && !hasK) issue(ctx, ['purity', 'k'], 'An expanded uncertainty needs its coverage factor k, e.g. 2');
    if (hasK && !hasU) issue(ctx, ['purity', 'expandedUncertainty'], 'Give the expanded uncertainty that goes with k, or clear k');
  }
  if (both('expandedUncertainty', 'standardUncertainty') && hasU && hasu) issue(ctx, ['purity', 'standardUncertainty'], 'Give either the expanded uncertainty with k or the standard uncertainty, not both');
  if (full && grade === 'CRM' && !hasU && !hasu) {
    issue(ctx, ['purity', 'expandedUncertainty'], 'A certified reference material needs its purity uncertainty (expanded with k, or standard)');
  }
  for (const key of ['expandedUncertainty', 'standardUncertainty'] as const) {
    const u = p[key];
    if (decOk(p.value) && decOk(u) && new Decimal(u).gte(new Decimal(p.value))) {
      issue(ctx, ['purity', key], 'The uncertainty must be smaller than the purity value');
    }
  }
}

function materialDateRules(m: { receivedOn?: unknown; openedOn?: unknown; expiresOn?: unknown }, ctx: Ctx) {
  if (dateOk(m.receivedOn) && dateOk(m.expiresOn) && m.expiresOn < m.receivedOn) {
    issue(ctx, ['expiresOn'], 'The expiry date cannot be before the received date');
  }
  if (dateOk(m.receivedOn) && dateOk(m.openedOn) && m.openedOn < m.receivedOn) {
    issue(ctx, ['openedOn'], 'The opened date cannot be before the received date');
  }
  if (dateOk(m.openedOn) && dateOk(m.expiresOn) && m.expiresOn < m.openedOn) {
    issue(ctx, ['expiresOn'], 'The expiry date cannot be before the opened date');
  }
}

const materialFields = {
  name: requiredName('material name'),
  formula: requiredName('formula', 120),
  analytes: z.array(analyteInputSchema, { error: 'Give the analytes it is certified for' }).max(50, 'At most 50 analytes'),
  casNumber: opt(casNumberSchema),
  grade: z.enum(MATERIAL_GRADES, { error: `Grade is one of: ${MATERIAL_GRADES.join(', ')}` }),
  producer: requiredName('producer'),
  catalogueNumber: opt(freeText(100)),
  lot: requiredName('lot', 100),
  certificateNumber: opt(freeText(100)),
  densityGPerMl: opt(decimalCheck((d) => d.gt(0) && d.lte(25), 'Density must be greater than 0 and at most 25 g/mL, e.g. 2.17')),
  receivedOn: opt(isoDateSchema),
  openedOn: opt(isoDateSchema),
  expiresOn: opt(isoDateSchema),
  storage: opt(freeText(200)),
  ghsHazardStatements: hazardList,
  ghsPictograms: pictogramList,
};

/** A new lot is quarantined until accepted; it cannot be created retired. */
export const MATERIAL_INPUT_STATUSES = ['accepted', 'quarantined'] as const;

export const materialCreateInputSchema = z
  .object({
    ...materialFields,
    analytes: materialFields.analytes.min(1, 'Give at least one analyte it is certified for'),
    ghsHazardStatements: hazardList.default([]),
    ghsPictograms: pictogramList.default([]),
    purity: z.object(purityFields, { error: 'Give the purity' }),
    status: z.enum(MATERIAL_INPUT_STATUSES, { error: 'Status is accepted or quarantined' }).default('quarantined'),
  })
  .superRefine((m, ctx) => {
    purityRules(m.purity, m.grade, ctx, true);
    materialDateRules(m, ctx);
  });
export type MaterialCreateInput = z.input<typeof materialCreateInputSchema>;
export type MaterialCreate = z.output<typeof materialCreateInputSchema>;

/**
 * PATCH: any subset; `purity` may itself be partial. Cross-field rules run here on what is given, and
 * the server re-checks them on the merged record (materialCreateInputSchema).
 */
export const materialUpdateInputSchema = z
  .object({
    ...materialFields,
    analytes: materialFields.analytes.min(1, 'Give at least one analyte it is certified for'),
    purity: z.object(purityFields, { error: 'Give the purity' }).partial(),
    status: z.enum(MATERIAL_INPUT_STATUSES, { error: 'Status is accepted or quarantined; use retire to retire it' }),
  })
  .partial()
  .superRefine((m, ctx) => {
    if (m.purity) purityRules(m.purity, m.grade, ctx, false);
    materialDateRules(m, ctx);
  });
export type MaterialUpdateInput = z.input<typeof materialUpdateInputSchema>;
export type MaterialUpdate = z.output<typeof materialUpdateInputSchema>;

// ---------------------------------------------------------------------------------------------------
// Balances
// ---------------------------------------------------------------------------------------------------

export const BALANCE_INPUT_STATUSES = ['in_service', 'out_of_service'] as const;

const numberOf = (allowed: readonly number[], message: string) =>
  z.number({ error: message }).refine((v) => allowed.includes(v), message);

const balanceFields = {
  identifier: identifierSchema,
  description: requiredName('description'),
  location: opt(freeText(120)),
  capacityG: positive('Capacity must be greater than 0 g, e.g. 220'),
  readabilityMg: positive('Readability d must be greater than 0 mg, e.g. 0.1'),
  minWeightMg: opt(positive('Minimum weight must be greater than 0 mg')),
  minWeightDeterminedOn: opt(isoDateSchema),
  repeatabilitySdMg: opt(decimalCheck((d) => d.gte(0), 'Repeatability s must be 0 mg or more')),
  minWeightSafetyFactor: opt(decimalCheck((d) => d.gte(1) && d.lte(100), 'Safety factor must be from 1 to 100, e.g. 2')),
  calibratedOn: opt(isoDateSchema),
  calibrationDueOn: opt(isoDateSchema),
  calibrationUncertaintyMg: opt(positive('Calibration uncertainty must be greater than 0 mg')),
  calibrationUncertaintyK: opt(decimalCheck((d) => d.gt(0) && d.lte(10), 'Coverage factor k must be greater than 0 and at most 10, e.g. 2')),
  weightDensityGPerMl: decimalCheck((d) => d.gt(0) && d.lte(25), 'Calibration-weight density must be greater than 0 and at most 25 g/mL, e.g. 8.0'),
  status: z.enum(BALANCE_INPUT_STATUSES, { error: 'Status is in_service or out_of_service; use retire to retire it' }),
  outputShape: z.enum(LINE_SHAPES, { error: `Output line shape is one of: ${LINE_SHAPES.join(', ')}` }),
  /** printable ASCII only (sent to the balance as is, the line ending appended) */
  printCommand: opt(
    z
      .string({ error: 'Enter the print command as text, e.g. SI' })
      .trim()
      .max(20, 'Use at most 20 characters')
      .regex(/^[\x20-\x7e]+$/, 'Use printable characters only (letters, digits, punctuation); the line ending is added'),
  ),
  printedId: opt(freeText(40)),
  serialBaud: numberOf(SERIAL_BAUDS, `Baud rate is one of: ${SERIAL_BAUDS.join(', ')}`),
  serialDataBits: numberOf(SERIAL_DATA_BITS, 'Data bits are 7 or 8'),
  serialParity: z.enum(SERIAL_PARITIES, { error: `Parity is one of: ${SERIAL_PARITIES.join(', ')}` }),
  serialStopBits: numberOf(SERIAL_STOP_BITS, 'Stop bits are 1 or 2'),
  serialLineEnding: z.enum(SERIAL_LINE_ENDINGS, { error: `Line ending is one of: ${SERIAL_LINE_ENDINGS.join(', ')}` }),
};

function balanceRules(b: Partial<Record<keyof typeof balanceFields, unknown>>, ctx: Ctx, full: boolean) {
  if (dateOk(b.calibratedOn) && dateOk(b.calibrationDueOn) && b.calibrationDueOn <= b.calibratedOn) {
    issue(ctx, ['calibrationDueOn'], 'The calibration due date must be after the calibration date');
  }
  if (full || (b.calibrationUncertaintyMg !== undefined && b.calibrationUncertaintyK !== undefined)) {
    if (b.calibrationUncertaintyMg != null && b.calibrationUncertaintyK == null) {
      issue(ctx, ['calibrationUncertaintyK'], 'The calibration uncertainty needs its coverage factor k, e.g. 2');
    }
  }
  if (decOk(b.readabilityMg) && decOk(b.capacityG) && new Decimal(b.readabilityMg).div(1000).gt(new Decimal(b.capacityG))) {
    issue(ctx, ['readabilityMg'], 'Readability cannot be larger than the capacity');
  }
}

/**
 * When repeatabilitySdMg and readabilityMg are given and minWeightMg is not, the server computes the
 * USP <41> minimum weight 2000·max(s, 0.41·d)·SF and stores it with s, d, SF and the date.
 */
export const balanceCreateInputSchema = z
  .object({
    ...balanceFields,
    weightDensityGPerMl: balanceFields.weightDensityGPerMl.default('8.0'),
    status: balanceFields.status.default('in_service'),
    outputShape: balanceFields.outputShape.default('auto'),
    serialBaud: balanceFields.serialBaud.default(9600),
    serialDataBits: balanceFields.serialDataBits.default(8),
    serialParity: balanceFields.serialParity.default('none'),
    serialStopBits: balanceFields.serialStopBits.default(1),
    serialLineEnding: balanceFields.serialLineEnding.default('crlf'),
  })
  .superRefine((b, ctx) => balanceRules(b, ctx, true));
export type BalanceCreateInput = z.input<typeof balanceCreateInputSchema>;
export type BalanceCreate = z.output<typeof balanceCreateInputSchema>;

export const balanceUpdateInputSchema = z
  .object(balanceFields)
  .partial()
  .superRefine((b, ctx) => balanceRules(b, ctx, false));
export type BalanceUpdateInput = z.input<typeof balanceUpdateInputSchema>;
export type BalanceUpdate = z.output<typeof balanceUpdateInputSchema>;

// ---------------------------------------------------------------------------------------------------
// Volumetric ware
// ---------------------------------------------------------------------------------------------------

export const WARE_INPUT_STATUSES = ['in_service', 'out_of_service'] as const;

const wareFields = {
  identifier: identifierSchema,
  kind: z.enum(WARE_KINDS, { error: `Kind is one of: ${WARE_KINDS.join(', ')}` }),
  nominalVolumeMl: decimalCheck((d) => d.gt(0) && d.lte(10000), 'Nominal volume must be greater than 0 and at most 10000 mL, e.g. 100'),
  class: z.enum(WARE_CLASSES, { error: `Class is one of: ${WARE_CLASSES.join(', ')}` }),
  toleranceMl: opt(positive('Tolerance must be greater than 0 mL, e.g. 0.10')),
  /** e.g. "borosilicate 3.3", "soda-lime", "polypropylene" (thermal expansion). */
  material: opt(freeText(80)),
  status: z.enum(WARE_INPUT_STATUSES, { error: 'Status is in_service or out_of_service; use retire to retire it' }),
};

function wareRules(w: Partial<Record<keyof typeof wareFields, unknown>>, ctx: Ctx) {
  if (decOk(w.toleranceMl) && decOk(w.nominalVolumeMl) && new Decimal(w.toleranceMl).gte(new Decimal(w.nominalVolumeMl))) {
    issue(ctx, ['toleranceMl'], 'Tolerance must be smaller than the nominal volume');
  }
}

export const wareCreateInputSchema = z
  .object({ ...wareFields, status: wareFields.status.default('in_service') })
  .superRefine((w, ctx) => wareRules(w, ctx));
export type WareCreateInput = z.input<typeof wareCreateInputSchema>;
export type WareCreate = z.output<typeof wareCreateInputSchema>;

export const wareUpdateInputSchema = z
  .object(wareFields)
  .partial()
  .superRefine((w, ctx) => wareRules(w, ctx));
export type WareUpdateInput = z.input<typeof wareUpdateInputSchema>;
export type WareUpdate = z.output<typeof wareUpdateInputSchema>;

// ---------------------------------------------------------------------------------------------------
// Solvents and diluents
// ---------------------------------------------------------------------------------------------------

const solventFields = {
  name: requiredName('solvent name'),
  grade: opt(freeText(80)),
  lot: requiredName('lot', 100),
  density20cGPerMl: opt(decimalCheck((d) => d.gt(0) && d.lte(25), 'Density at 20 °C must be greater than 0 and at most 25 g/mL, e.g. 0.9982')),
  expansionCoefficientPerK: opt(
    decimalCheck((d) => d.gt(0) && d.lt('0.01'), 'Expansion coefficient must be greater than 0 and below 0.01 per K, e.g. 0.000207'),
  ),
  expiresOn: opt(isoDateSchema),
  status: z.enum(MATERIAL_INPUT_STATUSES, { error: 'Status is accepted or quarantined; use retire to retire it' }),
};

export const solventCreateInputSchema = z.object({ ...solventFields, status: solventFields.status.default('accepted') });
export type SolventCreateInput = z.input<typeof solventCreateInputSchema>;
export type SolventCreate = z.output<typeof solventCreateInputSchema>;

export const solventUpdateInputSchema = z.object(solventFields).partial();
export type SolventUpdateInput = z.input<typeof solventUpdateInputSchema>;
export type SolventUpdate = z.output<typeof solventUpdateInputSchema>;

// ---------------------------------------------------------------------------------------------------
// Certificates: POST /api/materials/:id/certificates (multipart: file, note)
// ---------------------------------------------------------------------------------------------------

export const CERTIFICATE_MAX_BYTES = 10 * 1024 * 1024;
export const CERTIFICATE_MIME_TYPES = ['application/pdf', 'image/png', 'image/jpeg'] as const;

export const certificateNoteSchema = opt(freeText(500));

export const certificateSchema = z.object({
  id: z.number().int(),
  materialId: z.number().int(),
  version: z.number().int(),
  originalName: z.string(),
  mimeType: z.enum(CERTIFICATE_MIME_TYPES),
  sizeBytes: z.number().int(),
  sha256: z.string(),
  uploadedBy: z.object({ id: z.number().int(), fullName: z.string() }),
  uploadedAt: z.string(),
  note: z.string().nullable(),
});
export type Certificate = z.infer<typeof certificateSchema>;
export const certificateListResponseSchema = z.object({ items: z.array(certificateSchema) });
