import type { ErrorRequestHandler, RequestHandler } from 'express';
import type { Logger } from 'pino';
import { ZodError } from 'zod';
import { AppError, type FieldErrors } from '../../../lib/app-error';

/** Turns a ZodError into `{ "doses.0.amount": ["must be positive"] }`. */
export function fieldErrorsFromZod(error: ZodError): FieldErrors {
  const fieldErrors: FieldErrors = {};
  for (const issue of error.issues) {
    const key = issue.path.length ? issue.path.join('.') : '_';
    (fieldErrors[key] ??= []).push(issue.message);
  }
  return fieldErrors;
}

/** Normalises anything thrown into an AppError. */
export function toAppError(error: unknown): AppError {
  if (error instanceof AppError) return error;
  if (error instanceof ZodError) {
    return new AppError('validation-failed', 'Some fields are not valid', 400, {
      fieldErrors: fieldErrorsFromZod(error),
    });
  }
  const e = error as { type?: string; status?: number; message?: string };
  if (e?.type === 'entity.parse.failed') {
    return new AppError('malformed-json', 'The request body is not valid JSON', 400);
  }
  if (e?.type === 'entity.too.large') {
    return new AppError('payload-too-large', 'The request body is too large', 413);
  }
  return new AppError(
    'internal-error',
    'Something went wrong on the server',
    500,
    {},
    { cause: error },
  );
}

export const notFoundHandler: RequestHandler = (req, _res, next) => {
  next(
    new AppError(
      'route-not-found',
      `No route for ${req.method} ${req.originalUrl.split('?')[0]}`,
      404,
    ),
  );
};

/** The one error middleware, registered last. Bodies are always `{ code, message, ... }`. */
export function errorHandler(logger: Logger): ErrorRequestHandler {
  return (error, req, res, _next) => {
    const appError = toAppError(error);
    if (appError.httpStatus >= 500) {
      logger.error({ err: appError.cause ?? appError, path: req.path }, appError.message);
    }
    const { fieldErrors, ...rest } = appError.details;
    res.status(appError.httpStatus).json({
      code: appError.code,
      message: appError.message,
      ...(fieldErrors ? { fieldErrors } : {}),
      ...(appError.httpStatus < 500 ? rest : {}),
    });
  };
}
