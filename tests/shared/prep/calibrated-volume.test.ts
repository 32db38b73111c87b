// How a calibrated volume is written (shared/prep/calibrated-volume.ts): the mean to the decimals of u at two
// significant digits, u rounded up to two significant digits (GUM 7.2.6 states u with at most two significant digits;
// rounding the uncertainty up is common practice).
import { describe, expect, it } from 'vitest';
import { calibratedVolumeLabel, calibratedVolumeLine, calibratedVolumeShown, twoDigits } from '../../../shared/prep/calibrated-volume.ts';

const cv = {
  checkId: 1,
  checkIdentifier: 'VC-2026-0001',
  volumeMl: '10',
  meanMl: '10.004312345678901234',
  expandedUncertaintyMl: '0.0098123',
  k: '2',
  standardUncertaintyMl: '0.00490615',
  repeatabilitySdMl: '0.0007',
  verifiedOn: '2026-11-16',
  nextDueOn: '2027-11-16',
};

describe('calibrated volume text', () => {
  it('u = 0.00490615 mL → 0.0050 mL (two digits, rounded up); the mean to 4 decimals: 10.0043 mL', () => {
    expect(twoDigits(cv.standardUncertaintyMl)).toBe('0.0050');
    expect(calibratedVolumeShown(cv)).toBe('10.0043');
  });
  it('u = 0.010 mL → mean 100.030 mL keeps three decimals; u = 0.0996 → 0.10 (two digits)', () => {
    expect(calibratedVolumeShown({ meanMl: '100.03', standardUncertaintyMl: '0.01' })).toBe('100.030');
    expect(twoDigits('0.0996')).toBe('0.10');
    expect(twoDigits('0')).toBe('0');
  });
  it('the budget label and the record line name the check', () => {
    expect(calibratedVolumeLabel('Flask volume', cv)).toBe('Flask volume, calibrated (VC-2026-0001): mean 10.0043 mL at 20 °C, u = U/k = 0.0099 mL/2');
    expect(calibratedVolumeLine('BP-10-01', cv)).toBe('BP-10-01: calibrated volume 10.0043 mL at 20 °C, u = 0.0050 mL (U = 0.0099 mL, k = 2) from volume check VC-2026-0001, verified 2026-11-16, next due 2027-11-16');
  });
});
