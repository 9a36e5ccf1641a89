import { z } from 'zod';
import { isoDateTimeSchema, pageSchema } from './pagination';

/**
 * GET /api/audit (admin): the append-only audit trail, newest first, filtered by patient (the
 * patient and every row hanging off it), course, acting user, action and time.
 */
export const auditQuerySchema = z
  .object({
    patientId: z.uuid().optional(),
    courseId: z.uuid().optional(),
    userId: z.uuid().optional(),
    /** Exact action ("plan.countersign") or a prefix ending in a dot ("plan."). */
    action: z.string().trim().max(80).optional(),
    from: isoDateTimeSchema.optional(),
    to: isoDateTimeSchema.optional(),
    page: z.coerce.number().int().min(1).default(1),
    pageSize: z.coerce.number().int().min(1).max(200).default(50),
  })
  .strict()
  .refine((q) => !q.from || !q.to || q.from <= q.to, {
    message: 'from must be before to',
    path: ['to'],
  });
export type AuditQuery = z.infer<typeof auditQuerySchema>;

export const auditEventSchema = z.object({
  id: z.string(),
  occurredAt: isoDateTimeSchema,
  actorUserId: z.string().nullable(),
  actorSubject: z.string().nullable(),
  actorName: z.string().nullable(),
  action: z.string(),
  entityType: z.string().nullable(),
  entityId: z.string().nullable(),
  before: z.unknown(),
  after: z.unknown(),
  context: z.record(z.string(), z.unknown()),
});
export type AuditEvent = z.infer<typeof auditEventSchema>;
export const auditPageSchema = pageSchema(auditEventSchema);
export type AuditPage = z.infer<typeof auditPageSchema>;
