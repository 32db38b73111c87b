import { describe, expect, it } from 'vitest';
import { computeExpiry } from '../../../shared/prep/expiry.ts';
import { addDays, daysBetween, isIsoDate } from '../../../shared/prep/dates.ts';
import { CalcError } from '../../../shared/calc/errors.ts';

// Rule: expiry = min(prepared + stability, material expiry, each parent's expiry)
// (METROLOGY §10 [CP]; REQUIREMENTS EX-01, EX-02).
describe('computeExpiry: limiting cases', () => {
  it('stability limits: 2026-03-01 + 30 days = 2026-03-31 (calendar arithmetic)', () => {
    const r = computeExpiry({ preparedOn: '2026-03-01', stabilityDays: 30, stabilityBasis: 'rule SR-12 (study ST-2024-07)', materialExpiresOn: '2027-01-31' });
    expect(r.expiresOn).toBe('2026-03-31');
    expect(r.limitedBy).toEqual({ kind: 'stability', basis: 'rule SR-12 (study ST-2024-07)' });
    expect(r.reason).toBe('Expires on 2026-03-31, limited by the stability period: prepared 2026-03-01 + 30 days (rule SR-12 (study ST-2024-07)) = 2026-03-31');
    expect(r.stabilityMissing).toBe(false);
  });
  it('material limits', () => {
    const r = computeExpiry({ preparedOn: '2026-03-01', stabilityDays: '365', materialExpiresOn: '2026-06-30', materialIdentifier: 'RM lot 4711' });
    expect(r.expiresOn).toBe('2026-06-30');
    expect(r.limitedBy).toEqual({ kind: 'material', identifier: 'RM lot 4711' });
    expect(r.reason).toBe('Expires on 2026-06-30, limited by the reference material RM lot 4711, which expires on 2026-06-30');
  });
  it('REQUIREMENTS EX-01 test: parent expires 2025-06-30, stability allows 2025-09-01 -> 2025-06-30, naming the parent', () => {
    // 2025-03-05 + 180 days = 2025-09-01 (calendar arithmetic)
    const r = computeExpiry({ preparedOn: '2025-03-05', stabilityDays: 180, parents: [{ identifier: 'HWL-2025-0042', expiresOn: '2025-06-30' }] });
    expect(r.candidates[0]!.expiresOn).toBe('2025-09-01');
    expect(r.expiresOn).toBe('2025-06-30');
    expect(r.limitedBy).toEqual({ kind: 'parent', identifier: 'HWL-2025-0042' });
    expect(r.reason).toContain('limited by parent HWL-2025-0042');
  });
  it.each([0, 1, 2])('each parent can be the limit (parent #%i earliest)', (k) => {
    const parents = ['HWL-2026-0001', 'HWL-2026-0002', 'HWL-2026-0003'].map((identifier, i) => ({
      identifier,
      expiresOn: i === k ? '2026-05-01' : '2026-08-01',
    }));
    const r = computeExpiry({ preparedOn: '2026-03-01', stabilityDays: 90, materialExpiresOn: '2026-12-31', parents });
    expect(r.expiresOn).toBe('2026-05-01');
    expect(r.limitedBy).toEqual({ kind: 'parent', identifier: parents[k]!.identifier });
    expect(r.reason).toBe(`Expires on 2026-05-01, limited by parent ${parents[k]!.identifier}, which expires on 2026-05-01`);
  });
  it('lists every candidate in tie-break order', () => {
    const r = computeExpiry({
      preparedOn: '2026-03-01', stabilityDays: 10, materialExpiresOn: '2026-04-01',
      parents: [{ identifier: 'P1', expiresOn: '2026-05-01' }],
    });
    expect(r.candidates.map((c) => c.kind)).toEqual(['stability', 'material', 'parent']);
  });
});

