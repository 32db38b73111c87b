// Pure helpers behind the preparations service: net weighing uncertainty, solution-temperature term,
// flask/density gates, hazards, reading conversion. Each check names its source.
import { describe, expect, it } from 'vitest';
import { withSolutionTemperature } from '../../shared/calc/solution-temperature.ts';
import { evaluateFlaskGates, evaluateMaterialDensityGate } from '../../shared/prep/plan-gates.ts';
import { netWeighingUncertainty } from '../../shared/prep/weighing-uncertainty.ts';
import { readingInMg, volumeAsKnown } from '../../server/services/preparation-calc.ts';
import { hazardsFor, STANDING_NOTE } from '../../server/services/preparation-hazards.ts';
import { TASK_CAUTION } from '../../shared/prep/cautions.ts';
import { labDate } from '../../server/services/preparations.service.ts';

describe('netWeighingUncertainty (METROLOGY §5.2)', () => {
  it('when only d is known, then u = 0.408·d (two display roundings, §5.2)', () => {
    expect(Number(netWeighingUncertainty({ readabilityMg: '0.1' }).standardUncertainty)).toBeCloseTo(0.0408248, 6);
  });
  it('when d, s and a calibration U are known, then they add in quadrature: √((0.408·0.01)² + 0.006² + 0.010²) = 0.012356 mg [arithmetic]', () => {
    const u = netWeighingUncertainty({ readabilityMg: '0.01', repeatabilitySdMg: '0.006', calibrationUncertaintyMg: '0.020', calibrationUncertaintyK: '2' });
    expect(Number(u.standardUncertainty)).toBeCloseTo(0.0123558, 6);
    expect(u.basis).toContain('s = 0.006 mg');
  });
});

describe('withSolutionTemperature (METROLOGY §9, QUAM A1)', () => {
  const base = {
    value: '1002.7',
    standardUncertainty: '0.6',
    unit: 'mg/L',
    budget: [{ input: 'reading', label: 'r', unit: 'mg', value: '100.28', standardUncertainty: '0.05', sensitivity: '12', contribution: '0.6', share: '1' }],
    betaPerK: '0.00021',
    typedInputs: [{ value: '100.28', name: 'reading' }, { value: '100.0', name: 'volume' }],
  };
  it('when not corrected, then f = 1 and the temperature term is c·β·4/√3 (QUAM A1: ±4 °C × 2.1e-4, rectangular → 0.486 mg/L)', () => {
    const r = withSolutionTemperature({ ...base, temperatureC: '20.0', corrected: false });
    expect(r.factor).toBe('1');
    expect(r.value).toBe('1002.7');
    const t = r.budget.find((b) => b.input === 'temperature')!;
    expect(Number(t.contribution)).toBeCloseTo(0.486, 3); // METROLOGY §5.3 contributions: V_T 0.486 mg/L
    // u_c = √(0.6² + 0.486²) [GUM eq. 10]
    expect(Number(r.standardUncertainty)).toBeCloseTo(Math.sqrt(0.36 + 0.4863 ** 2), 3);
    expect(r.budget.reduce((s, b) => s + Number(b.share), 0)).toBeCloseTo(1, 9);
  });
  it('when corrected at 25 °C with β = 1.2e-3, then f = 1.006 (METROLOGY §9: methanol ≈ 0.6 % higher)', () => {
    const r = withSolutionTemperature({ ...base, betaPerK: '0.0012', temperatureC: '25', corrected: true });
    expect(r.factor).toBe('1.006');
    expect(r.value).toBe('1008.7162');
    expect(r.budget[0]!.contribution).toBe('0.6036'); // 0.6 × 1.006
  });
  it('when not corrected but measured 7 °C away from 20 °C, then the half-width widens to 7 °C [common practice]', () => {
    expect(withSolutionTemperature({ ...base, temperatureC: '27', corrected: false }).temperatureHalfWidthC).toBe('7');
  });
  it('when the temperature is outside 0–40 °C, then CalcError (range of shared/prep/volume.ts)', () => {
    expect(() => withSolutionTemperature({ ...base, temperatureC: '45', corrected: true })).toThrow(/between 0 and 40/);
  });
});

