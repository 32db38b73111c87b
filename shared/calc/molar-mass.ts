/**
 * Molar masses from formulas, and gravimetric factors (analyte mass fraction of a compound).
 * Source: our own table of IUPAC/CIAAW abridged standard atomic weights (5 significant digits) with
 * their ± half-widths; conventional values for interval elements (CIAAW); Pb 207.2 ± 1.1.
 * Uncertainty: abridged ± taken as rectangular half-width (u = a/√3, QUAM convention); atoms of the
 * same element fully correlated (count × u), elements combined in quadrature.
 * Validity: natural isotopic composition only (isotopically labelled formulas are rejected).
 * Units: g/mol; gravimetric factor dimensionless (g analyte per g compound).
 * Parsing: mf-parser gives the atom counts; hydrate notations are normalised first, because
 * "CuSO4.5H2O" would otherwise parse as O4.5.
 */
import { MF } from 'mf-parser';
import { D, type Dec, c } from './decimal.ts';
import { CalcError } from './errors.ts';

export interface AtomicWeight {
  value: Dec;
  /** abridged ± half-width */
  halfWidth: Dec;
}

function aw(value: string, halfWidth: string): AtomicWeight {
  return { value: c(value), halfWidth: c(halfWidth) };
}

/**
 * Abridged standard atomic weights. Rows marked [T] are transcribed from our METROLOGY reference
 * (§8, CIAAW abridged table); all other rows are from memory of the CIAAW abridged table and should be
 * checked against ciaaw.org before being relied on.
 */
export const ATOMIC_WEIGHTS: Readonly<Record<string, AtomicWeight>> = Object.freeze({
  H: aw('1.0080', '0.0002'), // [T] conventional, interval element
  He: aw('4.0026', '0.0001'),
  Li: aw('6.94', '0.06'), // [T] conventional, interval element
  Be: aw('9.0122', '0.0001'),
  B: aw('10.81', '0.02'), // [T] conventional, interval element
  C: aw('12.011', '0.002'), // [T] conventional, interval element
  N: aw('14.007', '0.001'), // [T] conventional, interval element
  O: aw('15.999', '0.001'), // [T] conventional, interval element
  F: aw('18.998', '0.001'),
  Ne: aw('20.180', '0.001'),
  Na: aw('22.990', '0.001'), // [T]
  Mg: aw('24.305', '0.002'), // [T] conventional, interval element
  Al: aw('26.982', '0.001'),
  Si: aw('28.085', '0.001'),
  P: aw('30.974', '0.001'), // [T]
  S: aw('32.06', '0.02'), // [T] conventional, interval element
  Cl: aw('35.45', '0.01'), // [T] conventional, interval element
  Ar: aw('39.95', '0.16'),
  K: aw('39.098', '0.001'), // [T]
  Ca: aw('40.078', '0.004'), // [T]
  Sc: aw('44.956', '0.001'),
  Ti: aw('47.867', '0.001'),
  V: aw('50.942', '0.001'),
  Cr: aw('51.996', '0.001'),
  Mn: aw('54.938', '0.001'),
  Fe: aw('55.845', '0.002'), // [T]
  Co: aw('58.933', '0.001'),
  Ni: aw('58.693', '0.001'),
  Cu: aw('63.546', '0.003'), // [T]
  Zn: aw('65.38', '0.02'), // [T]
  Ga: aw('69.723', '0.001'),
  Ge: aw('72.630', '0.008'),
  As: aw('74.922', '0.001'),
  Se: aw('78.971', '0.008'),
  Br: aw('79.904', '0.003'), // [T] conventional, interval element
  Kr: aw('83.798', '0.002'),
  Rb: aw('85.468', '0.001'),
  Sr: aw('87.62', '0.01'),
  Y: aw('88.906', '0.001'),
  Zr: aw('91.224', '0.002'),
  Nb: aw('92.906', '0.001'),
  Mo: aw('95.95', '0.01'),
  Ru: aw('101.07', '0.02'),
  Rh: aw('102.91', '0.01'),
  Pd: aw('106.42', '0.01'),
  Ag: aw('107.87', '0.01'),
  Cd: aw('112.41', '0.01'), // [T]
  In: aw('114.82', '0.01'),
  Sn: aw('118.71', '0.01'),
  Sb: aw('121.76', '0.01'),
  Te: aw('127.60', '0.03'),
  I: aw('126.90', '0.01'), // [T]
  Xe: aw('131.29', '0.01'),
  Cs: aw('132.91', '0.01'),
  Ba: aw('137.33', '0.01'),
  La: aw('138.91', '0.01'),
  Ce: aw('140.12', '0.01'),
  Pr: aw('140.91', '0.01'),
  Nd: aw('144.24', '0.01'),
  Sm: aw('150.36', '0.02'),
  Eu: aw('151.96', '0.01'),
  Gd: aw('157.25', '0.03'),
  Tb: aw('158.93', '0.01'),
  Dy: aw('162.50', '0.01'),
  Ho: aw('164.93', '0.01'),
  Er: aw('167.26', '0.01'),
  Tm: aw('168.93', '0.01'),
  Yb: aw('173.05', '0.02'),
  Lu: aw('174.97', '0.01'),
  Hf: aw('178.49', '0.01'),
  Ta: aw('180.95', '0.01'),
  W: aw('183.84', '0.01'),
  Re: aw('186.21', '0.01'),
  Os: aw('190.23', '0.03'),
  Ir: aw('192.22', '0.01'),
  Pt: aw('195.08', '0.02'),
  Au: aw('196.97', '0.01'),
  Hg: aw('200.59', '0.01'),
  Tl: aw('204.38', '0.01'), // conventional, interval element
  Pb: aw('207.2', '1.1'), // [T] interval element since 2021; 207.2 ± 1.1
  Bi: aw('208.98', '0.01'),
  Th: aw('232.04', '0.01'),
  Pa: aw('231.04', '0.01'),
  U: aw('238.03', '0.01'),
});

