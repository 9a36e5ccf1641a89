import { z } from 'zod';

/** The body of every API error response. */
export const apiErrorBodySchema = z.object({
  code: z.string(),
  message: z.string(),
  fieldErrors: z.record(z.string(), z.array(z.string())).optional(),
});
export type ApiErrorBody = z.infer<typeof apiErrorBodySchema>;
