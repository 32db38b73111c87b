import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { D, CalcError, rectangular, triangular } from '../../../shared/calc/index.ts';
import { DILUTION_TEMPERATURE_HALF_WIDTH_C, gravimetricDilution, pistonSetting, proposeIntermediate, repeatabilityFromTolerance, pistonStepMl, proposeSeries, volumetricDilution, type SeriesWare } from '../../../shared/calc/dilution.ts';
import { expectClose } from '../../helpers/decimal.ts';

// METROLOGY §5.5 worked example [C]: 1.000 mL ISO 648 class A (±0.008, triangular) into 100 mL (±0.10,
// triangular) from the Pb stock of §5.4 (1000.99 mg/L, u = 1.30 mg/L).
const pbStock = { value: '1000.99', unit: 'mg/L', standardUncertainty: '1.30' };
const workedExample = () =>
  volumetricDilution({
    parent: pbStock,
    aliquot: { volumeMl: '1.000', standardUncertainty: triangular('0.008') },
    final: { volumeMl: '100', standardUncertainty: triangular('0.10') },
  });

describe('volumetric dilution', () => {
  it('Pb 1000.99 mg/L, 1 mL into 100 mL: c2 = 10.010 mg/L, u_r = 3.54e-3, U = 0.071 mg/L [C, METROLOGY §5.5]', () => {
    const r = workedExample();
    expect(new D(r.value).toFixed(3)).toBe('10.010');
    expectClose(r.relative, '3.54e-3', '0.005e-3');
    expect(new D(r.expandedUncertainty).toSignificantDigits(2).toFixed()).toBe('0.071');
    expect(r.display).toBe('10.010 ± 0.071 mg/L (k = 2)');
    expect(r.unit).toBe('mg/L');
  });

  it('component u_r: pipette 3.27e-3, flask 4.1e-4 [C, METROLOGY §5.5]; the parent enters as an input with sensitivity Vp/Vf', () => {
    const r = workedExample();
    const row = (n: string) => r.budget.find((b) => b.input === n)!;
    expectClose(new D(row('aliquot').contribution).div(r.value), '3.27e-3', '0.005e-3');
    expectClose(new D(row('final').contribution).div(r.value), '4.1e-4', '0.05e-4');
    expectClose(row('parent').sensitivity, '0.01', '1e-12'); // ∂c2/∂c1 = Vp/Vf = 1/100 (derivation)
    const shares = r.budget.reduce((a, b) => a.plus(b.share), new D(0));
    expectClose(shares, '1', '1e-12'); // uncorrelated inputs: shares sum to 1 (GUM eq. 10)
  });

  it('relative variances add for any inputs (property) [METROLOGY §5.5, GUM eq. 10 for a product/quotient]', () => {
    const dec = (lo: number, hi: number) => fc.integer({ min: lo, max: hi }).map((n) => new D(n).div(1000));
    fc.assert(
      fc.property(dec(1000, 100000), dec(1, 500), dec(100, 10000), dec(1, 50), dec(10000, 1000000), dec(1, 500), (c1, u1, vp, up, vfExtra, uf) => {
        const vf = vp.plus(vfExtra);
        const r = volumetricDilution({
          parent: { value: c1.toFixed(), unit: 'mg/L', standardUncertainty: u1.toFixed() },
          aliquot: { volumeMl: vp.toFixed(), standardUncertainty: up.toFixed() },
          final: { volumeMl: vf.toFixed(), standardUncertainty: uf.toFixed() },
        });
        const expected = u1.div(c1).pow(2).plus(up.div(vp).pow(2)).plus(uf.div(vf).pow(2)).sqrt();
        expectClose(r.relative, expected, expected.mul('1e-6'));
        expectClose(r.value, c1.mul(vp).div(vf), c1.mul(vp).div(vf).mul('1e-18')); // stored to 20 significant digits
      }),
      { numRuns: 60 },
    );
  });

  it('refuses an aliquot larger than the flask and non-positive volumes (common practice)', () => {
    expect(() => volumetricDilution({ parent: pbStock, aliquot: { volumeMl: '200', standardUncertainty: '0' }, final: { volumeMl: '100', standardUncertainty: '0' } })).toThrow(CalcError);
    expect(() => volumetricDilution({ parent: pbStock, aliquot: { volumeMl: '0', standardUncertainty: '0' }, final: { volumeMl: '100', standardUncertainty: '0' } })).toThrow(/greater than 0/);
  });
});

