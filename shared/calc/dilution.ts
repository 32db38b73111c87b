/**
 * Dilutions of a parent standard and the proposal of pipette/flask pairs for a calibration series.
 * Source: METROLOGY §5.5: volumetric c2 = c1·Vp/Vf with u_r(c2)² = u_r(c1)² + u_r(Vp)² + u_r(Vf)²
 * (no per-item temperature term when the whole dilution is at one temperature; the liquid's expansion
 * cancels in Vp/Vf); gravimetric w2 = w1·m_aliquot/m_total with buoyancy B = (1 − ρa/ρw)/(1 − ρa/ρ)
 * for each weighing (NIST SOP 2), and γ = w·ρ_solution. Uncertainty by the GUM law of propagation
 * (JCGM 100:2008 eq. 10) through propagate(); tolerances → u: triangular a/√6 for glass (QUAM A1),
 * rectangular a/√3 for piston pipettes (ISO 8655 maximum permissible error, conservative).
 * Validity: first-order GUM; one temperature for the whole dilution. Units: volumes mL, masses as read
 * (any one unit), densities g/mL, mass fraction mg/kg, concentrations in the parent's unit.
 *
 * The fuller volumetric budget (optional inputs `repeatability` and `temperature`; the server's calc version
 * "dilution-2") adds three rows to the three above:
 * - repeatability of the delivered aliquot and of filling the flask to the mark (independent of the calibration
 *   term, METROLOGY §5.5 "repeatability components are independent"). ISO 648 and ISO 1042 state only a maximum
 *   permissible error; without the lab's own fill-and-weigh s the repeatability is taken from the same tolerance
 *   as a triangular distribution, u = a/√6 (repeatabilityFromTolerance) [common practice]. Triangular, not
 *   rectangular: fills by a trained analyst cluster at the mark and fall well inside the limits, which is the
 *   reason QUAM A1 gives for treating the tolerance itself as triangular; a/√6 (0.041 mL for a 100 mL ±0.10 mL
 *   flask) is already twice the fill-and-weigh s = 0.02 mL QUAM A1 measured (METROLOGY §5.3), so the
 *   rectangular a/√3 would only inflate it further. For piston pipettes the ISO 8655-2 random-error limit at
 *   nominal is about 0.4 × the systematic MPE or less (METROLOGY §4.5, unverified there), which a/√6 = 0.408·a covers.
 * - temperature: the liquid's expansion cancels in Vp/Vf only when the aliquot and the final solution are at
 *   the same temperature (METROLOGY §5.5). What remains is their difference ΔT = t_final − t_aliquot, modelled as
 *   0 ± half-width, rectangular, with the final solution's cubic expansion coefficient β: c2·(1 + β·ΔT).
 *   The half-width is the ±4 °C QUAM A1 allows for the laboratory's temperature (the stock's uncorrected
 *   temperature term, solution-temperature.ts) [QUAM A1; conservative when both stand in the same room].
 */
import { D, type Dec, type DecInput, toDec } from './decimal.ts';
import { CalcError } from './errors.ts';
import { buoyancyFactor, REFERENCE_WEIGHT_DENSITY } from './buoyancy.ts';
import { formatResult, shownEstimate, type RoundingRule } from './rounding.ts';
import { propagate, rectangular, triangular, type BudgetRow, type InputDistribution, type UncertainInput } from './uncertainty.ts';
import type { McModel } from './monte-carlo.ts';

export interface DilutionBudgetRow {
  input: string;
  label: string;
  value: string;
  standardUncertainty: string;
  sensitivity: string;
  contribution: string;
  share: string;
}

export interface DilutionResult {
  value: string;
  unit: string;
  standardUncertainty: string;
  expandedUncertainty: string;
  /** u_c / |y| */
  relative: string;
  k: string;
  display: string;
  budget: DilutionBudgetRow[];
}

const SIG = 20;
const s = (x: Dec) => x.toSignificantDigits(SIG).toFixed();

function rowDto(r: BudgetRow): DilutionBudgetRow {
  return {
    input: r.input,
    label: r.label,
    value: s(r.value),
    standardUncertainty: s(r.standardUncertainty),
    sensitivity: s(r.sensitivity),
    contribution: s(r.contribution),
    share: s(r.share),
  };
}

