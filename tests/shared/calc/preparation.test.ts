import { describe, it, expect } from 'vitest';
import { calculatePreparation, rectangular, CalcError, D, type PreparationRequest } from '../../../shared/calc/index.ts';
import { expectClose } from '../../helpers/decimal.ts';

// Worked example of METROLOGY §5.4 [C]: 1000 mg/L Pb from Pb(NO3)2, 100 mL, purity 0.9995 ± 0.0005 (rect.),
// ρ(salt) 4.53 g/mL, air 21 °C / 985 hPa / 45 %, actual reading 160.07 mg with u(m) = 0.0179 mg.
// u(V) = 0.052 mL reproduces the example's u_r(V) = 5.2e-4 (§5.4 budget).
const pbRequest = (): PreparationRequest => ({
  target: { value: '1000', unit: 'mg/L' },
  volume: { value: '100.0', unit: 'mL', standardUncertainty: '0.052' },
  material: {
    formula: 'Pb(NO3)2',
    analyteFormula: 'Pb',
    purity: { value: '0.9995', standardUncertainty: rectangular('0.0005').toString() },
    density: { value: '4.53', unit: 'g/mL' },
  },
  balance: { standardUncertainty: { value: '0.0179', unit: 'mg' } },
  air: { temperatureC: '21', pressureHPa: '985', relativeHumidityPct: '45' },
  weighing: { reading: { value: '160.07', unit: 'mg' } },
});

function calcErr(req: PreparationRequest): CalcError {
  try {
    calculatePreparation(req);
  } catch (e) {
    expect(e).toBeInstanceOf(CalcError);
    return e as CalcError;
  }
  throw new Error('expected a CalcError');
}

