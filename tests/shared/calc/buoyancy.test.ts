import { describe, it, expect } from 'vitest';
import { buoyancyFactor, trueMassFromReading, readingForTrueMass, conventionalMass, CalcError } from '../../../shared/calc/index.ts';
import { expectClose, fixed } from '../../helpers/decimal.ts';

const std = (rho: string) => ({ airDensity: '0.0012', sampleDensity: rho, weightDensity: '8.0' });

describe('buoyancy factor B = (1 − ρa/ρw)/(1 − ρa/ρ)', () => {
  it.each([
    ['0.6594', '1.0016729'], // n-hexane
    ['0.7914', '1.0013684'], // methanol
    ['0.998', '1.0010537'], // water [C, METROLOGY Appendix A]
    ['1.0091', '1.0010404'], // 2 % HNO3
    ['1.636', '1.0005839'], // KHP
    ['2.16', '1.0004058'], // NaCl [C, METROLOGY Appendix A]
    ['2.165', '1.0004045'], // NaCl (2.165)
    ['2.54', '1.0003226'], // Na2CO3
    ['4.53', '1.0001149'], // Pb(NO3)2 [C, METROLOGY Appendix A]
    ['8.65', '0.9999887'], // Cd metal
    ['11.34', '0.9999558'], // Pb metal
  ])('ρ %s g/mL at ρa 0.0012, ρw 8.0 → B %s [C, METROLOGY §2.2, exact arithmetic]', (rho, b) => {
    expectClose(buoyancyFactor(std(rho)), b, '1e-7');
  });

  it('common practice: a sample as dense as the weights needs no correction: B = 1 at ρ = 8.0', () => {
    expect(buoyancyFactor(std('8.0')).toString()).toBe('1');
  });

  it('common practice: water weighed against 8.0 g/cm3 weights reads about 0.1 % light', () => {
    const reading = readingForTrueMass('1', std('0.998'));
    expectClose(reading.minus(1).mul(100), '-0.105', '0.001'); // −0.105 % [C, METROLOGY §2.2]
  });

  it('weight density defaults to 8.0 g/mL (OIML D28 reference density)', () => {
    expect(buoyancyFactor({ airDensity: '0.0012', sampleDensity: '0.998' }).toString()).toBe(buoyancyFactor(std('0.998')).toString());
  });

  it('real air 22 °C / 960 hPa / 45 % (ρa 0.00112818 g/mL): water 1.0009905, NaCl 1.0003803, Pb(NO3)2 1.0001081 [C, METROLOGY §2.2]', () => {
    const a = (rho: string) => buoyancyFactor({ airDensity: '0.00112818', sampleDensity: rho, weightDensity: '8.0' });
    expectClose(a('0.998'), '1.0009905', '1e-7');
    expectClose(a('2.165'), '1.0003803', '1e-7');
    expectClose(a('4.53'), '1.0001081', '1e-7');
  });

  it('planning examples at 0.0012/8.0 [C, METROLOGY §2.2]: 100.000 mg NaCl → 99.9596 mg; 204.22 mg KHP → 204.1008 mg; 100.000 g water → 99.8948 g', () => {
    expect(fixed(readingForTrueMass('100.000', std('2.165')), 4)).toBe('99.9596');
    expect(fixed(readingForTrueMass('204.22', std('1.636')), 4)).toBe('204.1008');
    // the water example reproduces with the Tanaka 20 °C density 0.998207 g/mL (§3.1); with 0.998 it is 99.8947
    expect(fixed(readingForTrueMass('100.000', std('0.998207')), 4)).toBe('99.8948');
    expect(fixed(readingForTrueMass('100.000', std('0.998')), 4)).toBe('99.8947');
  });

  it('trueMassFromReading and readingForTrueMass are inverse', () => {
    const m = trueMassFromReading(readingForTrueMass('159.929', std('4.53')), std('4.53'));
    expectClose(m, '159.929', '1e-30');
  });

  it.each([
    [{ airDensity: '0', sampleDensity: '1', weightDensity: '8' }, 'non_positive'],
    [{ airDensity: '0.0012', sampleDensity: '-1', weightDensity: '8' }, 'non_positive'],
    [{ airDensity: '0.0012', sampleDensity: '1', weightDensity: '0' }, 'non_positive'],
    [{ airDensity: '1.2', sampleDensity: '0.998', weightDensity: '8' }, 'calc_out_of_range'], // kg/m³ passed as g/mL
    [{ airDensity: '0.0012', sampleDensity: '0.0012', weightDensity: '8' }, 'calc_out_of_range'],
    [{ airDensity: '0.0012', sampleDensity: '1', weightDensity: '0.001' }, 'calc_out_of_range'],
  ])('invalid densities %o → CalcError %s', (p, code) => {
    expect(() => buoyancyFactor(p)).toThrow(CalcError);
    expect(() => buoyancyFactor(p)).toThrow(expect.objectContaining({ code }));
  });

  it('message explains that densities are in g/mL', () => {
    expect(() => buoyancyFactor({ airDensity: '1.2', sampleDensity: '0.998' })).toThrow(/must be smaller than the sample density 0.998 g\/mL/);
  });
});

describe('OIML D28 conventional mass', () => {
  it('1 g (true) of water has mc = 0.9989474 g [C, METROLOGY §2.1]', () => {
    expect(fixed(conventionalMass('1', '0.998'), 7)).toBe('0.9989474');
  });
  it('at ρa = ρ0 the reading equals the conventional mass [METROLOGY §2.1]', () => {
    const reading = readingForTrueMass('1', { airDensity: '0.0012', sampleDensity: '0.998' });
    expectClose(reading, conventionalMass('1', '0.998'), '1e-30');
  });
  it('readings at ρa 1.13 and 1.00 kg/m³ for 1 g of water: 0.9990088 g and 0.9991229 g [C, METROLOGY §2.1]', () => {
    expect(fixed(readingForTrueMass('1', { airDensity: '0.00113', sampleDensity: '0.998' }), 7)).toBe('0.9990088');
    expect(fixed(readingForTrueMass('1', { airDensity: '0.00100', sampleDensity: '0.998' }), 7)).toBe('0.9991229');
  });
  it('mc = m for a body of 8000 kg/m³ (definition)', () => {
    expect(conventionalMass('5.0000', '8.0').toString()).toBe('5');
  });
  it('non-positive or below-air density → CalcError', () => {
    expect(() => conventionalMass('1', '0')).toThrow(expect.objectContaining({ code: 'non_positive' }));
    expect(() => conventionalMass('1', '0.001')).toThrow(expect.objectContaining({ code: 'calc_out_of_range' }));
  });
});
