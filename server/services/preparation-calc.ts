/**
 * Builds the metrology core's requests from a preparation's stored values and turns the core's answers into
 * the plan and the result. No formulas live here: calculatePreparation (shared/calc/preparation.ts) does the
 * buoyancy, gravimetric factor and GUM budget; withSolutionTemperature (shared/calc/solution-temperature.ts)
 * adds the make-up temperature; shared/prep gives the window and the net weighing uncertainty.
 * Everything is recomputable from the stored request (TR-09): the request is stored beside the answer.
 */
import { calculatePreparation, CalcError, D, roundToDecimals, triangular, type CalcPreparationResponse, type PreparationRequest, type RoundingRule } from '../../shared/calc/index.ts';
import { withSolutionTemperature } from '../../shared/calc/solution-temperature.ts';
import { calibratedVolumeLabel, calibratedVolumeShown, classATolerance, decimalsOf, readingWindow } from '../../shared/prep/index.ts';
import { netWeighingUncertainty } from '../../shared/prep/weighing-uncertainty.ts';
import type { Balance as BalanceDto, ReferenceMaterial as MaterialDto, Solvent as SolventDto, VolumetricWare as WareDto } from '../../shared/schemas/inventory.ts';
import type { ConditionsUsed, PreparationResult } from '../../shared/schemas/preparations.ts';

/** Version of the calculation chain stored with every plan and result (REQUIREMENTS TR-09, VA-02). */
export const CALC_VERSION = 'tarebook-calc/1';
/**
 * Written instead when the flask's calibrated volume was used (lab setting useCalibratedVolumes): the same model
 * and budget rows, with V = the volume check's mean at 20 °C and u(V) = U/k. Records without one keep tarebook-calc/1.
 */
export const CALC_VERSION_CALIBRATED_VOLUME = 'tarebook-calc/2 (tarebook-calc/1 with the flask volume from its volume check: mean at 20 °C, u = U/k)';

/** The calc version of a plan or result with this flask. */
export function calcVersionFor(flask: WareDto | null | undefined): string {
  return flask?.calibratedVolume ? CALC_VERSION_CALIBRATED_VOLUME : CALC_VERSION;
}

/** Water's expansion coefficient used for the temperature uncertainty when the solvent has none (QUAM A1: 2.1e-4 /K). */
export const FALLBACK_BETA_PER_K = '0.00021';

export interface CalcContext {
  /** where CalcError fields point in the API request: plan, weighing or make-up */
  kind: 'plan' | 'weighing' | 'make-up';
  usesFlask: boolean;
}

const AIR_FIELD: Record<string, string> = {
  'air.temperatureC': 'conditions.temperatureC',
  'air.pressureHPa': 'conditions.pressureHPa',
  'air.relativeHumidityPct': 'conditions.relativeHumidityPct',
};

/** Map a core field path (material.purity.value, air.temperatureC …) to the API request's path. */
export function apiField(field: string | undefined, ctx: CalcContext): string {
  if (!field) return ctx.kind === 'make-up' ? 'flaskIdentifier' : ctx.kind === 'weighing' ? 'reading' : 'materialId';
  if (field in AIR_FIELD) return AIR_FIELD[field]!;
  if (field.startsWith('air')) return 'conditions';
  if (field === 'material.analyteFormula') return 'analyteFormula';
  if (field.startsWith('material')) return 'materialId';
  if (field.startsWith('balance')) return 'balanceId';
  if (field.startsWith('volume')) return ctx.kind === 'make-up' ? 'flaskIdentifier' : ctx.usesFlask ? 'flaskId' : field;
  if (field.startsWith('weighing')) return 'reading';
  return field;
}

/** Run the core; a CalcError comes back with its field as the API request names it. */
export function runCore(req: PreparationRequest, ctx: CalcContext): CalcPreparationResponse {
  try {
    return calculatePreparation(req);
  } catch (e) {
    if (e instanceof CalcError) {
      e.field = apiField(e.field, ctx);
    }
    throw e;
  }
}

/**
 * The flask's volume and its standard uncertainty: the calibrated volume frozen in the snapshot (mean at 20 °C,
 * u = U/k of its volume check), else the nominal volume with its tolerance (snapshot, else ISO 1042 class A), triangular.
 */
export function flaskVolumeUncertainty(flask: WareDto): { volumeMl: string; standardUncertainty?: string; basis: string; label?: string } {
  const cv = flask.calibratedVolume;
  if (cv) return { volumeMl: cv.meanMl, standardUncertainty: cv.standardUncertaintyMl, basis: `calibrated, ${cv.checkIdentifier}`, label: calibratedVolumeLabel('Flask volume', cv) };
  return { volumeMl: flask.nominalVolumeMl, ...toleranceUncertainty(flask) };
}