describe('calculatePreparation: Pb(NO3)2 worked example [C, METROLOGY §5.4]', () => {
  const res = calculatePreparation(pbRequest());

  it('air density 1.162 kg/m³ from CIPM-2007 at 21 °C / 985 hPa / 45 % [C, METROLOGY §5.4]', () => {
    expect(res.airDensity.unit).toBe('g/mL');
    expect(res.airDensity.method).toBe('CIPM-2007');
    expectClose(res.airDensity.value, '0.001162', '0.0000005');
  });

  it('gravimetric factor 207.2/331.208 and buoyancy factor', () => {
    expect(res.gravimetricFactor).toBe(new D('207.2').div('331.208').toSignificantDigits(20).toFixed());
    expectClose(res.buoyancyFactor, '1.000111', '0.000001');
  });

  it('true mass 159.929 mg → read 159.912 mg [C, METROLOGY §5.4]', () => {
    expect(res.trueMass.unit).toBe('mg');
    expect(new D(res.trueMass.value).toFixed(3)).toBe('159.929');
    expect(new D(res.balanceReading.value).toFixed(3)).toBe('159.912');
  });

  it('actual: reading 160.07 mg → m = 160.0878 mg, c = 1000.99 mg/L, U ≈ 2.6 mg/L, "1001.0 ± 2.6 mg/L (k = 2)" [C, METROLOGY §5.4]', () => {
    const a = res.actual!;
    expect(new D(a.trueMass.value).toFixed(4)).toBe('160.0878');
    expect(new D(a.concentration.value).toFixed(2)).toBe('1000.99');
    expectClose(a.concentration.standardUncertainty, '1.30', '0.01');
    expectClose(a.concentration.expandedUncertainty, '2.6', '0.05');
    expect(a.concentration.k).toBe('2');
    expect(a.concentration.unit).toBe('mg/L');
    expect(a.concentration.display).toBe('1001.0 ± 2.6 mg/L (k = 2)');
  });

  it('relative budget: m 1.1e-4, B 7.5e-6, w 1.15e-3, P 2.9e-4, V 5.2e-4 → u_r(c) = 1.30e-3 [C, METROLOGY §5.4]', () => {
    const a = res.actual!;
    const c = new D(a.concentration.value);
    const rel = Object.fromEntries(a.budget.map((b) => [b.input, new D(b.contribution).div(c)]));
    expectClose(rel.reading, '1.12e-4', '0.01e-4');
    expectClose(rel.purity, '2.9e-4', '0.05e-4');
    expectClose(rel.volume, '5.2e-4', '0.05e-4');
    const B = rel.airDensity.pow(2).plus(rel.materialDensity.pow(2)).plus(rel.weightDensity.pow(2)).sqrt();
    expectClose(B, '7.5e-6', '0.2e-6');
    const w = rel['atomicWeight.Pb'].pow(2).plus(rel['atomicWeight.N'].pow(2)).plus(rel['atomicWeight.O'].pow(2)).sqrt();
    expectClose(w, '1.15e-3', '0.005e-3');
    expectClose(new D(a.concentration.standardUncertainty).div(c), '1.30e-3', '0.005e-3');
    expect(a.budget.map((b) => b.input).sort()).toEqual(
      ['airDensity', 'atomicWeight.N', 'atomicWeight.O', 'atomicWeight.Pb', 'materialDensity', 'purity', 'reading', 'volume', 'weightDensity'].sort(),
    );
  });

  it('the budget’s root-sum-square equals u (all inputs uncorrelated; atomic weights enter through w)', () => {
    const a = res.actual!;
    const rss = a.budget.reduce((s, b) => s.plus(new D(b.contribution).pow(2)), new D(0)).sqrt();
    expectClose(rss, a.concentration.standardUncertainty, '1e-12');
  });

  it('classical significant-figure view: 4 figures → "1001" (common practice, METROLOGY §6.1)', () => {
    expect(res.actual!.concentration.significantFigures).toEqual({ value: '1001', significantFigures: 4, limitedBy: 'volume' });
  });

  it('planned case: expected uncertainty at the target reading ≈ the same 2.6 mg/L', () => {
    expect(res.planned.expectedUncertainty.value).toBe('1000');
    expect(res.planned.expectedUncertainty.display).toBe('1000.0 ± 2.6 mg/L (k = 2)');
  });

  it('every number in the response is a decimal string', () => {
    const walk = (v: unknown, path: string): void => {
      if (typeof v === 'number') expect.fail(`${path} is a JS number`);
      if (v && typeof v === 'object') for (const [k, x] of Object.entries(v)) if (k !== 'significantFigures' || typeof x === 'object') walk(x, `${path}.${k}`);
    };
    const { actual, ...rest } = res;
    walk(rest, 'res');
    walk({ ...actual, concentration: { ...actual!.concentration, significantFigures: undefined } }, 'res.actual');
  });
});

