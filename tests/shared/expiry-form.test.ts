// The "Extend expiry" form's checks before sending (src/features/expiry/form-schema.ts): the API's schema plus
// "later than the current expiry" and "not after the cap" at the field (REQUIREMENTS EX-01, EX-05), and the
// first-signature statement (ES-08). Dates are made-up examples.
import { describe, expect, it } from 'vitest';
import { acknowledgeProblem, extendFormSchema, toInput } from '../../src/features/expiry/form-schema.ts';

const cap = { date: '2027-03-01', limitedBy: 'parent HWL-2026-0001', kind: 'parent' as const };
const ok = { newExpiresOn: '2027-02-01', reason: 'Stability study ST-2026-11', password: 'pw', acknowledge: false };
const fieldErrors = (v: object, c: typeof cap | null = cap) => {
  const r = extendFormSchema('2027-01-10', c).safeParse(v);
  return r.success ? {} : Object.fromEntries(r.error.issues.map((i) => [i.path.join('.'), i.message]));
};

describe('extendFormSchema', () => {
  it('accepts a date after the current expiry up to the cap', () => {
    expect(fieldErrors(ok)).toEqual({});
    expect(fieldErrors({ ...ok, newExpiresOn: '2027-03-01' })).toEqual({});
    expect(fieldErrors({ ...ok, newExpiresOn: '2031-01-01' }, null)).toEqual({});
  });

  it('puts each problem at its field, naming the limiting record', () => {
    expect(fieldErrors({ ...ok, newExpiresOn: '2027-01-10' }).newExpiresOn).toBe('The new expiry must be later than the current expiry 2027-01-10');
    expect(fieldErrors({ ...ok, newExpiresOn: '2027-03-02' }).newExpiresOn).toBe('The new expiry cannot be later than 2027-03-01, limited by parent HWL-2026-0001');
    expect(fieldErrors({ ...ok, newExpiresOn: '' }).newExpiresOn).toBe('Enter the new expiry date');
    expect(fieldErrors({ ...ok, reason: ' ' }).reason).toMatch(/reason/);
    expect(fieldErrors({ ...ok, password: '' }).password).toBe('Enter your password to sign the extension');
  });
});

describe('acknowledgement and request body', () => {
  it('asks for the statement only at the first signature', () => {
    expect(acknowledgeProblem(true, false)).toMatch(/Tick the statement/);
    expect(acknowledgeProblem(true, true)).toBeNull();
    expect(acknowledgeProblem(false, false)).toBeNull();
  });

  it('sends acknowledgeResponsibility only when it was asked for and ticked', () => {
    expect(toInput({ ...ok, reason: ' evidence ' }, false)).toEqual({ newExpiresOn: '2027-02-01', reason: 'evidence', password: 'pw' });
    expect(toInput({ ...ok, acknowledge: true }, true)).toMatchObject({ acknowledgeResponsibility: true });
  });
});
