import { z } from 'zod';
import { uuidSchema } from './pagination';

/**
 * Imports. CSV: POST /api/courses/:id/imports/csv (multipart: `file`, `kind`, `mapping` JSON, `mode`).
 * With no mapping the server suggests one from the header. `mode=preview` marks every refused row
 * with its reasons; `mode=commit` is all-or-nothing (any refused row: 400, nothing saved).
 * FHIR: POST /api/imports/fhir (JSON) with a Bundle; same preview/commit semantics.
 */
export const csvImportKindSchema = z.enum(['doses', 'levels']);
export type CsvImportKind = z.infer<typeof csvImportKindSchema>;

/** Our fields a CSV column can map to. Times: an ISO date-time (real) or hours (teaching). */
export const csvDoseFields = [
  'start',
  'amount',
  'unit',
  'route',
  'infusionMinutes',
  'end',
  'administrationStatus',
  'note',
] as const;
export const csvLevelFields = [
  'collected',
  'value',
  'unit',
  'sampleKind',
  'assayLowerLimit',
  'fraction',
  'note',
] as const;

/** field -> CSV column header (or null when not present). */
export const csvMappingSchema = z.record(z.string(), z.string().nullable());
export type CsvMapping = z.infer<typeof csvMappingSchema>;

export const csvImportFormSchema = z.object({
  kind: csvImportKindSchema,
  mode: z.enum(['preview', 'commit']).default('preview'),
  /** JSON-encoded CsvMapping. */
  mapping: z.string().optional(),
});

export const importRowSchema = z.object({
  rowNumber: z.number().int(),
  status: z.enum(['accepted', 'refused']),
  reasons: z.array(z.string()),
  /** The row as our fields, when it could be read. */
  values: z.record(z.string(), z.unknown()),
  /** Unit echo, e.g. "1 g (1000 mg)". */
  echo: z.string().nullable(),
});
export type ImportRow = z.infer<typeof importRowSchema>;

export const csvImportResponseSchema = z.object({
  kind: csvImportKindSchema,
  columns: z.array(z.string()),
  mapping: csvMappingSchema,
  missingFields: z.array(z.string()),
  rows: z.array(importRowSchema),
  acceptedCount: z.number().int(),
  refusedCount: z.number().int(),
  committed: z.boolean(),
  createdIds: z.array(uuidSchema),
});
export type CsvImportResponse = z.infer<typeof csvImportResponseSchema>;

export const fhirImportRequestSchema = z
  .object({
    bundle: z.object({ resourceType: z.literal('Bundle') }).passthrough(),
    mode: z.enum(['preview', 'commit']).default('preview'),
    /** Doses and drug levels go to this course; default: the patient's active course of the drug. */
    courseId: z.uuid().optional(),
  })
  .strict();
export type FhirImportRequest = z.infer<typeof fhirImportRequestSchema>;

export const fhirImportEntrySchema = z.object({
  resource: z.string(),
  target: z.enum(['patient', 'covariate', 'dose', 'level', 'skipped']),
  status: z.enum(['accepted', 'refused', 'skipped']),
  reasons: z.array(z.string()),
  echo: z.string().nullable(),
});
export const fhirImportResponseSchema = z.object({
  patientId: uuidSchema.nullable(),
  patientCreated: z.boolean(),
  courseId: uuidSchema.nullable(),
  entries: z.array(fhirImportEntrySchema),
  acceptedCount: z.number().int(),
  refusedCount: z.number().int(),
  /** Codes we do not map (reported, never imported). */
  unknownCodes: z.array(z.string()),
  committed: z.boolean(),
});
export type FhirImportResponse = z.infer<typeof fhirImportResponseSchema>;
