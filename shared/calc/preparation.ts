/**
 * The composed calculation behind POST /api/calc/preparation and the client live preview:
 * mass of a solid to weigh for a target concentration, the balance reading after air-buoyancy
 * correction, and (after weighing) the actual concentration with its GUM uncertainty budget.
 * Model: c = m'·B(ρa, ρs, ρw)·w(atomic weights)·P / V, converted to the target unit
 * (mass fraction via the solution density, amount concentration via the analyte's molar mass).
 * Sources: buoyancy NIST SOP 2 (buoyancy.ts), air density CIPM-2007 (air-density.ts), atomic weights
 * CIAAW abridged (molar-mass.ts), GUM law of propagation (uncertainty.ts), GUM 7.2.6 rounding.
 * Default uncertainties (common practice): air density given → rectangular ±0.06 kg/m³; solid density
 * rectangular ±5 %; weight density u = 0.035 g/mL; reading without a balance uncertainty →
 * 0.408·d (two display roundings, d = last typed digit); volume without u → ISO 1042 class A
 * tolerance (triangular) for a listed nominal volume, else rectangular ± half the last typed digit.
 * Validity: air conditions within CIPM-2007 (15–27 °C, 600–1100 hPa); 0 < purity ≤ 1.
 * Units: request units as given; masses out in the reading's unit, else mg; air density g/mL.
 */
import { D, type Dec, c, toDec } from './decimal.ts';
import { CalcError, withField } from './errors.ts';
import { airDensityUncertainty } from './air-density.ts';
import { buoyancyFactor } from './buoyancy.ts';
import { gravimetricFactorModel, molarMassFromAtoms, defaultWeights, parseFormula } from './molar-mass.ts';
import { convertDensity, convertMass, convertVolume, unitKind, normaliseUnit, type UnitKind } from './units.ts';
import { propagate, rectangular, triangular, fromExpanded, type BudgetRow, type InputDistribution, type UncertainInput } from './uncertainty.ts';
import type { McModel, McResultText } from './monte-carlo.ts';
import { formatResult, lastDigitUnit, significantFigureResult, type RoundingRule } from './rounding.ts';

export interface QuantityText {
  value: string;
  unit: string;
}

/** Structural request type; the zod schema in shared/schemas/calc.ts infers the same shape. */
export interface PreparationRequest {
  target: { value: string; unit: string; solutionDensity?: QuantityText };
  volume: { value: string; unit: string; standardUncertainty?: string };
  material: {
    formula?: string;
    analyteFormula?: string;
    purity: { value: string; standardUncertainty?: string; expandedUncertainty?: string; k?: string; halfWidth?: string };
    density: QuantityText;
    /**
     * Atomic weights stated on the material's certificate (e.g. the Pb of a lot of known isotopic composition),
     * used instead of the standard atomic weight for that element: value g/mol, standard uncertainty g/mol
     * (or expanded with k), and the certificate it comes from, named in the budget row.
     */
    atomicWeights?: Record<string, { value: string; standardUncertainty?: string; expandedUncertainty?: string; k?: string; source: string }>;
  };
  balance?: { weightDensity?: QuantityText; standardUncertainty?: QuantityText; readability?: QuantityText };
  air: {
    temperatureC?: string;
    pressureHPa?: string;
    relativeHumidityPct?: string;
    co2MoleFraction?: string;
    density?: QuantityText;
  };
  weighing?: { reading: QuantityText };
  rounding?: RoundingRule;
}

export interface BudgetRowText {
  input: string;
  label: string;
  unit: string;
  value: string;
  standardUncertainty: string;
  sensitivity: string;
  contribution: string;
  share: string;
}

export interface ConcentrationResultText {
  value: string;
  unit: string;
  standardUncertainty: string;
  expandedUncertainty: string;
  k: '2';
  display: string;
}

