import { z } from 'zod';
import {
  isoDateTimeSchema,
  listQuerySchema,
  pageSchema,
  relativeHourSchema,
  rowSourceSchema,
  versionSchema,
} from './pagination';

/** UCUM codes accepted for a drug level. mg/L and ug/mL are numerically equal. */
export const levelUnitSchema = z.enum(['mg/L', 'ug/mL', 'umol/L']);
export type LevelUnit = z.infer<typeof levelUnitSchema>;

/**
 * The sample kind as recorded. `during-infusion` must be chosen deliberately for a sample
 * collected while an infusion ran: such a level is kept but flagged.
 */
export const sampleKindSchema = z.enum([
  'trough',
  'peak',
  'random',
  'during-infusion',
  'pre-dialysis',
  'post-dialysis',
]);
export type SampleKind = z.infer<typeof sampleKindSchema>;

/** total or free (unbound) concentration; free is meaningful for phenytoin. */
export const levelFractionSchema = z.enum(['total', 'free']);

/** POST /api/courses/:id/levels. Times: `collectedAt` (real) or `collectedHour` (teaching). */
export const levelCreateSchema = z
  .object({
    value: z.number().nonnegative(),
    unit: levelUnitSchema,
    collectedAt: isoDateTimeSchema.optional(),
    collectedHour: relativeHourSchema.optional(),
    sampleKind: sampleKindSchema,
    fraction: levelFractionSchema.default('total'),
    /** Assay lower limit of quantification, in the same unit as `value`. */
    assayLowerLimit: z.number().nonnegative().nullable().optional(),
    loincCode: z
      .string()
      .regex(/^\d{1,7}-\d$/)
      .nullable()
      .optional(),
    note: z.string().max(500).optional(),
  })
  .strict();
export type LevelCreate = z.infer<typeof levelCreateSchema>;

/** PATCH /api/levels/:id — only the fields sent change (no defaults are applied). */
export const levelUpdateSchema = levelCreateSchema
  .partial()
  .extend({ version: versionSchema, fraction: levelFractionSchema.optional() })
  .strict();
export type LevelUpdate = z.infer<typeof levelUpdateSchema>;

export const levelFlagSchema = z.enum(['during-infusion', 'below-assay-limit', 'post-dialysis']);

export const levelSchema = z.object({
  id: z.uuid(),
  version: versionSchema,
  courseId: z.uuid(),
  value: z.number(),
  unit: levelUnitSchema,
  valueMgL: z.number(),
  /** e.g. "10.4 umol/L (15.1 mg/L)" */
  echo: z.string(),
  collectedAt: isoDateTimeSchema.nullable(),
  collectedHour: z.number().nullable(),
  sampleKind: sampleKindSchema,
  fraction: levelFractionSchema,
  assayLowerLimit: z.number().nullable(),
  loincCode: z.string().nullable(),
  flags: z.array(levelFlagSchema),
  note: z.string().nullable(),
  source: rowSourceSchema,
  createdAt: isoDateTimeSchema,
  updatedAt: isoDateTimeSchema,
});
export type Level = z.infer<typeof levelSchema>;

/** GET /api/courses/:id/levels */
export const levelListQuerySchema = listQuerySchema(
  ['collected', 'valueMgL', 'createdAt'] as const,
  'collected',
);
export type LevelListQuery = z.infer<typeof levelListQuerySchema>;
export const levelPageSchema = pageSchema(levelSchema);
export type LevelPage = z.infer<typeof levelPageSchema>;