function toleranceUncertainty(flask: WareDto): { standardUncertainty?: string; basis: string } {
  const tol = flask.toleranceMl ?? (flask.class === 'A' ? classATolerance('flask', flask.nominalVolumeMl)?.toleranceMl : undefined);
  if (!tol) return { basis: 'no tolerance recorded: the core uses ISO 1042 class A for listed volumes, else half the last digit' };
  return { standardUncertainty: triangular(tol).toSignificantDigits(20).toFixed(), basis: `tolerance ±${tol} mL of ${flask.identifier}, triangular` };
}

function purityOf(m: MaterialDto): PreparationRequest['material']['purity'] {
  const p = m.purity;
  if (p.standardUncertainty) return { value: p.value, standardUncertainty: p.standardUncertainty };
  if (p.expandedUncertainty && p.k) return { value: p.value, expandedUncertainty: p.expandedUncertainty, k: p.k };
  return { value: p.value };
}

export interface CoreInputs {
  material: MaterialDto;
  analyteFormula: string;
  target: { value: string; unit: string };
  volume: { value: string; unit: string; standardUncertainty?: string };
  balance: BalanceDto;
  air: Pick<ConditionsUsed, 'temperatureC' | 'pressureHPa' | 'relativeHumidityPct'>;
  rounding: RoundingRule;
  /** the net reading in mg, with the digits the balance showed */
  readingMg?: string;
}

export function coreRequest(i: CoreInputs): PreparationRequest {
  const u = netWeighingUncertainty({
    readabilityMg: i.balance.readabilityMg,
    repeatabilitySdMg: i.balance.repeatabilitySdMg,
    calibrationUncertaintyMg: i.balance.calibrationUncertaintyMg,
    calibrationUncertaintyK: i.balance.calibrationUncertaintyK,
  });
  const req: PreparationRequest = {
    target: { value: i.target.value, unit: i.target.unit },
    volume: { value: i.volume.value, unit: i.volume.unit, ...(i.volume.standardUncertainty ? { standardUncertainty: i.volume.standardUncertainty } : {}) },
    material: {
      formula: i.material.formula,
      analyteFormula: i.analyteFormula,
      purity: purityOf(i.material),
      density: { value: i.material.densityGPerMl ?? '', unit: 'g/mL' },
    },
    balance: {
      weightDensity: { value: i.balance.weightDensityGPerMl, unit: 'g/mL' },
      standardUncertainty: { value: u.standardUncertainty, unit: 'mg' },
      readability: { value: i.balance.readabilityMg, unit: 'mg' },
    },
    air: { temperatureC: i.air.temperatureC, pressureHPa: i.air.pressureHPa, relativeHumidityPct: i.air.relativeHumidityPct },
    rounding: i.rounding,
  };
  if (i.readingMg !== undefined) req.weighing = { reading: { value: i.readingMg, unit: 'mg' } };
  return req;
}

/** A reading typed in g, as mg with the same digits ("0.16007" g → "160.07" mg). */
export function readingInMg(value: string, unit: 'mg' | 'g'): string {
  if (unit === 'mg') return value;
  const typed = value.includes('.') ? value.length - value.indexOf('.') - 1 : 0;
  return new D(value).times(1000).toFixed(Math.max(0, typed - 3));
}

export interface PlanNumbers {
  calc: CalcPreparationResponse;
  calcRequest: PreparationRequest;
  targetReading: { value: string; unit: 'mg' };
  window: { low: string; high: string; unit: 'mg'; pct: string };
  trueMass: { value: string; unit: 'mg' };
  expectedUncertainty: { standardUncertainty: string; expandedUncertainty: string; relative: string; display: string };
  /** the planned reading at the balance's decimals, for the gates' messages */
  plannedReadingMg: string;
}

export function planNumbers(i: CoreInputs, windowPct: string, ctx: CalcContext): PlanNumbers {
  const calcRequest = coreRequest({ ...i, readingMg: undefined });
  const calc = runCore(calcRequest, ctx);
  const d = i.balance.readabilityMg;
  const decimals = decimalsOf(d, 'mg');
  let shown = roundToDecimals(calc.balanceReading.value, decimals, i.rounding);
  if (new D(shown).lte(0)) shown = new D(d).toFixed(decimals); // below one scale interval: the gates still need a positive number
  const w = readingWindow(calc.balanceReading.value, windowPct, d);
  const e = calc.planned.expectedUncertainty;
  return {
    calc,
    calcRequest,
    targetReading: { value: shown, unit: 'mg' },
    window: { low: w.low, high: w.high, unit: 'mg', pct: windowPct },
    trueMass: { value: calc.trueMass.value, unit: 'mg' },
    expectedUncertainty: {
      standardUncertainty: e.standardUncertainty,
      expandedUncertainty: e.expandedUncertainty,
      relative: new D(e.standardUncertainty).div(e.value).toSignificantDigits(20).toFixed(),
      display: e.display,
    },
    plannedReadingMg: shown,
  };
}