describe('gravimetric dilution', () => {
  it('equal densities: buoyancy cancels, w2 = w1·m_a/m_f and u_r adds in quadrature [METROLOGY §5.5]', () => {
    const r = gravimetricDilution({
      parentMassFraction: '1000.0',
      u: '1.0',
      aliquotReading: { value: '1.0000', standardUncertainty: '0.0001' },
      finalReading: { value: '100.000', standardUncertainty: '0.001' },
      densities: { aliquot: '0.998', final: '0.998' },
      air: { density: '0.0012', standardUncertainty: '0.00001' },
    });
    expect(new D(r.buoyancyRatio).toFixed()).toBe('1');
    expectClose(r.massFraction.value, '10', '1e-25');
    const expected = new D('1e-3').pow(2).plus(new D('1e-4').pow(2)).plus(new D('1e-5').pow(2)).sqrt();
    expectClose(r.massFraction.relative, expected, '1e-10');
    // γ = w·ρ: 10 mg/kg × 0.998 kg/L = 9.98 mg/L [METROLOGY §5.5]
    expectClose(r.massConcentration.value, '9.98', '1e-25');
    expect(r.massConcentration.unit).toBe('mg/L');
  });

  it('different densities: w2 carries B(aliquot)/B(final) (NIST SOP 2 buoyancy, METROLOGY §5.5)', () => {
    const r = gravimetricDilution({
      parentMassFraction: '1000',
      u: '1',
      aliquotReading: { value: '1.0000', standardUncertainty: '0.0001' },
      finalReading: { value: '100.000', standardUncertainty: '0.001' },
      densities: { aliquot: '1.2', final: '0.998' },
      air: { density: '0.0012' },
    });
    // B = (1 − ρa/8)/(1 − ρa/ρ): ratio = (1 − 0.0012/0.998)/(1 − 0.0012/1.2) [derivation]
    const ratio = new D(1).minus(new D('0.0012').div('0.998')).div(new D(1).minus(new D('0.0012').div('1.2')));
    expectClose(r.buoyancyRatio, ratio, '1e-15');
    expectClose(r.massFraction.value, ratio.mul(10), '1e-15');
    expect(new D(r.buoyancyRatio).lt(1)).toBe(true);
  });

  it('refuses an aliquot heavier than the final solution', () => {
    expect(() =>
      gravimetricDilution({ parentMassFraction: '1000', u: '1', aliquotReading: { value: '5', standardUncertainty: '0' }, finalReading: { value: '2', standardUncertainty: '0' }, densities: { aliquot: '1', final: '1' }, air: { density: '0.0012' } }),
    ).toThrow(CalcError);
  });
});

