import { z } from 'zod';
import {
  isoDateTimeSchema,
  listQuerySchema,
  pageSchema,
  relativeHourSchema,
  rowSourceSchema,
  versionSchema,
} from './pagination';

/** How a dose was given. `im` is absorbed first-order like `oral`. */
export const doseRouteSchema = z.enum(['iv-infusion', 'iv-bolus', 'oral', 'im']);
export type DoseRoute = z.infer<typeof doseRouteSchema>;

/** given: as recorded; missed: not given (kept for the record, not simulated); partial: `amount` is what was actually given. */
export const administrationStatusSchema = z.enum(['given', 'missed', 'partial']);
export type AdministrationStatus = z.infer<typeof administrationStatusSchema>;

/** UCUM codes accepted for a dose amount. */
export const doseUnitSchema = z.enum(['mg', 'g']);

/**
 * POST /api/courses/:id/doses. Times: `startAt` (real) or `startHour` (teaching).
 * Infusions give `infusionMinutes` or an end time (`endAt` / `endHour`).
 */
export const doseCreateSchema = z
  .object({
    amount: z.number().positive(),
    unit: doseUnitSchema,
    route: doseRouteSchema,
    startAt: isoDateTimeSchema.optional(),
    startHour: relativeHourSchema.optional(),
    infusionMinutes: z
      .number()
      .positive()
      .max(48 * 60)
      .optional(),
    endAt: isoDateTimeSchema.optional(),
    endHour: relativeHourSchema.optional(),
    administrationStatus: administrationStatusSchema.default('given'),
    note: z.string().max(500).optional(),
  })
  .strict();
export type DoseCreate = z.infer<typeof doseCreateSchema>;

/** PATCH /api/doses/:id — only the fields sent change (no defaults are applied). */
export const doseUpdateSchema = doseCreateSchema
  .partial()
  .extend({ version: versionSchema, administrationStatus: administrationStatusSchema.optional() })
  .strict();
export type DoseUpdate = z.infer<typeof doseUpdateSchema>;

export const doseSchema = z.object({
  id: z.uuid(),
  version: versionSchema,
  courseId: z.uuid(),
  amount: z.number(),
  unit: doseUnitSchema,
  amountMg: z.number(),
  /** e.g. "1 g (1000 mg)" */
  echo: z.string(),
  route: doseRouteSchema,
  startAt: isoDateTimeSchema.nullable(),
  startHour: z.number().nullable(),
  /** Infusion duration in hours (null for bolus, oral, IM). */
  durationH: z.number().nullable(),
  endAt: isoDateTimeSchema.nullable(),
  endHour: z.number().nullable(),
  administrationStatus: administrationStatusSchema,
  note: z.string().nullable(),
  source: rowSourceSchema,
  createdAt: isoDateTimeSchema,
  updatedAt: isoDateTimeSchema,
});
export type Dose = z.infer<typeof doseSchema>;

/** GET /api/courses/:id/doses */
export const doseListQuerySchema = listQuerySchema(
  ['start', 'amountMg', 'createdAt'] as const,
  'start',
);
export type DoseListQuery = z.infer<typeof doseListQuerySchema>;
export const dosePageSchema = pageSchema(doseSchema);
export type DosePage = z.infer<typeof dosePageSchema>;
