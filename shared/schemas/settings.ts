import { z } from 'zod';
import { lineText } from './text.ts';
import { decimalCheck, decimalInRange } from './decimal-text.ts';

export const ROUNDING_RULES = ['half-even', 'half-up'] as const;
export type RoundingRule = (typeof ROUNDING_RULES)[number];

function isTimeZone(tz: string): boolean {
  try {
    new Intl.DateTimeFormat('en-GB', { timeZone: tz });
    return true;
  } catch {
    return false;
  }
}

/**
 * Default room conditions offered on a new weighing. The ranges are those of the CIPM-2007 air-density
 * equation (15–27 °C, 600–1100 hPa, 0–100 % RH; from memory, check against the published paper).
 */
export const roomConditionsSchema = z.object({
  temperatureC: decimalInRange('15', '27', 'Temperature must be between 15 and 27 °C'),
  pressureHPa: decimalInRange('600', '1100', 'Pressure must be between 600 and 1100 hPa'),
  relativeHumidityPct: decimalInRange('0', '100', 'Relative humidity must be between 0 and 100 %'),
});
export type RoomConditions = z.infer<typeof roomConditionsSchema>;

export const STABILITY_RULE_KINDS = ['stock', 'dilution', 'series_level', 'mix'] as const;

/**
 * A stability rule (REQUIREMENTS EX-02): the period a kind of solution keeps, and the study or SOP it rests on.
 * A rule applies when every condition it states holds; the most specific applicable rule wins (ties: first listed).
 */
export const stabilityRuleSchema = z.object({
  id: lineText({ error: 'Give the rule an id, e.g. SR-12' }).trim().min(1, 'Give the rule an id, e.g. SR-12').max(40, 'Use at most 40 characters'),
  appliesTo: z.object({
    kind: z.enum(STABILITY_RULE_KINDS, { error: `Kind is one of: ${STABILITY_RULE_KINDS.join(', ')}` }).optional(),
    analyteFormula: lineText().trim().min(1, 'Enter the analyte formula, e.g. Pb').max(60, 'Use at most 60 characters').optional(),
    /** applies only at or below this mass concentration, mg/L (decimal string) */
    maxConcentrationMgL: decimalCheck((d) => d.gt(0), 'Use a concentration greater than 0 mg/L').optional(),
  }),
  days: z.number({ error: 'Enter a whole number of days' }).int('Enter a whole number of days').min(0, 'Use 0 to 3650 days').max(3650, 'Use 0 to 3650 days'),
  basis: lineText({ error: 'Say where the period comes from (study or SOP)' }).trim().min(1, 'Say where the period comes from (study or SOP)').max(200, 'Use at most 200 characters'),
  /** how solutions under this rule are stored (printed on their labels); unset: settings.solutionStorage */
  storage: lineText({ error: 'Say how the solutions are stored' }).trim().min(1, 'Say how the solutions are stored').max(120, 'Use at most 120 characters').optional(),
});
export type StabilityRule = z.infer<typeof stabilityRuleSchema>;

