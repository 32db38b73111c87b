/**
 * The prep-sheet text of a gravimetric dilution (METROLOGY §5.5), as plain rows and lines that prep-sheet.tsx lays
 * out with its own table and paragraph styles: inputs with their sources, both readings as read, the calculation
 * (buoyancy per weighing, §2.1; w2 = w1·(r_a·B_a)/(r_f·B_f); γ2 = w2·ρ_final) and the GUM budgets.
 */
import type { GravimetricDilutionSection } from '../../shared/schemas/gravimetric.ts';
import type { BudgetEntry, PreparationDetail } from '../../shared/schemas/preparations.ts';
import { labDateTime, percent, shortDecimal } from './format.ts';

export const gravimetricOf = (d: PreparationDetail): GravimetricDilutionSection | undefined => (d as PreparationDetail & { gravimetric?: GravimetricDilutionSection }).gravimetric;

export function gravimetricInputRows(d: PreparationDetail, g: GravimetricDilutionSection): string[][] {
  const p = g.parent.snapshot;
  const plan = g.plan;
  const inputs = g.result?.inputs;
  return [
    ['Target mass fraction', `${d.target.value} ${d.target.unit}`, 'entered by the planner'],
    ['Parent concentration', `${p.concentration.display} (u = ${shortDecimal(p.concentration.standardUncertainty, 6)} ${p.concentration.unit})`, `parent ${p.identifier} v${p.version}, ${p.status} when used, expires ${p.expiresOn}`],
    ['Parent mass fraction w1', `${shortDecimal(plan.parentMassFraction.value, 8)} mg/kg (u = ${shortDecimal(plan.parentMassFraction.standardUncertainty, 4)})`, plan.parentMassFraction.basis],
    ['Parent solution density', `${plan.parentDensity.value} g/mL (u = ${shortDecimal(plan.parentDensity.standardUncertainty, 3)})`, plan.parentDensity.basis],
    ['Final solution density', `${(inputs?.finalDensity ?? plan.finalDensity).value} g/mL (u = ${shortDecimal((inputs?.finalDensity ?? plan.finalDensity).standardUncertainty, 3)})`, (inputs?.finalDensity ?? plan.finalDensity).basis],
    ['Planned aliquot', `${plan.aliquot.readingShownG} g reading (true ${shortDecimal(plan.aliquot.trueMassG, 7)} g)`, `buoyancy factor ${shortDecimal(plan.aliquot.buoyancyFactor, 8)} at planning`],
    ['Planned final solution', `${plan.final.readingShownG} g reading (true ${plan.plannedFinalMassG} g)`, `buoyancy factor ${shortDecimal(plan.final.buoyancyFactor, 8)} at planning`],
    ['Balance', d.snapshot.balance.identifier, `reads to ${d.snapshot.balance.readabilityMg} mg; weight density ${d.snapshot.balance.weightDensityGPerMl} g/mL`],
  ];
}

export function gravimetricReadingRows(g: GravimetricDilutionSection, tz: string): string[][] {
  return g.readings.map((r) => [
    String(r.id),
    `aliquot ${r.aliquotReading} ${r.unit}; final ${r.finalReading} ${r.unit}`,
    r.balance.identifier,
    `${r.conditions.temperatureC} °C, ${r.conditions.pressureHPa} hPa, ${r.conditions.relativeHumidityPct} % (${r.conditions.source === 'measured' ? 'measured' : 'lab default'}); ρ_air ${shortDecimal(r.airDensity.value, 7)} g/mL`,
    `${r.recordedBy.fullName}, ${labDateTime(r.recordedAt, tz)}`,
    [r.supersedesId ? `corrects #${r.supersedesId}: ${r.correctionReason ?? '—'}` : '', r.supersededById ? `SUPERSEDED by #${r.supersededById}` : ''].filter(Boolean).join('; '),
  ]);
}

export function gravimetricCalculationLines(g: GravimetricDilutionSection): string[] {
  const r = g.result;
  const plan = g.plan;
  if (!r) {
    return [
      `Planned: weigh about ${plan.aliquot.readingShownG} g of ${g.parent.identifier} and dilute to ${plan.final.readingShownG} g; expected ${plan.planned.massFraction.display}, ${plan.planned.massConcentration.display}.`,
      'No result yet: it is computed when both readings are recorded.',
    ];
  }
  const i = r.inputs;
  return [
    `1. Net readings (readings #${r.basedOn.readingsId}): aliquot r_a = ${i.aliquotReading.value} ${i.aliquotReading.unit}, final solution r_f = ${i.finalReading.value} ${i.finalReading.unit}; u(r) = ${shortDecimal(i.aliquotReading.standardUncertainty, 4)} ${i.aliquotReading.unit} each (${i.aliquotReading.basis}).`,
    `2. Air buoyancy for each weighing: B = (1 − ρa/ρw)/(1 − ρa/ρ) with ρa = ${shortDecimal(i.airDensity.value, 7)} g/mL (${i.airDensity.basis}) and ρw = ${i.weightDensity} g/mL; B_a/B_f = ${shortDecimal(r.buoyancyRatio, 8)}.`,
    `3. w2 = w1 × (r_a × B_a)/(r_f × B_f) = ${shortDecimal(i.parentMassFraction.value, 8)} mg/kg × … = ${shortDecimal(r.massFraction.value, 8)} mg/kg; u = ${shortDecimal(r.massFraction.standardUncertainty, 4)} mg/kg (relative ${percent(r.massFraction.relative, 2)}).`,
    `4. γ2 = w2 × ρ_final = ${shortDecimal(r.massFraction.value, 8)} mg/kg × ${i.finalDensity.value} g/mL = ${shortDecimal(r.massConcentration.value, 8)} mg/L; u = ${shortDecimal(r.massConcentration.standardUncertainty, 4)} mg/L (relative ${percent(r.massConcentration.relative, 2)}).`,
    `Reported: ${r.massFraction.display}; ${r.massConcentration.display}. Formula version ${r.calcVersion}.`,
  ];
}

/** The mass-concentration budget as prep-sheet budget entries (units per input). */
export function gravimetricBudget(g: GravimetricDilutionSection): BudgetEntry[] | null {
  const r = g.result;
  if (!r) return null;
  const unit: Record<string, string> = { parent: 'mg/kg', aliquot: r.inputs.aliquotReading.unit, final: r.inputs.finalReading.unit, airDensity: 'g/mL', aliquotDensity: 'g/mL', finalDensity: 'g/mL' };
  return r.massConcentration.budget.map((b) => ({ ...b, unit: unit[b.input] ?? '1' }));
}
