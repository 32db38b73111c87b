import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { propagate, rectangular, triangular, fromExpanded, expanded, CalcError, D } from '../../../shared/calc/index.ts';
import { expectClose } from '../../helpers/decimal.ts';

// QUAM A1 (EURACHEM/CITAC QUAM:2012, Example A1): c = 1000·m·P/V, m 100.28 mg, P 0.9999, V 100.0 mL
const uV = new D('0.1').div(new D(6).sqrt()).pow(2).plus(new D('0.02').pow(2)).plus(new D('0.084').div(new D(3).sqrt()).pow(2)).sqrt();
const quam = () =>
  propagate({
    model: (x) => x.m.mul(x.P).div(x.V).mul(1000),
    inputs: {
      m: { value: '100.28', standardUncertainty: '0.05', label: 'mass of Cd' },
      P: { value: '0.9999', standardUncertainty: rectangular('0.0001'), label: 'purity' },
      V: { value: '100.0', standardUncertainty: uV, label: 'volume' },
    },
  });

describe('GUM law of propagation', () => {
  it('QUAM A1: c = 1002.7 mg/L, u = 0.835 [V-calc, METROLOGY §5.3]', () => {
    const r = quam();
    expect(r.value.toFixed(3)).toBe('1002.700');
    expectClose(r.standardUncertainty, '0.835', '0.001');
    expectClose(r.standardUncertainty, '0.835199', '0.000005'); // independent re-computation quoted in METROLOGY §5.3
  });

  it('QUAM A1 volume u(V) = 0.0665 mL from ±0.1 triangular, 0.02, ±0.084 rectangular [V-calc, METROLOGY §5.3]', () => {
    expectClose(uV, '0.0665', '0.00005');
  });

  it('QUAM A1 contributions: m 0.500, V 0.664 (from 0.486, 0.409, 0.201), P 0.058 mg/L [V-calc, METROLOGY §5.3]', () => {
    const by = Object.fromEntries(quam().budget.map((b) => [b.input, b]));
    expectClose(by.m.contribution, '0.500', '0.001');
    expectClose(by.P.contribution, '0.058', '0.001');
    const vParts = new D('0.486').pow(2).plus(new D('0.409').pow(2)).plus(new D('0.201').pow(2)).sqrt();
    expectClose(by.V.contribution, vParts, '0.002');
    expect(by.V.sensitivity.isNeg()).toBe(true);
    expect(by.m.label).toBe('mass of Cd');
  });

  it('QUAM A1 with QUAM’s rounded relative values (0.000058, 0.0005, 0.0007) gives u = 0.865 → U = 1.8 [V-calc, METROLOGY §5.3]', () => {
    const r = propagate({
      model: (x) => x.m.mul(x.P).div(x.V).mul(1000),
      inputs: {
        m: { value: '100.28', standardUncertainty: '0.05014' }, // 0.0005 relative
        P: { value: '0.9999', standardUncertainty: '0.0000579942' }, // 0.000058 relative
        V: { value: '100.0', standardUncertainty: '0.07' }, // 0.0007 relative
      },
    });
    expectClose(r.standardUncertainty, '0.865', '0.001');
    expect(expanded(r.standardUncertainty).toSignificantDigits(2).toString()).toBe('1.7'); // 1.73 → 1.7; QUAM rounds u to 0.9 first → 1.8
    expect(expanded(r.standardUncertainty.toSignificantDigits(1)).toString()).toBe('1.8');
  });

  it('shares sum to 1 for uncorrelated inputs', () => {
    const sum = quam().budget.reduce((s, b) => s.plus(b.share), new D(0));
    expectClose(sum, '1', '1e-20');
  });

  it('sensitivities are numerical central differences: ∂(x²)/∂x = 2x', () => {
    const r = propagate({ model: (x) => x.a.pow(2), inputs: { a: { value: '3', standardUncertainty: '0.1' } } });
    expectClose(r.budget[0].sensitivity, '6', '1e-20');
    expectClose(r.standardUncertainty, '0.6', '1e-20');
  });

  it('zero uncertainty still yields a sensitivity', () => {
    const r = propagate({ model: (x) => x.a.mul(5), inputs: { a: { value: '0', standardUncertainty: '0' } } });
    expectClose(r.budget[0].sensitivity, '5', '1e-20');
    expect(r.standardUncertainty.toString()).toBe('0');
    expect(r.budget[0].share.toString()).toBe('0');
  });

  it('correlated inputs (GUM eq. 13): y = a − b with r = 1 and equal u cancels; y = a + b with r = 1 adds linearly', () => {
    const inputs = { a: { value: '10', standardUncertainty: '0.3' }, b: { value: '4', standardUncertainty: '0.3' } };
    const minus = propagate({ model: (x) => x.a.minus(x.b), inputs, correlations: [['a', 'b', '1']] });
    expectClose(minus.standardUncertainty, '0', '1e-15');
    const plus = propagate({ model: (x) => x.a.plus(x.b), inputs, correlations: [['a', 'b', '1']] });
    expectClose(plus.standardUncertainty, '0.6', '1e-20');
    const none = propagate({ model: (x) => x.a.plus(x.b), inputs });
    expectClose(none.standardUncertainty, new D('0.18').sqrt(), '1e-20');
  });

  it('bad correlations → CalcError', () => {
    const inputs = { a: { value: '1', standardUncertainty: '0.1' } };
    expect(() => propagate({ model: (x) => x.a, inputs, correlations: [['a', 'zz', '0.5']] })).toThrow(expect.objectContaining({ code: 'missing_input' }));
    expect(() => propagate({ model: (x) => x.a, inputs: { ...inputs, b: inputs.a }, correlations: [['a', 'b', '1.5']] })).toThrow(
      expect.objectContaining({ code: 'calc_out_of_range' }),
    );
  });

  it('negative u → non_positive; non-decimal value → invalid_number', () => {
    expect(() => propagate({ model: (x) => x.a, inputs: { a: { value: '1', standardUncertainty: '-0.1' } } })).toThrow(
      expect.objectContaining({ code: 'non_positive' }),
    );
    expect(() => propagate({ model: (x) => x.a, inputs: { a: { value: '1,5', standardUncertainty: '0.1' } } })).toThrow(
      expect.objectContaining({ code: 'invalid_number' }),
    );
  });

  it('property: for uncorrelated inputs the budget’s root-sum-square equals u', () => {
    const text = fc.tuple(fc.integer({ min: 1, max: 99999 }), fc.integer({ min: -3, max: 2 })).map(([m, e]) => `${m}e${e}`);
    fc.assert(
      fc.property(fc.array(fc.tuple(text, text), { minLength: 1, maxLength: 5 }), (xs) => {
        const inputs = Object.fromEntries(xs.map(([v, u], i) => [`x${i}`, { value: v, standardUncertainty: u }]));
        const r = propagate({ model: (x) => Object.values(x).reduce((p, v) => p.mul(v), new D(1)), inputs });
        const rss = r.budget.reduce((s, b) => s.plus(b.contribution.pow(2)), new D(0)).sqrt();
        return rss.minus(r.standardUncertainty).abs().lte(r.standardUncertainty.mul('1e-25'));
      }),
      { numRuns: 50 },
    );
  });
});

describe('Type B conversions (GUM 4.3.7; QUAM)', () => {
  it('rectangular a/√3: ±0.0001 → 0.000058 (QUAM A1 purity) [V-src, METROLOGY §5.3]', () => {
    expect(rectangular('0.0001').toSignificantDigits(2).toString()).toBe('0.000058');
  });
  it('triangular a/√6: 100 mL ± 0.1 → 0.041 mL [V-src, QUAM A1, METROLOGY §4.4]', () => {
    expect(triangular('0.1').toSignificantDigits(2).toString()).toBe('0.041');
  });
  it('fromExpanded U/k and expanded k·u', () => {
    expect(fromExpanded('1.8', '2').toString()).toBe('0.9');
    expect(expanded('0.835').toString()).toBe('1.67');
    expect(expanded('0.835', '1.96').toString()).toBe('1.6366');
  });
  it('k ≤ 0 or negative widths → non_positive', () => {
    expect(() => fromExpanded('1', '0')).toThrow(CalcError);
    expect(() => expanded('1', '-2')).toThrow(expect.objectContaining({ code: 'non_positive' }));
    expect(() => rectangular('-1')).toThrow(expect.objectContaining({ code: 'non_positive' }));
  });
});
