/**
 * Units of mass, volume, density and concentration, and conversions between them.
 * Source: SI definitions (exact decimal factors); mass fraction ↔ mass concentration via the solution
 * density (γ = w·ρ), amount ↔ mass concentration via the molar mass (γ = c·M).
 * Validity: exact factors; conversions across kinds need the named extra quantity.
 * Units: base units are g (mass), mL (volume), g/mL (density), g/L (mass concentration),
 * 1 = kg/kg (mass fraction), mol/L (amount concentration). Molar mass in g/mol, solution density g/mL.
 */
import { type Dec, type DecInput, c, toDec } from './decimal.ts';
import { CalcError } from './errors.ts';

export type UnitKind = 'mass' | 'volume' | 'density' | 'massConcentration' | 'massFraction' | 'amountConcentration';

interface UnitDef {
  kind: UnitKind;
  /** factor to the base unit of its kind */
  factor: Dec;
}

const MICRO = 'µ'; // U+00B5 micro sign, the canonical spelling

export const MASS_UNITS = ['µg', 'mg', 'g', 'kg'] as const;
export const VOLUME_UNITS = ['µL', 'mL', 'L'] as const;
export const DENSITY_UNITS = ['g/mL', 'kg/m3', 'g/cm3', 'kg/L'] as const;
export const MASS_CONCENTRATION_UNITS = ['ng/mL', 'µg/L', 'µg/mL', 'mg/L', 'mg/mL', 'g/L'] as const;
export const MASS_FRACTION_UNITS = ['ng/g', 'µg/kg', 'µg/g', 'mg/kg', 'mg/g', 'g/kg'] as const;
export const AMOUNT_CONCENTRATION_UNITS = ['µmol/L', 'mmol/L', 'mol/L'] as const;
export const CONCENTRATION_UNITS = [...MASS_CONCENTRATION_UNITS, ...MASS_FRACTION_UNITS, ...AMOUNT_CONCENTRATION_UNITS] as const;

export type MassUnit = (typeof MASS_UNITS)[number];
export type VolumeUnit = (typeof VOLUME_UNITS)[number];
export type DensityUnit = (typeof DENSITY_UNITS)[number];
export type ConcentrationUnit = (typeof CONCENTRATION_UNITS)[number];

const UNITS: Record<string, UnitDef> = {
  µg: { kind: 'mass', factor: c('1e-6') },
  mg: { kind: 'mass', factor: c('1e-3') },
  g: { kind: 'mass', factor: c('1') },
  kg: { kind: 'mass', factor: c('1000') },
  µL: { kind: 'volume', factor: c('1e-3') },
  mL: { kind: 'volume', factor: c('1') },
  L: { kind: 'volume', factor: c('1000') },
  'g/mL': { kind: 'density', factor: c('1') },
  'g/cm3': { kind: 'density', factor: c('1') },
  'kg/L': { kind: 'density', factor: c('1') },
  'kg/m3': { kind: 'density', factor: c('1e-3') },
  'ng/mL': { kind: 'massConcentration', factor: c('1e-6') },
  'µg/L': { kind: 'massConcentration', factor: c('1e-6') },
  'µg/mL': { kind: 'massConcentration', factor: c('1e-3') },
  'mg/L': { kind: 'massConcentration', factor: c('1e-3') },
  'mg/mL': { kind: 'massConcentration', factor: c('1') },
  'g/L': { kind: 'massConcentration', factor: c('1') },
  'ng/g': { kind: 'massFraction', factor: c('1e-9') },
  'µg/kg': { kind: 'massFraction', factor: c('1e-9') },
  'µg/g': { kind: 'massFraction', factor: c('1e-6') },
  'mg/kg': { kind: 'massFraction', factor: c('1e-6') },
  'mg/g': { kind: 'massFraction', factor: c('1e-3') },
  'g/kg': { kind: 'massFraction', factor: c('1e-3') },
  'µmol/L': { kind: 'amountConcentration', factor: c('1e-6') },
  'mmol/L': { kind: 'amountConcentration', factor: c('1e-3') },
  'mol/L': { kind: 'amountConcentration', factor: c('1') },
};

const KIND_NAMES: Record<UnitKind, string> = {
  mass: 'a mass unit',
  volume: 'a volume unit',
  density: 'a density unit',
  massConcentration: 'a mass concentration',
  massFraction: 'a mass fraction',
  amountConcentration: 'an amount (molar) concentration',
};

const KIND_LISTS: Record<UnitKind, readonly string[]> = {
  mass: MASS_UNITS,
  volume: VOLUME_UNITS,
  density: DENSITY_UNITS,
  massConcentration: MASS_CONCENTRATION_UNITS,
  massFraction: MASS_FRACTION_UNITS,
  amountConcentration: AMOUNT_CONCENTRATION_UNITS,
};

/** Canonical spelling: "ug"/"μg" (Greek mu) → "µg", "uL" → "µL", "ml" → "mL", "l" → "L", "kg/m³" → "kg/m3". */
export function normaliseUnit(unit: string): string {
  if (typeof unit !== 'string') return String(unit);
  let u = unit.trim().replace(/\s+/g, '');
  u = u.replace(/μ/g, MICRO).replace(/³/g, '3');
  u = u.replace(/^u(?=(g|L|l|mol)\b)/, MICRO).replace(/\/u(?=(g|L|l)\b)/, `/${MICRO}`);
  u = u.replace(/^mcg/, `${MICRO}g`);
  u = u.replace(/(^|[µm/])l$/, '$1L').replace(/^l$/, 'L').replace(/ml$/, 'mL');
  u = u.replace(/mol\/l$/, 'mol/L');
  return u;
}

