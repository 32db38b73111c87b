/**
 * Plausible ranges of the quantities a calculation takes (issue 10 §5). Outside them an entry is a slip (a unit
 * or an exponent typed wrongly), and the calculation would answer with a number of hundreds of digits; the API
 * answers 400 naming the field instead. Each bound states its reason. The ranges are wide on purpose: every
 * demo value and every value a laboratory meets lies well inside them.
 *
 * Quantities with a unit are compared after conversion to the unit named in the bound (shared/calc/units.ts).
 */
import Decimal from 'decimal.js';
import { z } from 'zod';
import { DECIMAL_TEXT } from './decimal-text.ts';
import { convertConcentration, convertDensity, convertMass, convertVolume, unitKind } from '../calc/units.ts';

export interface Range {
  min: string;
  max: string;
  unit: string;
  /** why the bounds are where they are */
  reason: string;
}

export const PLAUSIBLE = {
  /** Mass fraction of the analyte-bearing compound in the material. */
  purity: {
    min: '0.5',
    max: '1',
    unit: '',
    reason: 'a mass fraction; a material that is less than half the stated compound is not used to make a standard, and 0.5 catches a % typed as a fraction slip (e.g. 0.0999 for 99.9 %)',
  },
  /** Standard, expanded or half-width uncertainty of the purity. */
  purityUncertainty: { min: '0', max: '0.5', unit: '', reason: 'an uncertainty larger than half the mass fraction carries no information about the purity' },
  /** Coverage factor k of an expanded uncertainty. */
  coverageFactor: { min: '1', max: '15', unit: '', reason: 'k is at least 1 (k = 1 is the standard uncertainty); Student t95 for one degree of freedom is 12.71 (GUM Table G.2)' },
  /** Volume of the flask or solution. */
  volume: { min: '0.01', max: '10000', unit: 'mL', reason: '0.01 mL is the smallest volume a laboratory makes up; 10 L is the largest volumetric vessel (a carboy)' },
  /** A delivered or planned aliquot. */
  aliquot: { min: '0.0001', max: '10000', unit: 'mL', reason: '0.1 µL is the smallest piston-pipette setting; nothing delivers more than the largest flask (10 L)' },
  /** Mass concentration of the target. */
  massConcentration: {
    min: '1e-9',
    max: '2500000',
    unit: 'mg/L',
    reason: 'a litre of solution weighs at most about 2.5 kg (the densest aqueous solutions), so it cannot hold more than 2 500 000 mg of analyte; below 1 pg/L no method measures',
  },
  /** Mass fraction of the target. */
  massFraction: { min: '1e-9', max: '1000000', unit: 'mg/kg', reason: 'a kilogram of solution holds at most 1 000 000 mg of analyte; below 1 pg/kg no method measures' },
  /** Amount concentration of the target. */
  amountConcentration: { min: '1e-15', max: '60', unit: 'mol/L', reason: 'pure water is 55.5 mol/L; no solution used as a standard holds more than 60 mol of analyte per litre' },
  /** Density of a solid or liquid material. */
  materialDensity: { min: '0.5', max: '23', unit: 'g/mL', reason: 'lithium (0.53 g/cm³) is the lightest solid element and osmium (22.59 g/cm³) the densest substance' },
  /** Density of a solution. */
  solutionDensity: { min: '0.5', max: '2.5', unit: 'g/mL', reason: 'solutions a laboratory makes lie between light solvents (about 0.6) and dense salt solutions (about 2.4 g/mL)' },
  /** Density of the balance's adjustment weights. */
  weightDensity: { min: '2', max: '22', unit: 'g/mL', reason: 'weights are made of aluminium (2.7 g/cm³) up to platinum–iridium (21.5 g/cm³); OIML R 111-1 reference is 8.0' },
  /** Density of air given directly. */
  airDensity: {
    min: '0.0006',
    max: '0.0014',
    unit: 'g/mL',
    reason: 'air within the CIPM-2007 range (15–27 °C, 600–1100 hPa, 0–100 % RH) is 0.70–1.33 kg/m³',
  },
  /** A balance reading, readability or standard uncertainty. */
  balanceMass: { min: '0', max: '50000', unit: 'g', reason: 'bench balances weigh up to about 50 kg' },
  readability: { min: '0.0000001', max: '1', unit: 'g', reason: 'from an ultra-microbalance (0.1 µg) to a top-loading balance (1 g)' },
  /** Planned final mass of a gravimetric dilution. */
  finalMass: { min: '0.01', max: '50000', unit: 'g', reason: 'from a 10 mg micro-vial to what a bench balance weighs (about 50 kg)' },
} as const satisfies Record<string, Range>;

const dec = (s: unknown): Decimal | null => (typeof s === 'string' && DECIMAL_TEXT.test(s.trim()) ? new Decimal(s.trim()) : null);

const fmt = (r: Range) => `${r.min}${r.unit ? ` ${r.unit}` : ''} and ${r.max}${r.unit ? ` ${r.unit}` : ''}`;

/** The message for a value outside `r` (in r.unit), or null inside (or when it is not a number: the format check says so). */
export function outside(value: Decimal | null, r: Range, what: string): string | null {
  if (value === null) return null;
  return value.gte(r.min) && value.lte(r.max) ? null : `Enter ${what} between ${fmt(r)} (${r.reason})`;
}

/** Converts a { value, unit } to `to`; null when either is not usable (other checks report that). */
function converted(value: unknown, unit: unknown, to: string, kind: 'volume' | 'density' | 'mass'): Decimal | null {
  const v = dec(value);
  if (v === null || typeof unit !== 'string') return null;
  try {
    const f = kind === 'volume' ? convertVolume : kind === 'density' ? convertDensity : convertMass;
    return new Decimal(f(v.toString(), unit, to).toString());
  } catch {
    return null;
  }
}

/** A plain decimal string (no unit) within `r`. */
export function inRange(r: Range, what: string) {
  return (s: string, ctx: z.RefinementCtx) => {
    const m = outside(dec(s), r, what);
    if (m) ctx.addIssue({ code: 'custom', message: m });
  };
}

type Ctx = z.RefinementCtx;
const add = (ctx: Ctx, path: (string | number)[], message: string | null) => {
  if (message) ctx.addIssue({ code: 'custom', path, message });
};

/** A concentration { value, unit } within the range of its kind; the issue goes on `value`. */
export function checkConcentration(q: { value?: unknown; unit?: unknown }, ctx: Ctx, what = 'the target concentration') {
  const v = dec(q.value);
  if (v === null || typeof q.unit !== 'string') return;
  const kind = unitKind(q.unit);
  const r = kind === 'massConcentration' ? PLAUSIBLE.massConcentration : kind === 'massFraction' ? PLAUSIBLE.massFraction : kind === 'amountConcentration' ? PLAUSIBLE.amountConcentration : null;
  if (!r) return;
  let inUnit: Decimal;
  try {
    inUnit = new Decimal(convertConcentration(v.toString(), q.unit, r.unit).toString());
  } catch {
    return;
  }
  add(ctx, ['value'], outside(inUnit, r, what));
}

/** A { value, unit } volume, density or mass within `r`; the issue goes on `value`. */
export function checkQuantity(kind: 'volume' | 'density' | 'mass', r: Range, what: string) {
  return (q: { value?: unknown; unit?: unknown }, ctx: Ctx) => add(ctx, ['value'], outside(converted(q.value, q.unit, r.unit, kind), r, what));
}
