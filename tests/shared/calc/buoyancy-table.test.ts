import { describe, expect, it } from 'vitest';
import { BUOYANCY_TABLE_ENTRIES, buoyancyTable, tableAirDensity, type BuoyancyTableEntry } from '../../../shared/calc/buoyancy-table.ts';
import { CalcError, D, waterDensityTanaka } from '../../../shared/calc/index.ts';
import { expectClose } from '../../helpers/decimal.ts';

const entry = (name: string, density: string): BuoyancyTableEntry => ({ name, group: 'salt', density, source: 'test' });

describe('buoyancy factor table (shared/calc/buoyancy-table.ts)', () => {
  it.each([
    ['methanol', '0.7914', '1.0013684'],
    ['water', '0.998', '1.0010537'],
    ['2 % (w/w) HNO3', '1.0091', '1.0010404'],
    ['KHP', '1.636', '1.0005839'],
    ['NaCl', '2.16', '1.0004058'],
    ['NaCl', '2.165', '1.0004045'],
    ['Na2CO3', '2.54', '1.0003226'],
    ['Pb(NO3)2', '4.53', '1.0001149'],
    ['stainless weight', '8.0', '1.0000000'],
    ['Cd metal', '8.65', '0.9999887'],
    ['Pb metal', '11.34', '0.9999558'],
  ])('%s, ρ %s g/mL at ρa 1.2 kg/m³ and ρw 8.0 g/cm³ → B %s [C, METROLOGY §2.2 check values, exact arithmetic]', (name, rho, b) => {
    const t = buoyancyTable({ airDensity: '0.0012', weightDensity: '8.0' }, [entry(name, rho)]);
    expect(t.rows[0]!.factorDisplay).toBe(b);
    expectClose(t.rows[0]!.factor, b, '5e-8');
  });

  it('the inverse is the reading per gram of true mass: 100.000 g true water reads 99.8948 g at 1.2 kg/m³ and 8.0 g/cm³ [C, METROLOGY §2.2 planning example]', () => {
    const t = buoyancyTable({ airDensity: '0.0012' }, [entry('water', '0.998')]);
    const r = t.rows[0]!;
    // METROLOGY §2.2 prints 99.8948 g; 100/1.001 053 7 worked by hand is 99.894 74 g, so the check allows 0.0001 g
    expectClose(new D(r.readingPerGram).mul(100), '99.8948', '0.0001');
    expect(r.readingPerGramDisplay).toBe('0.9989474'); // 1/1.001 053 70 = 0.998 947 4 [worked by hand]
    expectClose(new D(r.factor).mul(r.readingPerGram), '1', '1e-30');
    expect(r.correctionPpm).toBe('1053.7'); // +1054 ppm [C, METROLOGY §2.2]
    expect(t.weightDensity).toBe('8'); // default: the reference density of weights, 8000 kg/m³ (OIML D28)
  });

  it('at real air: 22 °C, 960 hPa, 45 % → ρa 1.128 18 kg/m³ (CIPM-2007) and Pb(NO3)2 B 1.000 108 1 [C, METROLOGY §2.2]', () => {
    const rhoA = tableAirDensity({ temperatureC: '22', pressureHPa: '960', relativeHumidityPct: '45' });
    expectClose(rhoA, '0.00112818', '5e-9');
    const t = buoyancyTable({ airDensity: rhoA, weightDensity: '8.0' }, [entry('Pb(NO3)2', '4.53'), entry('water', '0.998')]);
    expect(t.rows[0]!.factorDisplay).toBe('1.0001081');
    expect(t.rows[1]!.factorDisplay).toBe('1.0009905');
  });

  it('B falls as the sample density rises (named rows lightest first), crosses 1 at the weights’ density, and the rows span 0.7–22 g/mL', () => {
    const t = buoyancyTable({ airDensity: '0.0012', weightDensity: '8.0' });
    const rho = t.rows.map((r) => new D(r.density));
    const b = t.rows.map((r) => new D(r.factor));
    for (let i = 1; i < t.rows.length; i++) {
      expect(rho[i]!.gt(rho[i - 1]!), `${t.rows[i]!.name} after ${t.rows[i - 1]!.name}`).toBe(true);
      expect(b[i]!.lt(b[i - 1]!), `${t.rows[i]!.name}: B ${b[i]} < ${b[i - 1]}`).toBe(true);
    }
    expect(t.rows.every((r) => new D(r.density).gte('0.7') && new D(r.density).lte('22'))).toBe(true);
    expect(t.rows.find((r) => r.density === '8.0')!.factor).toBe('1');
    expect(t.rows.filter((r) => new D(r.density).lt(8)).every((r) => new D(r.factor).gt(1))).toBe(true);
    expect(t.rows.filter((r) => new D(r.density).gt(8)).every((r) => new D(r.factor).lt(1))).toBe(true);
    for (const g of ['solvent', 'water', 'salt', 'metal']) expect(t.rows.some((r) => r.group === g)).toBe(true);
    expect(BUOYANCY_TABLE_ENTRIES.every((e) => e.source.length > 5)).toBe(true);
  });

  it('the water row is Tanaka (2001) at 20 °C, air-free (shared/calc/water-density.ts)', () => {
    const water = BUOYANCY_TABLE_ENTRIES.find((e) => e.group === 'water')!;
    expect(waterDensityTanaka('20').div(1000).toFixed(6)).toBe(water.density);
  });

  it('refuses a density outside 0.7–22 g/mL and air outside the CIPM-2007 range, naming the input', () => {
    expect(() => buoyancyTable({ airDensity: '0.0012' }, [entry('n-hexane', '0.6594')])).toThrow(/outside the table's range 0.7–22/);
    expect(() => tableAirDensity({ temperatureC: '30', pressureHPa: '1000', relativeHumidityPct: '50' })).toThrow(CalcError);
  });
});
