import { describe, it, expect } from 'vitest';
import { calculateVolumeCheck, verdictFor, limitFor, type VolumeCheckRequest } from '../../../shared/calc/volume-check.ts';
import { ISO_8655_2_PISTON_PIPETTES, GLASS_TOLERANCE_TABLES } from '../../../shared/calc/volume-tolerances.ts';
import { D } from '../../../shared/calc/decimal.ts';
import { expectClose, fixed } from '../../helpers/decimal.ts';

const g = (...vs: string[]) => vs.map((value) => ({ value, unit: 'g' }));

/** A 10 mL class A bulb pipette at 20 °C, air density given as 0.0012 g/mL. */
function bulb10(readings = g('9.9721', '9.9735', '9.9718', '9.9742', '9.9729')): VolumeCheckRequest {
  return {
    ware: { kind: 'bulb_pipette', nominal: { value: '10', unit: 'mL' }, class: 'A', material: 'borosilicate_3_3', mode: 'delivery' },
    readings,
    waterTemperatureC: '20.0',
    air: { density: { value: '0.0012', unit: 'g/mL' } },
    balance: { readability: { value: '0.1', unit: 'mg' } },
  };
}

describe('calculateVolumeCheck: worked values', () => {
  it('ISO 4787 V20: 99.7500 g, 21.5 °C, ρA 0.00119 g/mL, borosilicate 3.3 → 100.0644 mL [C, METROLOGY §4.1 worked example]', () => {
    const r = calculateVolumeCheck({
      ware: { kind: 'volumetric_flask', nominal: { value: '100', unit: 'mL' }, class: 'A', material: 'borosilicate_3_3', mode: 'content' },
      readings: g('99.7500', '99.7500'),
      waterTemperatureC: '21.5',
      air: { density: { value: '0.00119', unit: 'g/mL' } },
    });
    expect(r.method).toBe('ISO 4787');
    expect(fixed(r.replicates[0].volume.value, 4)).toBe('100.0644');
    expect(fixed(r.mean.value, 4)).toBe('100.0644');
    expect(r.randomError.standardDeviation.value).toBe('0');
    // ρW at 21.5 °C = 0.997 885 g/mL (METROLOGY §4.1, Tanaka air-free)
    expect(fixed(r.waterDensity.value, 6)).toBe('0.997885');
  });

  it('Tanaka 2001 water density in the response: 998.2067 kg/m³ air-free at 20 °C [V-calc, METROLOGY §3.1]; air-saturated 998.2043 [C, METROLOGY §3.2]', () => {
    expect(fixed(calculateVolumeCheck(bulb10()).waterDensity.value, 7)).toBe('0.9982067');
    const sat = calculateVolumeCheck({ ...bulb10(), waterAirSaturated: true });
    expect(sat.waterDensity.airSaturated).toBe(true);
    expect(fixed(sat.waterDensity.value, 7)).toBe('0.9982043');
  });

  it('ISO 8655-6 Z from the conditions: 1.002 58 at 18.75 °C / 986 hPa / 59.29 %RH [V-calc, METROLOGY §4.2, accredited certificate]', () => {
    const r = calculateVolumeCheck({
      ware: { kind: 'piston_pipette', nominal: { value: '1000', unit: 'µL' }, class: null, material: 'polypropylene', mode: 'delivery' },
      readings: [{ value: '997.46', unit: 'mg' }, { value: '997.52', unit: 'mg' }, { value: '997.41', unit: 'mg' }],
      waterTemperatureC: '18.75',
      air: { temperatureC: '18.75', pressureHPa: '986', relativeHumidityPct: '59.29' },
    });
    expect(r.method).toBe('ISO 8655-6');
    expectClose(r.zFactor.value, '1.00258', '2e-5');
    expect(r.expansionCoefficient.value).toBe('0'); // no vessel term for piston pipettes
    expect(r.mean.unit).toBe('µL');
  });

  it.each([
    ['20', '1013', '1.0029'],
    ['25', '1013', '1.0040'],
    ['15', '1050', '1.0020'],
  ])('Z table: %s °C / %s hPa / 50 %%RH → %s (4 dp) [C, METROLOGY §4.2 table; 20 °C value M from ISO 8655-6]', (t, p, z) => {
    const r = calculateVolumeCheck({ ...bulb10(), waterTemperatureC: t, air: { temperatureC: t, pressureHPa: p, relativeHumidityPct: '50' } });
    expect(fixed(r.zFactor.value, 4)).toBe(z);
  });

  it('hand-worked replicate set (10 mL bulb pipette, 20 °C, ρA 0.0012, ρB 8.0; worked independently in Python decimal arithmetic)', () => {
    // Z = 1/(0.998 206 745 56 − 0.0012)·(1 − 0.0012/8.0) = 1.002 851 790 575 19 mL/g
    // volumes = reading·Z (γ term 0 at 20 °C); mean 10.001 340 622 23 mL; es +0.001 340 622 mL (+0.013 406 %);
    // s 0.000 990 236 800 mL; CV 0.009 901 040 6 %
    const r = calculateVolumeCheck(bulb10());
    expectClose(r.zFactor.value, '1.00285179057519', '1e-13');
    expect(r.n).toBe('5');
    expectClose(r.mean.value, '10.0013406222273', '1e-12');
    expectClose(r.systematicError.value, '0.0013406222273', '1e-12');
    expectClose(r.systematicError.percent, '0.013406222273', '1e-11');
    expectClose(r.randomError.standardDeviation.value, '0.000990236800474', '1e-14');
    expectClose(r.randomError.cvPercent, '0.0099010406492', '1e-12');
    expect(r.verdict.result).toBe('pass');
    expect(r.verdict.limit.systematic).toEqual({ value: '0.020', unit: 'mL' });
    // every number is a decimal string
    for (const x of [r.mean.value, r.uncertainty.expandedUncertainty, r.uncertainty.k, r.n]) expect(typeof x).toBe('string');
    expect(r.uncertainty.k).toBe('2');
    // U = 2·u and u ≥ s/√n (repeatability is one component)
    expectClose(r.uncertainty.expandedUncertainty, new D(r.uncertainty.standardUncertainty).mul(2), '1e-18');
    expect(new D(r.uncertainty.standardUncertainty).gte(new D(r.randomError.standardDeviation.value).div(new D(5).sqrt()))).toBe(true);
  });

  it('evaporation is added to every reading and stated', () => {
    const base = calculateVolumeCheck(bulb10());
    const withEvap = calculateVolumeCheck({ ...bulb10(), evaporation: { value: '0.5', unit: 'mg' } });
    const dV = new D(withEvap.mean.value).minus(base.mean.value);
    expectClose(dV, new D('0.0005').mul(base.zFactor.value), '1e-15');
    expect(withEvap.evaporation).toEqual({ value: '0.5', unit: 'mg' });
  });

  it('a mean outside the class A limit fails (10 mL pipette delivering 9.95 mL)', () => {
    const r = calculateVolumeCheck(bulb10(g('9.9200', '9.9210', '9.9190')));
    expect(r.verdict.result).toBe('fail');
    expect(r.verdict.checks[0]).toMatchObject({ quantity: 'systematic', pass: false, limit: '0.020' });
  });
});

