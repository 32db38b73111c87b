/**
 * Which record the dilution and series pages accept as a parent (src/features/lineage/parent-check.ts), mirroring
 * the server's rule (lineage.service usableParent, REQUIREMENTS TR-11: only verified, in-date records with a
 * concentration) and its concentration (lineage-view concentrationOf): a stock's result, a volumetric dilution's
 * result, a gravimetric dilution's mass concentration; a mix is refused as a parent.
 */
import { describe, expect, it } from 'vitest';
import { parentConcentration, parentRefusal } from '../../src/features/lineage/parent-check.ts';
import type { PreparationDetail } from '../../src/features/preparations/types.ts';

const TODAY = '2026-12-02';
const conc = (value: string, unit = 'mg/L') => ({ value, unit, standardUncertainty: '0.01', display: `${value} ± 0.02 ${unit} (k = 2)` });
const rec = (over: Record<string, unknown>) =>
  ({ identifier: 'HWL-2026-0100', status: 'verified', kind: 'stock', expiry: { expiresOn: '2027-01-31', reason: '' }, ...over }) as unknown as PreparationDetail;

describe('parentConcentration', () => {
  it('a stock gives its result, a volumetric dilution its dilution result, a gravimetric one its mass concentration', () => {
    expect(parentConcentration(rec({ result: { concentration: conc('1000.0') } }))?.value).toBe('1000.0');
    expect(parentConcentration(rec({ kind: 'dilution', result: null, dilution: { result: conc('10.00') } }))?.value).toBe('10.00');
    const grav = rec({ kind: 'dilution', result: null, gravimetric: { result: { massFraction: conc('9.910', 'mg/kg'), massConcentration: conc('9.890') } } });
    expect(parentConcentration(grav)).toMatchObject({ value: '9.890', unit: 'mg/L' });
  });

  it('a mix, or a record without a result yet, has none', () => {
    expect(parentConcentration(rec({ kind: 'mix', result: { concentration: conc('10') } }))).toBeNull();
    expect(parentConcentration(rec({ kind: 'dilution', result: null, dilution: {} }))).toBeNull();
  });
});

describe('parentRefusal', () => {
  it('a verified, in-date dilution with a result can be diluted further (a second generation)', () => {
    expect(parentRefusal(rec({ kind: 'dilution', result: null, dilution: { result: conc('10.00') } }), TODAY)).toBeNull();
  });

  it('refuses with the reason: not verified, expired, a mix, no result', () => {
    expect(parentRefusal(rec({ status: 'prepared', result: { concentration: conc('1') } }), TODAY)).toMatch(/only a verified standard can be diluted/);
    expect(parentRefusal(rec({ expiry: { expiresOn: '2026-12-01', reason: '' }, result: { concentration: conc('1') } }), TODAY)).toMatch(/expired on 2026-12-01/);
    expect(parentRefusal(rec({ kind: 'mix', result: null }), TODAY)).toMatch(/a mix cannot be used as a parent/);
    expect(parentRefusal(rec({ kind: 'dilution', result: null, dilution: {} }), TODAY)).toMatch(/no computed concentration/);
  });
});