describe('calibration series proposal', () => {
  const ware = (id: number, identifier: string, kind: SeriesWare['kind'], nominal: string, cls: SeriesWare['class'], tol: string | null, status = 'in_service'): SeriesWare => ({
    id,
    identifier,
    kind,
    nominalVolumeMl: nominal,
    class: cls,
    toleranceMl: tol,
    status,
  });
  // tolerances: ISO 648 / ISO 1042 class A [M, METROLOGY §4.4]; class B = 2 × A [METROLOGY §4.4]
  const pipettes = [
    ware(1, 'BP-1', 'bulb_pipette', '1', 'A', '0.008'),
    ware(2, 'BP-2', 'bulb_pipette', '2', 'A', '0.010'),
    ware(3, 'BP-5', 'bulb_pipette', '5', 'A', '0.015'),
    ware(4, 'BP-10', 'bulb_pipette', '10', 'A', '0.020'),
    ware(5, 'BP-10B', 'bulb_pipette', '10', 'B', '0.040'),
    ware(6, 'PP-1000', 'piston_pipette', '1', 'n/a', '0.008'),
    ware(7, 'BP-0.5', 'bulb_pipette', '0.5', 'A', '0.005'),
    ware(8, 'BP-20-OOS', 'bulb_pipette', '20', 'A', '0.030', 'out_of_service'),
  ];
  const flasks = [ware(11, 'VF-100', 'volumetric_flask', '100', 'A', '0.10'), ware(12, 'VF-100B', 'volumetric_flask', '100', 'B', '0.20'), ware(13, 'VF-50', 'volumetric_flask', '50', 'A', '0.06'), ware(14, 'VF-1000', 'volumetric_flask', '1000', 'A', '0.40')];
  const levels = ['1', '2', '5', '10', '20'].map((value) => ({ value, unit: 'mg/L' }));
  const proposals = () => proposeSeries({ parentConcentration: { value: '1000', unit: 'mg/L', standardUncertainty: '1.3' }, levels, pipettes, flasks });

  it('5 levels from 1000 mg/L: every level exact, each in its own flask, class A, lowest u_r (METROLOGY §5.5, §4.4; common practice)', () => {
    const p = proposals();
    expect(p).toHaveLength(5);
    const pick = p.map((l) => (l.choice ? `${l.choice.pipette.identifier}→${l.choice.flask.identifier}` : null));
    // 1 mg/L: 1 mL into 1000 mL (u_r 3.3e-3) beats 0.1 mL by piston into 100 mL (u_r 4.6e-2) and 0.5 mL bulb (below 1 mL)
    // [derivation: u = a/√6]; the next levels take the best pair whose flask no earlier level took; four flasks
    // hold four levels, so the fifth says why it has none
    expect(pick).toEqual(['BP-1→VF-1000', 'PP-1000→VF-100', 'PP-1000→VF-50', 'BP-1→VF-100B', null]);
    expect(p[4]!.message).toMatch(/taken by another level/);
    for (const l of p.slice(0, 4)) {
      expect(l.choice!.exact).toBe(true);
      expect(new D(l.choice!.concentration).eq(l.target.value)).toBe(true);
    }
    // u_r for 1 mg/L: √((1.3e-3)² + (0.008/√6/1)² + (0.40/√6/1000)²) [METROLOGY §5.5 formula]
    const ur = new D('1.3e-3').pow(2).plus(triangular('0.008').div(1).pow(2)).plus(triangular('0.40').div(1000).pow(2)).sqrt();
    expectClose(p[0]!.choice!.expectedRelativeU!, ur, '1e-15');
  });

  it('never proposes one flask for two levels, nor a flask another level took as an alternative (one flask, one solution)', () => {
    const withFive = [...flasks, ware(15, 'VF-200', 'volumetric_flask', '200', 'A', '0.15')];
    const p = proposeSeries({ parentConcentration: { value: '1000', unit: 'mg/L', standardUncertainty: '1.3' }, levels, pipettes, flasks: withFive });
    const chosen = p.map((l) => l.choice!.flask.identifier);
    expect(new Set(chosen).size).toBe(5);
    p.forEach((l, k) => {
      for (const a of l.alternatives) expect(chosen.filter((_, j) => j !== k)).not.toContain(a.flask.identifier);
    });
  });

  it('says the parent concentration as the record shows it, never its internal digits', () => {
    const p = proposeSeries({ parentConcentration: { value: '1003.8063975891223363', unit: 'mg/L', standardUncertainty: '1.05' }, levels: [{ value: '2000', unit: 'mg/L' }], pipettes, flasks });
    // U = 2 × 1.05 = 2.1 → one decimal (GUM 7.2.6)
    expect(p[0]!.message).toBe("2000 mg/L is not below the parent's 1003.8 mg/L, so it is not a dilution");
  });

  it('never proposes out-of-service ware, bulb aliquots below the minimum, or piston settings below 10 % of nominal (common practice)', () => {
    for (const l of proposals()) {
      for (const c of [...(l.choice ? [l.choice] : []), ...l.alternatives]) {
        expect(c.pipette.identifier).not.toBe('BP-20-OOS');
        expect(c.pipette.identifier).not.toBe('BP-0.5');
        if (c.pipette.kind === 'piston_pipette') expect(new D(c.aliquotMl).gte('0.1')).toBe(true);
      }
    }
  });

  it('prefers class A over class B for the same ratio and u (common practice)', () => {
    const p = proposeSeries({ parentConcentration: { value: '1000', unit: 'mg/L' }, levels: [{ value: '100', unit: 'mg/L' }], pipettes: [pipettes[4]!, pipettes[3]!], flasks: [flasks[1]!, flasks[0]!] });
    expect(p[0]!.choice!.pipette.identifier).toBe('BP-10');
    expect(p[0]!.choice!.flask.identifier).toBe('VF-100');
  });

  it('uses a piston pipette at a setting when no bulb pipette gives the ratio exactly', () => {
    const p = proposeSeries({ parentConcentration: { value: '1000', unit: 'mg/L' }, levels: [{ value: '7', unit: 'mg/L' }], pipettes, flasks });
    expect(p[0]!.choice!.pipette.identifier).toBe('PP-1000');
    expect(p[0]!.choice!.aliquotMl).toBe('0.7');
    expect(p[0]!.choice!.flask.identifier).toBe('VF-100');
  });

  it('sets a piston pipette only in steps it can be set to (a thousandth of nominal, common practice, from memory)', () => {
    // 1000 mg/L → 3.33 mg/L in 100 mL wants 0.333 mL; a 1 mL piston pipette sets in 0.001 mL, so 0.333 mL exactly.
    expect(pistonStepMl('1').toString()).toBe('0.001');
    expect(pistonStepMl('0.1').toString()).toBe('0.0001');
    expect(pistonSetting('0.33301', '1').toString()).toBe('0.333');
    expect(pistonSetting('0.9990099', '1').toString()).toBe('0.999'); // never an unsettable 0.99901 mL
    expect(pistonSetting('0.01245', '0.1').toString()).toBe('0.0124'); // a tie goes to the even step (half-even)
    const p = proposeSeries({ parentConcentration: { value: '1000', unit: 'mg/L' }, levels: [{ value: '3.33', unit: 'mg/L' }], pipettes, flasks });
    const c = p[0]!.choice!;
    expect(c.pipette.kind).toBe('piston_pipette');
    expect(new D(c.aliquotMl).mod(pistonStepMl('1')).isZero()).toBe(true);
    // the achieved concentration is the one of the settable aliquot: c1·Va/Vf
    expect(new D(c.concentration).eq(new D('1000').mul(c.aliquotMl).div(c.finalMl))).toBe(true);
  });

  it('says why when nothing fits: a level above the parent or in another unit', () => {
    const p = proposeSeries({ parentConcentration: { value: '10', unit: 'mg/L' }, levels: [{ value: '20', unit: 'mg/L' }, { value: '1', unit: 'µg/L' }, { value: '0.0001', unit: 'mg/L' }], pipettes, flasks });
    expect(p[0]!.choice).toBeNull();
    expect(p[0]!.message).toMatch(/not below/);
    expect(p[1]!.message).toMatch(/in mg\/L/);
    expect(p[2]!.message).toMatch(/No in-service pipette/);
  });
});

