/** What the screen says: no internal document references (calculation versions are named, not annotated). */
import { describe, expect, it } from 'vitest';
import { calcVersionName, expiryReasonText } from '../../src/features/preparations/format.ts';

describe('calculation version on screen', () => {
  it('names the version and drops the internal reference stored with it', () => {
    expect(calcVersionName('dilution-1 (METROLOGY §5.5: c2 = c1·Vp/Vf, relative variances add, no per-item temperature term)')).toBe('calculation dilution-1');
    expect(calcVersionName('mix-1')).toBe('calculation mix-1');
  });
});

describe('expiry line', () => {
  const reason = 'Expires on 2026-12-13, limited by the stability period: prepared 2026-11-13 + 30 days (lab default: lab rule) = 2026-12-13';
  it('says the date once (it is shown beside the reason)', () => {
    expect(expiryReasonText(reason, false)).toBe('Limited by the stability period: prepared 2026-11-13 + 30 days (lab default: lab rule) = 2026-12-13');
  });
  it('does not say "prepared" for a record not yet made up', () => {
    const text = expiryReasonText(reason, true);
    expect(text).not.toMatch(/prepared/);
    expect(text).toContain('planned for 2026-11-13');
  });
});
