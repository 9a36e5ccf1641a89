import { z } from 'zod';
import {
  isoDateTimeSchema,
  listQuerySchema,
  pageSchema,
  relativeHourSchema,
  versionSchema,
} from './pagination';

/** Drugs Ebbtide monitors. */
export const drugSchema = z.enum([
  'vancomycin',
  'gentamicin',
  'tobramycin',
  'amikacin',
  'phenytoin',
]);
export type Drug = z.infer<typeof drugSchema>;

export const courseStatusSchema = z.enum(['active', 'on-hold', 'completed', 'stopped']);
export type CourseStatus = z.infer<typeof courseStatusSchema>;

/**
 * The exposure target of a course. Units: auc24 mg·h/L; trough, peak, css mg/L;
 * peak-mic-ratio dimensionless. At least one bound.
 */
export const targetSchema = z
  .object({
    metric: z.enum(['auc24', 'trough', 'peak', 'peak-mic-ratio', 'css']),
    low: z.number().positive().nullable(),
    high: z.number().positive().nullable(),
  })
  .refine((t) => t.low !== null || t.high !== null, { message: 'give a low or a high bound' })
  .refine((t) => t.low === null || t.high === null || t.low < t.high, {
    message: 'low must be below high',
  });
export type Target = z.infer<typeof targetSchema>;

/** POST /api/patients/:id/courses */
export const courseCreateSchema = z
  .object({
    drug: drugSchema,
    /** Drug-model library id; the server records its latest version unless one is given. */
    modelId: z.string().min(1).max(80),
    modelVersion: z.number().int().min(1).optional(),
    indication: z.string().trim().min(1).max(200),
    /** MIC in mg/L, with its method. */
    micMgL: z.number().positive().max(1024).nullable().optional(),
    micMethod: z.string().trim().max(60).nullable().optional(),
    target: targetSchema,
    status: courseStatusSchema.default('active'),
    startedAt: isoDateTimeSchema.optional(),
    startedHour: relativeHourSchema.optional(),
  })
  .strict();
export type CourseCreate = z.infer<typeof courseCreateSchema>;

/** PATCH /api/courses/:id */
export const courseUpdateSchema = z
  .object({
    version: versionSchema,
    modelId: z.string().min(1).max(80).optional(),
    modelVersion: z.number().int().min(1).optional(),
    indication: z.string().trim().min(1).max(200).optional(),
    micMgL: z.number().positive().max(1024).nullable().optional(),
    micMethod: z.string().trim().max(60).nullable().optional(),
    target: targetSchema.optional(),
    status: courseStatusSchema.optional(),
  })
  .strict();
export type CourseUpdate = z.infer<typeof courseUpdateSchema>;

export const courseSchema = z.object({
  id: z.uuid(),
  version: versionSchema,
  patientId: z.uuid(),
  isTeaching: z.boolean(),
  drug: drugSchema,
  modelId: z.string(),
  modelVersion: z.number().int(),
  indication: z.string(),
  micMgL: z.number().nullable(),
  micMethod: z.string().nullable(),
  target: targetSchema,
  status: courseStatusSchema,
  ownerUserId: z.uuid().nullable(),
  startedAt: isoDateTimeSchema.nullable(),
  startedHour: z.number().nullable(),
  createdAt: isoDateTimeSchema,
  updatedAt: isoDateTimeSchema,
});
export type Course = z.infer<typeof courseSchema>;

/** GET /api/courses and GET /api/patients/:id/courses */
export const courseListQuerySchema = listQuerySchema(
  ['createdAt', 'drug', 'status', 'startedAt'] as const,
  'createdAt',
).extend({
  status: courseStatusSchema.optional(),
  drug: drugSchema.optional(),
  patientId: z.uuid().optional(),
});
export type CourseListQuery = z.infer<typeof courseListQuerySchema>;
export const coursePageSchema = pageSchema(courseSchema);
export type CoursePage = z.infer<typeof coursePageSchema>;