describe('calculatePreparation: defaults and variants', () => {
  it('reading u defaults to 0.408·d with d = last typed digit (METROLOGY §5.2): 160.07 mg → 0.00408 mg', () => {
    const req = pbRequest();
    delete req.balance;
    const row = calculatePreparation(req).actual!.budget.find((b) => b.input === 'reading')!;
    expectClose(row.standardUncertainty, new D('0.01').div(new D(6).sqrt()), '1e-15');
    expectClose(row.standardUncertainty, '0.00408', '0.000005');
  });

  it('volume u defaults to ISO 1042 class A 100 mL ±0.10 triangular = 0.0408 mL (METROLOGY §4.4, QUAM convention)', () => {
    const req = pbRequest();
    delete req.volume.standardUncertainty;
    const row = calculatePreparation(req).actual!.budget.find((b) => b.input === 'volume')!;
    expectClose(row.standardUncertainty, '0.0408', '0.00005');
  });

  it('a volume not in the table uses half the last typed digit, rectangular: 37.5 mL → 0.05/√3', () => {
    const req = pbRequest();
    req.volume = { value: '37.5', unit: 'mL' };
    const row = calculatePreparation(req).actual!.budget.find((b) => b.input === 'volume')!;
    expectClose(row.standardUncertainty, new D('0.05').div(new D(3).sqrt()), '1e-15');
  });

  it('a given air density carries rectangular ±0.06 kg/m³ [CP, METROLOGY §1.3]', () => {
    const req = pbRequest();
    req.air = { density: { value: '1.2', unit: 'kg/m3' } };
    const r = calculatePreparation(req);
    expect(r.airDensity).toMatchObject({ value: '0.0012', method: 'given' });
    expectClose(r.airDensity.standardUncertainty, new D('0.00006').div(new D(3).sqrt()), '1e-20');
  });

  it('material density ±5 % rectangular and weight density u 0.035 g/mL [CP, METROLOGY §2.3]', () => {
    const rows = Object.fromEntries(calculatePreparation(pbRequest()).actual!.budget.map((b) => [b.input, b]));
    expectClose(rows.materialDensity.standardUncertainty, new D('4.53').mul('0.05').div(new D(3).sqrt()), '1e-15');
    expect(rows.weightDensity.standardUncertainty).toBe('0.035');
    expect(rows.weightDensity.value).toBe('8');
  });

  it('no formula = factor 1, no atomic-weight inputs; QUAM A1-like Cd metal standard', () => {
    const r = calculatePreparation({
      target: { value: '1000', unit: 'mg/L' },
      volume: { value: '100.0', unit: 'mL' },
      material: { purity: { value: '0.9999', halfWidth: '0.0001' }, density: { value: '8.65', unit: 'g/mL' } },
      air: { density: { value: '0.0012', unit: 'g/mL' } },
      weighing: { reading: { value: '100.28', unit: 'mg' } },
    });
    expect(r.gravimetricFactor).toBe('1');
    expect(r.actual!.budget.some((b) => b.input.startsWith('atomicWeight'))).toBe(false);
    // Cd (8.65 g/mL) is slightly denser than the weights: B = 0.9999887 [C, METROLOGY §2.2]
    expectClose(r.buoyancyFactor, '0.9999887', '1e-7');
    // c ≈ 1000·100.28·0.9999/100.0 ·B = 1002.7 mg/L (QUAM A1 value before buoyancy, METROLOGY §5.3)
    expectClose(r.actual!.concentration.value, new D('1002.6997').mul('0.9999887'), '0.001');
  });

  it('purity from an expanded uncertainty with k', () => {
    const req = pbRequest();
    req.material.purity = { value: '0.9995', expandedUncertainty: '0.0006', k: '2' };
    const row = calculatePreparation(req).actual!.budget.find((b) => b.input === 'purity')!;
    expect(row.standardUncertainty).toBe('0.0003');
  });

  it('masses are given in the reading’s unit when it is g', () => {
    const req = pbRequest();
    req.weighing = { reading: { value: '0.16007', unit: 'g' } };
    const r = calculatePreparation(req);
    expect(r.trueMass.unit).toBe('g');
    expect(new D(r.trueMass.value).toFixed(6)).toBe('0.159929');
    expect(new D(r.actual!.concentration.value).toFixed(2)).toBe('1000.99');
  });

  it('µg/mL target and a litre volume give the same mass (1 µg/mL = 1 mg/L by definition)', () => {
    const req = pbRequest();
    req.target = { value: '1000', unit: 'ug/mL' };
    req.volume = { value: '0.1000', unit: 'L', standardUncertainty: '0.000052' };
    expect(new D(calculatePreparation(req).trueMass.value).toFixed(3)).toBe('159.929');
  });

  it('mmol/L target uses the analyte molar mass: 1 mmol/L NaCl in 1 L = 58.440 mg / P', () => {
    const r = calculatePreparation({
      target: { value: '1', unit: 'mmol/L' },
      volume: { value: '1000', unit: 'mL' },
      material: { formula: 'NaCl', purity: { value: '1' }, density: { value: '2.165', unit: 'g/mL' } },
      air: { density: { value: '0.0012', unit: 'g/mL' } },
    });
    expect(r.trueMass.value).toBe('58.44');
    // reading 100.000 mg true NaCl → 99.9596 mg at 0.0012/8.0 [C, METROLOGY §2.2] scales to 58.44 mg
    expectClose(r.balanceReading.value, new D('58.44').mul('0.999596'), '0.00003'); // 0.999596 carries ±5e-7 from rounding
  });

  it('mg/kg target with the solution density: 1000 mg/kg at 1.0091 g/mL needs 1009.1 mg/L worth of analyte', () => {
    const req = pbRequest();
    req.target = { value: '1000', unit: 'mg/kg', solutionDensity: { value: '1.0091', unit: 'g/mL' } };
    const r = calculatePreparation(req);
    expectClose(r.trueMass.value, new D('159.9293855').mul('1.0091'), '0.00001');
    expect(r.actual!.concentration.unit).toBe('mg/kg');
  });
});

