/**
 * Planning gates for a gravimetric standard: checks run before anyone weighs, each returning why it
 * fired (message) and what to do (action), with the numbers.
 *
 * Sources: REQUIREMENTS EQ-01/EQ-02 (no use of a balance that is out of service or past its
 * calibration due date), EQ-04 and OT-04 with USP <41> (block a net weighing below the balance's
 * minimum weight m_min; m_min = 2000 s, at best 820 d, METROLOGY §7), TR-03 (reference material
 * accepted before use), TR-11/EX-04 (no expired inputs), TR-02 (certified value / purity recorded).
 * The 14-day "due soon" notice is common practice (a lab-configurable lead time).
 */
import { D, toDec, type Dec } from '../calc/decimal.ts';
import { CalcError } from '../calc/errors.ts';
import { dayNumber, plural } from './dates.ts';

export const GATE_CODES = [
  'balance_out_of_service',
  'calibration_due_unknown',
  'calibration_overdue',
  'calibration_due_soon',
  'min_weight_unknown',
  'below_min_weight',
  'material_not_accepted',
  'material_expired',
  'material_expiry_unknown',
  'purity_missing',
] as const;
export type GateCode = (typeof GATE_CODES)[number];
export type GateSeverity = 'block' | 'warn';

/** Severity of each gate (fixed; blocks cannot be downgraded by the caller). */
export const GATE_SEVERITY: Readonly<Record<GateCode, GateSeverity>> = {
  balance_out_of_service: 'block',
  calibration_due_unknown: 'block',
  calibration_overdue: 'block',
  calibration_due_soon: 'warn',
  min_weight_unknown: 'warn',
  below_min_weight: 'block',
  material_not_accepted: 'block',
  material_expired: 'block',
  material_expiry_unknown: 'warn',
  purity_missing: 'block',
};

/** Calibration due within this many days (inclusive) gives a warning [common practice]. */
export const CALIBRATION_DUE_SOON_DAYS = 14;

export interface GateBalance {
  identifier: string;
  status: 'in_service' | 'out_of_service';
  /** YYYY-MM-DD; the balance may be used on this day, not after */
  calibrationDueOn?: string;
  minWeightMg?: string;
  readabilityMg: string;
}

export interface GateMaterial {
  name: string;
  status: 'accepted' | 'quarantined' | 'retired';
  /** YYYY-MM-DD; usable on this day, expired from the next */
  expiresOn?: string;
  purityValue?: string;
}

export interface GateInput {
  today: string;
  /** planned balance reading of the solute, mg */
  plannedReadingMg: string;
  balance: GateBalance;
  /** other balances of the lab, to suggest one whose minimum weight the reading meets */
  otherBalances?: GateBalance[];
  material: GateMaterial;
  /** planned made-up volume, mL */
  volumeMl: string;
  /** nominal volumes of the flasks available, mL */
  flaskOptions?: string[];
}

export interface GateSuggestion {
  /** a larger flask that brings the reading up to the minimum weight */
  volumeMl?: string;
  /** the planned reading in that flask, mg, with the balance's decimals */
  readingMg?: string;
  /** a usable balance whose minimum weight the planned reading meets */
  balanceIdentifier?: string;
  /** the smallest volume that would meet the minimum weight on this balance, mL (rounded up) */
  minimumVolumeMl?: string;
}

export interface Gate {
  code: GateCode;
  severity: GateSeverity;
  /** why the gate fired, with the numbers */
  message: string;
  /** what to do about it, with the numbers */
  action: string;
  suggestion?: GateSuggestion;
}

function positive(x: string, name: string): Dec {
  const d = toDec(x, name);
  if (d.lte(0)) throw new CalcError('non_positive', `${name} must be greater than zero, got ${x}`, { field: name });
  return d;
}

function gate(code: GateCode, message: string, action: string, suggestion?: GateSuggestion): Gate {
  return suggestion ? { code, severity: GATE_SEVERITY[code], message, action, suggestion } : { code, severity: GATE_SEVERITY[code], message, action };
}

function fmt(x: Dec, decimals: number): string {
  return x.toDecimalPlaces(decimals, D.ROUND_HALF_UP).toFixed(decimals);
}