export interface ParsedFormula {
  /** formula after hydrate normalisation, as given to mf-parser */
  normalised: string;
  atoms: Record<string, number>;
  hill: string;
}

export interface MolarMassResult {
  /** g/mol */
  value: Dec;
  atoms: Record<string, number>;
  hill: string;
  /** standard uncertainty, g/mol */
  uncertainty: Dec;
}

const HYDRATE_SEPARATORS = /[·•∙⋅*]/g;

/**
 * Rewrite hydrate/adduct notations to bracket form: "CuSO4·5H2O", "CuSO4•5H2O", "CuSO4.5H2O",
 * "CuSO4*5H2O" and "CuSO4 5H2O" all become "CuSO4(H2O)5". A "." is always treated as an adduct
 * separator (decimal subscripts are not supported in that notation).
 */
export function normaliseHydrate(formula: string): string {
  const pieces = formula
    .replace(HYDRATE_SEPARATORS, ' ')
    .replace(/\./g, ' ')
    .split(/\s+/)
    .filter((s) => s.length > 0);
  if (pieces.length <= 1) return pieces[0] ?? '';
  return pieces
    .map((piece, i) => {
      const m = /^(\d+)(.+)$/.exec(piece);
      if (m) return `(${m[2]})${m[1]}`;
      return i === 0 ? piece : `(${piece})`;
    })
    .join('');
}

function invalid(formula: string, why: string): CalcError {
  return new CalcError('invalid_formula', `Formula "${formula}" is not valid: ${why}`, { details: { formula } });
}

function hillOrder(atoms: Record<string, number>): string {
  const els = Object.keys(atoms);
  const fmt = (el: string) => {
    const n = atoms[el];
    return n === 1 ? el : `${el}${n}`;
  };
  const hasC = els.includes('C');
  const first = hasC ? ['C', ...(els.includes('H') ? ['H'] : [])] : [];
  const rest = els.filter((e) => !first.includes(e)).sort();
  return [...first, ...rest].map(fmt).join('');
}

