/**
 * Maximum permissible errors of volumetric ware, stored as data with their sources.
 * Quantity: maximum permissible error (± volume at the 20 °C reference temperature) of one-mark flasks
 * (ISO 1042), one-mark (bulb) pipettes (ISO 648), burettes (ISO 385) and air-displacement piston pipettes
 * (ISO 8655-2, systematic and random limits). Cubic expansion coefficients of the vessel materials.
 * Source: each table names its standard and whether its numbers are from memory (the purchased standard
 * could not be opened here; METROLOGY.md §4.3–4.5). A lab that holds the standard should check these rows;
 * a check may always carry the lab's own limit instead (`limits` in the request), which then names its source.
 * Validity: the nominal volumes listed; other nominal volumes have no tabulated limit.
 * Units: glass tables in mL, piston pipette table in µL; γ in K⁻¹.
 */

export type CheckWareKind = 'bulb_pipette' | 'volumetric_flask' | 'piston_pipette' | 'burette';
export type CheckWareMaterial = 'borosilicate_3_3' | 'soda_lime' | 'polypropylene';

export const CHECK_WARE_KINDS: readonly CheckWareKind[] = ['bulb_pipette', 'volumetric_flask', 'piston_pipette', 'burette'];
export const CHECK_WARE_MATERIALS: readonly CheckWareMaterial[] = ['borosilicate_3_3', 'soda_lime', 'polypropylene'];

export interface GlassToleranceTable {
  kind: Exclude<CheckWareKind, 'piston_pipette'>;
  standard: string;
  unit: 'mL';
  /** class A maximum permissible error, ± mL, by nominal volume (mL, as written in the standard) */
  classA: Readonly<Record<string, string>>;
  /** class B = factor × class A */
  classBFactor: string;
  source: string;
  fromMemory: boolean;
}

export interface PistonToleranceRow {
  /** nominal volume, µL */
  nominal: string;
  /** maximum permissible systematic error, ± µL */
  systematic: string;
  /** maximum permissible random error (repeatability standard deviation), µL */
  random: string;
}

export interface PistonToleranceTable {
  kind: 'piston_pipette';
  standard: string;
  unit: 'µL';
  rows: readonly PistonToleranceRow[];
  source: string;
  fromMemory: boolean;
}

export const ISO_1042_FLASKS: GlassToleranceTable = Object.freeze({
  kind: 'volumetric_flask',
  standard: 'ISO 1042 (one-mark volumetric flasks)',
  unit: 'mL',
  classA: Object.freeze({ '5': '0.025', '10': '0.025', '20': '0.04', '25': '0.04', '50': '0.06', '100': '0.10', '200': '0.15', '250': '0.15', '500': '0.25', '1000': '0.40', '2000': '0.60' }),
  classBFactor: '2',
  source: 'ISO 1042 class A table as recalled in METROLOGY.md §4.4 (from memory); class B = 2 × class A (from memory for ISO)',
  fromMemory: true,
}) as GlassToleranceTable;

export const ISO_648_BULB_PIPETTES: GlassToleranceTable = Object.freeze({
  kind: 'bulb_pipette',
  standard: 'ISO 648 (one-mark pipettes)',
  unit: 'mL',
  classA: Object.freeze({ '1': '0.008', '2': '0.010', '5': '0.015', '10': '0.020', '20': '0.030', '25': '0.030', '50': '0.050', '100': '0.080' }),
  classBFactor: '2',
  source: 'ISO 648 class A table as recalled in METROLOGY.md §4.4 (from memory); class B = 2 × class A (from memory)',
  fromMemory: true,
}) as GlassToleranceTable;

export const ISO_385_BURETTES: GlassToleranceTable = Object.freeze({
  kind: 'burette',
  standard: 'ISO 385 (burettes)',
  unit: 'mL',
  classA: Object.freeze({ '5': '0.01', '10': '0.02', '25': '0.03', '50': '0.05', '100': '0.10' }),
  classBFactor: '2',
  source: 'ISO 385 class A limits for the total nominal delivery, from memory (not in METROLOGY.md); class B = 2 × class A (from memory)',
  fromMemory: true,
}) as GlassToleranceTable;

