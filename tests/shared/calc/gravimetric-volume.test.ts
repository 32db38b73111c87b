import { describe, it, expect } from 'vitest';
import { zFactor, zFactorFromDensities, volumeAt20C, airDensityCIPM2007, waterDensityTanaka } from '../../../shared/calc/index.ts';
import { expectClose, fixed } from '../../helpers/decimal.ts';

describe('ISO 8655-6 Z factor and ISO 4787 V20', () => {
  it('ISO 8655-6 Z: compute Z = (1/(ρW−ρA))·(1−ρA/ρB) = 1.0029 at 20 °C/101.3 kPa from the core [M + C, METROLOGY §4.2]', () => {
    const rhoA = airDensityCIPM2007({ temperatureC: '20', pressurePa: '101300', relativeHumidity: '0.5' }).density.div(1000);
    const rhoW = waterDensityTanaka('20').div(1000);
    const z = zFactorFromDensities({ waterDensity: rhoW, airDensity: rhoA, weightDensity: '8.0' });
    expect(fixed(z, 4)).toBe('1.0029');
    expect(zFactor({ temperatureC: '20', pressurePa: '101300', relativeHumidity: '0.5' }).toString()).toBe(z.toString());
  });

  it.each([
    ['15', '80000', '1.0017'],
    ['15', '105000', '1.0020'],
    ['22', '95000', '1.0032'],
    ['25', '101300', '1.0040'],
  ])('Z table row %s °C / %s Pa = %s (50 %%RH) [C, METROLOGY §4.2 table]', (t, p, z) => {
    expect(fixed(zFactor({ temperatureC: t, pressurePa: p, relativeHumidity: '0.5' }), 4)).toBe(z);
  });

  it('accredited-laboratory certificate: Z = 1.00258 at 18.75 °C / 986 hPa / 59.29 % [V-calc, METROLOGY Appendix A]', () => {
    expectClose(zFactor({ temperatureC: '18.75', pressurePa: '98600', relativeHumidity: '0.5929' }), '1.00258', '2e-5');
  });

  it('30 °C is outside CIPM-2007 unless unchecked is set; 1.0054 at 101.3 kPa [C, METROLOGY §4.2]', () => {
    expect(() => zFactor({ temperatureC: '30', pressurePa: '101300', relativeHumidity: '0.5' })).toThrow(expect.objectContaining({ code: 'calc_out_of_range' }));
    expect(fixed(zFactor({ temperatureC: '30', pressurePa: '101300', relativeHumidity: '0.5', unchecked: true }), 4)).toBe('1.0054');
  });

  it('ISO 4787 V20: 99.7500 g, 21.5 °C, ρA 0.00119, γ 9.9e-6 → 100.0644 mL [C, METROLOGY §4.1]', () => {
    expect(fixed(volumeAt20C({ netReading: '99.7500', waterTemperatureC: '21.5', airDensity: '0.00119', expansionCoefficient: '9.9e-6' }), 4)).toBe('100.0644');
  });

  it('invalid densities are rejected', () => {
    expect(() => zFactorFromDensities({ waterDensity: '0', airDensity: '0.0012' })).toThrow(expect.objectContaining({ code: 'non_positive' }));
    expect(() => zFactorFromDensities({ waterDensity: '0.001', airDensity: '0.0012' })).toThrow(expect.objectContaining({ code: 'calc_out_of_range' }));
  });
});
