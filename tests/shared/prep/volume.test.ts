import { describe, expect, it } from 'vitest';
import Decimal from 'decimal.js';
import { classATolerance, concentrationTemperatureCorrection, flaskVolumeAtTemperature } from '../../../shared/prep/volume.ts';
import { CalcError } from '../../../shared/calc/errors.ts';

describe('flaskVolumeAtTemperature: V20 · [1 + γ (t − 20)] (ISO 4787 form, METROLOGY §4.1/§4.3)', () => {
  it('100 mL borosilicate 3.3 (γ 9.9e-6 /K, METROLOGY §4.3 V-src) at 27 °C -> 100.00693 mL, i.e. ≤ 0.007 % (METROLOGY §4.3)', () => {
    const v = flaskVolumeAtTemperature({ nominalMl: '100', glassExpansionPerK: '9.9e-6', temperatureC: '27' });
    expect(v).toBe('100.00693');
    expect(new Decimal(v).minus(100).div(100).times(100).lte('0.007')).toBe(true);
  });
  it('soda-lime (γ 27e-6 /K) at 27 °C: +0.0189 %, "0.02 %" in METROLOGY §4.3', () => {
    expect(flaskVolumeAtTemperature({ nominalMl: '100', glassExpansionPerK: '27e-6', temperatureC: '27' })).toBe('100.0189');
  });
  it('is the nominal volume at 20 °C and smaller below it (arithmetic)', () => {
    expect(flaskVolumeAtTemperature({ nominalMl: '250.0', glassExpansionPerK: '9.9e-6', temperatureC: '20.0' })).toBe('250');
    expect(flaskVolumeAtTemperature({ nominalMl: '1000', glassExpansionPerK: '9.9e-6', temperatureC: '15' })).toBe('999.9505');
  });
  it('rejects non-positive volumes, negative γ and temperatures outside 0–40 °C', () => {
    expect(() => flaskVolumeAtTemperature({ nominalMl: '0', glassExpansionPerK: '9.9e-6', temperatureC: '20' })).toThrow(CalcError);
    expect(() => flaskVolumeAtTemperature({ nominalMl: '100', glassExpansionPerK: '-1e-6', temperatureC: '20' })).toThrow(CalcError);
    expect(() => flaskVolumeAtTemperature({ nominalMl: '100', glassExpansionPerK: '9.9e-6', temperatureC: '60' })).toThrow(CalcError);
  });
});

describe('concentrationTemperatureCorrection: c(20 °C) = (m/V) · [1 + β (t_makeup − 20)] (METROLOGY §9)', () => {
  it('METROLOGY §9 example: methanol (β ≈ 1.2e-3 /K, [M]) made up at 25 °C in a 20 °C flask -> c about 0.6 % higher', () => {
    const f = concentrationTemperatureCorrection({ solventExpansionPerK: '1.2e-3', makeUpTemperatureC: '25' });
    expect(f).toBe('1.006');
  });
  it('water (β 2.07e-4 /K, METROLOGY §9 V-calc) at 25 °C -> 1.001035, about 5–7× smaller than methanol (§9)', () => {
    const f = concentrationTemperatureCorrection({ solventExpansionPerK: '2.07e-4', makeUpTemperatureC: '25' });
    expect(f).toBe('1.001035');
    const ratio = new Decimal('0.006').div(new Decimal(f).minus(1));
    expect(ratio.gte(5) && ratio.lte(7)).toBe(true);
  });
  it('is 1 at 20 °C and below 1 when made up cold (arithmetic)', () => {
    expect(concentrationTemperatureCorrection({ solventExpansionPerK: '1.2e-3', makeUpTemperatureC: '20' })).toBe('1');
    expect(concentrationTemperatureCorrection({ solventExpansionPerK: '1.2e-3', makeUpTemperatureC: '18.5' })).toBe('0.9982');
  });
  it('applied to a concentration: 1000.0 mg/L -> 1006 mg/L (arithmetic on the §9 example)', () => {
    const f = concentrationTemperatureCorrection({ solventExpansionPerK: '1.2e-3', makeUpTemperatureC: '25' });
    expect(new Decimal('1000.0').times(f).toString()).toBe('1006');
  });
});

describe('classATolerance (METROLOGY §4.4 tables, marked [M]: from memory)', () => {
  it.each([
    ['5', '0.025'], ['10', '0.025'], ['20', '0.04'], ['25', '0.04'], ['50', '0.06'], ['100', '0.10'],
    ['200', '0.15'], ['250', '0.15'], ['500', '0.25'], ['1000', '0.40'], ['2000', '0.60'],
  ])('ISO 1042 flask %s mL -> ± %s mL (METROLOGY §4.4 [M])', (v, tol) => {
    expect(classATolerance('flask', v)).toEqual({ toleranceMl: tol, standard: 'ISO 1042', fromMemory: true });
  });
  it.each([
    ['1', '0.008'], ['2', '0.010'], ['5', '0.015'], ['10', '0.020'], ['20', '0.030'], ['25', '0.030'], ['50', '0.050'], ['100', '0.08'],
  ])('ISO 648 bulb pipette %s mL -> ± %s mL (METROLOGY §4.4 [M])', (v, tol) => {
    expect(classATolerance('pipette', v)).toEqual({ toleranceMl: tol, standard: 'ISO 648', fromMemory: true });
  });
  it('matches the nominal numerically ("100.0" = "100")', () => {
    expect(classATolerance('flask', '100.0')?.toleranceMl).toBe('0.10');
  });
  it('returns undefined for volumes not tabulated', () => {
    expect(classATolerance('flask', '150')).toBeUndefined();
    expect(classATolerance('flask', '1')).toBeUndefined();
    expect(classATolerance('pipette', '15')).toBeUndefined();
    expect(classATolerance('pipette', '1000')).toBeUndefined();
  });
});
