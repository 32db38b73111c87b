/**
 * The arithmetic of a gravimetric dilution from stored values (no formulas of its own beyond unit handling):
 * shared/calc gravimetricDilution (METROLOGY §5.5: w2 = w1·(r_a·B_a)/(r_f·B_f), γ2 = w2·ρ_final), buoyancyFactor
 * (§2.1), airDensityUncertainty (CIPM-2007 §1.1 with its default input uncertainties), waterDensityTanaka (§3.1);
 * shared/prep netWeighingUncertainty (§5.2) for each net reading. Also the read side the rest of the server needs
 * (is a record gravimetric, its current readings, its stored result, its detail section), kept here so that
 * lineage-view and signatures can use it without importing the write service.
 *
 * Densities (the plan's choice, stated in the plan and the result):
 * - parent solution, when not entered: water (Tanaka 2001) at the parent's make-up solution temperature (20 °C if
 *   none was recorded), u rectangular with half-width 0.005 g/mL. Why: the parents here are dilute aqueous standards;
 *   a 1000 mg/L metal standard from its salt is about 0.001 g/mL denser than water and 1 % nitric acid about
 *   0.005 g/mL (METROLOGY §2.2 lists 2 % HNO3 at 1.0091 g/mL against water 0.998), so ±0.005 g/mL covers both
 *   [CP]. This term converts the parent's mass concentration to a mass fraction, w1 = γ1/ρ1, and enters w2 fully
 *   (u_r ≈ 0.29 %): a measured density should be entered when that matters.
 * - final solution, when not entered: water at the room temperature of the readings, same half-width [CP]; it
 *   enters γ2 = w2·ρ_final fully and the buoyancy of the final weighing slightly.
 * - entered densities: u rectangular with a half-width of one unit in the last digit typed [CP].
 * ρ1 (in w1) and ρ_final are treated as independent, which is conservative when both are the same matrix; the
 * correlation of ρ1 between w1 and B_aliquot is neglected (∂lnB/∂ρ = −ρa/ρ² ≈ −1.2·10⁻³ per g/mL, METROLOGY §2.3).
 */
import { capturesOf } from './reading-capture.ts';
import type { Transaction } from 'sequelize';
import {
  airDensityUncertainty,
  buoyancyFactor,
  convertConcentration,
  CalcError,
  D,
  lastDigitUnit,
  rectangular,
  REFERENCE_WEIGHT_DENSITY,
  roundToDecimals,
  unitKind,
  waterDensityTanaka,
  type Dec,
  type RoundingRule,
} from '../../shared/calc/index.ts';
import { gravimetricDilution } from '../../shared/calc/dilution.ts';
import { decimalsOf } from '../../shared/prep/index.ts';
import { netWeighingUncertainty } from '../../shared/prep/weighing-uncertainty.ts';
import type { GravimetricDilutionSection, GravimetricMasses, GravimetricPlan, GravimetricReadingDto, GravimetricResult, SourcedValue } from '../../shared/schemas/gravimetric.ts';
import type { Balance as BalanceDto } from '../../shared/schemas/inventory.ts';
import type { ParentSnapshot } from '../../shared/schemas/lineage.ts';
import type { ConditionsUsed } from '../../shared/schemas/preparations.ts';
import type { LabSettings } from '../../shared/schemas/settings.ts';
import { GravimetricReading, Preparation, PreparationParent, User } from '../db/models/index.ts';
import { AppError } from '../errors/app-error.ts';

export const GRAVIMETRIC_CALC_VERSION = 'gravimetric-dilution-1 (METROLOGY §5.5: w2 = w1·(r_a·B_a)/(r_f·B_f), γ2 = w2·ρ_final; B per §2.1, ρa CIPM-2007 §1.1)';
/** half-width of the default solution density, g/mL (see the header) [CP] */
export const DEFAULT_DENSITY_HALF_WIDTH = '0.005';

const SIG = 20;
const s = (x: Dec) => x.toSignificantDigits(SIG).toFixed();

// ------------------------------------------------------------------ read side