// The fuller budget (dilution-2): the same worked example plus each item's repeatability from its tolerance,
// triangular a/√6 [common practice, reasons in shared/calc/dilution.ts], and the aliquot-to-final temperature
// difference 0 ± 4 °C rectangular [QUAM A1 laboratory allowance] with water's β = 2.1e-4 /K [QUAM A1, METROLOGY §5.3].
describe('volumetric dilution, fuller budget', () => {
  const fuller = () =>
    volumetricDilution({
      parent: pbStock,
      aliquot: { volumeMl: '1.000', standardUncertainty: triangular('0.008') },
      final: { volumeMl: '100', standardUncertainty: triangular('0.10') },
      repeatability: { aliquotMl: repeatabilityFromTolerance('0.008'), finalMl: repeatabilityFromTolerance('0.10') },
      temperature: { betaPerK: '0.00021', standardUncertaintyC: rectangular(DILUTION_TEMPERATURE_HALF_WIDTH_C) },
    });

  it('adds three rows; u_r² = 3.54e-3² + 3.27e-3² + 4.1e-4² + (2.1e-4·4/√3)² → u_r = 4.86e-3 [C, arithmetic on METROLOGY §5.5 and QUAM A1]', () => {
    const r = fuller();
    expect(r.value).toBe(workedExample().value); // the terms are 0 ± u: the value does not move
    expect(r.budget.map((b) => b.input)).toEqual(['parent', 'aliquot', 'final', 'aliquotRepeatability', 'finalRepeatability', 'temperature']);
    const row = (n: string) => r.budget.find((b) => b.input === n)!;
    expectClose(new D(row('aliquotRepeatability').contribution).div(r.value), '3.27e-3', '0.005e-3'); // 0.008/√6 / 1 mL
    expectClose(new D(row('finalRepeatability').contribution).div(r.value), '4.1e-4', '0.05e-4'); // 0.10/√6 / 100 mL
    expectClose(new D(row('temperature').contribution).div(r.value), '4.85e-4', '0.005e-4'); // 2.1e-4 × 4/√3
    const expected = new D(workedExample().relative).pow(2).plus(triangular('0.008').pow(2)).plus(triangular('0.10').div(100).pow(2)).plus(new D('0.00021').mul(rectangular('4')).pow(2)).sqrt();
    expectClose(r.relative, expected, '1e-15');
    expectClose(r.relative, '4.86e-3', '0.005e-3');
    expect(r.display).toBe('10.010 ± 0.097 mg/L (k = 2)');
  });

  it('repeatability from a tolerance is triangular a/√6: 100 mL ±0.10 → 0.0408 mL, twice QUAM A1\u2019s measured fill-and-weigh s = 0.02 mL [METROLOGY §5.3]', () => {
    expectClose(repeatabilityFromTolerance('0.10'), '0.040825', '0.000001');
  });

  it('without the options the budget is dilution-1 exactly (records written before keep theirs)', () => {
    const r = workedExample();
    expect(r.budget.map((b) => b.input)).toEqual(['parent', 'aliquot', 'final']);
  });

  it('the series proposal\u2019s expected u_r includes the same terms when asked [same sources]', () => {
    const ware: SeriesWare[] = [
      { id: 1, identifier: 'BP-1-01', kind: 'bulb_pipette', nominalVolumeMl: '1', class: 'A', toleranceMl: '0.008', status: 'in_service' },
      { id: 2, identifier: 'VF-100-01', kind: 'volumetric_flask', nominalVolumeMl: '100', class: 'A', toleranceMl: '0.10', status: 'in_service' },
    ];
    const args = { parentConcentration: pbStock, levels: [{ value: '10.0099', unit: 'mg/L' }], pipettes: [ware[0]!], flasks: [ware[1]!] };
    const plain = proposeSeries(args)[0]!.choice!;
    const full = proposeSeries({ ...args, fullerBudget: { betaPerK: '0.00021' } })[0]!.choice!;
    expectClose(plain.expectedRelativeU!, workedExample().relative, '1e-12');
    expectClose(full.expectedRelativeU!, fuller().relative, '1e-12');
  });
});

