import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
  formatPreparationId,
  isValidPrefix,
  parsePreparationId,
  preparationPrefixSchema,
  validatePrefix,
} from '../../../shared/prep/identifiers.ts';

// Identifier format PREFIX-YYYY-NNNN: common practice (the lab's own convention), not from a standard.
describe('formatPreparationId', () => {
  it('zero-pads the sequence to 4 digits', () => {
    expect(formatPreparationId('HWL', 2026, 42)).toBe('HWL-2026-0042');
    expect(formatPreparationId('HWL', 2026, 1)).toBe('HWL-2026-0001');
    expect(formatPreparationId('HWL', 2026, 9999)).toBe('HWL-2026-9999');
  });
  it('uses more digits past 9999', () => {
    expect(formatPreparationId('HWL', 2026, 10000)).toBe('HWL-2026-10000');
    expect(formatPreparationId('QCLABS', 2027, 123456)).toBe('QCLABS-2027-123456');
  });
  it('refuses invalid prefix, year or sequence', () => {
    expect(() => formatPreparationId('hwl', 2026, 1)).toThrow(RangeError);
    expect(() => formatPreparationId('H', 2026, 1)).toThrow(RangeError);
    expect(() => formatPreparationId('HWL', 26, 1)).toThrow(RangeError);
    expect(() => formatPreparationId('HWL', 2026, 0)).toThrow(RangeError);
    expect(() => formatPreparationId('HWL', 2026, 1.5)).toThrow(RangeError);
  });
});

describe('parsePreparationId', () => {
  it('parses canonical identifiers', () => {
    expect(parsePreparationId('HWL-2026-0042')).toEqual({ prefix: 'HWL', year: 2026, seq: 42 });
    expect(parsePreparationId('HWL-2026-10000')).toEqual({ prefix: 'HWL', year: 2026, seq: 10000 });
  });
  it.each(['hwl-2026-0042', 'HWL-2026-42', 'HWL-2026-00042', 'HWL-2026-0000', 'HWL-26-0042', 'HWL2026-0042', ' HWL-2026-0042', 'HWL-2026-0042-A', 'H-2026-0042', 'ABCDEFG-2026-0042', ''])(
    'rejects %j',
    (s) => expect(parsePreparationId(s)).toBeUndefined(),
  );
  it('property: parse ∘ format is the identity, and format ∘ parse too', () => {
    fc.assert(
      fc.property(
        fc.stringMatching(/^[A-Z]{2,6}$/),
        fc.integer({ min: 1000, max: 9999 }),
        fc.integer({ min: 1, max: 10_000_000 }),
        (prefix, year, seq) => {
          const id = formatPreparationId(prefix, year, seq);
          expect(parsePreparationId(id)).toEqual({ prefix, year, seq });
          const back = parsePreparationId(id)!;
          expect(formatPreparationId(back.prefix, back.year, back.seq)).toBe(id);
        },
      ),
    );
  });
});

describe('prefix validation (2–6 upper-case letters)', () => {
  it.each(['HW', 'HWL', 'ABCDEF'])('accepts %s', (p) => {
    expect(validatePrefix(p)).toEqual({ ok: true });
    expect(isValidPrefix(p)).toBe(true);
    expect(preparationPrefixSchema.safeParse(p).success).toBe(true);
  });
  it.each(['H', 'ABCDEFG', 'hwl', 'HW1', 'HW-L', 'ÄBC', ''])('rejects %j with a message', (p) => {
    const r = validatePrefix(p);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.message).toContain('2 to 6 upper-case letters');
    expect(preparationPrefixSchema.safeParse(p).success).toBe(false);
  });
  it('rejects non-strings', () => {
    expect(isValidPrefix(42)).toBe(false);
  });
});
