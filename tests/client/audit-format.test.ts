/** Audit changes on screen: field names in words and values without raw JSON (the CSV export keeps the stored form). */
import { describe, expect, it } from 'vitest';
import { fieldLabel, formatValue } from '../../src/features/audit/format-audit.ts';

describe('audit change wording', () => {
  it('writes field names in words, with units', () => {
    expect(fieldLabel('solutionTemperatureC')).toBe('Solution temperature (°C)');
    expect(fieldLabel('preparation.dilutionResult')).toBe('Preparation: dilution result');
    expect(fieldLabel('readingWindowPct')).toBe('Reading window (%)');
    expect(fieldLabel('defaultRoomConditions.pressureHPa')).toBe('Default room conditions: pressure (hPa)');
    expect(fieldLabel('signature.recordVersion')).toBe('Signature: record version');
  });

  it('shows lists and records in words, never [] or {}; strings exactly as stored', () => {
    expect(formatValue([])).toBe('(none)');
    expect(formatValue(['Pb', 'Cd'])).toBe('Pb, Cd');
    expect(formatValue({ value: '10.00', unit: 'mg/L' })).toBe('value: 10.00; unit: mg/L');
    expect(formatValue([{ id: 'SR-1', days: 7 }])).toBe('(id: SR-1; days: 7)');
    expect(formatValue('8.0')).toBe('8.0');
    expect(formatValue(null)).toBe('—');
    expect(formatValue({})).toBe('(none)');
    for (const v of [[], {}, [{ a: 1 }], { a: [] }]) expect(formatValue(v)).not.toMatch(/[[\]{}"]/);
  });
});
