import { describe, it, expect } from 'vitest';
import psychrolib from 'psychrolib';
import {
  airDensityCIPM2007,
  airDensityCIPM2007Unchecked,
  airDensityOIML_E3,
  airDensityUncertainty,
  saturationVapourPressure,
  CONVENTIONAL_AIR_DENSITY,
  CalcError,
  D,
} from '../../../shared/calc/index.ts';
import { expectClose, expectRelClose, fixed } from '../../helpers/decimal.ts';

const cipm = (t: string, p: string, h: string, x?: string) =>
  airDensityCIPM2007({ temperatureC: t, pressurePa: p, relativeHumidity: h, ...(x ? { xCO2: x } : {}) }).density;

describe('CIPM-2007 air density', () => {
  it.each([
    // [t °C, p Pa, h, xCO2, ρa kg/m³]
    ['20', '101325', '0.50', '0.0004', '1.19931'], // CIPM-2007 check value [C, METROLOGY §1.1 / Appendix A]
    ['20', '101325', '0.00', '0.0004', '1.20456'], // [C, METROLOGY §1.1]
    ['23', '101325', '0.50', '0.0004', '1.18608'], // [C, METROLOGY §1.1]
    ['25', '100000', '0.40', '0.0004', '1.16322'], // [C, METROLOGY §1.1]
    ['22', '96000', '0.45', '0.0004', '1.12818'], // [C, METROLOGY §1.1]
    ['15', '101325', '0.50', '0.0004', '1.22163'], // [C, METROLOGY §1.1]
    ['27', '110000', '0.80', '0.0004', '1.26466'], // [C, METROLOGY §1.1]
    ['20', '101325', '0.50', '0.0010', '1.19961'], // raised CO2 [C, METROLOGY §1.1]
  ])('%s °C, %s Pa, h %s, xCO2 %s → %s kg/m³ (CIPM-2007 check value [C, METROLOGY §1.1])', (t, p, h, x, rho) => {
    expectClose(cipm(t, p, h, x), rho, '5e-6');
  });

  it('S. V. Gupta Mass Metrology table, 10 °C / 730 mmHg / 40 %: 1.19569 [V-calc, METROLOGY §1.1] (below the nominal range, unchecked)', () => {
    const r = airDensityCIPM2007Unchecked({ temperatureC: '10', pressurePa: '97325.3', relativeHumidity: '0.40' });
    expect(fixed(r.density, 5)).toBe('1.19569');
  });

  it('0 °C dry air 1.29305 kg/m³ [C, METROLOGY §1.1], unchecked variant', () => {
    const r = airDensityCIPM2007Unchecked({ temperatureC: '0', pressurePa: '101325', relativeHumidity: '0' });
    expectClose(r.density, '1.29305', '5e-6');
  });

  it('intermediate values at 20 °C / 101325 Pa / 50 % [C, METROLOGY §1.1]: psv 2339.16, f 1.004026, xv 0.011589, Z 0.999615', () => {
    const { steps } = airDensityCIPM2007({ temperatureC: '20', pressurePa: '101325', relativeHumidity: '0.5' });
    expect(steps.T.toString()).toBe('293.15');
    expectClose(steps.psv, '2339.16', '0.01');
    expectClose(steps.f, '1.004026', '5e-7');
    expectClose(steps.xv, '0.011589', '5e-7');
    expectClose(steps.Z, '0.999615', '5e-7');
    expect(steps.Ma.toString()).toBe('0.02896546'); // Ma at xCO2 = 0.0004 by definition [V-src, METROLOGY §1.1]
  });

  it('dry-air compressibility Z = 0.999643 at 20 °C / 101325 Pa [C, METROLOGY §1.1]', () => {
    const { steps } = airDensityCIPM2007({ temperatureC: '20', pressurePa: '101325', relativeHumidity: '0' });
    expectClose(steps.Z, '0.999643', '5e-7');
  });

  it('psv(293.15 K) = 2339.16 Pa [C, METROLOGY Appendix A]', () => {
    expectClose(saturationVapourPressure('293.15'), '2339.16', '0.01');
  });

  it('accepts Dec inputs as well as strings', () => {
    expectClose(
      airDensityCIPM2007({ temperatureC: new D('20'), pressurePa: new D('101325'), relativeHumidity: new D('0.5') }).density,
      '1.19931',
      '5e-6',
    );
  });

  it.each([
    ['31', '101325', '0.5', undefined, 'temperatureC', 'Temperature 31 °C is outside the CIPM-2007 range 15–27 °C'],
    ['14.9', '101325', '0.5', undefined, 'temperatureC', 'Temperature 14.9 °C is outside the CIPM-2007 range 15–27 °C'],
    ['20', '59999', '0.5', undefined, 'pressurePa', 'Pressure 599.99 hPa is outside the CIPM-2007 range 600–1100 hPa'],
    ['20', '110001', '0.5', undefined, 'pressurePa', 'Pressure 1100.01 hPa is outside the CIPM-2007 range 600–1100 hPa'],
    ['20', '101325', '1.01', undefined, 'relativeHumidity', 'Relative humidity 101 % is outside the range 0–100 %'],
    ['20', '101325', '-0.01', undefined, 'relativeHumidity', 'Relative humidity -1 % is outside the range 0–100 %'],
    ['20', '101325', '0.5', '0.02', 'xCO2', 'CO2 mole fraction 0.02 is outside the range 0–0.01'],
  ])('out of the validity range (METROLOGY §1.1: 15–27 °C, 600–1100 hPa) → calc_out_of_range: t %s, p %s, h %s, x %s', (t, p, h, x, input, msg) => {
    try {
      cipm(t, p, h, x);
      expect.fail('should throw');
    } catch (e) {
      expect(e).toBeInstanceOf(CalcError);
      expect((e as CalcError).code).toBe('calc_out_of_range');
      expect((e as CalcError).message).toBe(msg);
      expect((e as CalcError).details?.input).toBe(input);
    }
  });

  it('range limits themselves are inside (15 °C and 27 °C, 600 and 1100 hPa)', () => {
    expect(() => cipm('15', '60000', '0', undefined)).not.toThrow();
    expect(() => cipm('27', '110000', '1', undefined)).not.toThrow();
  });

  it('rejects non-numeric and float inputs with invalid_number', () => {
    expect(() => cipm('twenty', '101325', '0.5')).toThrow(expect.objectContaining({ code: 'invalid_number' }));
    expect(() =>
      airDensityCIPM2007({ temperatureC: 20 as unknown as string, pressurePa: '101325', relativeHumidity: '0.5' }),
    ).toThrow(expect.objectContaining({ code: 'invalid_number' }));
  });

  it('absolute zero or zero pressure → non_positive (unchecked variant)', () => {
    expect(() => airDensityCIPM2007Unchecked({ temperatureC: '-273.15', pressurePa: '101325', relativeHumidity: '0' })).toThrow(
      expect.objectContaining({ code: 'non_positive' }),
    );
    expect(() => airDensityCIPM2007Unchecked({ temperatureC: '20', pressurePa: '0', relativeHumidity: '0' })).toThrow(
      expect.objectContaining({ code: 'non_positive' }),
    );
  });

  it('raising xCO2 from 0.0004 to 0.0010 raises ρa by ≈0.025 % [C, METROLOGY §1.1]', () => {
    const rel = cipm('20', '101325', '0.5', '0.0010').div(cipm('20', '101325', '0.5', '0.0004')).minus(1);
    expectClose(rel, '0.00025', '0.00001');
  });
});