/** Parse a formula (hydrates allowed) into atom counts and a Hill-order formula. */
export function parseFormula(formula: string): ParsedFormula {
  if (typeof formula !== 'string' || formula.trim() === '') throw invalid(String(formula ?? ''), 'enter a formula such as NaCl or CuSO4·5H2O');
  if (formula.length > 200) throw invalid(formula.slice(0, 20) + '…', 'use at most 200 characters');
  if (/[+-]\s*[A-Z([\d]/.test(formula.replace(/\([+-]?\d*[+-]?\)/g, ''))) {
    throw invalid(formula, 'write one species; use "·" for hydrates and adducts (e.g. CuSO4·5H2O)');
  }
  if (/[[\]]|D(?![a-z])|T(?![a-z])/.test(formula)) {
    throw invalid(formula, 'isotopically labelled formulas are not supported (standard atomic weights assume natural composition)');
  }
  const normalised = normaliseHydrate(formula.trim());
  let info: { atoms?: Record<string, number>; mf?: string };
  try {
    info = new MF(normalised).getInfo() as { atoms?: Record<string, number>; mf?: string };
  } catch (e) {
    const msg = e instanceof Error ? e.message.split('\n')[0] : String(e);
    throw invalid(formula, `${msg}; element symbols start with a capital letter, e.g. NaCl, Pb(NO3)2`);
  }
  const atoms = { ...(info.atoms ?? {}) };
  const els = Object.keys(atoms);
  if (els.length === 0) throw invalid(formula, 'it contains no atoms');
  for (const el of els) {
    const n = atoms[el];
    if (!(n > 0)) throw invalid(formula, `the count of ${el} must be positive`);
    if (!(el in ATOMIC_WEIGHTS)) throw invalid(formula, `${el} has no standard atomic weight in our table`);
  }
  return { normalised, atoms, hill: hillOrder(atoms) };
}

function countDec(n: number): Dec {
  // atom counts are exact small numbers from the parser (integers, or decimals such as 0.5)
  return new D(String(n));
}

/** Molar mass from a set of atom counts with given atomic weights (defaults: our table). */
export function molarMassFromAtoms(atoms: Record<string, number>, weights: Record<string, Dec> = defaultWeights()): Dec {
  let m = new D(0);
  for (const [el, n] of Object.entries(atoms)) {
    const w = weights[el];
    if (w === undefined) throw new CalcError('missing_input', `No atomic weight given for ${el}`, { details: { element: el } });
    m = m.plus(countDec(n).mul(w));
  }
  return m;
}

export function defaultWeights(): Record<string, Dec> {
  const out: Record<string, Dec> = {};
  for (const [el, w] of Object.entries(ATOMIC_WEIGHTS)) out[el] = w.value;
  return out;
}

/** Standard uncertainty of an atomic weight (abridged ± as rectangular half-width). */
export function atomicWeightUncertainty(el: string): Dec {
  const w = ATOMIC_WEIGHTS[el];
  if (!w) throw new CalcError('invalid_formula', `${el} has no standard atomic weight in our table`, { details: { element: el } });
  return w.halfWidth.div(new D(3).sqrt());
}

/** Molar mass of a formula with its standard uncertainty (g/mol). */
export function molarMass(formula: string): MolarMassResult {
  const p = parseFormula(formula);
  const value = molarMassFromAtoms(p.atoms);
  let v = new D(0);
  for (const [el, n] of Object.entries(p.atoms)) v = v.plus(countDec(n).mul(atomicWeightUncertainty(el)).pow(2));
  return { value, atoms: p.atoms, hill: p.hill, uncertainty: v.sqrt() };
}

export interface GravimetricFactorModel {
  /** number of whole analyte units in one formula unit of the compound */
  analyteUnits: number;
  compound: ParsedFormula;
  analyte: ParsedFormula;
  /** elements whose atomic weights enter w */
  elements: string[];
  /** w as a function of atomic weights (g/mol), so correlated atomic weights are differentiated together */
  model: (weights: Record<string, Dec>) => Dec;
  /** atomic weights as GUM inputs (value and rectangular standard uncertainty), keyed by element */
  inputs: Record<string, { value: Dec; standardUncertainty: Dec; label: string }>;
}

/**
 * Where an atomic weight in a budget comes from: the IUPAC/CIAAW standard atomic weight (abridged value, its ±
 * taken as the half-width of a rectangular distribution, QUAM convention), e.g. "Atomic weight of Pb: standard
 * atomic weight 207.2 ± 1.1 (IUPAC/CIAAW abridged; interval as rectangular half-width, u = a/√3)".
 */
export function atomicWeightLabel(el: string): string {
  const w = ATOMIC_WEIGHTS[el]!;
  return `Atomic weight of ${el}: standard atomic weight ${w.value.toString()} ± ${w.halfWidth.toString()} (IUPAC/CIAAW abridged; interval as rectangular half-width, u = a/√3)`;
}

/** Build the function w(atomic weights) = n·M(analyte)/M(compound). */
export function gravimetricFactorModel(formula: string, analyteFormula?: string): GravimetricFactorModel {
  const compound = parseFormula(formula);
  const analyte = analyteFormula === undefined || analyteFormula.trim() === '' ? compound : parseFormula(analyteFormula);
  // whole analyte units: min over the analyte's elements of floor(count in compound / count in analyte)
  let whole: Dec | undefined;
  for (const [el, n] of Object.entries(analyte.atoms)) {
    const q = countDec(compound.atoms[el] ?? 0).div(countDec(n)).floor();
    whole = whole === undefined || q.lt(whole) ? q : whole;
  }
  const units = whole === undefined ? 0 : whole.toNumber(); // a small exact integer count, not a measured value
  if (units < 1) {
    throw new CalcError(
      'invalid_formula',
      `${formula} does not contain a whole ${analyteFormula ?? formula} unit; the analyte must be part of the compound (e.g. Pb in Pb(NO3)2)`,
      { details: { formula, analyteFormula } },
    );
  }
  const elements = Object.keys(compound.atoms);
  const n = new D(String(units));
  const model = (weights: Record<string, Dec>) =>
    n.mul(molarMassFromAtoms(analyte.atoms, weights)).div(molarMassFromAtoms(compound.atoms, weights));
  const inputs: GravimetricFactorModel['inputs'] = {};
  for (const el of elements) {
    inputs[el] = { value: ATOMIC_WEIGHTS[el].value, standardUncertainty: atomicWeightUncertainty(el), label: atomicWeightLabel(el) };
  }
  return { analyteUnits: units, compound, analyte, elements, model, inputs };
}

export interface GravimetricFactorResult {
  /** g analyte per g compound */
  value: Dec;
  analyteUnits: number;
  compoundMolarMass: Dec;
  analyteMolarMass: Dec;
  /** standard uncertainty of w from the atomic weights (correlations handled by differentiating w) */
  standardUncertainty: Dec;
  relativeStandardUncertainty: Dec;
}

/**
 * Gravimetric factor w = n·M(analyte)/M(compound), e.g. Pb in Pb(NO3)2 = 207.2/331.208.
 * The analyte may be an element, ion or group ("NO3", "PO4"); n is the number of whole analyte units.
 */
export function gravimetricFactor(formula: string, analyteFormula?: string): GravimetricFactorResult {
  const gm = gravimetricFactorModel(formula, analyteFormula);
  const w0 = defaultWeights();
  const value = gm.model(w0);
  // first-order propagation over the atomic weights (central differences, same as uncertainty.ts)
  let variance = new D(0);
  for (const el of gm.elements) {
    const u = gm.inputs[el].standardUncertainty;
    const h = u.mul('1e-6');
    const yp = gm.model({ ...w0, [el]: w0[el].plus(h) });
    const ym = gm.model({ ...w0, [el]: w0[el].minus(h) });
    variance = variance.plus(yp.minus(ym).div(h.mul(2)).mul(u).pow(2));
  }
  const u = variance.sqrt();
  return {
    value,
    analyteUnits: gm.analyteUnits,
    compoundMolarMass: molarMassFromAtoms(gm.compound.atoms, w0),
    analyteMolarMass: molarMassFromAtoms(gm.analyte.atoms, w0),
    standardUncertainty: u,
    relativeStandardUncertainty: u.div(value),
  };
}
