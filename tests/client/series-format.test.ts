/**
 * Display helpers of the series pages: identifiers, progress and status counts in words, the target range
 * compared as exact decimals (no floats: "10" > "9.5", "1.50" = "1.5"), which concentration a level shows, and
 * who gets the Bench link. Expected values are worked by hand from the rules in src/features/series/format.ts.
 */
import { describe, expect, it } from 'vitest';
import { aliquotText, benchOpen, compareDecimal, isSeriesIdentifier, levelConcentration, statusCounts, targetRange, verifiedProgress } from '../../src/features/series/format.ts';

const conc = (display: string) => ({ value: '1', unit: 'mg/L', standardUncertainty: '0.01', expandedUncertainty: '0.02', k: '2', display });

describe('series identifiers', () => {
  it('accepts what the server issues (prefix, year, S and a running number) and nothing else', () => {
    expect(isSeriesIdentifier('HWL-2026-S001')).toBe(true);
    expect(isSeriesIdentifier(' hwl-2026-s012 ')).toBe(true); // a scanner in lower case, with spaces
    expect(isSeriesIdentifier('HWL-2026-S1234')).toBe(true);
    expect(isSeriesIdentifier('HWL-2026-0001')).toBe(false); // a preparation, not a series
    expect(isSeriesIdentifier('HWL-26-S001')).toBe(false);
    expect(isSeriesIdentifier('')).toBe(false);
  });
});

describe('progress and counts in words', () => {
  const L = (...s: string[]) => s.map((status) => ({ status }));
  it('says how many levels are verified', () => {
    expect(verifiedProgress(L('verified', 'planned', 'planned', 'planned', 'planned'))).toBe('1 of 5 verified');
    expect(verifiedProgress(L('verified', 'verified'))).toBe('all 2 verified');
    expect(verifiedProgress(L('verified'))).toBe('the level is verified');
    expect(verifiedProgress(L('planned', 'prepared'))).toBe('none verified yet (2 levels)');
    expect(verifiedProgress([])).toBe('no levels');
  });
  it('counts each status in the order of the journey', () => {
    expect(statusCounts(L('planned', 'verified', 'planned', 'expired', 'prepared'))).toBe('2 planned, 1 prepared, 1 verified, 1 expired');
    expect(statusCounts(L('on_hold'))).toBe('1 on hold');
  });
});

describe('exact decimal comparison and the target range', () => {
  it('compares decimal strings without floats', () => {
    expect(compareDecimal('10', '9.5')).toBe(1);
    expect(compareDecimal('1.50', '1.5')).toBe(0);
    expect(compareDecimal('0.1', '0.10000000000000000001')).toBe(-1); // beyond double precision
    expect(compareDecimal('007', '7')).toBe(0);
    expect(compareDecimal('2', '20')).toBe(-1);
  });
  it('gives lowest–highest whatever the order of the levels', () => {
    const t = (...v: string[]) => v.map((value) => ({ target: { value, unit: 'mg/L' } }));
    expect(targetRange(t('20', '1', '5', '10', '2'))).toBe('1–20 mg/L');
    expect(targetRange(t('0.5', '0.5'))).toBe('0.5 mg/L');
    expect(targetRange([])).toBe('—');
  });
});

describe('a level as shown', () => {
  it('shows the recomputed concentration once recorded, else the planned one, saying which', () => {
    expect(levelConcentration({ planned: conc('1.000 ± 0.010 mg/L (k = 2)') })).toEqual({ text: '1.000 ± 0.010 mg/L (k = 2)', basis: 'planned' });
    expect(levelConcentration({ planned: conc('1.000 ± 0.010 mg/L (k = 2)'), result: { ...conc('0.9995 ± 0.0096 mg/L (k = 2)'), basedOn: { aliquotId: 1, makeUpId: 2 } } })).toEqual({
      text: '0.9995 ± 0.0096 mg/L (k = 2)',
      basis: 'recomputed',
    });
  });
  it('writes the aliquot with its digits as stored', () => {
    expect(aliquotText({ aliquot: { pipette: { id: 1, identifier: 'PP-1000-01', kind: 'piston_pipette', nominalVolumeMl: '1.000' }, volumeMl: '0.99901' } })).toBe('0.99901 mL with PP-1000-01');
  });
  it('offers the bench to chemists and technicians while the level is planned', () => {
    expect(benchOpen('planned', 'chemist')).toBe(true);
    expect(benchOpen('planned', 'technician')).toBe(true);
    expect(benchOpen('planned', 'qa')).toBe(false);
    expect(benchOpen('planned', 'admin')).toBe(false);
    expect(benchOpen('prepared', 'chemist')).toBe(false);
    expect(benchOpen('planned', undefined)).toBe(false);
  });
});
