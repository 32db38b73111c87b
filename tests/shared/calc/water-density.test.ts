import { describe, it, expect } from 'vitest';
import { waterDensityTanaka, CalcError } from '../../../shared/calc/index.ts';
import { expectClose, fixed } from '../../helpers/decimal.ts';

describe('Tanaka 2001 water density (air-free, 101 325 Pa)', () => {
  it.each([
    ['15', '999.1026'], // [C, METROLOGY §3.1; widely tabulated]
    ['20', '998.2067'], // Tanaka 2001: 998.2067 at 20 °C [V-calc, METROLOGY §3.1]
    ['22', '997.7730'], // [C, METROLOGY §3.1]
    ['25', '997.0470'], // Tanaka 2001: 997.0470 at 25 °C [V-calc, METROLOGY §3.1]
    ['18', '998.5984'], // [C]
    ['21', '997.9950'], // [C]
    ['23', '997.5408'], // [C]
    ['30', '995.6488'], // [C]
  ])('%s °C → %s kg/m³ [METROLOGY §3.1]', (t, rho) => {
    expect(fixed(waterDensityTanaka(t), 4)).toBe(rho);
    expectClose(waterDensityTanaka(t), rho, '5e-5');
  });

  it('maximum density near 3.98 °C is a5 = 999.97495 kg/m³ (Tanaka constant a1 = −3.983035 °C, a5)', () => {
    expect(waterDensityTanaka('3.983035').toString()).toBe('999.97495');
  });

  it('cubic expansion coefficient at 20 °C ≈ 2.07e-4 K⁻¹ [C, METROLOGY §3.1]', () => {
    const beta = waterDensityTanaka('20.01').minus(waterDensityTanaka('19.99')).div('0.02').neg().div(waterDensityTanaka('20'));
    expectClose(beta, '2.07e-4', '0.01e-4');
  });

  it('air-saturated water at 20 °C: 998.2043 kg/m³ (Δρ = −2.49e-3) [C, METROLOGY §3.2]', () => {
    expect(fixed(waterDensityTanaka('20', { airSaturated: true }), 4)).toBe('998.2043');
    expectClose(waterDensityTanaka('20').minus(waterDensityTanaka('20', { airSaturated: true })), '2.492e-3', '1e-6');
  });

  it('compressibility: 950 hPa at 20 °C gives 998.2038 kg/m³ [C, METROLOGY §3.3]', () => {
    expect(fixed(waterDensityTanaka('20', { pressurePa: '95000' }), 4)).toBe('998.2038');
    expect(waterDensityTanaka('20', { pressurePa: '101325' }).toString()).toBe(waterDensityTanaka('20').toString());
  });

  it.each(['-0.1', '40.1', '100'])('%s °C is outside 0–40 °C → calc_out_of_range', (t) => {
    expect(() => waterDensityTanaka(t)).toThrow(CalcError);
    expect(() => waterDensityTanaka(t)).toThrow(expect.objectContaining({ code: 'calc_out_of_range' }));
  });

  it('message names the range', () => {
    expect(() => waterDensityTanaka('41')).toThrow('Water temperature 41 °C is outside the Tanaka (2001) range 0–40 °C');
  });

  it('air-saturation correction only 0–25 °C; pressure must be positive', () => {
    expect(() => waterDensityTanaka('26', { airSaturated: true })).toThrow(expect.objectContaining({ code: 'calc_out_of_range' }));
    expect(() => waterDensityTanaka('20', { pressurePa: '0' })).toThrow(expect.objectContaining({ code: 'non_positive' }));
  });
});
