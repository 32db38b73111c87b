/**
 * Balance minimum weight.
 * Source: USP <41> (repeatability criterion 2·s/m ≤ 0.10 %, so m_min = 2000·s; s is replaced by
 * 0.41·d when smaller than 0.41·d, d = scale interval); safety factor per USP <1251>.
 * Validity: net weighings on the balance whose repeatability s was measured.
 * Units: s, d, readings and the result share one mass unit (any).
 */
import { type Dec, type DecInput, c, toDec } from './decimal.ts';
import { CalcError } from './errors.ts';

export interface MinimumWeightResult {
  minimumWeight: Dec;
  /** max(s, 0.41·d) */
  effectiveSd: Dec;
  /** true when 0.41·d replaced a smaller measured s */
  readabilityFloorApplied: boolean;
  safetyFactor: Dec;
}

export function uspMinimumWeight(p: { repeatabilitySd: DecInput; readability?: DecInput; safetyFactor?: DecInput }): MinimumWeightResult {
  const s = toDec(p.repeatabilitySd, 'repeatability standard deviation');
  if (s.isNeg()) throw new CalcError('non_positive', `Repeatability standard deviation must not be negative (got ${s.toString()})`, { details: { input: 'repeatabilitySd' } });
  const sf = toDec(p.safetyFactor ?? '1', 'safety factor');
  if (sf.lt(1)) throw new CalcError('calc_out_of_range', `Safety factor must be at least 1 (got ${sf.toString()})`, { details: { input: 'safetyFactor' } });
  let eff = s;
  let floor = false;
  if (p.readability !== undefined) {
    const d = toDec(p.readability, 'readability');
    if (d.lte(0)) throw new CalcError('non_positive', `Readability must be greater than 0 (got ${d.toString()})`, { details: { input: 'readability' } });
    const f = c('0.41').mul(d);
    if (f.gt(s)) {
      eff = f;
      floor = true;
    }
  }
  if (eff.isZero()) throw new CalcError('non_positive', 'Give a repeatability standard deviation greater than 0, or the readability d');
  return { minimumWeight: sf.mul(2000).mul(eff), effectiveSd: eff, readabilityFloorApplied: floor, safetyFactor: sf };
}

export interface MinimumWeightCheck {
  ok: boolean;
  /** reading / minimum weight */
  ratio: Dec;
  /** reading − minimum weight */
  margin: Dec;
  message: string;
}

export function checkAgainstMinimumWeight(reading: DecInput, minWeight: DecInput | MinimumWeightResult): MinimumWeightCheck {
  const m = toDec(reading, 'reading');
  const mw = typeof minWeight === 'object' && minWeight !== null && 'minimumWeight' in minWeight ? minWeight.minimumWeight : toDec(minWeight as DecInput, 'minimum weight');
  if (mw.lte(0)) throw new CalcError('non_positive', `Minimum weight must be greater than 0 (got ${mw.toString()})`);
  const ok = m.gte(mw);
  return {
    ok,
    ratio: m.div(mw),
    margin: m.minus(mw),
    message: ok
      ? `Net mass ${m.toString()} is at or above the minimum weight ${mw.toString()}`
      : `Net mass ${m.toString()} is below the minimum weight ${mw.toString()}; weigh more (e.g. a larger volume) or use a stock and a dilution`,
  };
}
