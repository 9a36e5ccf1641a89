import type { Request } from 'express';
import type { z } from 'zod';
import { AppError } from '../../../lib/app-error';
import { fieldErrorsFromZod } from './error-handler';

type Part = 'body' | 'query' | 'params';

/** Parses one part of the request with a zod schema; a failure is a 400 with field errors. */
export function parseRequest<S extends z.ZodType>(req: Request, part: Part, schema: S): z.infer<S> {
  const result = schema.safeParse(req[part]);
  if (!result.success) {
    throw new AppError('validation-failed', 'Some fields are not valid', 400, {
      fieldErrors: fieldErrorsFromZod(result.error),
    });
  }
  return result.data;
}