function positive(x: DecInput, name: string): Dec {
  const d = toDec(x, name);
  if (d.lte(0)) throw new CalcError('non_positive', `${name} must be greater than 0 (got ${d.toString()})`, { details: { input: name } });
  return d;
}

function finish(value: Dec, uc: Dec, unit: string, budget: BudgetRow[], k: DecInput, rule: RoundingRule): DilutionResult {
  const kk = toDec(k, 'coverage factor k');
  const U = uc.mul(kk);
  return {
    value: s(value),
    unit,
    standardUncertainty: s(uc),
    expandedUncertainty: s(U),
    relative: value.isZero() ? '0' : s(uc.div(value.abs())),
    k: kk.toString(),
    display: U.gt(0) ? formatResult(value, U, unit, kk, { rule }) : `${value.toString()} ${unit}`,
    budget: budget.map(rowDto),
  };
}

// ------------------------------------------------------------------ volumetric

export interface VolumetricDilutionInput {
  /** the parent's concentration (any unit; the result has the same unit) and its standard uncertainty */
  parent: { value: DecInput; unit: string; standardUncertainty: DecInput };
  /** delivered aliquot, mL, with its standard uncertainty (calibration, and repeatability if known); label: the budget row's name (default "Aliquot volume"); distribution: as the budget states it (for Monte Carlo) */
  aliquot: { volumeMl: DecInput; standardUncertainty: DecInput; label?: string; distribution?: InputDistribution };
  /** final (flask) volume, mL, with its standard uncertainty; label: the budget row's name (default "Final volume") */
  final: { volumeMl: DecInput; standardUncertainty: DecInput; label?: string; distribution?: InputDistribution };
  /** standard uncertainties (mL) of the aliquot's delivery and the flask's filling from repeat to repeat; omitted: not in the budget */
  repeatability?: { aliquotMl: DecInput; finalMl: DecInput; aliquotLabel?: string; finalLabel?: string; distribution?: InputDistribution };
  /** the temperature difference between aliquot and final solution, 0 ± u(ΔT) °C, with the liquid's β (1/K); omitted: not in the budget */
  temperature?: { betaPerK: DecInput; standardUncertaintyC: DecInput; label?: string };
  k?: DecInput;
  rounding?: RoundingRule;
}

/** ±4 °C between the aliquot and the final solution, rectangular (QUAM A1's laboratory temperature allowance). */
export const DILUTION_TEMPERATURE_HALF_WIDTH_C = '4';

/**
 * Repeatability of a glass or piston volume from its tolerance a, when the lab has no fill-and-weigh s:
 * triangular a/√6 [common practice; reasons in the header].
 */
export function repeatabilityFromTolerance(toleranceMl: DecInput): Dec {
  return triangular(toleranceMl);
}

/** c2 = c1·Vp/Vf (METROLOGY §5.5); the parent's uncertainty enters the budget as an input. */
export function volumetricDilution(i: VolumetricDilutionInput): DilutionResult {
  const { inputs, model } = volumetricModel(i);
  const r = propagate({ model, inputs });
  return finish(r.value, r.standardUncertainty, i.parent.unit, r.budget, i.k ?? '2', i.rounding ?? 'half-even');
}

/**
 * The dilution's measurement model for the Monte Carlo propagation (monte-carlo.ts): the budget's inputs with their
 * distributions (parent normal, from its own GUM budget; tolerances as the caller states them, default normal;
 * temperature difference rectangular ±4 °C, QUAM A1) and the same model in plain numbers.
 */
export function volumetricDilutionMonteCarloModel(i: VolumetricDilutionInput): McModel {
  const { inputs, model } = volumetricModel(i);
  const r = propagate({ model, inputs });
  const beta = i.temperature ? toDec(i.temperature.betaPerK, 'expansion coefficient').toNumber() : 0;
  return {
    inputs: Object.entries(inputs).map(([name, x]) => ({
      name,
      value: toDec(x.value, name),
      standardUncertainty: toDec(x.standardUncertainty, name),
      distribution: x.distribution ?? 'normal',
    })),
    model: (x) => (x.parent * (x.aliquot + (x.aliquotRepeatability ?? 0))) / (x.final + (x.finalRepeatability ?? 0)) * (x.temperature === undefined ? 1 : 1 + beta * x.temperature),
    gum: { value: r.value, standardUncertainty: r.standardUncertainty },
    unit: i.parent.unit,
  };
}

