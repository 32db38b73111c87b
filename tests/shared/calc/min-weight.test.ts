import { describe, it, expect } from 'vitest';
import { uspMinimumWeight, checkAgainstMinimumWeight, CalcError } from '../../../shared/calc/index.ts';

describe('USP <41> minimum weight', () => {
  it('USP <41> example 0.30000 g for s = 0.00015 g [V-src, METROLOGY §7]', () => {
    const r = uspMinimumWeight({ repeatabilitySd: '0.00015' });
    expect(r.minimumWeight.toFixed(5)).toBe('0.30000');
    expect(r.readabilityFloorApplied).toBe(false);
  });

  it('d = 0.01 mg, s = 0.003 mg < 0.41 d → 8.2 mg; SF 2 → 16.4 mg [C, METROLOGY §7]', () => {
    const r = uspMinimumWeight({ repeatabilitySd: '0.003', readability: '0.01' });
    expect(r.minimumWeight.toString()).toBe('8.2');
    expect(r.effectiveSd.toString()).toBe('0.0041');
    expect(r.readabilityFloorApplied).toBe(true);
    expect(uspMinimumWeight({ repeatabilitySd: '0.003', readability: '0.01', safetyFactor: '2' }).minimumWeight.toString()).toBe('16.4');
  });

  it('the 0.41 d floor alone gives 820 d [V-src, METROLOGY §7]', () => {
    expect(uspMinimumWeight({ repeatabilitySd: '0', readability: '0.1' }).minimumWeight.toString()).toBe('82');
  });

  it('a measured s above 0.41 d is used as is', () => {
    expect(uspMinimumWeight({ repeatabilitySd: '0.006', readability: '0.01' }).minimumWeight.toString()).toBe('12');
  });

  it('check a planned net mass against the minimum weight', () => {
    const mw = uspMinimumWeight({ repeatabilitySd: '0.003', readability: '0.01', safetyFactor: '2' });
    expect(checkAgainstMinimumWeight('159.912', mw).ok).toBe(true);
    const low = checkAgainstMinimumWeight('10.0', mw);
    expect(low.ok).toBe(false);
    expect(low.margin.toString()).toBe('-6.4');
    expect(low.message).toMatch(/below the minimum weight 16.4/);
    expect(checkAgainstMinimumWeight('16.4', '16.4').ok).toBe(true);
  });

  it('invalid inputs → CalcError', () => {
    expect(() => uspMinimumWeight({ repeatabilitySd: '-0.1' })).toThrow(expect.objectContaining({ code: 'non_positive' }));
    expect(() => uspMinimumWeight({ repeatabilitySd: '0' })).toThrow(expect.objectContaining({ code: 'non_positive' }));
    expect(() => uspMinimumWeight({ repeatabilitySd: '0.1', readability: '0' })).toThrow(CalcError);
    expect(() => uspMinimumWeight({ repeatabilitySd: '0.1', safetyFactor: '0.5' })).toThrow(expect.objectContaining({ code: 'calc_out_of_range' }));
    expect(() => checkAgainstMinimumWeight('1', '0')).toThrow(expect.objectContaining({ code: 'non_positive' }));
  });
});
