import { describe, it, expect } from 'vitest';
import { selectStabilityRule } from '../../../shared/prep/stability-rules.ts';
import { computeExpiry } from '../../../shared/prep/expiry.ts';
import type { StabilityRule } from '../../../shared/schemas/settings.ts';

// REQUIREMENTS EX-02: a stability rule per solution type with its basis recorded; the rules below are our own
// fictional lab rules (no stability science is asserted, only the selection logic).
const rules: StabilityRule[] = [
  { id: 'SR-1', appliesTo: { kind: 'stock' }, days: 180, basis: 'study ST-2026-01' },
  { id: 'SR-2', appliesTo: { kind: 'series_level', maxConcentrationMgL: '1' }, days: 1, basis: 'SOP HWL-CAL-07 §4' },
  { id: 'SR-3', appliesTo: { kind: 'series_level' }, days: 7, basis: 'SOP HWL-CAL-07 §3' },
  { id: 'SR-4', appliesTo: { kind: 'dilution', analyteFormula: 'Pb' }, days: 30, basis: 'study ST-2026-04' },
  { id: 'SR-5', appliesTo: { kind: 'dilution' }, days: 14, basis: 'SOP HWL-CAL-07 §2' },
];
const fallback = { days: 30, basis: 'lab rule' };

describe('stability rule selection (REQUIREMENTS EX-02)', () => {
  it('the most specific applicable rule wins, with its basis recorded', () => {
    expect(selectStabilityRule(rules, { kind: 'dilution', analyteFormula: 'Pb', concentration: { value: '10', unit: 'mg/L' } }, fallback)).toEqual({ days: 30, basis: 'rule SR-4: study ST-2026-04', ruleId: 'SR-4' });
    expect(selectStabilityRule(rules, { kind: 'dilution', analyteFormula: 'Cd', concentration: { value: '10', unit: 'mg/L' } }, fallback).ruleId).toBe('SR-5');
  });

  it('a concentration cap applies at or below it, converting µg/L to mg/L (exact SI factor)', () => {
    expect(selectStabilityRule(rules, { kind: 'series_level', analyteFormula: 'Pb', concentration: { value: '1', unit: 'mg/L' } }, fallback).ruleId).toBe('SR-2');
    expect(selectStabilityRule(rules, { kind: 'series_level', analyteFormula: 'Pb', concentration: { value: '500', unit: 'µg/L' } }, fallback).ruleId).toBe('SR-2');
    expect(selectStabilityRule(rules, { kind: 'series_level', analyteFormula: 'Pb', concentration: { value: '2', unit: 'mg/L' } }, fallback).ruleId).toBe('SR-3');
  });

  it('a cap never applies to a concentration that is not a mass concentration', () => {
    expect(selectStabilityRule(rules, { kind: 'series_level', analyteFormula: 'Pb', concentration: { value: '0.5', unit: 'mg/kg' } }, fallback).ruleId).toBe('SR-3');
  });

  it('no applicable rule: the lab default, marked as the default', () => {
    expect(selectStabilityRule(rules, { kind: 'mix', analyteFormula: 'Pb', concentration: { value: '1', unit: 'mg/L' } }, fallback)).toEqual({ days: 30, basis: 'lab default: lab rule' });
    expect(selectStabilityRule(undefined, { kind: 'stock', analyteFormula: 'Pb', concentration: { value: '1', unit: 'mg/L' } }, fallback).days).toBe(30);
  });

  it('ties between equally specific rules go to the first listed', () => {
    const tied: StabilityRule[] = [
      { id: 'A', appliesTo: { kind: 'stock' }, days: 10, basis: 'a' },
      { id: 'B', appliesTo: { analyteFormula: 'Pb' }, days: 20, basis: 'b' },
    ];
    expect(selectStabilityRule(tied, { kind: 'stock', analyteFormula: 'Pb', concentration: { value: '1', unit: 'mg/L' } }, fallback).ruleId).toBe('A');
  });

  it('the chosen rule feeds computeExpiry and its basis appears in the reason (EX-01, EX-02)', () => {
    const choice = selectStabilityRule(rules, { kind: 'dilution', analyteFormula: 'Pb', concentration: { value: '10', unit: 'mg/L' } }, fallback);
    const e = computeExpiry({ preparedOn: '2026-03-01', stabilityDays: choice.days, stabilityBasis: choice.basis, parents: [{ identifier: 'HWL-2026-0042', expiresOn: '2026-12-31' }] });
    expect(e.expiresOn).toBe('2026-03-31');
    expect(e.reason).toContain('rule SR-4: study ST-2026-04');
  });
});
