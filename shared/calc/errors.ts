/**
 * CalcError: the one error type the metrology core throws.
 * Quantity: none. Codes form a closed set so the API can map them to 400 responses.
 * `field` is the dotted path of the offending request input; callers (e.g. preparation.ts) set it.
 */
export type CalcErrorCode =
  | 'unit_mismatch'
  | 'unknown_unit'
  | 'calc_out_of_range'
  | 'non_positive'
  | 'invalid_number'
  | 'invalid_formula'
  | 'division_by_zero'
  | 'missing_input';

export const CALC_ERROR_CODES: readonly CalcErrorCode[] = [
  'unit_mismatch',
  'unknown_unit',
  'calc_out_of_range',
  'non_positive',
  'invalid_number',
  'invalid_formula',
  'division_by_zero',
  'missing_input',
];

export class CalcError extends Error {
  readonly code: CalcErrorCode;
  field?: string;
  details?: Record<string, unknown>;

  constructor(code: CalcErrorCode, message: string, opts: { field?: string; details?: Record<string, unknown> } = {}) {
    super(message);
    this.name = 'CalcError';
    this.code = code;
    if (opts.field !== undefined) this.field = opts.field;
    if (opts.details !== undefined) this.details = opts.details;
  }

  /** Return this error with `field` set (keeps an already more specific field). */
  at(field: string): this {
    if (this.field === undefined) this.field = field;
    return this;
  }
}

export function isCalcError(e: unknown): e is CalcError {
  return e instanceof CalcError;
}

/** Run fn; if it throws a CalcError without a field, attach `field`. */
export function withField<T>(field: string, fn: () => T): T {
  try {
    return fn();
  } catch (e) {
    if (e instanceof CalcError) throw e.at(field);
    throw e;
  }
}