/** An other balance that can take the weighing: in service, calibrated today, m_min known and met. */
function usableAlternatives(input: GateInput, readingMg: Dec, today: number): GateBalance[] {
  return (input.otherBalances ?? [])
    .filter((b) => b.identifier !== input.balance.identifier)
    .filter((b) => b.status === 'in_service')
    .filter((b) => b.calibrationDueOn !== undefined && dayNumber(b.calibrationDueOn, `${b.identifier}.calibrationDueOn`) >= today)
    .filter((b) => b.minWeightMg !== undefined && readingMg.gte(toDec(b.minWeightMg, `${b.identifier}.minWeightMg`)))
    .map((b, i) => ({ b, i }))
    // most margin first (smallest minimum weight); equal minimum weights keep the order given
    .sort((x, y) => toDec(x.b.minWeightMg!).cmp(toDec(y.b.minWeightMg!)) || x.i - y.i)
    .map(({ b }) => b);
}

function alternativeText(b: GateBalance | undefined): string {
  return b ? `weigh on ${b.identifier} (minimum weight ${b.minWeightMg} mg, reads to ${new D(b.readabilityMg).toString()} mg)` : '';
}

/**
 * Evaluate every planning gate. Returns the gates that fired, in the order of GATE_CODES
 * (balance, then weighing, then material); an empty array means planning may proceed.
 * Throws CalcError for malformed input (not a date, not a positive decimal).
 */
