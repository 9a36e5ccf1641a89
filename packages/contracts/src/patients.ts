import { z } from 'zod';
import { listQuerySchema, pageSchema, versionSchema, isoDateTimeSchema } from './pagination';

/**
 * Patients. A real patient has an (invented) MRN, name and date of birth. A teaching patient
 * (`isTeaching`) has none of them (no HIPAA Safe Harbor identifiers): only a case label,
 * an age in whole years (90 means "90 or over") and sex; its times are relative to the first dose.
 */
export const sexSchema = z.enum(['female', 'male']);
export type Sex = z.infer<typeof sexSchema>;

const mrn = z
  .string()
  .trim()
  .regex(/^[A-Za-z0-9-]{3,32}$/, 'MRN: 3-32 letters, digits or dashes');
const name = z.string().trim().min(1).max(100);
const isoDate = z.iso.date();
const ward = z.string().trim().min(1).max(60);

const realPatientCreate = z
  .object({
    isTeaching: z.literal(false).optional(),
    mrn,
    givenName: name,
    familyName: name,
    sex: sexSchema,
    birthDate: isoDate,
    ward: ward.nullable().optional(),
  })
  .strict();

const teachingPatientCreate = z
  .object({
    isTeaching: z.literal(true),
    teachingLabel: z.string().trim().min(1).max(80),
    sex: sexSchema,
    ageYears: z.number().int().min(0).max(90),
    ward: ward.nullable().optional(),
  })
  .strict();

/** POST /api/patients — `isTeaching` defaults to false (a real patient). */
export const patientCreateSchema = z.discriminatedUnion('isTeaching', [
  realPatientCreate,
  teachingPatientCreate,
]);
export type PatientCreate = z.infer<typeof patientCreateSchema>;

/** PATCH /api/patients/:id — the fields to change plus the version last read. */
export const patientUpdateSchema = z
  .object({
    version: versionSchema,
    mrn: mrn.optional(),
    givenName: name.optional(),
    familyName: name.optional(),
    sex: sexSchema.optional(),
    birthDate: isoDate.optional(),
    ward: ward.nullable().optional(),
    teachingLabel: z.string().trim().min(1).max(80).optional(),
    ageYears: z.number().int().min(0).max(90).optional(),
  })
  .strict();
export type PatientUpdate = z.infer<typeof patientUpdateSchema>;

export const patientSchema = z.object({
  id: z.uuid(),
  version: versionSchema,
  isTeaching: z.boolean(),
  mrn: z.string().nullable(),
  givenName: z.string().nullable(),
  familyName: z.string().nullable(),
  /** "FAMILY, Given" for real patients, the case label for teaching ones. */
  displayName: z.string(),
  teachingLabel: z.string().nullable(),
  sex: sexSchema,
  birthDate: z.string().nullable(),
  /** Age in whole years today (real) or as stored (teaching). */
  ageYears: z.number().int(),
  ward: z.string().nullable(),
  createdAt: isoDateTimeSchema,
  updatedAt: isoDateTimeSchema,
});
export type Patient = z.infer<typeof patientSchema>;

/** GET /api/patients */
export const patientListQuerySchema = listQuerySchema(
  ['familyName', 'mrn', 'ward', 'createdAt', 'birthDate'] as const,
  'familyName',
).extend({
  /** Free text: part of the name, MRN or case label. */
  q: z.string().trim().max(100).optional(),
  ward: ward.optional(),
  isTeaching: z.enum(['true', 'false']).optional(),
});
export type PatientListQuery = z.infer<typeof patientListQuerySchema>;
export const patientPageSchema = pageSchema(patientSchema);
export type PatientPage = z.infer<typeof patientPageSchema>;