function volumetricModel(i: VolumetricDilutionInput): { inputs: Record<string, UncertainInput>; model: (x: Record<string, Dec>) => Dec } {
  positive(i.parent.value, 'Parent concentration');
  const vp = positive(i.aliquot.volumeMl, 'Aliquot volume');
  const vf = positive(i.final.volumeMl, 'Final volume');
  if (vp.gt(vf)) {
    throw new CalcError('calc_out_of_range', `The aliquot (${vp.toString()} mL) cannot be larger than the final volume (${vf.toString()} mL)`, { details: { input: 'aliquot' } });
  }
  const inputs: Record<string, UncertainInput> = {
    parent: { value: i.parent.value, standardUncertainty: i.parent.standardUncertainty, label: 'Parent concentration', unit: i.parent.unit },
    aliquot: { value: i.aliquot.volumeMl, standardUncertainty: i.aliquot.standardUncertainty, label: i.aliquot.label ?? 'Aliquot volume', unit: 'mL', ...(i.aliquot.distribution ? { distribution: i.aliquot.distribution } : {}) },
    final: { value: i.final.volumeMl, standardUncertainty: i.final.standardUncertainty, label: i.final.label ?? 'Final volume', unit: 'mL', ...(i.final.distribution ? { distribution: i.final.distribution } : {}) },
  };
  const repDist = i.repeatability?.distribution ? { distribution: i.repeatability.distribution } : {};
  if (i.repeatability) {
    inputs.aliquotRepeatability = { value: '0', standardUncertainty: i.repeatability.aliquotMl, label: i.repeatability.aliquotLabel ?? 'Aliquot repeatability', unit: 'mL', ...repDist };
    inputs.finalRepeatability = { value: '0', standardUncertainty: i.repeatability.finalMl, label: i.repeatability.finalLabel ?? 'Flask filling repeatability', unit: 'mL', ...repDist };
  }
  const beta = i.temperature ? toDec(i.temperature.betaPerK, 'expansion coefficient') : new D(0);
  if (i.temperature) {
    inputs.temperature = { value: '0', standardUncertainty: i.temperature.standardUncertaintyC, label: i.temperature.label ?? 'Temperature difference, aliquot to final solution', unit: '°C', distribution: 'rectangular' };
  }
  const model = (x: Record<string, Dec>) => {
    const vp = x.aliquot!.plus(x.aliquotRepeatability ?? 0);
    const vf = x.final!.plus(x.finalRepeatability ?? 0);
    const t = x.temperature ? new D(1).plus(beta.mul(x.temperature)) : new D(1);
    return x.parent!.mul(vp).div(vf).mul(t);
  };
  return { inputs, model };
}

// ------------------------------------------------------------------ gravimetric

export interface GravimetricDilutionInput {
  /** mass fraction of the analyte in the parent, mg/kg */
  parentMassFraction: DecInput;
  /** its standard uncertainty, mg/kg */
  u: DecInput;
  /** net balance reading of the aliquot of parent solution (any mass unit) and its standard uncertainty */
  aliquotReading: { value: DecInput; standardUncertainty: DecInput };
  /** net balance reading of the final solution (same unit as the aliquot) and its standard uncertainty */
  finalReading: { value: DecInput; standardUncertainty: DecInput };
  /** g/mL: the parent solution (aliquot), the final solution, optional weight density (default 8.0) */
  densities: {
    aliquot: DecInput;
    final: DecInput;
    aliquotU?: DecInput;
    finalU?: DecInput;
    weights?: DecInput;
  };
  /** air density, g/mL, and its standard uncertainty (default 0) */
  air: { density: DecInput; standardUncertainty?: DecInput };
  k?: DecInput;
  rounding?: RoundingRule;
}

export interface GravimetricDilutionResult {
  massFraction: DilutionResult;
  /** γ = w·ρ_final (mg/kg × g/mL = mg/L), with u(ρ_final) as an input */
  massConcentration: DilutionResult;
  /** B(aliquot)/B(final): close to 1 when the densities are similar (METROLOGY §5.5) */
  buoyancyRatio: string;
}