export interface CalcPreparationResponse {
  airDensity: { value: string; unit: 'g/mL'; standardUncertainty: string; method: 'CIPM-2007' | 'given' };
  gravimetricFactor: string;
  gravimetricFactorStandardUncertainty: string;
  buoyancyFactor: string;
  trueMass: QuantityText;
  balanceReading: QuantityText;
  planned: {
    expectedUncertainty: ConcentrationResultText & { readingUncertaintyBasis: string };
    budget: BudgetRowText[];
  };
  actual?: {
    trueMass: QuantityText;
    concentration: ConcentrationResultText & {
      significantFigures: { value: string; significantFigures: number; limitedBy: string };
    };
    budget: BudgetRowText[];
    /** the Monte Carlo propagation of the same model (JCGM 101), when the request asks for it */
    monteCarlo?: McResultText;
  };
}

/** ISO 1042 class A tolerances of one-mark volumetric flasks, ± mL (METROLOGY §4.4, from memory there). */
export const ISO1042_CLASS_A_TOLERANCE_ML: Readonly<Record<string, string>> = Object.freeze({
  '5': '0.025',
  '10': '0.025',
  '20': '0.04',
  '25': '0.04',
  '50': '0.06',
  '100': '0.10',
  '200': '0.15',
  '250': '0.15',
  '500': '0.25',
  '1000': '0.40',
  '2000': '0.60',
});

const DEFAULT_WEIGHT_DENSITY = '8.0'; // g/mL
const WEIGHT_DENSITY_U = '0.035'; // g/mL [common practice]
const GIVEN_AIR_DENSITY_HALF_WIDTH = '0.06e-3'; // g/mL = ±0.06 kg/m³ [common practice]
const SOLID_DENSITY_REL_HALF_WIDTH = '0.05'; // ±5 % [common practice]

/** Output precision of response numbers (unrounded results keep 20 significant digits). */
function out(d: Dec): string {
  return d.toSignificantDigits(20).toFixed();
}

function num(x: string | undefined, field: string, label: string): Dec {
  if (x === undefined || x === null || x === '') {
    throw new CalcError('missing_input', `Enter the ${label}`, { field });
  }
  return withField(field, () => toDec(x, label.charAt(0).toUpperCase() + label.slice(1)));
}

function positive(x: string | undefined, field: string, label: string): Dec {
  const d = num(x, field, label);
  if (d.lte(0)) throw new CalcError('non_positive', `The ${label} must be greater than 0 (got ${d.toString()})`, { field });
  return d;
}

function nonNegative(x: string | undefined, field: string, label: string): Dec {
  const d = num(x, field, label);
  if (d.isNeg()) throw new CalcError('non_positive', `The ${label} must not be negative (got ${d.toString()})`, { field });
  return d;
}

function unitOf(unit: string | undefined, field: string, kinds: UnitKind[], label: string): { name: string; kind: UnitKind } {
  if (unit === undefined || unit === '') throw new CalcError('missing_input', `Choose a unit for the ${label}`, { field });
  const kind = unitKind(unit);
  if (kind === undefined) throw new CalcError('unknown_unit', `Unknown unit "${unit}" for the ${label}`, { field, details: { unit } });
  if (!kinds.includes(kind)) {
    throw new CalcError('unit_mismatch', `${normaliseUnit(unit)} cannot be used for the ${label}; it needs ${kindText(kinds)}`, {
      field,
      details: { unit, kind },
    });
  }
  return { name: normaliseUnit(unit), kind };
}

function kindText(kinds: UnitKind[]): string {
  const t: Record<UnitKind, string> = {
    mass: 'a mass unit (µg, mg, g)',
    volume: 'a volume unit (µL, mL, L)',
    density: 'a density unit (g/mL, kg/m3)',
    massConcentration: 'a mass concentration (e.g. mg/L)',
    massFraction: 'a mass fraction (e.g. mg/kg)',
    amountConcentration: 'an amount concentration (e.g. mmol/L)',
  };
  return kinds.map((k) => t[k]).join(' or ');
}