describe('plan gates for flasks and density (REQUIREMENTS EQ-07; METROLOGY §2.3)', () => {
  const flasks = [
    { identifier: 'VF-100-01', kind: 'volumetric_flask', nominalVolumeMl: '100', class: 'A', status: 'out_of_service' },
    { identifier: 'VF-100-02', kind: 'volumetric_flask', nominalVolumeMl: '100', class: 'A', status: 'in_service' },
  ];
  it('when the chosen flask is out of service, then it blocks and names an in-service flask of the same volume', () => {
    const g = evaluateFlaskGates({ flask: flasks[0], volumeMl: '100', flasks });
    expect(g.map((x) => x.code)).toEqual(['flask_not_in_service']);
    expect(g[0]!.severity).toBe('block');
    expect(g[0]!.action).toContain('VF-100-02');
  });
  it('when a volume has no registered flask, then a warning says so', () => {
    expect(evaluateFlaskGates({ volumeMl: '75', flasks }).map((x) => x.code)).toEqual(['no_flask_for_volume']);
    expect(evaluateFlaskGates({ volumeMl: '100.0', flasks })).toEqual([]);
  });
  it('when a class B flask is chosen, then a warning (not a block)', () => {
    const g = evaluateFlaskGates({ flask: { ...flasks[1]!, class: 'B' }, volumeMl: '100', flasks });
    expect(g).toMatchObject([{ code: 'flask_not_class_a', severity: 'warn' }]);
  });
  it('when the material has no density, then material_density_unknown blocks', () => {
    expect(evaluateMaterialDensityGate({ name: 'X', densityGPerMl: null })).toMatchObject([{ code: 'material_density_unknown', severity: 'block' }]);
    expect(evaluateMaterialDensityGate({ name: 'X', densityGPerMl: '2.2' })).toEqual([]);
  });
});

describe('hazards, readings, dates', () => {
  it('when the material carries H360Df, then the reproductive-toxicity caution comes first and the SDS line is stated once, apart', () => {
    const h = hazardsFor({ ghsHazardStatements: ['H302', 'H360Df'], ghsPictograms: ['GHS07', 'GHS08'] });
    expect(h.cautions[0]).toMatch(/^May damage fertility or the unborn child/);
    expect(h.cautions).not.toContain(STANDING_NOTE);
    expect(h.sdsNote).toBe(STANDING_NOTE);
  });
  it('when no statements are recorded, then pictograms give the cautions; none at all leaves only the task caution', () => {
    expect(hazardsFor({ ghsHazardStatements: [], ghsPictograms: ['GHS06'] }).cautions[0]).toMatch(/toxic/i);
    expect(hazardsFor({ ghsHazardStatements: [], ghsPictograms: [] }).cautions).toEqual([TASK_CAUTION.weigh_solid.text]);
  });
  it('when a reading is typed in g, then mg keeps the shown digits (0.16007 g = 160.07 mg; 12.3 g = 12300 mg)', () => {
    expect(readingInMg('0.16007', 'g')).toBe('160.07');
    expect(readingInMg('12.3', 'g')).toBe('12300');
    expect(readingInMg('160.07', 'mg')).toBe('160.07');
  });
  it('when a flask has a tolerance, then its volume is written to the tolerance digits (100 ± 0.10 → 100.00) [common practice]', () => {
    const f = { id: 1, identifier: 'VF', kind: 'volumetric_flask', nominalVolumeMl: '100', class: 'A', toleranceMl: '0.10', material: null, status: 'in_service', retiredAt: null, retiredReason: null, createdAt: '', updatedAt: '' } as const;
    expect(volumeAsKnown(f)).toBe('100.00');
    expect(volumeAsKnown({ ...f, toleranceMl: null, class: 'n/a' })).toBe('100');
  });
  it('when it is 00:30 UTC in British summer time, then the lab date is already the next day (Europe/London, UTC+1)', () => {
    expect(labDate(new Date('2026-07-01T23:30:00Z'), 'Europe/London')).toBe('2026-07-02');
    expect(labDate(new Date('2026-11-30T23:30:00Z'), 'Europe/London')).toBe('2026-11-30');
  });
});
