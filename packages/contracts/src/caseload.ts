import { z } from 'zod';
import { isoDateTimeSchema, listQuerySchema, pageSchema } from './pagination';
import { courseStatusSchema, drugSchema } from './courses';
import { sampleKindSchema } from './levels';

/**
 * GET /api/caseload — the signed-in pharmacist's active courses and what is due.
 * Plans: submitted (awaiting countersignature), returned, or past their re-check time.
 */
export const caseloadQuerySchema = listQuerySchema(
  ['due', 'patient', 'ward', 'drug'] as const,
  'due',
).extend({
  /** mine: courses I own (default); all: every active course I may see. */
  scope: z.enum(['mine', 'all']).default('mine'),
  ward: z.string().max(60).optional(),
});
export type CaseloadQuery = z.infer<typeof caseloadQuerySchema>;

export const dueItemSchema = z.object({
  kind: z.enum([
    'first-level-due',
    'level-overdue',
    'level-due',
    'renal-function-unstable',
    'no-recent-weight',
    'level-needs-review',
    'plan-awaiting-countersignature',
    'plan-returned',
    'plan-recheck-due',
  ]),
  message: z.string(),
  dueAt: isoDateTimeSchema.nullable(),
});
export type DueItem = z.infer<typeof dueItemSchema>;

export const caseloadItemSchema = z.object({
  courseId: z.uuid(),
  patient: z.object({
    id: z.uuid(),
    displayName: z.string(),
    mrn: z.string().nullable(),
    ward: z.string().nullable(),
    isTeaching: z.boolean(),
  }),
  drug: drugSchema,
  status: courseStatusSchema,
  lastDose: z
    .object({
      echo: z.string(),
      startAt: isoDateTimeSchema.nullable(),
      startHour: z.number().nullable(),
    })
    .nullable(),
  lastLevel: z
    .object({
      echo: z.string(),
      valueMgL: z.number(),
      sampleKind: sampleKindSchema,
      collectedAt: isoDateTimeSchema.nullable(),
      collectedHour: z.number().nullable(),
    })
    .nullable(),
  due: z.array(dueItemSchema),
  nextAction: z.string(),
});
export type CaseloadItem = z.infer<typeof caseloadItemSchema>;
export const caseloadPageSchema = pageSchema(caseloadItemSchema);
export type CaseloadPage = z.infer<typeof caseloadPageSchema>;
