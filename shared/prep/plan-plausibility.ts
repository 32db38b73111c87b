/**
 * Whether a result is one the plan could have produced. A standard made to its plan lands within a few per cent
 * of the target (the weighing window, the purity, the flask); a result more than twice the target or less than
 * half of it comes from a reading the balance did not show, a unit slip or the wrong material. Such a result is
 * not refused (it is what the record says), but it is signed as prepared only with a stated reason and the
 * verifier sees it first (server/services/signatures.service.ts). The factor 2 is our own rule ("common practice"
 * for a gross-error check, not a tolerance).
 */
import { toDec } from '../calc/decimal.ts';

export const OUT_OF_PLAN_FACTOR = '2';

export interface PlanValue {
  value: string;
  unit: string;
}

/**
 * null when the result lies within target / 2 … target × 2 (or the two cannot be compared: other units, no
 * number); otherwise a message naming the result as displayed and the target.
 */
export function outOfPlan(result: PlanValue & { display?: string }, target: PlanValue, what = 'The result'): string | null {
  if (!result || !target || result.unit !== target.unit) return null;
  let r, t;
  try {
    r = toDec(result.value, 'result');
    t = toDec(target.value, 'target');
  } catch {
    return null;
  }
  if (!t.gt(0)) return null;
  const factor = toDec(OUT_OF_PLAN_FACTOR, 'factor');
  const shown = result.display ?? `${result.value} ${result.unit}`;
  if (r.gt(t.times(factor))) return `${what} ${shown} is more than twice the target ${target.value} ${target.unit}: the plan cannot produce it`;
  if (r.lt(t.div(factor))) return `${what} ${shown} is less than half the target ${target.value} ${target.unit}: the plan cannot produce it`;
  return null;
}
