import { z } from 'zod';
import {
  isoDateTimeSchema,
  listQuerySchema,
  pageSchema,
  relativeHourSchema,
  rowSourceSchema,
  versionSchema,
} from './pagination';

/**
 * Time-stamped covariate observations of a patient. Values keep the unit they were entered in
 * (UCUM code) and a canonical value: kg, cm, umol/L (creatinine), g/L (albumin).
 */
export const covariateKindSchema = z.enum([
  'weight',
  'height',
  'serum-creatinine',
  'albumin',
  'dialysis',
]);
export type CovariateKind = z.infer<typeof covariateKindSchema>;

/** UCUM codes accepted per kind. `[lb_av]` is the avoirdupois pound. */
export const covariateUnits = {
  weight: ['kg', '[lb_av]'],
  height: ['cm'],
  'serum-creatinine': ['umol/L', 'mg/dL'],
  albumin: ['g/L', 'g/dL'],
  dialysis: [],
} as const satisfies Record<CovariateKind, readonly string[]>;

/** The canonical unit each kind is stored and computed in. */
export const covariateCanonicalUnits = {
  weight: 'kg',
  height: 'cm',
  'serum-creatinine': 'umol/L',
  albumin: 'g/L',
  dialysis: null,
} as const;

export const weightSourceSchema = z.enum(['measured', 'stated', 'estimated']);
export const dialysisStatusSchema = z.enum([
  'none',
  'intermittent-haemodialysis',
  'continuous-rrt',
  'peritoneal',
]);
export type DialysisStatus = z.infer<typeof dialysisStatusSchema>;

/** POST /api/patients/:id/covariates — give `observedAt` (real) or `observedHour` (teaching). */
export const covariateCreateSchema = z
  .object({
    kind: covariateKindSchema,
    value: z.number().finite().optional(),
    unit: z.string().trim().min(1).max(20).optional(),
    weightSource: weightSourceSchema.optional(),
    dialysisStatus: dialysisStatusSchema.optional(),
    observedAt: isoDateTimeSchema.optional(),
    observedHour: relativeHourSchema.optional(),
    note: z.string().max(500).optional(),
  })
  .strict();
export type CovariateCreate = z.infer<typeof covariateCreateSchema>;

/** PATCH /api/covariates/:id */
export const covariateUpdateSchema = covariateCreateSchema
  .omit({ kind: true })
  .partial()
  .extend({ version: versionSchema })
  .strict();
export type CovariateUpdate = z.infer<typeof covariateUpdateSchema>;

export const covariateSchema = z.object({
  id: z.uuid(),
  version: versionSchema,
  patientId: z.uuid(),
  kind: covariateKindSchema,
  /** As entered. */
  value: z.number().nullable(),
  unit: z.string().nullable(),
  /** Converted to the canonical unit of the kind. */
  canonicalValue: z.number().nullable(),
  canonicalUnit: z.string().nullable(),
  /** The value echoed in both units, e.g. "1.1 mg/dL (97.2 umol/L)". */
  echo: z.string(),
  weightSource: weightSourceSchema.nullable(),
  dialysisStatus: dialysisStatusSchema.nullable(),
  observedAt: isoDateTimeSchema.nullable(),
  observedHour: z.number().nullable(),
  note: z.string().nullable(),
  source: rowSourceSchema,
  createdAt: isoDateTimeSchema,
  updatedAt: isoDateTimeSchema,
});
export type Covariate = z.infer<typeof covariateSchema>;

/** GET /api/patients/:id/covariates */
export const covariateListQuerySchema = listQuerySchema(
  ['observedAt', 'kind', 'createdAt'] as const,
  'observedAt',
).extend({ kind: covariateKindSchema.optional() });
export type CovariateListQuery = z.infer<typeof covariateListQuerySchema>;
export const covariatePageSchema = pageSchema(covariateSchema);
export type CovariatePage = z.infer<typeof covariatePageSchema>;

/** GET /api/patients/:id/derived — values computed by the engine from the latest covariates. */
const derivedValue = z.object({
  value: z.number(),
  unit: z.string(),
  formula: z.string(),
  source: z.string(),
});
export const derivedValuesSchema = z.object({
  patientId: z.uuid(),
  inputs: z.object({
    ageYears: z.number().int(),
    sex: z.enum(['female', 'male']),
    weightKg: z.number().nullable(),
    weightObservedAt: isoDateTimeSchema.nullable(),
    weightObservedHour: z.number().nullable(),
    weightSource: weightSourceSchema.nullable(),
    heightCm: z.number().nullable(),
    serumCreatinineUmolL: z.number().nullable(),
    serumCreatinineMgDl: z.number().nullable(),
    serumCreatinineObservedAt: isoDateTimeSchema.nullable(),
    serumCreatinineObservedHour: z.number().nullable(),
    dialysisStatus: dialysisStatusSchema.nullable(),
  }),
  creatinineClearance: derivedValue
    .extend({
      weightUsed: z.enum(['total', 'ideal', 'adjusted']),
      weightKg: z.number(),
    })
    .nullable(),
  idealBodyWeight: derivedValue.nullable(),
  adjustedBodyWeight: derivedValue.nullable(),
  leanBodyWeight: derivedValue.nullable(),
  bodySurfaceArea: derivedValue.nullable(),
  egfr: derivedValue.nullable(),
  warnings: z.array(z.object({ code: z.string(), message: z.string() })),
});
export type DerivedValues = z.infer<typeof derivedValuesSchema>;