describe('cross-check against psychrolib (independent moist-air implementation)', () => {
  psychrolib.SetUnitSystem(psychrolib.SI);
  // psychrolib uses ideal-gas moist air (no Z, no enhancement factor); agreement within about 0.1 % is expected.
  const cases: Array<[number, number, number]> = [];
  for (const t of [15, 18, 20, 22, 25, 27]) for (const p of [90000, 96000, 101325, 105000]) for (const h of [0.2, 0.5, 0.8]) cases.push([t, p, h]);
  it.each(cases)('%s °C, %s Pa, h %s agrees with psychrolib within 0.1 %%', (t, p, h) => {
    // the test's float inputs are converted to decimal text for the core; psychrolib works in floats
    const ours = cipm(String(t), String(p), String(h));
    const theirs = psychrolib.GetMoistAirDensity(t, psychrolib.GetHumRatioFromRelHum(t, h, p), p) as number;
    expectRelClose(ours, String(theirs), '0.001');
  });
});

describe('OIML R111-1 E.3-1 approximation', () => {
  it.each([
    ['20', '1013.25', '50', '1.19929'], // [C, METROLOGY §1.2]
    ['25', '1013.25', '40', '1.17875'], // [C, METROLOGY §1.2]
    ['22', '960', '45', '1.12821'], // [C, METROLOGY §1.2]
    ['15', '1013.25', '50', '1.22150'], // [C, METROLOGY §1.2]
  ])('OIML R111-1 E.3-1: %s °C, %s hPa, %s %% → %s kg/m³ [C, METROLOGY §1.2]', (t, p, h, rho) => {
    expectClose(airDensityOIML_E3({ temperatureC: t, pressureHPa: p, relativeHumidityPct: h }), rho, '5e-6');
  });

  it('E.3-1 agrees with CIPM-2007 within −135…+95 ppm over 15–27 °C, 900–1050 hPa, 20–80 % [C, METROLOGY §1.2]', () => {
    for (const t of ['15', '20', '27']) {
      for (const p of ['900', '1013.25', '1050']) {
        for (const h of ['20', '50', '80']) {
          const e3 = airDensityOIML_E3({ temperatureC: t, pressureHPa: p, relativeHumidityPct: h });
          const ci = cipm(t, new D(p).mul(100).toString(), new D(h).div(100).toString());
          const ppm = e3.div(ci).minus(1).mul(1e6);
          expect(ppm.gte(-136) && ppm.lte(96)).toBe(true);
        }
      }
    }
  });

  it('E.3-1 rejects RH outside 0–100 % and non-positive pressure', () => {
    expect(() => airDensityOIML_E3({ temperatureC: '20', pressureHPa: '1013', relativeHumidityPct: '120' })).toThrow(
      expect.objectContaining({ code: 'calc_out_of_range' }),
    );
    expect(() => airDensityOIML_E3({ temperatureC: '20', pressureHPa: '0', relativeHumidityPct: '50' })).toThrow(
      expect.objectContaining({ code: 'non_positive' }),
    );
  });
});