export function evaluateGates(input: GateInput): Gate[] {
  const today = dayNumber(input.today, 'today');
  const reading = positive(input.plannedReadingMg, 'plannedReadingMg');
  const volume = positive(input.volumeMl, 'volumeMl');
  const bal = input.balance;
  const decimals = positive(bal.readabilityMg, 'balance.readabilityMg').decimalPlaces();
  const readingText = input.plannedReadingMg.trim();
  const alternatives = usableAlternatives(input, reading, today);
  const alt = alternatives[0];
  const out: Gate[] = [];

  // --- balance status (EQ-01, EQ-02)
  if (bal.status !== 'in_service') {
    out.push(
      gate(
        'balance_out_of_service',
        `${bal.identifier} is out of service`,
        alt
          ? `Do not weigh on ${bal.identifier}; ${alternativeText(alt)}`
          : `Do not weigh on ${bal.identifier}; choose an in-service, calibrated balance whose minimum weight is at most ${readingText} mg`,
        alt ? { balanceIdentifier: alt.identifier } : undefined,
      ),
    );
  }
  if (bal.calibrationDueOn === undefined || bal.calibrationDueOn === '') {
    out.push(
      gate(
        'calibration_due_unknown',
        `${bal.identifier} has no calibration due date, so its calibration status is unknown`,
        `Ask the equipment custodian to record the calibration due date of ${bal.identifier}${alt ? `, or ${alternativeText(alt)}` : ''}`,
        alt ? { balanceIdentifier: alt.identifier } : undefined,
      ),
    );
  } else {
    const due = dayNumber(bal.calibrationDueOn, 'balance.calibrationDueOn');
    if (due < today) {
      out.push(
        gate(
          'calibration_overdue',
          `Calibration of ${bal.identifier} was due on ${bal.calibrationDueOn} (${plural(today - due, 'day')} ago)`,
          `Do not weigh on ${bal.identifier} until it is recalibrated${alt ? `; ${alternativeText(alt)}` : '; choose a calibrated balance'}`,
          alt ? { balanceIdentifier: alt.identifier } : undefined,
        ),
      );
    } else if (due - today <= CALIBRATION_DUE_SOON_DAYS) {
      const when = due === today ? 'today' : `in ${plural(due - today, 'day')}`;
      out.push(
        gate(
          'calibration_due_soon',
          `Calibration of ${bal.identifier} is due on ${bal.calibrationDueOn} (${when})`,
          `${bal.identifier} may be used up to and including ${bal.calibrationDueOn}; book its calibration with the equipment custodian`,
        ),
      );
    }
  }

  // --- minimum weight (USP <41>, EQ-04, OT-04)
  if (bal.minWeightMg === undefined || bal.minWeightMg === '') {
    const floor = positive(bal.readabilityMg, 'balance.readabilityMg').times(820);
    const below = reading.lt(floor);
    out.push(
      gate(
        'min_weight_unknown',
        `${bal.identifier} has no recorded minimum weight, so the planned reading ${readingText} mg cannot be checked against it` +
          (below ? `; it is below ${fmt(floor, decimals)} mg (820 d), the lowest minimum weight any balance reading to ${new D(bal.readabilityMg).toString()} mg can have under USP <41>` : ''),
        `Have the minimum weight of ${bal.identifier} determined (USP <41>: m_min = 2000 · s, with s at least 0.41 d, so at least ${fmt(floor, decimals)} mg)` +
          (alt ? `, or ${alternativeText(alt)}` : ''),
        alt ? { balanceIdentifier: alt.identifier } : undefined,
      ),
    );
  } else {
    const mmin = positive(bal.minWeightMg, 'balance.minWeightMg');
    if (reading.lt(mmin)) {
      // the solute mass, hence the reading, scales with the made-up volume at a fixed concentration
      const larger = (input.flaskOptions ?? [])
        .map((v, i) => ({ text: v.trim(), v: positive(v, `flaskOptions.${i}`) }))
        .filter(({ v }) => v.gt(volume))
        .sort((a, b) => a.v.cmp(b.v))
        .find(({ v }) => reading.times(v).div(volume).gte(mmin));
      const minVolume = volume.times(mmin).div(reading).toDecimalPlaces(1, D.ROUND_UP);
      const suggestion: GateSuggestion = { minimumVolumeMl: minVolume.toString() };
      const parts: string[] = [];
      if (larger) {
        const newReading = fmt(reading.times(larger.v).div(volume), decimals);
        suggestion.volumeMl = larger.text;
        suggestion.readingMg = newReading;
        parts.push(
          `make up ${larger.text} mL instead of ${input.volumeMl.trim()} mL (same concentration): the planned reading becomes ${newReading} mg, at or above ${bal.minWeightMg} mg`,
        );
      }
      if (alt) {
        suggestion.balanceIdentifier = alt.identifier;
        parts.push(alternativeText(alt));
      }
      let action: string;
      if (parts.length > 0) {
        action = parts.join('; or ');
        action = action.charAt(0).toUpperCase() + action.slice(1);
      } else {
        action =
          `Make up at least ${minVolume.toString()} mL (the reading scales with the volume) or use a balance whose minimum weight is at most ${readingText} mg` +
          `; none of the listed flasks${(input.otherBalances ?? []).length ? ' or balances' : ''} is enough`;
      }
      out.push(gate('below_min_weight', `Planned reading ${readingText} mg is below the minimum weight ${bal.minWeightMg} mg of ${bal.identifier}`, action, suggestion));
    }
  }

  // --- reference material (TR-03, TR-11, EX-04, TR-02)
  const mat = input.material;
  if (mat.status !== 'accepted') {
    out.push(
      gate(
        'material_not_accepted',
        `Reference material ${mat.name} is ${mat.status}, not accepted for use`,
        mat.status === 'quarantined'
          ? `Complete the receipt check and acceptance of ${mat.name}, or choose an accepted lot`
          : `${mat.name} is retired and cannot be used; choose an accepted lot`,
      ),
    );
  }
  if (mat.expiresOn === undefined || mat.expiresOn === '') {
    out.push(
      gate(
        'material_expiry_unknown',
        `Reference material ${mat.name} has no expiry date, so the standard's expiry cannot be capped by it`,
        `Record the expiry (or period of validity) from the certificate of ${mat.name}`,
      ),
    );
  } else {
    const exp = dayNumber(mat.expiresOn, 'material.expiresOn');
    if (exp < today) {
      out.push(
        gate(
          'material_expired',
          `Reference material ${mat.name} expired on ${mat.expiresOn} (${plural(today - exp, 'day')} ago)`,
          `Choose an unexpired lot; an expiry can only be extended with documented evidence and QA approval`,
        ),
      );
    }
  }
  const purity = mat.purityValue?.trim() ?? '';
  if (purity === '') {
    out.push(
      gate(
        'purity_missing',
        `Reference material ${mat.name} has no purity or certified value, so the concentration cannot be calculated`,
        `Enter the purity (certified value) from the certificate of ${mat.name}`,
      ),
    );
  } else {
    let valid = true;
    try {
      valid = toDec(purity).gt(0);
    } catch {
      valid = false;
    }
    if (!valid) {
      out.push(
        gate(
          'purity_missing',
          `The purity "${mat.purityValue}" of ${mat.name} is not a positive number`,
          `Correct the purity (certified value) of ${mat.name} from its certificate`,
        ),
      );
    }
  }
  return out;
}