/** w2 = w1·(r_a·B_a)/(r_f·B_f); γ = w2·ρ_final (METROLOGY §5.5). */
export function gravimetricDilution(i: GravimetricDilutionInput): GravimetricDilutionResult {
  positive(i.parentMassFraction, 'Parent mass fraction');
  const ra = positive(i.aliquotReading.value, 'Aliquot reading');
  const rf = positive(i.finalReading.value, 'Final reading');
  if (ra.gt(rf)) {
    throw new CalcError('calc_out_of_range', `The aliquot reading (${ra.toString()}) cannot be larger than the final solution's reading (${rf.toString()})`, { details: { input: 'aliquotReading' } });
  }
  const rhoW = i.densities.weights ?? REFERENCE_WEIGHT_DENSITY;
  const zero = '0';
  const inputs: Record<string, UncertainInput> = {
    parent: { value: i.parentMassFraction, standardUncertainty: i.u, label: 'Parent mass fraction', unit: 'mg/kg' },
    aliquot: { value: i.aliquotReading.value, standardUncertainty: i.aliquotReading.standardUncertainty, label: 'Aliquot weighing' },
    final: { value: i.finalReading.value, standardUncertainty: i.finalReading.standardUncertainty, label: 'Final solution weighing' },
    airDensity: { value: i.air.density, standardUncertainty: i.air.standardUncertainty ?? zero, label: 'Air density', unit: 'g/mL' },
    aliquotDensity: { value: i.densities.aliquot, standardUncertainty: i.densities.aliquotU ?? zero, label: 'Parent solution density', unit: 'g/mL' },
    finalDensity: { value: i.densities.final, standardUncertainty: i.densities.finalU ?? zero, label: 'Final solution density', unit: 'g/mL' },
  };
  const w = (x: Record<string, Dec>) => {
    const ba = buoyancyFactor({ airDensity: x.airDensity!, sampleDensity: x.aliquotDensity!, weightDensity: rhoW });
    const bf = buoyancyFactor({ airDensity: x.airDensity!, sampleDensity: x.finalDensity!, weightDensity: rhoW });
    return x.parent!.mul(x.aliquot!).mul(ba).div(x.final!.mul(bf));
  };
  const k = i.k ?? '2';
  const rule = i.rounding ?? 'half-even';
  const rw = propagate({ model: w, inputs });
  const rg = propagate({ model: (x) => w(x).mul(x.finalDensity!), inputs });
  const ratio = buoyancyFactor({ airDensity: i.air.density, sampleDensity: i.densities.aliquot, weightDensity: rhoW }).div(
    buoyancyFactor({ airDensity: i.air.density, sampleDensity: i.densities.final, weightDensity: rhoW }),
  );
  return {
    massFraction: finish(rw.value, rw.standardUncertainty, 'mg/kg', rw.budget, k, rule),
    massConcentration: finish(rg.value, rg.standardUncertainty, 'mg/L', rg.budget, k, rule),
    buoyancyRatio: s(ratio),
  };
}

// ------------------------------------------------------------------ series proposal

export interface SeriesWare {
  id: number;
  identifier: string;
  kind: 'volumetric_flask' | 'bulb_pipette' | 'graduated_pipette' | 'piston_pipette';
  nominalVolumeMl: string;
  class: 'A' | 'B' | 'n/a';
  /** ± mL at nominal volume; the caller fills in the class A table value when none is recorded */
  toleranceMl?: string | null;
  status: string;
}

export interface SeriesChoice {
  pipette: { id: number; identifier: string; kind: SeriesWare['kind']; class: SeriesWare['class'] };
  flask: { id: number; identifier: string; class: SeriesWare['class'] };
  aliquotMl: string;
  finalMl: string;
  /** c_parent·Va/Vf in the parent's unit */
  concentration: string;
  /** (achieved − target)/target */
  deviation: string;
  exact: boolean;
  /** expected u_r from the two tolerances and the parent's u_r; null when a tolerance is unknown */
  expectedRelativeU: string | null;
}