/**
 * The flask volume written to the digits its tolerance supports, for the significant-figure view:
 * 100 mL ± 0.10 mL → "100.00" (a bare "100" would count as one significant figure) [common practice].
 */
export function volumeAsKnown(flask: WareDto): string {
  if (flask.calibratedVolume) return calibratedVolumeShown(flask.calibratedVolume);
  const tol = flask.toleranceMl ?? (flask.class === 'A' ? classATolerance('flask', flask.nominalVolumeMl)?.toleranceMl : undefined);
  if (!tol) return flask.nominalVolumeMl;
  const decimals = tol.includes('.') ? tol.length - tol.indexOf('.') - 1 : 0;
  const nominal = new D(flask.nominalVolumeMl);
  return nominal.decimalPlaces() >= decimals ? flask.nominalVolumeMl : nominal.toFixed(decimals);
}

export interface ResultInputs {
  material: MaterialDto;
  analyteFormula: string;
  target: { value: string; unit: string };
  weighing: { id: number; netMg: string; balance: BalanceDto; conditions: ConditionsUsed };
  makeUp: { id: number; flask: WareDto; solvent: SolventDto; solutionTemperatureC: string; applyTemperatureCorrection: boolean };
  rounding: RoundingRule;
  computedAt: string;
}

/** The stored result: recomputed from stored values only (weighing, make-up, snapshots). */
export function computeResult(i: ResultInputs): PreparationResult & { calcRequest: PreparationRequest } {
  const vu = flaskVolumeUncertainty(i.makeUp.flask);
  const calcRequest = coreRequest({
    material: i.material,
    analyteFormula: i.analyteFormula,
    target: i.target,
    volume: { value: vu.volumeMl, unit: 'mL', ...(vu.standardUncertainty ? { standardUncertainty: vu.standardUncertainty } : {}) },
    balance: i.weighing.balance,
    air: i.weighing.conditions,
    rounding: i.rounding,
    readingMg: i.weighing.netMg,
  });
  const calc = runCore(calcRequest, { kind: 'make-up', usesFlask: true });
  const actual = calc.actual!;
  const beta = i.makeUp.solvent.expansionCoefficientPerK ?? FALLBACK_BETA_PER_K;
  const t = withSolutionTemperature({
    value: actual.concentration.value,
    standardUncertainty: actual.concentration.standardUncertainty,
    unit: actual.concentration.unit,
    budget: actual.budget,
    betaPerK: beta,
    temperatureC: i.makeUp.solutionTemperatureC,
    corrected: i.makeUp.applyTemperatureCorrection,
    rule: i.rounding,
    typedInputs: [
      { value: i.weighing.netMg, name: 'reading' },
      { value: volumeAsKnown(i.makeUp.flask), name: 'volume' },
      { value: i.material.purity.value, name: 'purity' },
    ],
  });
  const result: PreparationResult & { calcRequest: PreparationRequest } = {
    calcVersion: calcVersionFor(i.makeUp.flask),
    computedAt: i.computedAt,
    trueMass: { value: actual.trueMass.value, unit: 'mg' },
    volume: { value: vu.volumeMl, unit: 'mL' },
    concentration: {
      value: t.value,
      unit: actual.concentration.unit,
      standardUncertainty: t.standardUncertainty,
      expandedUncertainty: t.expandedUncertainty,
      k: t.k,
      display: t.display,
      significantFigures: t.significantFigures,
    },
    budget: t.budget.map((r) => ({
      input: r.input,
      label: r.input === 'volume' ? (vu.label ?? `Volume (${vu.basis})`) : r.label,
      value: r.value,
      unit: r.unit,
      standardUncertainty: r.standardUncertainty,
      sensitivity: r.sensitivity,
      contribution: r.contribution,
      share: r.share,
    })),
    basedOn: { weighingId: i.weighing.id, makeUpId: i.makeUp.id },
    calcRequest,
  };
  if (i.makeUp.applyTemperatureCorrection) {
    result.temperatureCorrection = { factor: t.factor, temperatureC: i.makeUp.solutionTemperatureC };
  }
  return result;
}
