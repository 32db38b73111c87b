/** An expected failure with an HTTP status and a client-facing message. */
export class AppError extends Error {
  override name = 'AppError';
  readonly code: string;
  readonly status: number;
  readonly fields?: Record<string, string>;

  constructor(code: string, status: number, message: string, opts: { fields?: Record<string, string>; cause?: unknown } = {}) {
    super(message, opts.cause === undefined ? undefined : { cause: opts.cause });
    this.code = code;
    this.status = status;
    if (opts.fields) this.fields = opts.fields;
  }

  static notFound(what: string): AppError {
    return new AppError('not_found', 404, `${what} was not found`);
  }

  static conflict(message: string, fields?: Record<string, string>): AppError {
    return new AppError('conflict', 409, message, { fields });
  }

  static validation(message: string, fields?: Record<string, string>): AppError {
    return new AppError('validation_failed', 400, message, { fields });
  }
}