export interface SeriesLevelProposal {
  target: { value: string; unit: string };
  choice: SeriesChoice | null;
  alternatives: SeriesChoice[];
  /** why no pair fits (only when choice is null) */
  message?: string;
}

export interface ProposeSeriesInput {
  parentConcentration: { value: DecInput; unit: string; standardUncertainty?: DecInput };
  levels: Array<{ value: string; unit: string }>;
  pipettes: SeriesWare[];
  flasks: SeriesWare[];
  /** smallest bulb-pipette aliquot, mL (common practice: 1 mL); piston pipettes: ≥ 10 % of nominal */
  minAliquotMl?: DecInput;
  /** largest |deviation| of an inexact pair (default 0.05 = 5 %) */
  maxDeviation?: DecInput;
  /** the fuller budget (dilution-2): repeatability from each tolerance and the temperature term with this β (1/K) */
  fullerBudget?: { betaPerK: DecInput };
}

const EXACT = new D('1e-12');

/**
 * The smallest step a piston pipette's volume can be set in, mL: a thousandth of its nominal volume
 * (a 1000 µL pipette sets in 1 µL steps, a 100 µL one in 0.1 µL, a 10 mL one in 10 µL). Common practice for
 * adjustable pipettes with a four-digit counter; from memory of makers' data, not from ISO 8655.
 */
export function pistonStepMl(nominalVolumeMl: DecInput): Dec {
  return toDec(nominalVolumeMl, 'pipette volume').div(1000);
}

/** A wanted volume rounded to the nearest setting of the piston pipette (half-even), mL. */
export function pistonSetting(wantedMl: DecInput, nominalVolumeMl: DecInput): Dec {
  const step = pistonStepMl(nominalVolumeMl);
  return toDec(wantedMl, 'aliquot volume').div(step).toDecimalPlaces(0, D.ROUND_HALF_EVEN).mul(step);
}

function tolU(w: SeriesWare): Dec | null {
  if (!w.toleranceMl) return null;
  return w.kind === 'piston_pipette' ? rectangular(w.toleranceMl) : triangular(w.toleranceMl);
}

/**
 * For each level, the in-service pipette/flask pair whose ratio gives the target most closely (exact first),
 * then class A, then the lowest expected u_r (METROLOGY §5.5 with §4.4 tolerances); bulb pipettes deliver their
 * nominal volume (≥ minAliquotMl), piston pipettes are set anywhere from 10 % of nominal to nominal (common practice).
 * Each level gets a flask of its own (the first level in order takes its best flask; later levels the next best).
 */