/** A gravimetric dilution is a dilution whose stored plan says so (volumetric plans have no method). */
export function isGravimetricPlan(p: Pick<Preparation, 'plan'>): boolean {
  return (p.plan as unknown as { dilution?: { method?: string } } | null)?.dilution?.method === 'gravimetric';
}

export const gravimetricPlanOf = (p: Pick<Preparation, 'plan'>): GravimetricPlan => (p.plan as unknown as { dilution: GravimetricPlan }).dilution;

/** The newest readings record that no other supersedes. */
export function activeReadings(rows: GravimetricReading[]): GravimetricReading | undefined {
  const superseded = new Set(rows.map((r) => r.supersedesId).filter((x): x is number => x !== null));
  return rows.filter((r) => !superseded.has(r.id)).at(-1);
}

export async function readingsOf(preparationId: number, transaction?: Transaction): Promise<GravimetricReading[]> {
  return GravimetricReading.findAll({ where: { preparationId }, order: [['id', 'ASC']], ...(transaction ? { transaction } : {}) });
}

/** The stored result when it is based on the current readings; otherwise computed from them (null without readings). */
export async function gravimetricResultOf(p: Preparation, settings: Pick<LabSettings, 'roundingRule'>, transaction?: Transaction): Promise<GravimetricResult | null> {
  const current = activeReadings(await readingsOf(p.id, transaction));
  if (!current) return null;
  const stored = p.dilutionResult as unknown as GravimetricResult | null | undefined;
  if (stored && stored.method === 'gravimetric' && stored.basedOn?.readingsId === current.id) return stored;
  return computeGravimetricResult(gravimetricPlanOf(p), current, settings.roundingRule);
}

function readingDto(r: GravimetricReading, supersededBy: Map<number, number>, users: Map<number, User>): GravimetricReadingDto {
  const dto: GravimetricReadingDto = {
    id: r.id,
    unit: r.unit,
    aliquotReading: r.aliquotReading,
    finalReading: r.finalReading,
    captures: capturesOf(r.captures, ['aliquotReading', 'finalReading']),
    balance: { id: r.balanceId, identifier: r.balanceSnapshot.identifier, snapshot: r.balanceSnapshot },
    conditions: r.conditions,
    airDensity: { value: r.airDensity, standardUncertainty: r.airDensityU },
    recordedBy: { id: r.recordedBy, fullName: users.get(r.recordedBy)?.fullName ?? `user ${r.recordedBy}` },
    recordedAt: r.recordedAt,
  };
  if (r.supersedesId !== null) dto.supersedesId = r.supersedesId;
  const by = supersededBy.get(r.id);
  if (by !== undefined) dto.supersededById = by;
  if (r.correctionReason) dto.correctionReason = r.correctionReason;
  return dto;
}

/** LineageSection.gravimetric of GET /api/preparations/:key. */
export async function gravimetricSection(p: Preparation, settings: Pick<LabSettings, 'roundingRule'>): Promise<GravimetricDilutionSection | null> {
  const link = await PreparationParent.findOne({ where: { preparationId: p.id, role: 'aliquot' } });
  if (!link) return null;
  const rows = await readingsOf(p.id);
  const users = new Map((await User.findAll({ where: { id: [...new Set(rows.map((r) => r.recordedBy))] } })).map((u) => [u.id, u]));
  const supersededBy = new Map<number, number>();
  for (const r of rows) if (r.supersedesId !== null) supersededBy.set(r.supersedesId, r.id);
  const section: GravimetricDilutionSection = {
    method: 'gravimetric',
    parent: { id: link.parentPreparationId, identifier: link.snapshot.identifier, snapshot: link.snapshot },
    plan: gravimetricPlanOf(p),
    gates: p.gates,
    readings: rows.map((r) => readingDto(r, supersededBy, users)),
  };
  const result = await gravimetricResultOf(p, settings);
  if (result) section.result = result;
  return section;
}

// ------------------------------------------------------------------ inputs

