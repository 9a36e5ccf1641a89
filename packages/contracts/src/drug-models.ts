import { z } from 'zod';
import { isoDateTimeSchema, listQuerySchema, pageSchema } from './pagination';
import { drugSchema } from './courses';

/**
 * Drug-model library entries, versioned: (id, version) is immutable once stored; an edit is a new
 * version. `definition` is the engine's model object, validated by the engine before it is stored.
 */
export const drugModelSchema = z.object({
  id: z.string(),
  version: z.number().int().min(1),
  drug: drugSchema,
  name: z.string(),
  source: z.string(),
  definition: z.record(z.string(), z.unknown()),
  /** Practical per-drug settings used by the plausibility checks. */
  plausibleSingleDoseMg: z.object({ min: z.number(), max: z.number() }),
  createdAt: isoDateTimeSchema,
  createdBy: z.string().nullable(),
});
export type DrugModel = z.infer<typeof drugModelSchema>;

/** POST /api/drug-models (admin): a new model, or a new version of an existing id. */
export const drugModelCreateSchema = z
  .object({
    id: z.string().regex(/^[a-z0-9][a-z0-9-]{2,79}$/, 'lower-case letters, digits and dashes'),
    drug: drugSchema,
    name: z.string().trim().min(1).max(200),
    source: z.string().trim().min(1).max(500),
    definition: z.record(z.string(), z.unknown()),
    plausibleSingleDoseMg: z
      .object({ min: z.number().positive(), max: z.number().positive() })
      .refine((r) => r.min < r.max, { message: 'min must be below max' }),
  })
  .strict();
export type DrugModelCreate = z.infer<typeof drugModelCreateSchema>;

export const drugModelListQuerySchema = listQuerySchema(
  ['id', 'drug', 'createdAt'] as const,
  'id',
).extend({ drug: drugSchema.optional(), allVersions: z.enum(['true', 'false']).optional() });
export type DrugModelListQuery = z.infer<typeof drugModelListQuerySchema>;
export const drugModelPageSchema = pageSchema(drugModelSchema);
