/**
 * The preparation state machine (REQUIREMENTS ES-07 sign-off order, RV-06 return path, CO-02 amendment).
 * Every status change goes through `transition`; a change the table does not allow is
 * 409 { error: { code: "invalid_transition", message: "… current state is '<status>' …" } }.
 *
 *   planned  --sign prepared-->  prepared  --sign verified-->  verified
 *                                prepared  --sign returned-->  returned  --sign prepared-->  prepared
 *   prepared | returned | verified  --amend (data changed after signing)-->  planned (amendedFromVersion)
 *   any live state  --sign discarded-->  discarded;   planned | prepared | returned | verified  --expire-->  expired
 *   expired  --sign discarded-->  discarded;   discarded is final.
 */
import type { PreparationStatus } from '../../shared/schemas/preparations.ts';
import { AppError } from '../errors/app-error.ts';

export type StatusEvent = 'sign_prepared' | 'sign_verified' | 'sign_returned' | 'sign_discarded' | 'amend' | 'expire';
type Status = 'planned' | 'prepared' | 'verified' | 'returned' | 'expired' | 'discarded';

/** The only allowed transitions: TRANSITIONS[from][event] = to. */
export const TRANSITIONS: Readonly<Record<Status, Partial<Record<StatusEvent, Status>>>> = {
  planned: { sign_prepared: 'prepared', sign_discarded: 'discarded', expire: 'expired' },
  prepared: { sign_verified: 'verified', sign_returned: 'returned', sign_discarded: 'discarded', amend: 'planned', expire: 'expired' },
  returned: { sign_prepared: 'prepared', sign_discarded: 'discarded', amend: 'planned', expire: 'expired' },
  verified: { sign_discarded: 'discarded', amend: 'planned', expire: 'expired' },
  expired: { sign_discarded: 'discarded' },
  discarded: {},
};

const EVENT_TEXT: Record<StatusEvent, string> = {
  sign_prepared: 'signed "prepared"',
  sign_verified: 'signed "verified"',
  sign_returned: 'returned to the preparer',
  sign_discarded: 'discarded',
  amend: 'amended',
  expire: 'marked expired',
};

const HINT: Partial<Record<Status, Partial<Record<StatusEvent, string>>>> = {
  planned: {
    sign_verified: 'the preparer must sign "prepared" first',
    sign_returned: 'only a record signed "prepared" can be returned',
  },
  verified: { sign_verified: 'it is already verified', sign_prepared: 'it is already prepared and verified', sign_returned: 'it is already verified' },
  prepared: { sign_prepared: 'it is already signed "prepared" and awaits verification' },
  returned: { sign_verified: 'the preparer must correct it and sign "prepared" again', sign_returned: 'it is already returned' },
  discarded: {},
  expired: {},
};

function isStatus(s: string): s is Status {
  return s in TRANSITIONS;
}

/** The state an event leads to, or null when the table does not allow it. */
export function nextStatus(from: PreparationStatus, event: StatusEvent): Status | null {
  if (!isStatus(from)) return null;
  return TRANSITIONS[from][event] ?? null;
}

export function invalidTransition(identifier: string, from: string, event: StatusEvent, why?: string): AppError {
  const hint = why ?? (isStatus(from) ? HINT[from]?.[event] : undefined);
  return new AppError(
    'invalid_transition',
    409,
    `${identifier} cannot be ${EVENT_TEXT[event]}: current state is '${from}'${hint ? ` (${hint})` : ''}`,
  );
}

/** The new status for `event`, or 409 invalid_transition naming the current state. */
export function transition(identifier: string, from: PreparationStatus, event: StatusEvent): Status {
  const to = nextStatus(from, event);
  if (!to) throw invalidTransition(identifier, from, event);
  return to;
}

/** Statuses whose data may still change: planned freely; signed ones only through an amendment. */
export const SIGNED_STATUSES: readonly string[] = ['prepared', 'returned', 'verified'];

/**
 * Whether data (weighings, make-up) may be entered now: 'free' when planned, 'amend' when the record is signed
 * (reason + password + "amended" signature), else 409 (expired or discarded records are closed).
 */
export function dataEntryMode(identifier: string, status: PreparationStatus): 'free' | 'amend' {
  if (status === 'planned') return 'free';
  if (SIGNED_STATUSES.includes(status)) return 'amend';
  throw new AppError('invalid_transition', 409, `${identifier} cannot be changed: current state is '${status}' (the record is closed)`);
}