const TARGET_FACTOR: Record<string, string> = {
  // to g/L, g/g, mol/L respectively
  'ng/mL': '1e-6',
  'µg/L': '1e-6',
  'µg/mL': '1e-3',
  'mg/L': '1e-3',
  'mg/mL': '1',
  'g/L': '1',
  'ng/g': '1e-9',
  'µg/kg': '1e-9',
  'µg/g': '1e-6',
  'mg/kg': '1e-6',
  'mg/g': '1e-3',
  'g/kg': '1e-3',
  'µmol/L': '1e-6',
  'mmol/L': '1e-3',
  'mol/L': '1',
};

const AIR_FIELDS: Record<string, string> = {
  temperatureC: 'air.temperatureC',
  pressurePa: 'air.pressureHPa',
  relativeHumidity: 'air.relativeHumidityPct',
  xCO2: 'air.co2MoleFraction',
};

/** Numerically derived budget numbers carry 15 significant digits (the rest is difference noise). */
function outBudget(d: Dec): string {
  return d.toSignificantDigits(15).toFixed();
}

function rowsText(rows: BudgetRow[]): BudgetRowText[] {
  return rows.map((r) => ({
    input: r.input,
    label: r.label,
    unit: r.unit ?? '',
    value: out(r.value),
    standardUncertainty: out(r.standardUncertainty),
    sensitivity: outBudget(r.sensitivity),
    contribution: outBudget(r.contribution),
    share: outBudget(r.share),
  }));
}

export function calculatePreparation(req: PreparationRequest): CalcPreparationResponse {
  return computePreparation(req).response;
}

/**
 * The actual concentration's measurement model for the Monte Carlo propagation (monte-carlo.ts): the budget's
 * inputs with their stated distributions and the same model in plain numbers. Null when the request has no weighing.
 */
export function preparationMonteCarloModel(req: PreparationRequest): McModel | null {
  return computePreparation(req).mc ?? null;
}