function lookup(unit: string): UnitDef & { name: string } {
  const name = normaliseUnit(unit);
  const def = UNITS[name];
  if (!def) {
    throw new CalcError('unknown_unit', `Unknown unit "${unit}"; use one of ${Object.keys(UNITS).join(', ')}`, {
      details: { unit },
    });
  }
  return { ...def, name };
}

/** The kind of a unit, or undefined when unknown. */
export function unitKind(unit: string): UnitKind | undefined {
  return UNITS[normaliseUnit(unit)]?.kind;
}

export function isConcentrationUnit(unit: string): boolean {
  const k = unitKind(unit);
  return k === 'massConcentration' || k === 'massFraction' || k === 'amountConcentration';
}
export function isMassUnit(unit: string): boolean {
  return unitKind(unit) === 'mass';
}
export function isVolumeUnit(unit: string): boolean {
  return unitKind(unit) === 'volume';
}
export function isDensityUnit(unit: string): boolean {
  return unitKind(unit) === 'density';
}

function expectKind(unit: string, kinds: UnitKind[], what: string): UnitDef & { name: string } {
  const def = lookup(unit);
  if (!kinds.includes(def.kind)) {
    const allowed = kinds.flatMap((k) => KIND_LISTS[k]).join(', ');
    throw new CalcError('unit_mismatch', `${def.name} is ${KIND_NAMES[def.kind]}, not ${what}; use one of ${allowed}`, {
      details: { unit, kind: def.kind },
    });
  }
  return def;
}

function convertSameKind(value: DecInput, from: string, to: string, kind: UnitKind, what: string): Dec {
  const f = expectKind(from, [kind], what);
  const t = expectKind(to, [kind], what);
  return toDec(value).mul(f.factor).div(t.factor);
}

export function convertMass(value: DecInput, from: string, to: string): Dec {
  return convertSameKind(value, from, to, 'mass', 'a mass unit');
}
export function convertVolume(value: DecInput, from: string, to: string): Dec {
  return convertSameKind(value, from, to, 'volume', 'a volume unit');
}
export function convertDensity(value: DecInput, from: string, to: string): Dec {
  return convertSameKind(value, from, to, 'density', 'a density unit');
}

export interface ConcentrationContext {
  /** molar mass of the substance the concentration refers to, g/mol */
  molarMass?: DecInput;
  /** solution density: a value in g/mL, or { value, unit } */
  density?: DecInput | { value: DecInput; unit: string };
}

function densityGPerMl(d: NonNullable<ConcentrationContext['density']>): Dec {
  const v = typeof d === 'object' && d !== null && 'unit' in d ? convertDensity(d.value, d.unit, 'g/mL') : toDec(d as DecInput, 'solution density');
  if (v.lte(0)) throw new CalcError('non_positive', `Solution density must be greater than 0 (got ${v.toString()} g/mL)`, { details: { input: 'density' } });
  return v;
}

/**
 * Convert between concentration units. Same kind: exact factor. Mass fraction ↔ mass concentration
 * needs the solution density; amount ↔ mass concentration needs the molar mass; amount ↔ mass fraction
 * needs both.
 */
export function convertConcentration(value: DecInput, from: string, to: string, ctx: ConcentrationContext = {}): Dec {
  const kinds: UnitKind[] = ['massConcentration', 'massFraction', 'amountConcentration'];
  const f = expectKind(from, kinds, 'a concentration unit');
  const t = expectKind(to, kinds, 'a concentration unit');
  const x = toDec(value).mul(f.factor); // in the base unit of f.kind
  if (f.kind === t.kind) return x.div(t.factor);
  const needDensity = f.kind === 'massFraction' || t.kind === 'massFraction';
  const needMolar = f.kind === 'amountConcentration' || t.kind === 'amountConcentration';
  if (needDensity && ctx.density === undefined) {
    throw new CalcError(
      'unit_mismatch',
      `Cannot convert ${f.name} (${KIND_NAMES[f.kind]}) to ${t.name} (${KIND_NAMES[t.kind]}) without the solution density`,
      { details: { from, to, needs: 'density' } },
    );
  }
  if (needMolar && ctx.molarMass === undefined) {
    throw new CalcError(
      'unit_mismatch',
      `Cannot convert ${f.name} (${KIND_NAMES[f.kind]}) to ${t.name} (${KIND_NAMES[t.kind]}) without the molar mass`,
      { details: { from, to, needs: 'molarMass' } },
    );
  }
  let M: Dec | undefined;
  if (needMolar) {
    M = toDec(ctx.molarMass, 'molar mass');
    if (M.lte(0)) throw new CalcError('non_positive', `Molar mass must be greater than 0 g/mol (got ${M.toString()})`, { details: { input: 'molarMass' } });
  }
  const rhoGPerL = needDensity ? densityGPerMl(ctx.density!).mul(1000) : undefined;
  // to g/L
  let gPerL: Dec;
  if (f.kind === 'massConcentration') gPerL = x;
  else if (f.kind === 'massFraction') gPerL = x.mul(rhoGPerL!);
  else gPerL = x.mul(M!);
  // from g/L
  let out: Dec;
  if (t.kind === 'massConcentration') out = gPerL;
  else if (t.kind === 'massFraction') out = gPerL.div(rhoGPerL!);
  else out = gPerL.div(M!);
  return out.div(t.factor);
}

/** Convert a { value, unit } quantity of any kind to `to` (same kind only). */
export function convertQuantity(value: DecInput, from: string, to: string): Dec {
  const f = lookup(from);
  return convertSameKind(value, from, to, f.kind, KIND_NAMES[f.kind]);
}
