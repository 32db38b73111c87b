/**
 * Which stability rule applies to a preparation (REQUIREMENTS EX-02: a rule per solution type, its basis
 * recorded on the record). A rule applies when every condition it states holds (kind, analyte, and the
 * concentration at or below maxConcentrationMgL); the most specific applicable rule wins, ties go to the
 * first listed. No applicable rule: the lab default period (settings.defaultStabilityDays), marked as such.
 */
import { convertConcentration, unitKind } from '../calc/units.ts';
import { CalcError } from '../calc/errors.ts';
import { toDec } from '../calc/decimal.ts';
import type { StabilityRule } from '../schemas/settings.ts';

export interface StabilitySubject {
  kind: string;
  analyteFormula: string;
  concentration: { value: string; unit: string };
}

export interface StabilityChoice {
  days: number;
  /** how solutions under the chosen rule are stored, when the rule says */
  storage?: string;
  /** recorded on the record, e.g. "rule SR-12: study ST-2024-07" */
  basis: string;
  ruleId?: string;
}

function mgPerL(c: StabilitySubject['concentration']): ReturnType<typeof toDec> | null {
  if (unitKind(c.unit) !== 'massConcentration') return null;
  try {
    return convertConcentration(c.value, c.unit, 'mg/L');
  } catch (e) {
    if (e instanceof CalcError) return null;
    throw e;
  }
}

export function selectStabilityRule(rules: readonly StabilityRule[] | undefined, subject: StabilitySubject, fallback: { days: number; basis: string }): StabilityChoice {
  let best: { rule: StabilityRule; specificity: number } | undefined;
  const conc = mgPerL(subject.concentration);
  for (const rule of rules ?? []) {
    const a = rule.appliesTo;
    let specificity = 0;
    if (a.kind !== undefined) {
      if (a.kind !== subject.kind) continue;
      specificity++;
    }
    if (a.analyteFormula !== undefined) {
      if (a.analyteFormula !== subject.analyteFormula) continue;
      specificity++;
    }
    if (a.maxConcentrationMgL !== undefined) {
      if (conc === null || conc.gt(a.maxConcentrationMgL)) continue;
      specificity++;
    }
    if (!best || specificity > best.specificity) best = { rule, specificity };
  }
  if (!best) return { days: fallback.days, basis: `lab default: ${fallback.basis}` };
  return { days: best.rule.days, basis: `rule ${best.rule.id}: ${best.rule.basis}`, ruleId: best.rule.id, ...(best.rule.storage ? { storage: best.rule.storage } : {}) };
}