describe('calculatePreparation: validation errors carry the request field path', () => {
  it.each<[string, string, string, (r: PreparationRequest) => void]>([
    ['purity > 1', 'material.purity.value', 'calc_out_of_range', (r) => (r.material.purity.value = '1.2')],
    ['purity 0', 'material.purity.value', 'non_positive', (r) => (r.material.purity.value = '0')],
    ['purity text', 'material.purity.value', 'invalid_number', (r) => (r.material.purity.value = '99,95')],
    ['temperature 31 °C', 'air.temperatureC', 'calc_out_of_range', (r) => (r.air.temperatureC = '31')],
    ['pressure 500 hPa', 'air.pressureHPa', 'calc_out_of_range', (r) => (r.air.pressureHPa = '500')],
    ['RH 120 %', 'air.relativeHumidityPct', 'calc_out_of_range', (r) => (r.air.relativeHumidityPct = '120')],
    ['CO2 0.05', 'air.co2MoleFraction', 'calc_out_of_range', (r) => (r.air.co2MoleFraction = '0.05')],
    ['missing temperature', 'air.temperatureC', 'missing_input', (r) => delete r.air.temperatureC],
    ['air both ways', 'air.density', 'calc_out_of_range', (r) => (r.air.density = { value: '1.2', unit: 'kg/m3' })],
    ['target unit mg', 'target.unit', 'unit_mismatch', (r) => (r.target.unit = 'mg')],
    ['target unit ppm', 'target.unit', 'unknown_unit', (r) => (r.target.unit = 'ppm')],
    ['mg/kg without density', 'target.unit', 'unit_mismatch', (r) => (r.target.unit = 'mg/kg')],
    ['target 0', 'target.value', 'non_positive', (r) => (r.target.value = '0')],
    ['volume negative', 'volume.value', 'non_positive', (r) => (r.volume.value = '-100')],
    ['volume unit g', 'volume.unit', 'unit_mismatch', (r) => (r.volume.unit = 'g')],
    ['volume u negative', 'volume.standardUncertainty', 'non_positive', (r) => (r.volume.standardUncertainty = '-1')],
    ['density 0', 'material.density.value', 'non_positive', (r) => (r.material.density.value = '0')],
    ['density unit mL', 'material.density.unit', 'unit_mismatch', (r) => (r.material.density.unit = 'mL')],
    ['density below air', 'material.density.value', 'calc_out_of_range', (r) => (r.material.density = { value: '0.001', unit: 'g/mL' })],
    ['bad formula', 'material.formula', 'invalid_formula', (r) => (r.material.formula = 'Pb(NO3')],
    ['analyte not in compound', 'material.analyteFormula', 'invalid_formula', (r) => (r.material.analyteFormula = 'Cd')],
    ['analyte without formula', 'material.formula', 'missing_input', (r) => delete r.material.formula],
    ['reading unit mL', 'weighing.reading.unit', 'unit_mismatch', (r) => (r.weighing!.reading.unit = 'mL')],
    ['reading 0', 'weighing.reading.value', 'non_positive', (r) => (r.weighing!.reading.value = '0')],
    ['balance u unit', 'balance.standardUncertainty.unit', 'unit_mismatch', (r) => (r.balance!.standardUncertainty!.unit = 'kg/m3')],
    ['expanded without k', 'material.purity.k', 'missing_input', (r) => (r.material.purity = { value: '0.9995', expandedUncertainty: '0.001' })],
  ])('%s → field %s, code %s', (_name, field, code, mutate) => {
    const req = pbRequest();
    mutate(req);
    const e = calcErr(req);
    expect(e.field).toBe(field);
    expect(e.code).toBe(code);
    expect(e.message.length).toBeGreaterThan(10);
  });

  it('mmol/L without a formula → target.unit', () => {
    const req = pbRequest();
    req.target.unit = 'mmol/L';
    delete req.material.formula;
    delete req.material.analyteFormula;
    expect(calcErr(req)).toMatchObject({ field: 'target.unit', code: 'unit_mismatch' });
  });

  it('the CIPM message says what is allowed', () => {
    const req = pbRequest();
    req.air.temperatureC = '31';
    expect(calcErr(req).message).toBe('Temperature 31 °C is outside the CIPM-2007 range 15–27 °C');
  });
});