/** Water (Tanaka 2001, air-free) at t, g/mL, with the default half-width as a rectangular u. */
export function defaultSolutionDensity(temperatureC: string, what: string): SourcedValue {
  const rho = waterDensityTanaka(temperatureC).div(1000);
  return {
    value: s(rho),
    standardUncertainty: s(rectangular(DEFAULT_DENSITY_HALF_WIDTH)),
    basis: `${what}: taken as water at ${temperatureC} °C (Tanaka 2001), ±${DEFAULT_DENSITY_HALF_WIDTH} g/mL rectangular for dissolved salts and acid [common practice]; enter a measured density to narrow it`,
  };
}

/** A density typed by the chemist, u rectangular with one unit in its last digit as half-width. */
export function enteredDensity(typed: string, what: string): SourcedValue {
  const half = lastDigitUnit(typed);
  return { value: typed, standardUncertainty: s(rectangular(half)), basis: `${what}: ${typed} g/mL as entered, ±${half.toString()} g/mL rectangular (last digit) [common practice]` };
}

/** Air density (CIPM-2007) in g/mL with its u from the default u(t) 0.2 K, u(p) 50 Pa, u(h) 0.03, u(xCO2) 0.0001. */
export function airDensityOf(c: Pick<ConditionsUsed, 'temperatureC' | 'pressureHPa' | 'relativeHumidityPct'>): SourcedValue {
  const r = airDensityUncertainty({ temperatureC: c.temperatureC, pressurePa: new D(c.pressureHPa).mul(100), relativeHumidity: new D(c.relativeHumidityPct).div(100) });
  return {
    value: s(r.density.div(1000)),
    standardUncertainty: s(r.standardUncertainty.div(1000)),
    basis: `CIPM-2007 at ${c.temperatureC} °C, ${c.pressureHPa} hPa, ${c.relativeHumidityPct} % RH (u(t) 0.2 K, u(p) 50 Pa, u(h) 3 %, u(xCO2) 0.0001)`,
  };
}

/**
 * The parent's analyte as a mass fraction, mg/kg. A mass concentration γ1 is divided by the parent solution's
 * density: w1 = γ1/ρ1 (mg/L ÷ g/mL = mg/kg), u_r(w1)² = u_r(γ1)² + u_r(ρ1)² (GUM eq. 10 for a quotient).
 * A parent that is itself a gravimetric dilution gives its own mass fraction (no density needed).
 */
export function parentMassFractionOf(parent: ParentSnapshot, parentDensity: SourcedValue, ownMassFraction?: { value: string; standardUncertainty: string } | null): SourcedValue {
  if (ownMassFraction) return { value: ownMassFraction.value, standardUncertainty: ownMassFraction.standardUncertainty, basis: `mass fraction of ${parent.identifier} as recorded (gravimetric)` };
  const c = parent.concentration;
  const kind = unitKind(c.unit);
  if (kind === 'massFraction') {
    const f = convertConcentration('1', c.unit, 'mg/kg');
    return { value: s(new D(c.value).mul(f)), standardUncertainty: s(new D(c.standardUncertainty).mul(f)), basis: `mass fraction of ${parent.identifier} as recorded` };
  }
  if (kind !== 'massConcentration') {
    throw AppError.validation(`${parent.identifier} is in ${c.unit}; a gravimetric dilution needs a parent in a mass concentration or mass fraction`, { parent: `${parent.identifier} is in ${c.unit}: use a parent in mg/L or mg/kg` });
  }
  const gamma = convertConcentration(c.value, c.unit, 'mg/L');
  const ug = convertConcentration(c.standardUncertainty, c.unit, 'mg/L');
  const rho = new D(parentDensity.value);
  const w = gamma.div(rho);
  const ur = ug.div(gamma).pow(2).plus(new D(parentDensity.standardUncertainty).div(rho).pow(2)).sqrt();
  return { value: s(w), standardUncertainty: s(w.mul(ur)), basis: `w1 = γ1/ρ1 = ${c.value} ${c.unit} / ${parentDensity.value} g/mL (${parent.identifier})` };
}