describe('computeExpiry: ties (deterministic: stability < material < parent, parents in the order given)', () => {
  it('stability ties with material and parent -> stability', () => {
    const r = computeExpiry({ preparedOn: '2026-03-01', stabilityDays: 30, materialExpiresOn: '2026-03-31', parents: [{ identifier: 'P1', expiresOn: '2026-03-31' }] });
    expect(r.limitedBy.kind).toBe('stability');
    expect(r.reason).toContain('(the reference material, parent P1 give the same date)');
  });
  it('material ties with parent -> material', () => {
    const r = computeExpiry({ preparedOn: '2026-03-01', stabilityDays: 60, materialExpiresOn: '2026-03-31', parents: [{ identifier: 'P1', expiresOn: '2026-03-31' }] });
    expect(r.limitedBy).toEqual({ kind: 'material' });
    expect(r.reason).toContain('(parent P1 gives the same date)');
  });
  it('two parents tie -> the first listed; reversing the list flips it', () => {
    const a = { identifier: 'HWL-2026-0042', expiresOn: '2026-04-15' };
    const b = { identifier: 'HWL-2026-0043', expiresOn: '2026-04-15' };
    expect(computeExpiry({ preparedOn: '2026-03-01', parents: [a, b] }).limitedBy.identifier).toBe('HWL-2026-0042');
    expect(computeExpiry({ preparedOn: '2026-03-01', parents: [b, a] }).limitedBy.identifier).toBe('HWL-2026-0043');
  });
});

describe('computeExpiry: missing and odd inputs', () => {
  it('without a stability period the caps still apply, and the result says release needs a rule (EX-02)', () => {
    const r = computeExpiry({ preparedOn: '2026-03-01', materialExpiresOn: '2026-06-30' });
    expect(r.expiresOn).toBe('2026-06-30');
    expect(r.stabilityMissing).toBe(true);
    expect(r.reason).toContain('no stability period was given');
  });
  it('stability 0 days expires on the preparation day', () => {
    expect(computeExpiry({ preparedOn: '2026-03-01', stabilityDays: 0 }).expiresOn).toBe('2026-03-01');
  });
  it('flags an input that had expired before the preparation date', () => {
    const r = computeExpiry({ preparedOn: '2026-03-01', stabilityDays: 30, parents: [{ identifier: 'P1', expiresOn: '2026-02-28' }] });
    expect(r.expiredBeforePreparation).toBe(true);
    expect(r.reason).toContain('had already expired');
  });
  it('throws CalcError with no basis at all, a fractional stability period or a bad date', () => {
    expect(() => computeExpiry({ preparedOn: '2026-03-01' })).toThrow(CalcError);
    expect(() => computeExpiry({ preparedOn: '2026-03-01', stabilityDays: '1.5' })).toThrow(CalcError);
    expect(() => computeExpiry({ preparedOn: '2026-03-01', stabilityDays: -1 })).toThrow(CalcError);
    expect(() => computeExpiry({ preparedOn: '2026-13-01', stabilityDays: 1 })).toThrow(CalcError);
    expect(() => computeExpiry({ preparedOn: '2026-03-01', parents: [{ identifier: 'P', expiresOn: '31.12.2026' }] })).toThrow(CalcError);
  });
});

describe('calendar helpers (Gregorian calendar arithmetic)', () => {
  it('leap years', () => {
    expect(isIsoDate('2024-02-29')).toBe(true);
    expect(isIsoDate('2026-02-29')).toBe(false);
    expect(isIsoDate('2100-02-29')).toBe(false);
    expect(isIsoDate('2000-02-29')).toBe(true);
    expect(addDays('2028-02-28', 1)).toBe('2028-02-29');
    expect(addDays('2026-12-31', 1)).toBe('2027-01-01');
    expect(daysBetween('2026-01-01', '2027-01-01')).toBe(365);
    expect(daysBetween('2028-01-01', '2029-01-01')).toBe(366);
  });
  it('is independent of the process time zone (integer UTC day numbers; DST does not move dates)', () => {
    // 2026-03-29 is the EU DST change; 2026-03-08 the US one
    expect(addDays('2026-03-28', 1)).toBe('2026-03-29');
    expect(addDays('2026-03-08', 1)).toBe('2026-03-09');
    expect(daysBetween('2026-03-01', '2026-04-01')).toBe(31);
  });
});