export const labSettingsSchema = z.object({
  labName: lineText({ error: 'Enter the laboratory name' }).trim().min(1, 'Enter the laboratory name').max(120, 'Use at most 120 characters'),
  idPrefix: z
    .string({ error: 'Enter an ID prefix' })
    .trim()
    .regex(/^[A-Z][A-Z0-9]{1,7}$/, 'Use 2 to 8 capital letters or digits, starting with a letter, e.g. HWL'),
  timeZone: z.string({ error: 'Enter a time zone' }).refine(isTimeZone, 'Enter an IANA time zone, e.g. Europe/London'),
  defaultRoomConditions: roomConditionsSchema,
  /** Allowed deviation of an actual weighing from its planned mass, in percent of the target. */
  readingWindowPct: decimalCheck((d) => d.gt(0) && d.lte(50), 'Use a window greater than 0 and at most 50 %'),
  roundingRule: z.enum(ROUNDING_RULES, { error: `Choose one of: ${ROUNDING_RULES.join(', ')}` }),
  /** Stability period of a new preparation in days, and where it comes from (unset: DEFAULT_STABILITY_DAYS). */
  defaultStabilityDays: z.number({ error: 'Enter a whole number of days' }).int('Enter a whole number of days').min(0, 'Use 0 to 3650 days').max(3650, 'Use 0 to 3650 days').optional(),
  defaultStabilityBasis: lineText({ error: 'Say where the stability period comes from' }).trim().min(1, 'Say where the stability period comes from').max(200, 'Use at most 200 characters').optional(),
  /** Stability rules by kind, analyte and concentration (unset or none applicable: the default period above). */
  stabilityRules: z.array(stabilityRuleSchema).max(100, 'Use at most 100 rules').optional(),
  /** Days before expiry that a standard appears in the daily expiry digest to its preparer (unset: DEFAULT_EXPIRY_NOTICE_DAYS). */
  expiryNoticeDays: z.number({ error: 'Enter a whole number of days' }).int('Enter a whole number of days').min(0, 'Use 0 to 365 days').max(365, 'Use 0 to 365 days').optional(),
  /** Minutes without activity after which a session ends (unset: DEFAULT_SESSION_IDLE_MINUTES; Annex 11 §12). */
  sessionIdleMinutes: z.number({ error: 'Enter a whole number of minutes' }).int('Enter a whole number of minutes').min(5, 'Use 5 to 480 minutes').max(480, 'Use 5 to 480 minutes').optional(),
  /** How prepared solutions are stored, printed on their labels (a stability rule may say otherwise; unset: DEFAULT_SOLUTION_STORAGE). */
  solutionStorage: lineText({ error: 'Say how prepared solutions are stored' }).trim().min(1, 'Say how prepared solutions are stored').max(120, 'Use at most 120 characters').optional(),
  /**
   * Budgets of new preparations use the calibrated volume of a flask or pipette (the mean at 20 °C and u = U/k of
   * its latest verified, passed, in-date volume check at the volume used) instead of the nominal volume and the
   * class tolerance (unset: off). Records already written keep the volumes they were computed with.
   */
  useCalibratedVolumes: z.boolean({ error: 'Choose on or off' }).optional(),
  /** Accept a reading the balance marked unstable (stored flagged "unstable_allowed"); unset or false: refused (issue 15). */
  allowUnstableReadings: z.boolean({ error: 'Choose on or off' }).optional(),
});

/** Used when settings.sessionIdleMinutes is unset (common practice for shared lab terminals: 30 min). */
export const DEFAULT_SESSION_IDLE_MINUTES = 30;

/** Used when settings.solutionStorage is unset: a lab rule to replace with the lab's own (common practice for aqueous standards). */
export const DEFAULT_SOLUTION_STORAGE = 'Tightly closed, room temperature, away from light';

/** Used when settings.expiryNoticeDays is unset (a lab choice, common practice: two weeks' notice). */
export const DEFAULT_EXPIRY_NOTICE_DAYS = 14;

/** Used when settings.defaultStabilityDays is unset (METROLOGY §10: a lab-editable default, not science). */
export const DEFAULT_STABILITY_DAYS = 30;
export const DEFAULT_STABILITY_BASIS = 'lab rule; replace with your validated stability data';
export type LabSettings = z.infer<typeof labSettingsSchema>;

/** PUT /api/settings: any subset; `defaultRoomConditions` may itself be partial. */
export const updateLabSettingsInputSchema = labSettingsSchema
  .extend({ defaultRoomConditions: roomConditionsSchema.partial() })
  .partial();
export type UpdateLabSettingsInput = z.infer<typeof updateLabSettingsInputSchema>;

export const DEFAULT_LAB_SETTINGS: LabSettings = {
  labName: 'Harbourside Water Laboratory',
  idPrefix: 'HWL',
  timeZone: 'Europe/London',
  defaultRoomConditions: { temperatureC: '20.0', pressureHPa: '1013', relativeHumidityPct: '50' },
  readingWindowPct: '5',
  roundingRule: 'half-even',
};