export function proposeSeries(i: ProposeSeriesInput): SeriesLevelProposal[] {
  const c1 = positive(i.parentConcentration.value, 'Parent concentration');
  const ur1 = i.parentConcentration.standardUncertainty !== undefined ? toDec(i.parentConcentration.standardUncertainty, 'parent u').div(c1) : new D(0);
  const minAliquot = toDec(i.minAliquotMl ?? '1', 'minAliquotMl');
  const maxDev = toDec(i.maxDeviation ?? '0.05', 'maxDeviation');
  const pipettes = i.pipettes.filter((p) => p.status === 'in_service' && (p.kind === 'bulb_pipette' || p.kind === 'piston_pipette'));
  const flasks = i.flasks.filter((f) => f.status === 'in_service' && f.kind === 'volumetric_flask');
  const parentShown = shownEstimate(c1, i.parentConcentration.standardUncertainty); // as the record shows it, never the internal digits
  const ranked = i.levels.map((level): SeriesLevelProposal & { options?: SeriesChoice[] } => {
    const target = { value: level.value, unit: level.unit };
    if (level.unit !== i.parentConcentration.unit) {
      return { target, choice: null, alternatives: [], message: `The level is in ${level.unit} but the parent is in ${i.parentConcentration.unit}; give levels in ${i.parentConcentration.unit}` };
    }
    const c2 = positive(level.value, 'Level concentration');
    if (c2.gte(c1)) return { target, choice: null, alternatives: [], message: `${level.value} ${level.unit} is not below the parent's ${parentShown} ${level.unit}, so it is not a dilution` };
    const ratio = c2.div(c1);
    const options: Array<SeriesChoice & { score: [Dec, number, Dec] }> = [];
    for (const f of flasks) {
      const vf = toDec(f.nominalVolumeMl, 'flask volume');
      const uf = tolU(f);
      for (const p of pipettes) {
        const nominal = toDec(p.nominalVolumeMl, 'pipette volume');
        let va: Dec;
        if (p.kind === 'bulb_pipette') {
          if (nominal.lt(minAliquot)) continue;
          va = nominal;
        } else {
          va = pistonSetting(ratio.mul(vf), nominal);
          if (va.gt(nominal) || va.lt(nominal.mul('0.1'))) continue;
        }
        if (va.gte(vf)) continue;
        const achieved = c1.mul(va).div(vf);
        const dev = achieved.minus(c2).div(c2);
        if (dev.abs().gt(maxDev)) continue;
        const up = tolU(p);
        // a piston pipette's tolerance is stated at nominal; relative error grows at lower settings (ISO 8655): use the absolute value
        let urExpected = up && uf ? ur1.pow(2).plus(up.div(va).pow(2)).plus(uf.div(vf).pow(2)) : null;
        if (urExpected && i.fullerBudget) {
          // repeatability a/√6 of each item and β·u(ΔT), as volumetricDilution's fuller budget (header)
          const rp = repeatabilityFromTolerance(p.toleranceMl!).div(va);
          const rf = repeatabilityFromTolerance(f.toleranceMl!).div(vf);
          const rt = toDec(i.fullerBudget.betaPerK, 'expansion coefficient').mul(rectangular(DILUTION_TEMPERATURE_HALF_WIDTH_C));
          urExpected = urExpected.plus(rp.pow(2)).plus(rf.pow(2)).plus(rt.pow(2));
        }
        if (urExpected) urExpected = urExpected.sqrt();
        const exact = dev.abs().lt(EXACT);
        const classRank = (p.class === 'A' ? 0 : 1) + (f.class === 'A' ? 0 : 1);
        options.push({
          pipette: { id: p.id, identifier: p.identifier, kind: p.kind, class: p.class },
          flask: { id: f.id, identifier: f.identifier, class: f.class },
          aliquotMl: va.toFixed(),
          finalMl: vf.toFixed(),
          concentration: s(achieved),
          deviation: exact ? '0' : s(dev),
          exact,
          expectedRelativeU: urExpected ? s(urExpected) : null,
          score: [exact ? new D(0) : dev.abs(), classRank, urExpected ?? new D(1)],
        });
      }
    }
    options.sort((a, b) => a.score[0].cmp(b.score[0]) || a.score[1] - b.score[1] || a.score[2].cmp(b.score[2]) || a.pipette.identifier.localeCompare(b.pipette.identifier) || a.flask.identifier.localeCompare(b.flask.identifier));
    const clean = options.map(({ score: _score, ...rest }) => rest);
    if (!clean.length) {
      return {
        target,
        choice: null,
        alternatives: [],
        message: `No in-service pipette and flask give ${level.value} ${level.unit} from ${parentShown} ${level.unit} within ${maxDev.mul(100).toString()} % (aliquot ≥ ${minAliquot.toString()} mL for bulb pipettes, ≥ 10 % of nominal for piston pipettes)`,
      };
    }
    return { target, choice: null, alternatives: [], options: clean };
  });
  // One flask holds one level: levels take their best pair in order, each with a flask no earlier level took;
  // a pipette is rinsed and used again, so pipettes may repeat.
  const taken = new Set<number>();
  const choices = ranked.map((l) => {
    const c = l.options?.find((o) => !taken.has(o.flask.id)) ?? null;
    if (c) taken.add(c.flask.id);
    return c;
  });
  return ranked.map(({ options, ...l }, k) => {
    if (!options) return l;
    const choice = choices[k]!;
    if (!choice) return { ...l, message: `Every flask that gives ${l.target.value} ${l.target.unit} is taken by another level of this series` };
    const others = new Set(choices.filter((c, j) => c && j !== k).map((c) => c!.flask.id));
    return { ...l, choice, alternatives: options.filter((o) => o !== choice && !others.has(o.flask.id)).slice(0, 5) };
  });
}

// ------------------------------------------------------------------ intermediate step

