import { describe, expect, it } from 'vitest';
import * as prep from '../../../shared/prep/index.ts';

describe('shared/prep index', () => {
  it('re-exports the public API', () => {
    for (const name of [
      'evaluateGates', 'GATE_CODES', 'decimalsOf', 'checkReadingDigits', 'readingWindow', 'isInWindow',
      'netFromDifference', 'netFromTare', 'formatPreparationId', 'parsePreparationId', 'validatePrefix',
      'computeExpiry', 'flaskVolumeAtTemperature', 'concentrationTemperatureCorrection', 'classATolerance',
    ]) {
      expect(prep, name).toHaveProperty(name);
    }
  });
});
