/**
 * Expiry of a prepared standard (METROLOGY §10, REQUIREMENTS EX-01/EX-02):
 * expiresOn = min(preparedOn + stability period, the reference material's expiry, every parent's expiry).
 * A solution never outlives its inputs, and the record names the input (or the stability rule) that set it.
 * Dates are calendar dates "YYYY-MM-DD"; the solution may be used through expiresOn
 * (it is expired when expiresOn < today, as in gates.ts).
 */
import { CalcError } from '../calc/errors.ts';
import { addDays, dayNumber } from './dates.ts';

export type ExpiryLimitKind = 'stability' | 'material' | 'parent';

export interface ExpiryInput {
  preparedOn: string;
  /** stability period in whole days (lab rule), e.g. 30 or "30" */
  stabilityDays?: number | string;
  /** where the stability period comes from, e.g. "rule SR-12 (study ST-2024-07)" */
  stabilityBasis?: string;
  materialExpiresOn?: string;
  /** optional identifier of the reference-material lot or unit, for the reason text */
  materialIdentifier?: string;
  parents?: Array<{ identifier: string; expiresOn: string }>;
}

export interface ExpiryLimit {
  kind: ExpiryLimitKind;
  identifier?: string;
  basis?: string;
}

export interface ExpiryCandidate extends ExpiryLimit {
  expiresOn: string;
}

export interface ExpiryResult {
  expiresOn: string;
  limitedBy: ExpiryLimit;
  reason: string;
  /** every cap considered, in tie-break order (stability, material, parents as given) */
  candidates: ExpiryCandidate[];
  /** no stability period was given: EX-02 says release needs one (or a QA-approved default) */
  stabilityMissing: boolean;
  /** the limiting input had already expired before the preparation date */
  expiredBeforePreparation: boolean;
}

function stabilityDaysOf(x: number | string): number {
  const s = typeof x === 'number' ? String(x) : x.trim();
  if (!/^\d+$/.test(s) || !Number.isSafeInteger(Number(s))) {
    throw new CalcError('invalid_number', `stabilityDays must be a whole number of days ≥ 0, got "${String(x)}"`, {
      field: 'stabilityDays',
    });
  }
  return Number(s);
}

function describe(c: ExpiryCandidate, input: ExpiryInput, days?: number): string {
  switch (c.kind) {
    case 'stability': {
      const basis = c.basis ? ` (${c.basis})` : '';
      return `limited by the stability period: prepared ${input.preparedOn} + ${days} day${days === 1 ? '' : 's'}${basis} = ${c.expiresOn}`;
    }
    case 'material':
      return `limited by the reference material${c.identifier ? ` ${c.identifier}` : ''}, which expires on ${c.expiresOn}`;
    case 'parent':
      return `limited by parent ${c.identifier}, which expires on ${c.expiresOn}`;
  }
}

export function computeExpiry(input: ExpiryInput): ExpiryResult {
  const prepared = dayNumber(input.preparedOn, 'preparedOn');
  const candidates: ExpiryCandidate[] = [];
  let days: number | undefined;

  // Tie-break order is the order candidates are collected: stability, then material, then parents
  // in the order given. Only a strictly earlier date displaces the current cap, so on equal dates the
  // earlier kind wins (stability < material < parent; among parents, the first listed).
  if (input.stabilityDays !== undefined && input.stabilityDays !== '') {
    days = stabilityDaysOf(input.stabilityDays);
    candidates.push({
      kind: 'stability',
      expiresOn: addDays(input.preparedOn, days, 'preparedOn'),
      ...(input.stabilityBasis ? { basis: input.stabilityBasis } : {}),
    });
  }
  if (input.materialExpiresOn !== undefined && input.materialExpiresOn !== '') {
    dayNumber(input.materialExpiresOn, 'materialExpiresOn');
    candidates.push({
      kind: 'material',
      expiresOn: input.materialExpiresOn,
      ...(input.materialIdentifier ? { identifier: input.materialIdentifier } : {}),
    });
  }
  (input.parents ?? []).forEach((p, i) => {
    dayNumber(p.expiresOn, `parents.${i}.expiresOn`);
    candidates.push({ kind: 'parent', identifier: p.identifier, expiresOn: p.expiresOn });
  });

  if (candidates.length === 0) {
    throw new CalcError(
      'missing_input',
      'No basis for an expiry: give a stability period, the reference material’s expiry or a parent’s expiry',
      { field: 'stabilityDays' },
    );
  }

  let best = candidates[0]!;
  for (const c of candidates.slice(1)) {
    if (dayNumber(c.expiresOn) < dayNumber(best.expiresOn)) best = c;
  }
  const expiredBeforePreparation = dayNumber(best.expiresOn) < prepared;
  let reason = `Expires on ${best.expiresOn}, ${describe(best, input, days)}`;
  const ties = candidates.filter((c) => c !== best && c.expiresOn === best.expiresOn);
  if (ties.length > 0) {
    const names = ties.map((c) => (c.kind === 'stability' ? 'the stability period' : c.kind === 'material' ? 'the reference material' : `parent ${c.identifier}`));
    reason += ` (${names.join(', ')} ${ties.length === 1 ? 'gives' : 'give'} the same date)`;
  }
  if (days === undefined) reason += '; no stability period was given, so release needs a stability rule';
  if (expiredBeforePreparation) reason += `; this is before the preparation date ${input.preparedOn}: the input had already expired`;

  const limitedBy: ExpiryLimit = { kind: best.kind };
  if (best.identifier !== undefined) limitedBy.identifier = best.identifier;
  if (best.basis !== undefined) limitedBy.basis = best.basis;
  return { expiresOn: best.expiresOn, limitedBy, reason, candidates, stabilityMissing: days === undefined, expiredBeforePreparation };
}
