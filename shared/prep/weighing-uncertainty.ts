/**
 * Standard uncertainty of one net weighing (tared vessel or by difference), from the balance record.
 * METROLOGY §5.2: display rounding of the two readings → 0.408·d (√2 · d/√12); repeatability u = s;
 * calibration from the certificate as U/k (treated as fully applying to the net mass, which is
 * conservative for small net masses [common practice]). Components are combined in quadrature.
 * Inputs are decimal strings in mg; the result is a decimal string in mg at full precision.
 */
import { D, toDec } from '../calc/decimal.ts';
import { CalcError } from '../calc/errors.ts';
import { fromExpanded, triangular } from '../calc/uncertainty.ts';

export interface NetWeighingBalance {
  readabilityMg: string;
  repeatabilitySdMg?: string | null;
  calibrationUncertaintyMg?: string | null;
  calibrationUncertaintyK?: string | null;
}

export interface NetWeighingUncertainty {
  /** mg */
  standardUncertainty: string;
  /** which components were combined, for the budget label */
  basis: string;
}

export function netWeighingUncertainty(b: NetWeighingBalance): NetWeighingUncertainty {
  const d = toDec(b.readabilityMg, 'readabilityMg');
  if (d.lte(0)) throw new CalcError('non_positive', `readabilityMg must be greater than zero, got ${b.readabilityMg}`);
  const parts: string[] = ['0.408·d'];
  let variance = triangular(d).pow(2); // d/√6 = 0.408·d
  if (b.repeatabilitySdMg) {
    const s = toDec(b.repeatabilitySdMg, 'repeatabilitySdMg');
    variance = variance.plus(s.pow(2));
    parts.push(`s = ${b.repeatabilitySdMg} mg`);
  }
  if (b.calibrationUncertaintyMg) {
    const k = b.calibrationUncertaintyK ? b.calibrationUncertaintyK : '2';
    const u = fromExpanded(b.calibrationUncertaintyMg, k);
    variance = variance.plus(u.pow(2));
    parts.push(`calibration U = ${b.calibrationUncertaintyMg} mg (k = ${new D(k).toString()})`);
  }
  return { standardUncertainty: variance.sqrt().toSignificantDigits(20).toFixed(), basis: parts.join(', ') };
}