/** u of one net reading (METROLOGY §5.2 via netWeighingUncertainty) in the unit it was read in. */
export function readingUncertainty(b: BalanceDto, unit: 'g' | 'mg'): { standardUncertainty: string; basis: string } {
  const u = netWeighingUncertainty({ readabilityMg: b.readabilityMg, repeatabilitySdMg: b.repeatabilitySdMg, calibrationUncertaintyMg: b.calibrationUncertaintyMg, calibrationUncertaintyK: b.calibrationUncertaintyK });
  const value = unit === 'g' ? s(new D(u.standardUncertainty).div(1000)) : u.standardUncertainty;
  return { standardUncertainty: value, basis: `${b.identifier}: ${u.basis}` };
}

/** True mass → the reading (m' = m/B) and the reading to aim for at the balance's decimals. */
export function massesFor(trueMassG: Dec, airDensity: string, sampleDensity: string, balance: BalanceDto, rounding: RoundingRule): GravimetricMasses {
  const B = buoyancyFactor({ airDensity, sampleDensity, weightDensity: balance.weightDensityGPerMl ?? REFERENCE_WEIGHT_DENSITY });
  const reading = trueMassG.div(B);
  return { trueMassG: s(trueMassG), readingG: s(reading), readingShownG: roundToDecimals(reading, decimalsOf(balance.readabilityMg, 'g'), rounding), buoyancyFactor: s(B) };
}

// ------------------------------------------------------------------ the result

/** The result of one readings record against its plan: the core's gravimetricDilution, rounded by the lab rule. */
export function computeGravimetricResult(plan: GravimetricPlan, r: Pick<GravimetricReading, 'id' | 'unit' | 'aliquotReading' | 'finalReading' | 'balanceSnapshot' | 'airDensity' | 'airDensityU' | 'conditions'>, rounding: RoundingRule): GravimetricResult {
  const u = readingUncertainty(r.balanceSnapshot, r.unit);
  // the final solution's default density follows the room temperature of these readings
  const finalDensity = plan.finalDensity.basis.includes('taken as water') ? defaultSolutionDensity(r.conditions.temperatureC, 'Final solution density') : plan.finalDensity;
  const weightDensity = r.balanceSnapshot.weightDensityGPerMl ?? REFERENCE_WEIGHT_DENSITY.toString();
  let core;
  try {
    core = gravimetricDilution({
      parentMassFraction: plan.parentMassFraction.value,
      u: plan.parentMassFraction.standardUncertainty,
      aliquotReading: { value: r.aliquotReading, standardUncertainty: u.standardUncertainty },
      finalReading: { value: r.finalReading, standardUncertainty: u.standardUncertainty },
      densities: { aliquot: plan.parentDensity.value, aliquotU: plan.parentDensity.standardUncertainty, final: finalDensity.value, finalU: finalDensity.standardUncertainty, weights: weightDensity },
      air: { density: r.airDensity, standardUncertainty: r.airDensityU },
      rounding,
    });
  } catch (e) {
    if (e instanceof CalcError) throw AppError.validation(e.message, { [e.details?.input === 'aliquotReading' ? 'aliquotReading' : 'finalReading']: e.message });
    throw e;
  }
  return {
    method: 'gravimetric',
    massFraction: core.massFraction,
    massConcentration: core.massConcentration,
    buoyancyRatio: core.buoyancyRatio,
    display: `${core.massFraction.display}; ${core.massConcentration.display}`,
    inputs: {
      parentMassFraction: plan.parentMassFraction,
      parentDensity: plan.parentDensity,
      finalDensity,
      airDensity: { value: r.airDensity, standardUncertainty: r.airDensityU, basis: airDensityOf(r.conditions).basis },
      aliquotReading: { value: r.aliquotReading, unit: r.unit, ...u },
      finalReading: { value: r.finalReading, unit: r.unit, ...u },
      weightDensity,
    },
    calcVersion: GRAVIMETRIC_CALC_VERSION,
    basedOn: { readingsId: r.id },
  };
}