export const ISO_8655_2_PISTON_PIPETTES: PistonToleranceTable = Object.freeze({
  kind: 'piston_pipette',
  standard: 'ISO 8655-2:2002 (air-displacement piston pipettes)',
  unit: 'µL',
  rows: Object.freeze([
    { nominal: '1', systematic: '0.05', random: '0.05' },
    { nominal: '2', systematic: '0.08', random: '0.04' },
    { nominal: '5', systematic: '0.125', random: '0.075' },
    { nominal: '10', systematic: '0.12', random: '0.08' },
    { nominal: '20', systematic: '0.20', random: '0.10' },
    { nominal: '50', systematic: '0.50', random: '0.20' },
    { nominal: '100', systematic: '0.8', random: '0.3' },
    { nominal: '200', systematic: '1.6', random: '0.6' },
    { nominal: '500', systematic: '4.0', random: '1.5' },
    { nominal: '1000', systematic: '8.0', random: '3.0' },
    { nominal: '2000', systematic: '16', random: '6.0' },
    { nominal: '5000', systematic: '40', random: '15' },
    { nominal: '10000', systematic: '60', random: '30' },
  ]),
  source:
    'ISO 8655-2:2002 Table 1 (µL limits at nominal volume, applied at every tested volume of a variable pipette): rows 10, 20, 100, 200, 1000, 5000, 10 000 µL as in METROLOGY.md §4.5, the other rows from memory; all from memory, the 2022 revision not checked',
  fromMemory: true,
}) as PistonToleranceTable;

export const GLASS_TOLERANCE_TABLES: Readonly<Record<GlassToleranceTable['kind'], GlassToleranceTable>> = Object.freeze({
  volumetric_flask: ISO_1042_FLASKS,
  bulb_pipette: ISO_648_BULB_PIPETTES,
  burette: ISO_385_BURETTES,
});

export interface ExpansionCoefficient {
  /** cubic expansion coefficient γ, K⁻¹ */
  value: string;
  /** rectangular half-width of γ, K⁻¹ (common practice) */
  halfWidth: string;
  source: string;
}

/** γ of the vessel material (METROLOGY.md §4.3). */
export const EXPANSION_COEFFICIENTS: Readonly<Record<CheckWareMaterial, ExpansionCoefficient>> = Object.freeze({
  borosilicate_3_3: { value: '9.9e-6', halfWidth: '1e-6', source: 'borosilicate glass 3.3, 9.9 × 10⁻⁶ K⁻¹ (cited to ISO 4787:2010 in an independent implementation; METROLOGY §4.3)' },
  soda_lime: { value: '27e-6', halfWidth: '3e-6', source: 'soda-lime glass, 27 × 10⁻⁶ K⁻¹ (same source; METROLOGY §4.3)' },
  polypropylene: { value: '4.5e-4', halfWidth: '1.5e-4', source: 'polypropylene, 3–4.5 × 10⁻⁴ K⁻¹ from memory (METROLOGY §4.3); use the maker’s value where known' },
});

/** A source text as printed or shown: without the internal document references stored beside it (METROLOGY.md §…). */
export function withoutInternalRefs(text: string): string {
  return text
    .replace(/\s*(?:as recalled|as) in METROLOGY(?:\.md)?\s*§[\d.–-]+/g, '')
    .replace(/\s*\(not in METROLOGY(?:\.md)?\)/g, '')
    .replace(/[;,]?\s*METROLOGY(?:\.md)?\s*§[\d.–-]+/g, '')
    .replace(/\(\s*\)/g, '')
    .replace(/\s{2,}/g, ' ')
    .trim();
}

/** A limit's source as printed or shown; "from memory" is said once. */
export function limitSourceText(source: string, fromMemory: boolean): string {
  const clean = withoutInternalRefs(source);
  return fromMemory && !/from memory/i.test(clean) ? `${clean} (from memory; check against the standard)` : clean;
}