export interface IntermediateProposal {
  /** the planned dilution of the parent the levels are then made from */
  target: { value: string; unit: string };
  choice: SeriesChoice;
  /** the levels (by index in the request) that need it, with the pair each then takes from the intermediate */
  levels: Array<{ index: number; proposal: SeriesLevelProposal }>;
  message: string;
}

/**
 * When some levels lie too far below the parent for any one pipette and flask (µg/L from 1000 mg/L), a first
 * dilution of the parent that every such level can then be made from [common practice: serial dilution, no step
 * beyond what one pipette and flask give]. Candidates are the concentrations an exact pair gives from the parent
 * (c1·Va/Vf); the one that reaches the most of those levels wins, then exactly, then with the lowest summed expected
 * u_r of the levels (the intermediate's own u_r enters each level through its parent term), then the highest
 * concentration (the least diluted, the most stable). Returns null when no level needs one or no candidate helps.
 */
export function proposeIntermediate(i: ProposeSeriesInput, proposals: SeriesLevelProposal[] = proposeSeries(i)): IntermediateProposal | null {
  const c1 = positive(i.parentConcentration.value, 'Parent concentration');
  const unit = i.parentConcentration.unit;
  const needing = proposals
    .map((p, index) => ({ p, index }))
    .filter(({ p, index }) => !p.choice && i.levels[index]!.unit === unit && new D(i.levels[index]!.value).lt(c1));
  if (!needing.length) return null;
  // candidate concentrations: every exact pair from the parent, at one tenth of the parent or below
  const levelsAbove = needing.map(({ index }) => new D(i.levels[index]!.value));
  const lowest = D.min(...levelsAbove);
  const candidates = new Map<string, SeriesChoice>();
  const flasks = i.flasks.filter((f) => f.status === 'in_service' && f.kind === 'volumetric_flask');
  const pipettes = i.pipettes.filter((p) => p.status === 'in_service' && p.kind === 'bulb_pipette');
  for (const f of flasks) {
    for (const p of pipettes) {
      const c = c1.mul(p.nominalVolumeMl).div(f.nominalVolumeMl);
      if (c.gt(c1.div(10)) || c.lte(lowest)) continue;
      const key = c.toSignificantDigits(12).toFixed();
      if (!candidates.has(key)) {
        const [first] = proposeSeries({ ...i, levels: [{ value: key, unit }] });
        if (first?.choice?.exact) candidates.set(key, first.choice);
      }
    }
  }
  let best: { key: string; choice: SeriesChoice; reached: Array<{ index: number; proposal: SeriesLevelProposal }>; exact: number; sumU: Dec } | null = null;
  for (const [key, choice] of candidates) {
    const parentU = choice.expectedRelativeU ? new D(choice.expectedRelativeU).mul(key) : undefined;
    const sub = proposeSeries({ ...i, parentConcentration: { value: key, unit, ...(parentU ? { standardUncertainty: parentU } : {}) }, levels: needing.map(({ index }) => i.levels[index]!) });
    const reached = sub.map((proposal, k) => ({ index: needing[k]!.index, proposal })).filter((x) => x.proposal.choice);
    const exact = reached.filter((x) => x.proposal.choice!.exact).length;
    const sumU = reached.reduce((a, x) => a.plus(x.proposal.choice!.expectedRelativeU ?? 1), new D(0));
    const better =
      !best ||
      reached.length > best.reached.length ||
      (reached.length === best.reached.length && (exact > best.exact || (exact === best.exact && (sumU.lt(best.sumU) || (sumU.eq(best.sumU) && new D(key).gt(best.key))))));
    if (better) best = { key, choice, reached, exact, sumU };
  }
  if (!best || !best.reached.length) return null;
  const left = needing.length - best.reached.length;
  return {
    target: { value: best.key, unit },
    choice: best.choice,
    levels: best.reached,
    message:
      `Too far below ${c1.toString()} ${unit} for one pipette and flask: first dilute ${best.choice.aliquotMl} mL of the parent with ${best.choice.pipette.identifier} into ${best.choice.finalMl} mL (${best.choice.flask.identifier}) to ${best.key} ${unit}, ` +
      `then make ${best.reached.length === 1 ? 'that level' : `those ${best.reached.length} levels`} from it once it is verified` +
      (left ? `; ${left} level(s) remain out of reach` : ''),
  };
}
