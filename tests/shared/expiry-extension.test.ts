// Pure rules of expiry on read and of QA expiry extensions (shared/schemas/expiry.ts; REQUIREMENTS EX-01, EX-04, EX-05).
// The dates are made-up examples; the rules are the product's (a solution may be used through its expiry date,
// as shared/prep/expiry.ts and gates.ts state; an extension never outlives a parent or the reference material, EX-01).
import { describe, expect, it } from 'vitest';
import { expiryCapOf, expiryExtensionInputSchema, extensionDateProblem, extensionReasonText, shownStatus } from '../../shared/schemas/expiry.ts';

describe('shownStatus: expired on read (EX-04)', () => {
  it.each(['planned', 'prepared', 'returned', 'verified'])('a %s record is shown expired the day after its expiry, with the stored status kept', (stored) => {
    expect(shownStatus(stored, '2027-03-01', '2027-03-02')).toEqual({ status: 'expired', statusBeforeExpiry: stored });
  });

  it('on its expiry date a record is still in date (used through expiresOn)', () => {
    expect(shownStatus('verified', '2027-03-01', '2027-03-01')).toEqual({ status: 'verified' });
    expect(shownStatus('verified', '2027-03-01', '2027-02-28')).toEqual({ status: 'verified' });
  });

  it('discarded and stored-expired records keep their status', () => {
    expect(shownStatus('discarded', '2020-01-01', '2027-03-02')).toEqual({ status: 'discarded' });
    expect(shownStatus('expired', '2020-01-01', '2027-03-02')).toEqual({ status: 'expired' });
  });

  it('compares calendar dates across month and year ends', () => {
    expect(shownStatus('verified', '2026-12-31', '2027-01-01').status).toBe('expired');
    expect(shownStatus('verified', '2028-02-29', '2028-03-01').status).toBe('expired');
  });
});

describe('expiryCapOf: the earliest input expiry (EX-01)', () => {
  it('names the earliest parent or the material; inputs without an expiry cap nothing', () => {
    expect(
      expiryCapOf([
        { kind: 'parent', label: 'parent HWL-2026-0001', expiresOn: '2027-03-01' },
        { kind: 'parent', label: 'parent HWL-2026-0007', expiresOn: '2027-02-15' },
        { kind: 'material', label: 'reference material Lead(II) nitrate lot NRM-24-0931', expiresOn: '2028-02-29' },
      ]),
    ).toEqual({ date: '2027-02-15', limitedBy: 'parent HWL-2026-0007', kind: 'parent' });
    expect(expiryCapOf([{ kind: 'material', label: 'reference material X lot 1', expiresOn: null }])).toBeNull();
    expect(expiryCapOf([])).toBeNull();
  });

  it('on equal dates the first listed wins (parents are listed before the material)', () => {
    expect(
      expiryCapOf([
        { kind: 'parent', label: 'parent HWL-2026-0001', expiresOn: '2027-03-01' },
        { kind: 'material', label: 'reference material Y lot 2', expiresOn: '2027-03-01' },
      ])!.limitedBy,
    ).toBe('parent HWL-2026-0001');
  });
});

describe('extensionDateProblem', () => {
  const cap = { date: '2027-03-01', limitedBy: 'parent HWL-2026-0001', kind: 'parent' as const };
  it('accepts a date after the current expiry, not past, up to and including the cap', () => {
    expect(extensionDateProblem('2027-02-01', '2027-01-10', cap, '2027-01-15')).toBeNull();
    expect(extensionDateProblem('2027-03-01', '2027-01-10', cap, '2027-01-15')).toBeNull();
    expect(extensionDateProblem('2030-01-01', '2027-01-10', null, '2027-01-15')).toBeNull();
  });

  it('refuses the same or an earlier date, a date already past, and a date beyond the cap (naming what limits it)', () => {
    expect(extensionDateProblem('2027-01-10', '2027-01-10', cap, '2027-01-05')).toBe('The new expiry must be later than the current expiry 2027-01-10');
    expect(extensionDateProblem('2027-01-09', '2027-01-10', cap, '2027-01-05')).toMatch(/later than the current expiry/);
    expect(extensionDateProblem('2027-01-12', '2027-01-10', cap, '2027-01-15')).toBe('The new expiry 2027-01-12 is already past (today is 2027-01-15)');
    expect(extensionDateProblem('2027-03-02', '2027-01-10', cap, '2027-01-15')).toBe('The new expiry cannot be later than 2027-03-01, limited by parent HWL-2026-0001');
  });
});

describe('expiryExtensionInputSchema', () => {
  const ok = { newExpiresOn: '2027-03-01', reason: 'Stability study ST-2026-11', password: 'x' };
  it('takes a calendar date, a reason and the password', () => {
    expect(expiryExtensionInputSchema.parse({ ...ok, reason: '  Stability study ST-2026-11  ' }).reason).toBe('Stability study ST-2026-11');
  });

  it.each([
    [{ newExpiresOn: '2027-02-30' }, 'newExpiresOn'],
    [{ newExpiresOn: '01/03/2027' }, 'newExpiresOn'],
    [{ newExpiresOn: '' }, 'newExpiresOn'],
    [{ reason: '' }, 'reason'],
    [{ reason: '  a ' }, 'reason'],
    [{ password: '' }, 'password'],
  ])('refuses %j at the field %s', (over, field) => {
    const r = expiryExtensionInputSchema.safeParse({ ...ok, ...over });
    expect(r.success).toBe(false);
    expect(r.error!.issues.map((i) => i.path.join('.'))).toContain(field);
  });

  it('the stored reason text names QA, the lab date and the reason', () => {
    expect(extensionReasonText('Tomasz Achterberg', '2027-01-16', 'Stability study ST-2026-11')).toBe('extended by QA Tomasz Achterberg on 2027-01-16: Stability study ST-2026-11');
  });
});