describe('limits (tables stored as data)', () => {
  it('class B is twice class A: 100 mL flask ± 0.20 mL [M, ISO 1042 via METROLOGY §4.4]', () => {
    const l = limitFor({ kind: 'volumetric_flask', nominal: { value: '100', unit: 'mL' }, class: 'B', material: 'borosilicate_3_3', mode: 'content' }, 'mL');
    expect(new D(l.systematic.value).eq('0.20')).toBe(true);
    expect(l.fromMemory).toBe(true);
    expect(l.source).toContain('ISO 1042');
  });

  it('piston pipette 1000 µL: ±8.0 µL systematic, 3.0 µL random [M, ISO 8655-2:2002 via METROLOGY §4.5]', () => {
    const l = limitFor({ kind: 'piston_pipette', nominal: { value: '1.000', unit: 'mL' }, class: null, material: 'polypropylene', mode: 'delivery' }, 'µL');
    expect(l.systematic).toEqual({ value: '8.0', unit: 'µL' });
    expect(l.random).toEqual({ value: '3.0', unit: 'µL' });
  });

  it('every table row is decimal text and names its source', () => {
    for (const t of Object.values(GLASS_TOLERANCE_TABLES)) {
      expect(t.source.length).toBeGreaterThan(10);
      for (const [k, v] of Object.entries(t.classA)) expect(new D(v).gt(0) && new D(k).gt(0)).toBe(true);
    }
    for (const r of ISO_8655_2_PISTON_PIPETTES.rows) expect(new D(r.random).lt(new D(r.systematic).mul(2))).toBe(true);
  });

  it('no tabulated row: refused at ware.nominal.value unless the lab gives its limits', () => {
    const req = { ...bulb10(), ware: { ...bulb10().ware, nominal: { value: '15', unit: 'mL' } } };
    expect(() => calculateVolumeCheck(req)).toThrow(expect.objectContaining({ code: 'calc_out_of_range', field: 'ware.nominal.value' }));
    const own = calculateVolumeCheck({ ...req, ware: { ...req.ware, limits: { systematic: { value: '0.03', unit: 'mL' }, source: 'Lab procedure SOP-VOL-2' } } });
    expect(own.verdict.limit).toMatchObject({ systematic: { value: '0.03', unit: 'mL' }, source: 'Lab procedure SOP-VOL-2', fromMemory: false });
  });

  it('refusals name the field', () => {
    expect(() => calculateVolumeCheck({ ...bulb10(), readings: g('9.97') })).toThrow(expect.objectContaining({ field: 'readings' }));
    expect(() => calculateVolumeCheck({ ...bulb10(), waterTemperatureC: '45' })).toThrow(expect.objectContaining({ field: 'waterTemperatureC' }));
    expect(() => calculateVolumeCheck({ ...bulb10(), ware: { ...bulb10().ware, mode: 'content' } })).toThrow(expect.objectContaining({ field: 'ware.mode' }));
    expect(() => calculateVolumeCheck({ ...bulb10(), air: { temperatureC: '40', pressureHPa: '1013', relativeHumidityPct: '50' } })).toThrow(expect.objectContaining({ field: 'air.temperatureC' }));
    expect(() => calculateVolumeCheck({ ...bulb10(), readings: [{ value: '9.97', unit: 'g' }, { value: '9.97', unit: 'mL' }] })).toThrow(expect.objectContaining({ field: 'readings.1.unit' }));
  });
});

describe('verdict at the limit (simple acceptance, common practice)', () => {
  const glass = { systematic: { value: '0.020', unit: 'mL' }, random: null, source: 'test', fromMemory: false };
  const piston = { systematic: { value: '8.0', unit: 'µL' }, random: { value: '3.0', unit: 'µL' }, source: 'test', fromMemory: false };
  it.each([
    ['0.020', 'pass'],
    ['-0.020', 'pass'],
    ['0.0200000001', 'fail'],
    ['-0.0200000001', 'fail'],
    ['0.0199999999', 'pass'],
  ])('systematic error %s mL against ±0.020 mL → %s', (es, want) => {
    expect(verdictFor({ systematicError: new D(es), standardDeviation: new D('0.001'), limit: glass }).result).toBe(want);
  });
  it.each([
    ['3.0', 'pass'],
    ['3.0000001', 'fail'],
  ])('random error s = %s µL against 3.0 µL → %s', (s, want) => {
    const v = verdictFor({ systematicError: new D('-8.0'), standardDeviation: new D(s), limit: piston });
    expect(v.result).toBe(want);
    expect(v.checks.map((c) => c.quantity)).toEqual(['systematic', 'random']);
  });
});
