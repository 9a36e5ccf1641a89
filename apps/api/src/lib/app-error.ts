/** Field-level messages for a validation failure, keyed by dotted path (e.g. "doses.0.amount"). */
export type FieldErrors = Record<string, string[]>;

/**
 * The one error type of the API. Routes, domain and jobs throw it; the error middleware
 * turns it into `{ code, message, fieldErrors? }` with `httpStatus`.
 */
export class AppError extends Error {
  constructor(
    readonly code: string,
    message: string,
    readonly httpStatus = 500,
    readonly details: { fieldErrors?: FieldErrors; [key: string]: unknown } = {},
    options?: { cause?: unknown },
  ) {
    super(message, options);
    this.name = 'AppError';
  }
}

export const notFound = (what: string) => new AppError('not-found', `${what} was not found`, 404);