// Where the atomic-weight contribution comes from (issue 16 §5): the row names the standard atomic weight and its
// interval treatment (METROLOGY §8: CIAAW abridged Pb 207.2 ± 1.1, ± as rectangular half-width, QUAM style), and a
// certificate's stated atomic weight replaces it for that element. Expected w = Ar(Pb)/(Ar(Pb) + 2·14.007 + 6·15.999)
// [C, arithmetic with the CIAAW abridged N and O of METROLOGY §8].
describe('atomic weights: source named, certificate value instead', () => {
  const w = (pb: string) => new D(pb).div(new D(pb).plus('124.008'));
  const pbRow = (r: ReturnType<typeof calculatePreparation>) => r.actual!.budget.find((b) => b.input === 'atomicWeight.Pb')!;

  it('by default the row says "standard atomic weight 207.2 ± 1.1 (IUPAC/CIAAW abridged; interval as rectangular half-width)"', () => {
    const r = calculatePreparation(pbRequest());
    expect(pbRow(r).label).toBe('Atomic weight of Pb: standard atomic weight 207.2 ± 1.1 (IUPAC/CIAAW abridged; interval as rectangular half-width, u = a/√3)');
    expectClose(pbRow(r).standardUncertainty, rectangular('1.1'), '1e-15');
    expectClose(r.gravimetricFactor, w('207.2'), '1e-15');
  });

  it('a certificate value 207.21 ± 0.01 g/mol (standard uncertainty) is used instead and named; the Pb contribution shrinks by 1.1/√3 ÷ 0.01 [C]', () => {
    const base = calculatePreparation(pbRequest());
    const req = pbRequest();
    req.material.atomicWeights = { Pb: { value: '207.21', standardUncertainty: '0.01', source: 'certificate HWL-PB-ISO-7' } };
    const r = calculatePreparation(req);
    expect(pbRow(r).label).toBe('Atomic weight of Pb: 207.21 g/mol as stated on certificate HWL-PB-ISO-7 (instead of the standard atomic weight)');
    expectClose(r.gravimetricFactor, w('207.21'), '1e-15');
    // the concentration moves by the ratio of the gravimetric factors (model c ∝ w)
    expectClose(new D(r.actual!.concentration.value).div(base.actual!.concentration.value), w('207.21').div(w('207.2')), '1e-15');
    expectClose(new D(pbRow(base).contribution).div(pbRow(r).contribution), rectangular('1.1').div('0.01'), '0.01');
    expect(new D(r.actual!.concentration.standardUncertainty).lt(base.actual!.concentration.standardUncertainty)).toBe(true);
  });

  it('refuses a stated atomic weight of an element not in the compound, or without its uncertainty or source, at the field', () => {
    const req = pbRequest();
    req.material.atomicWeights = { Cu: { value: '63.546', standardUncertainty: '0.002', source: 'cert' } };
    expect(() => calculatePreparation(req)).toThrow(expect.objectContaining({ field: 'material.atomicWeights.Cu' }));
    req.material.atomicWeights = { Pb: { value: '207.21', source: 'cert' } };
    expect(() => calculatePreparation(req)).toThrow(expect.objectContaining({ field: 'material.atomicWeights.Pb.standardUncertainty' }));
    req.material.atomicWeights = { Pb: { value: '207.21', standardUncertainty: '0.01', source: ' ' } };
    expect(() => calculatePreparation(req)).toThrow(expect.objectContaining({ field: 'material.atomicWeights.Pb.source' }));
  });
});