// An intermediate step for levels too far below the parent (issue 16 §5): µg/L levels from a 1000 mg/L stock need
// a dilution factor of 10⁵, beyond any one pipette and flask (1 mL into 1000 mL is 10⁻³) [common practice: serial
// dilution]. Expected concentrations are c1·Va/Vf exactly [C, arithmetic].
describe('intermediate dilution step', () => {
  const glass: SeriesWare[] = [
    { id: 1, identifier: 'BP-1-01', kind: 'bulb_pipette', nominalVolumeMl: '1', class: 'A', toleranceMl: '0.008', status: 'in_service' },
    { id: 2, identifier: 'BP-2-01', kind: 'bulb_pipette', nominalVolumeMl: '2', class: 'A', toleranceMl: '0.010', status: 'in_service' },
    { id: 3, identifier: 'BP-10-01', kind: 'bulb_pipette', nominalVolumeMl: '10', class: 'A', toleranceMl: '0.020', status: 'in_service' },
  ];
  const flasks: SeriesWare[] = [
    { id: 4, identifier: 'VF-100-01', kind: 'volumetric_flask', nominalVolumeMl: '100', class: 'A', toleranceMl: '0.10', status: 'in_service' },
    { id: 5, identifier: 'VF-1000-01', kind: 'volumetric_flask', nominalVolumeMl: '1000', class: 'A', toleranceMl: '0.40', status: 'in_service' },
  ];
  const input = {
    parentConcentration: { value: '1000', unit: 'mg/L', standardUncertainty: '1.3' },
    levels: [{ value: '100', unit: 'mg/L' }, { value: '0.01', unit: 'mg/L' }, { value: '0.02', unit: 'mg/L' }],
    pipettes: glass,
    flasks,
  };

  it('proposes a first dilution that the 10 and 20 µg/L levels then come from; the reachable level needs none', () => {
    const direct = proposeSeries(input);
    expect(direct[0]!.choice).not.toBeNull(); // 10 mL into 100 mL
    expect(direct[1]!.choice).toBeNull();
    expect(direct[2]!.choice).toBeNull();
    const step = proposeIntermediate(input, direct)!;
    expect(step).not.toBeNull();
    expect(step.levels.map((l) => l.index)).toEqual([1, 2]);
    // the intermediate is exactly what its pair gives from the parent, and each level exactly what its pair gives from it
    expect(new D(step.target.value).eq(new D('1000').mul(step.choice.aliquotMl).div(step.choice.finalMl))).toBe(true);
    expect(step.choice.exact).toBe(true);
    for (const l of step.levels) {
      const c = l.proposal.choice!;
      expect(new D(step.target.value).mul(c.aliquotMl).div(c.finalMl).eq(l.proposal.target.value)).toBe(true);
    }
    expect(step.message).toMatch(/first dilute .* mL of the parent with BP-\d+-01 into \d+ mL \(VF-\d+-01\) to [\d.]+ mg\/L, then make those 2 levels from it once it is verified/);
  });

  it('is null when every level is reachable directly', () => {
    expect(proposeIntermediate({ ...input, levels: [{ value: '10', unit: 'mg/L' }] })).toBeNull();
  });
});