function computePreparation(req: PreparationRequest): { response: CalcPreparationResponse; mc?: McModel } {
  if (!req || typeof req !== 'object') throw new CalcError('missing_input', 'The request body is missing', { field: '' });
  const rule: RoundingRule = req.rounding ?? 'half-even';

  // ---- target
  if (!req.target) throw new CalcError('missing_input', 'Enter the target concentration', { field: 'target' });
  const targetValue = positive(req.target.value, 'target.value', 'target concentration');
  const targetUnit = unitOf(req.target.unit, 'target.unit', ['massConcentration', 'massFraction', 'amountConcentration'], 'target concentration');
  const targetFactor = c(TARGET_FACTOR[targetUnit.name]);

  // ---- volume
  if (!req.volume) throw new CalcError('missing_input', 'Enter the volume', { field: 'volume' });
  const volumeValue = positive(req.volume.value, 'volume.value', 'volume');
  const volumeUnit = unitOf(req.volume.unit, 'volume.unit', ['volume'], 'volume');
  const volumeMl = convertVolume(volumeValue, volumeUnit.name, 'mL');
  let volumeU: Dec;
  let volumeBasis: string;
  let volumeDist: InputDistribution = 'normal';
  if (req.volume.standardUncertainty !== undefined && req.volume.standardUncertainty !== '') {
    volumeU = nonNegative(req.volume.standardUncertainty, 'volume.standardUncertainty', 'volume standard uncertainty');
    volumeBasis = 'given';
  } else {
    const tol = ISO1042_CLASS_A_TOLERANCE_ML[volumeMl.toFixed()];
    if (tol !== undefined) {
      volumeU = convertVolume(triangular(tol), 'mL', volumeUnit.name);
      volumeBasis = `ISO 1042 class A ±${tol} mL, triangular`;
      volumeDist = 'triangular';
    } else {
      volumeU = rectangular(lastDigitUnit(req.volume.value).div(2));
      volumeBasis = 'half the last typed digit, rectangular';
      volumeDist = 'rectangular';
    }
  }

  // ---- material
  if (!req.material) throw new CalcError('missing_input', 'Describe the material', { field: 'material' });
  const formula = req.material.formula?.trim() || undefined;
  const analyteFormula = req.material.analyteFormula?.trim() || undefined;
  if (analyteFormula && !formula) {
    throw new CalcError('missing_input', 'Enter the compound formula as well as the analyte', { field: 'material.formula' });
  }
  const needsMolar = targetUnit.kind === 'amountConcentration';
  if (needsMolar && !formula) {
    throw new CalcError(
      'unit_mismatch',
      `${targetUnit.name} is an amount concentration; enter the compound formula (and analyte) so the molar mass is known`,
      { field: 'target.unit' },
    );
  }
  let gm: ReturnType<typeof gravimetricFactorModel> | undefined;
  if (formula) {
    withField('material.formula', () => parseFormula(formula));
    if (analyteFormula) withField('material.analyteFormula', () => parseFormula(analyteFormula));
    gm = withField(analyteFormula ? 'material.analyteFormula' : 'material.formula', () => gravimetricFactorModel(formula, analyteFormula));
  }
  const useAtomicWeights = gm !== undefined && (analyteFormula !== undefined || needsMolar);

  if (!req.material.purity) throw new CalcError('missing_input', 'Enter the purity (mass fraction, e.g. 0.9995)', { field: 'material.purity.value' });
  const purity = num(req.material.purity.value, 'material.purity.value', 'purity');
  if (purity.lte(0) || purity.gt(1)) {
    throw new CalcError(
      purity.lte(0) ? 'non_positive' : 'calc_out_of_range',
      `Purity ${purity.toString()} must be a mass fraction with 0 < P ≤ 1 (e.g. 0.9995 for 99.95 %)`,
      { field: 'material.purity.value' },
    );
  }
  const pu = req.material.purity;
  let purityU = new D(0);
  let purityDist: InputDistribution = 'normal';
  if (pu.standardUncertainty !== undefined && pu.standardUncertainty !== '') {
    purityU = nonNegative(pu.standardUncertainty, 'material.purity.standardUncertainty', 'purity standard uncertainty');
  } else if (pu.expandedUncertainty !== undefined && pu.expandedUncertainty !== '') {
    const U = nonNegative(pu.expandedUncertainty, 'material.purity.expandedUncertainty', 'purity expanded uncertainty');
    const k = positive(pu.k, 'material.purity.k', 'coverage factor k');
    purityU = fromExpanded(U, k);
  } else if (pu.halfWidth !== undefined && pu.halfWidth !== '') {
    purityU = rectangular(nonNegative(pu.halfWidth, 'material.purity.halfWidth', 'purity half-width'));
    purityDist = 'rectangular';
  }

  if (!req.material.density) throw new CalcError('missing_input', 'Enter the density of the material', { field: 'material.density.value' });
  const rhoS = positive(req.material.density.value, 'material.density.value', 'material density');
  const rhoSUnit = unitOf(req.material.density.unit, 'material.density.unit', ['density'], 'material density');
  const rhoSg = convertDensity(rhoS, rhoSUnit.name, 'g/mL');

  // ---- balance
  let rhoW = c(DEFAULT_WEIGHT_DENSITY);
  if (req.balance?.weightDensity) {
    const v = positive(req.balance.weightDensity.value, 'balance.weightDensity.value', 'weight density');
    const u = unitOf(req.balance.weightDensity.unit, 'balance.weightDensity.unit', ['density'], 'weight density');
    rhoW = convertDensity(v, u.name, 'g/mL');
  }
  let balanceU: { value: Dec; unit: string } | undefined;
  if (req.balance?.standardUncertainty) {
    const v = nonNegative(req.balance.standardUncertainty.value, 'balance.standardUncertainty.value', 'balance standard uncertainty');
    const u = unitOf(req.balance.standardUncertainty.unit, 'balance.standardUncertainty.unit', ['mass'], 'balance standard uncertainty');
    balanceU = { value: v, unit: u.name };
  }
  let readability: { value: Dec; unit: string } | undefined;
  if (req.balance?.readability) {
    const v = positive(req.balance.readability.value, 'balance.readability.value', 'balance readability');
    const u = unitOf(req.balance.readability.unit, 'balance.readability.unit', ['mass'], 'balance readability');
    readability = { value: v, unit: u.name };
  }

  // ---- air
  if (!req.air) throw new CalcError('missing_input', 'Enter the air conditions or an air density', { field: 'air' });
  let rhoA: Dec;
  let rhoAU: Dec;
  let airMethod: 'CIPM-2007' | 'given';
  const hasConditions = [req.air.temperatureC, req.air.pressureHPa, req.air.relativeHumidityPct].some((v) => v !== undefined && v !== '');
  if (req.air.density) {
    if (hasConditions) {
      throw new CalcError('calc_out_of_range', 'Give either the air conditions or an air density, not both', { field: 'air.density' });
    }
    const v = positive(req.air.density.value, 'air.density.value', 'air density');
    const u = unitOf(req.air.density.unit, 'air.density.unit', ['density'], 'air density');
    rhoA = convertDensity(v, u.name, 'g/mL');
    rhoAU = rectangular(GIVEN_AIR_DENSITY_HALF_WIDTH);
    airMethod = 'given';
  } else {
    const t = num(req.air.temperatureC, 'air.temperatureC', 'air temperature');
    const p = positive(req.air.pressureHPa, 'air.pressureHPa', 'air pressure');
    const h = num(req.air.relativeHumidityPct, 'air.relativeHumidityPct', 'relative humidity');
    const x = req.air.co2MoleFraction !== undefined && req.air.co2MoleFraction !== '' ? num(req.air.co2MoleFraction, 'air.co2MoleFraction', 'CO2 mole fraction') : undefined;
    let r;
    try {
      r = airDensityUncertainty({ temperatureC: t, pressurePa: p.mul(100), relativeHumidity: h.div(100), ...(x ? { xCO2: x } : {}) });
    } catch (e) {
      if (e instanceof CalcError && e.field === undefined) {
        const input = String(e.details?.input ?? 'temperatureC');
        e.field = AIR_FIELDS[input] ?? 'air';
      }
      throw e;
    }
    rhoA = r.density.div(1000);
    rhoAU = r.standardUncertainty.div(1000);
    airMethod = 'CIPM-2007';
  }
  // A refusal names the density that is out of place: a given air density when air was entered as a density,
  // else the sample's or the weights' density (METROLOGY §2.1 needs ρa < ρ and ρa < ρw).
  let B: Dec;
  try {
    B = buoyancyFactor({ airDensity: rhoA, sampleDensity: rhoSg, weightDensity: rhoW });
  } catch (e) {
    if (!(e instanceof CalcError)) throw e;
    const input = e.details?.input;
    throw e.at(
      airMethod === 'given' ? 'air.density.value' : input === 'weightDensity' ? (req.balance?.weightDensity ? 'balance.weightDensity.value' : 'air') : 'material.density.value',
    );
  }

  // ---- solution density for mass-fraction targets
  let rhoSol: Dec | undefined;
  let rhoSolU = new D(0);
  if (targetUnit.kind === 'massFraction') {
    if (!req.target.solutionDensity) {
      throw new CalcError(
        'unit_mismatch',
        `${targetUnit.name} is a mass fraction; a solution made up to volume needs the solution density (target.solutionDensity) to convert, or choose a mass concentration such as mg/L`,
        { field: 'target.unit' },
      );
    }
    const v = positive(req.target.solutionDensity.value, 'target.solutionDensity.value', 'solution density');
    const u = unitOf(req.target.solutionDensity.unit, 'target.solutionDensity.unit', ['density'], 'solution density');
    rhoSol = convertDensity(v, u.name, 'g/mL');
  }

  // ---- certificate atomic weights (instead of the standard atomic weight of those elements)
  const stated: Record<string, { value: Dec; u: Dec; label: string }> = {};
  for (const [el, a] of Object.entries(req.material.atomicWeights ?? {})) {
    const field = `material.atomicWeights.${el}`;
    if (!gm || !gm.elements.includes(el)) throw new CalcError('calc_out_of_range', `${el} is not an element of ${formula ?? 'the compound'}; a stated atomic weight applies to an element of the compound`, { field });
    const value = positive(a.value, `${field}.value`, `atomic weight of ${el}`);
    let u: Dec;
    if (a.standardUncertainty !== undefined && a.standardUncertainty !== '') u = nonNegative(a.standardUncertainty, `${field}.standardUncertainty`, `standard uncertainty of the atomic weight of ${el}`);
    else if (a.expandedUncertainty !== undefined && a.expandedUncertainty !== '') u = fromExpanded(nonNegative(a.expandedUncertainty, `${field}.expandedUncertainty`, `expanded uncertainty of the atomic weight of ${el}`), positive(a.k, `${field}.k`, 'coverage factor k'));
    else throw new CalcError('missing_input', `Enter the uncertainty the certificate states for the atomic weight of ${el}`, { field: `${field}.standardUncertainty` });
    const source = (a.source ?? '').trim();
    if (!source) throw new CalcError('missing_input', `Name the certificate that states the atomic weight of ${el}`, { field: `${field}.source` });
    stated[el] = { value, u, label: `Atomic weight of ${el}: ${value.toString()} g/mol as stated on ${source} (instead of the standard atomic weight)` };
  }

  // ---- the model
  const w0 = defaultWeights();
  for (const [el, a] of Object.entries(stated)) w0[el] = a.value;
  const compoundEls = gm ? gm.elements : [];
  const analyteAtoms = gm ? gm.analyte.atoms : {};
  const model = (massUnit: string) => {
    const toG = convertMass('1', massUnit, 'g');
    const toL = convertVolume('1', volumeUnit.name, 'L');
    return (x: Record<string, Dec>): Dec => {
      const weights: Record<string, Dec> = { ...w0 };
      for (const el of compoundEls) if (x[`atomicWeight.${el}`] !== undefined) weights[el] = x[`atomicWeight.${el}`];
      const Bx = c('1').minus(x.airDensity.div(x.weightDensity)).div(c('1').minus(x.airDensity.div(x.materialDensity)));
      const w = gm && analyteFormula ? gm.model(weights) : c('1');
      let y = x.reading.mul(toG).mul(Bx).mul(w).mul(x.purity).div(x.volume.mul(toL)); // g/L of analyte
      if (targetUnit.kind === 'massFraction') y = y.div(x.solutionDensity.mul(1000));
      if (targetUnit.kind === 'amountConcentration') y = y.div(molarMassFromAtoms(analyteAtoms, weights));
      return y.div(targetFactor);
    };
  };

  const wValue = gm && analyteFormula ? gm.model(w0) : c('1');
  // planned true mass: m = c·V/(w·P) in g, then the output unit
  const outMassUnit = req.weighing?.reading?.unit ? unitOf(req.weighing.reading.unit, 'weighing.reading.unit', ['mass'], 'balance reading').name : 'mg';
  let gPerL = targetValue.mul(targetFactor);
  if (targetUnit.kind === 'massFraction') gPerL = gPerL.mul(rhoSol!.mul(1000));
  if (targetUnit.kind === 'amountConcentration') gPerL = gPerL.mul(molarMassFromAtoms(analyteAtoms, w0));
  const trueMassG = gPerL.mul(convertVolume(volumeValue, volumeUnit.name, 'L')).div(wValue.mul(purity));
  const trueMass = convertMass(trueMassG, 'g', outMassUnit);
  const plannedReading = trueMass.div(B);

  const baseInputs = (): Record<string, UncertainInput> => {
    const inputs: Record<string, UncertainInput> = {
      purity: { value: purity, standardUncertainty: purityU, label: 'Purity (mass fraction)', unit: '1', distribution: purityDist },
      airDensity: {
        value: rhoA,
        standardUncertainty: rhoAU,
        label: airMethod === 'given' ? 'Air density (given)' : 'Air density (CIPM-2007)',
        unit: 'g/mL',
        distribution: airMethod === 'given' ? 'rectangular' : 'normal',
      },
      materialDensity: {
        value: rhoSg,
        standardUncertainty: rectangular(rhoSg.mul(SOLID_DENSITY_REL_HALF_WIDTH)),
        label: 'Density of the material',
        unit: 'g/mL',
        distribution: 'rectangular',
      },
      weightDensity: { value: rhoW, standardUncertainty: c(WEIGHT_DENSITY_U), label: 'Density of the balance weights', unit: 'g/mL' },
      volume: { value: volumeValue, standardUncertainty: volumeU, label: `Volume (${volumeBasis})`, unit: volumeUnit.name, distribution: volumeDist },
    };
    if (rhoSol) inputs.solutionDensity = { value: rhoSol, standardUncertainty: rhoSolU, label: 'Solution density', unit: 'g/mL' };
    if (gm && useAtomicWeights) {
      for (const el of gm.elements) {
        const a = stated[el];
        // a certificate's u or U/k: normal; a standard atomic weight's interval: rectangular (molar-mass.ts, QUAM)
        inputs[`atomicWeight.${el}`] = a
          ? { value: a.value, standardUncertainty: a.u, label: a.label, unit: 'g/mol', distribution: 'normal' }
          : { ...gm.inputs[el], unit: 'g/mol', distribution: 'rectangular' };
      }
    }
    return inputs;
  };

  // 0.408·d = d/√6: two display roundings of ±d/2 each (tare and gross) add to a triangular ±d (METROLOGY §5.2)
  const readingU = (massUnit: string, typed?: string): { u: Dec; basis: string; distribution: InputDistribution } => {
    if (balanceU) return { u: convertMass(balanceU.value, balanceU.unit, massUnit), basis: 'balance standard uncertainty (given)', distribution: 'normal' };
    if (readability) return { u: triangular(convertMass(readability.value, readability.unit, massUnit)), basis: '0.408·d from the balance readability', distribution: 'triangular' };
    if (typed !== undefined) return { u: triangular(lastDigitUnit(typed)), basis: '0.408·d, d = last typed digit of the reading', distribution: 'triangular' };
    return { u: new D(0), basis: 'not included: give the balance standard uncertainty or readability', distribution: 'normal' };
  };

  // The same model as model() in plain numbers, for the Monte Carlo trials only (monte-carlo.ts says why numbers).
  const numberModel = (massUnit: string): McModel['model'] => {
    const toG = convertMass('1', massUnit, 'g').toNumber();
    const toL = convertVolume('1', volumeUnit.name, 'L').toNumber();
    const tf = targetFactor.toNumber();
    const w0n: Record<string, number> = Object.fromEntries(Object.entries(w0).map(([k, v]) => [k, v.toNumber()]));
    // [input name, atom count, default weight] per element, so a trial builds no strings
    const atomsOf = (atoms: Record<string, number>): Array<[string, number, number]> => Object.entries(atoms).map(([el, n]) => [`atomicWeight.${el}`, n, w0n[el]!]);
    const analyteN = atomsOf(analyteAtoms);
    const compoundN = gm ? atomsOf(gm.compound.atoms) : [];
    const units = gm ? gm.analyteUnits : 1;
    const withW = Boolean(gm && analyteFormula);
    const massFraction = targetUnit.kind === 'massFraction';
    const amount = targetUnit.kind === 'amountConcentration';
    const molar = (x: Record<string, number>, atoms: Array<[string, number, number]>) => {
      let m = 0;
      for (let i = 0; i < atoms.length; i++) {
        const [key, n, w] = atoms[i]!;
        m += n * (x[key] ?? w);
      }
      return m;
    };
    return (x) => {
      const Bx = (1 - x.airDensity / x.weightDensity) / (1 - x.airDensity / x.materialDensity);
      const w = withW ? (units * molar(x, analyteN)) / molar(x, compoundN) : 1;
      let y = (x.reading * toG * Bx * w * x.purity) / (x.volume * toL);
      if (massFraction) y = y / (x.solutionDensity * 1000);
      if (amount) y = y / molar(x, analyteN);
      return y / tf;
    };
  };

  const conc = (res: { value: Dec; standardUncertainty: Dec }): ConcentrationResultText => {
    const U = res.standardUncertainty.mul(2);
    return {
      value: out(res.value),
      unit: targetUnit.name,
      standardUncertainty: out(res.standardUncertainty),
      expandedUncertainty: out(U),
      k: '2',
      display: U.gt(0) ? formatResult(res.value, U, targetUnit.name, '2', { rule }) : `${out(res.value)} ${targetUnit.name}`,
    };
  };

  // planned expected uncertainty: same model at the planned reading
  const pr = readingU(outMassUnit);
  const planned = propagate({
    model: model(outMassUnit),
    inputs: { reading: { value: plannedReading, standardUncertainty: pr.u, label: 'Balance reading (planned)', unit: outMassUnit }, ...baseInputs() },
  });

  const response: CalcPreparationResponse = {
    airDensity: { value: out(rhoA), unit: 'g/mL', standardUncertainty: out(rhoAU), method: airMethod },
    gravimetricFactor: out(wValue),
    gravimetricFactorStandardUncertainty: out(
      gm && analyteFormula
        ? propagate({ model: (x) => gm!.model({ ...w0, ...x }), inputs: Object.fromEntries(gm.elements.map((el) => [el, stated[el] ? { value: stated[el].value, standardUncertainty: stated[el].u } : gm!.inputs[el]!])) }).standardUncertainty
        : new D(0),
    ),
    buoyancyFactor: out(B),
    trueMass: { value: out(trueMass), unit: outMassUnit },
    balanceReading: { value: out(plannedReading), unit: outMassUnit },
    planned: { expectedUncertainty: { ...conc(planned), readingUncertaintyBasis: pr.basis }, budget: rowsText(planned.budget) },
  };

  // ---- actual weighing
  let mc: McModel | undefined;
  if (req.weighing) {
    if (!req.weighing.reading) throw new CalcError('missing_input', 'Enter the balance reading', { field: 'weighing.reading.value' });
    const reading = positive(req.weighing.reading.value, 'weighing.reading.value', 'balance reading');
    const ru = readingU(outMassUnit, req.weighing.reading.value);
    const actualInputs: Record<string, UncertainInput> = {
      reading: { value: reading, standardUncertainty: ru.u, label: `Balance reading: ${ru.basis}`, unit: outMassUnit, distribution: ru.distribution },
      ...baseInputs(),
    };
    const res = propagate({ model: model(outMassUnit), inputs: actualInputs });
    mc = {
      inputs: Object.entries(actualInputs).map(([name, i]) => ({
        name,
        value: toDec(i.value, name),
        standardUncertainty: toDec(i.standardUncertainty, name),
        distribution: i.distribution ?? 'normal',
      })),
      model: numberModel(outMassUnit),
      gum: { value: res.value, standardUncertainty: res.standardUncertainty },
      unit: targetUnit.name,
    };
    const sig = significantFigureResult(
      res.value,
      [
        { value: req.weighing.reading.value, name: 'reading' },
        { value: req.volume.value, name: 'volume' },
        { value: req.material.purity.value, name: 'purity' },
      ],
      rule,
    );
    response.actual = {
      trueMass: { value: out(reading.mul(B)), unit: outMassUnit },
      concentration: {
        ...conc(res),
        significantFigures: { value: sig.value, significantFigures: sig.significantFigures, limitedBy: sig.limitedBy ?? '' },
      },
      budget: rowsText(res.budget),
    };
  }
  return { response, ...(mc ? { mc } : {}) };
}