describe('conventional air density', () => {
  it('OIML D28 reference air density ρ0 = 1.2 kg/m³ [V-src, METROLOGY §1.3]', () => {
    expect(CONVENTIONAL_AIR_DENSITY.toString()).toBe('1.2');
  });
  it('common practice: dry air at 1 bar and 25 °C is ≈0.0012 g/mL (1.17 kg/m³ from CIPM-2007)', () => {
    expectClose(cipm('25', '100000', '0'), '1.17', '0.01');
  });
});

describe('u(ρa) by GUM propagation over the CIPM function', () => {
  it('example budget 20 °C / 101325 Pa / 50 %: u(ρa) = 1.11e-3 kg/m³ (0.093 %) [C, METROLOGY §1.1]', () => {
    const r = airDensityUncertainty({ temperatureC: '20', pressurePa: '101325', relativeHumidity: '0.5' });
    expectClose(r.standardUncertainty, '1.11e-3', '0.01e-3');
    expectClose(r.standardUncertainty.div(r.density), '0.00093', '0.00001');
    const by = Object.fromEntries(r.budget.map((b) => [b.input, b]));
    // contributions 8.9e-4, 5.9e-4, 3.1e-4, 4.9e-5, 2.6e-5 kg/m³ [C, METROLOGY §1.1]
    expectClose(by.temperatureC.contribution, '8.9e-4', '0.05e-4');
    expectClose(by.pressurePa.contribution, '5.9e-4', '0.05e-4');
    expectClose(by.relativeHumidity.contribution, '3.1e-4', '0.05e-4');
    expectClose(by.xCO2.contribution, '4.9e-5', '0.05e-5');
    expectClose(by.formula.contribution, '2.6e-5', '0.05e-5');
  });

  it('sensitivity coefficients at 20 °C / 101325 Pa / 50 % [C, METROLOGY §1.1 table]', () => {
    const by = Object.fromEntries(
      airDensityUncertainty({ temperatureC: '20', pressurePa: '101325', relativeHumidity: '0.5' }).budget.map((b) => [b.input, b.sensitivity]),
    );
    expectClose(by.pressurePa, '1.189e-5', '0.001e-5');
    expectClose(by.temperatureC, '-4.43e-3', '0.01e-3');
    expectClose(by.relativeHumidity, '-1.047e-2', '0.001e-2');
    expectClose(by.xCO2, '0.494', '0.001');
  });

  it('custom uncertainties are used and the check is range-checked', () => {
    const r = airDensityUncertainty({
      temperatureC: '20',
      pressurePa: '101325',
      relativeHumidity: '0.5',
      uncertainties: { temperatureC: '0', pressurePa: '0', relativeHumidity: '0', xCO2: '0' },
    });
    // only the formula's 22e-6 remains [V-src, METROLOGY §1.1]
    expectRelClose(r.standardUncertainty.div(r.density), '22e-6', '1e-6');
    expect(() => airDensityUncertainty({ temperatureC: '30', pressurePa: '101325', relativeHumidity: '0.5' })).toThrow(
      expect.objectContaining({ code: 'calc_out_of_range' }),
    );
  });

  it('works at the range edge (15 °C) although the derivative steps leave the range', () => {
    expect(() => airDensityUncertainty({ temperatureC: '15', pressurePa: '101325', relativeHumidity: '1' })).not.toThrow();
  });
});
