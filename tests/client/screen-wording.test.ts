/** What the screen says: no internal document references (calculation versions are named, not annotated). */
import { describe, expect, it } from 'vitest';
import { calcVersionName } from '../../src/features/preparations/format.ts';

describe('calculation version on screen', () => {
  it('names the version and drops the internal reference stored with it', () => {
    expect(calcVersionName('dilution-1 (METROLOGY §5.5: c2 = c1·Vp/Vf, relative variances add, no per-item temperature term)')).toBe('calculation dilution-1');
    expect(calcVersionName('mix-1')).toBe('calculation mix-1');
  });
});
