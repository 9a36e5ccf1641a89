import { z } from 'zod';
import { isoDateTimeSchema, relativeHourSchema, warningSchema } from './pagination';
import { targetSchema } from './courses';

/**
 * Engine endpoints: POST /api/courses/:id/{simulate,fit,level-validity,regimens,pta}.
 * The server reads the course, its doses, levels and covariates from the database and recomputes
 * everything; it never takes numbers from the client other than the request below.
 * Every response carries `warnings` (never silently extrapolate) and, for dosing results, `caution`.
 * Times in responses are hours from the course's first dose (`hour`) and, for real patients, `at`.
 */

export const estimationMethodSchema = z.enum(['map', 'two-level', 'population']);
export type EstimationMethod = z.infer<typeof estimationMethodSchema>;

/** A regular regimen to simulate forward after the recorded doses. */
export const regimenSchema = z
  .object({
    doseMg: z.number().positive().max(10_000),
    intervalH: z.number().positive().max(168),
    /** Infusion duration in hours; 0 means an IV bolus. */
    infusionH: z.number().min(0).max(48),
    route: z.enum(['iv-infusion', 'iv-bolus', 'oral', 'im']).default('iv-infusion'),
    /** Number of maintenance doses. */
    count: z.number().int().min(1).max(200).default(6),
    loadingDoseMg: z.number().positive().max(10_000).nullable().optional(),
    /** First dose of the regimen; default: one interval after the last recorded dose. */
    startAt: isoDateTimeSchema.optional(),
    startHour: relativeHourSchema.optional(),
  })
  .strict();
export type Regimen = z.infer<typeof regimenSchema>;

const modelRef = z.object({ id: z.string(), version: z.number().int() });

/** Present on every engine response. */
export const engineMetaSchema = z.object({
  model: modelRef,
  warnings: z.array(warningSchema),
  /** States that the output supports and does not replace clinical judgement. */
  caution: z.string(),
});

export const simulateRequestSchema = z
  .object({
    /** Which parameters to simulate with: the population prior (with covariates) or the MAP fit. */
    parameters: z.enum(['population', 'map']).default('population'),
    regimen: regimenSchema.optional(),
    /** Hours to simulate past the last dose; default one day. */
    horizonH: z
      .number()
      .positive()
      .max(24 * 28)
      .default(24),
    /** Output grid step in hours. */
    stepH: z.number().min(0.05).max(6).default(0.25),
  })
  .strict();
export type SimulateRequest = z.infer<typeof simulateRequestSchema>;

export const concentrationPointSchema = z.object({
  hour: z.number(),
  at: isoDateTimeSchema.nullable(),
  concentrationMgL: z.number(),
});

export const exposureSchema = z.object({
  peakMgL: z.number().nullable(),
  troughMgL: z.number().nullable(),
  auc24: z.number().nullable(),
});

export const simulateResponseSchema = engineMetaSchema.extend({
  parameters: z.record(z.string(), z.number()),
  points: z.array(concentrationPointSchema),
  /** Over the last 24 h simulated (or the last regimen interval). */
  exposure: exposureSchema,
  /** Step-doubling error estimate of the integrator, if the engine reports one. */
  errorEstimate: z.number().nullable(),
});
export type SimulateResponse = z.infer<typeof simulateResponseSchema>;

export const fitRequestSchema = z
  .object({
    method: estimationMethodSchema.default('map'),
    /** Levels to leave out (a "drop this level" what-if). */
    excludeLevelIds: z.array(z.uuid()).max(200).default([]),
  })
  .strict();
export type FitRequest = z.infer<typeof fitRequestSchema>;

export const fitResponseSchema = engineMetaSchema.extend({
  method: estimationMethodSchema,
  parameters: z.record(z.string(), z.number()),
  populationParameters: z.record(z.string(), z.number()),
  /** Approximate relative standard error or 90% interval per parameter when the method gives one. */
  uncertainty: z.record(z.string(), z.object({ low: z.number(), high: z.number() })).nullable(),
  /** Per-parameter shrinkage toward the prior, 0..1, when the method gives one. */
  shrinkage: z.record(z.string(), z.number()).nullable(),
  predictions: z.array(
    z.object({
      levelId: z.uuid(),
      hour: z.number(),
      observedMgL: z.number(),
      predictedMgL: z.number().nullable(),
      populationPredictedMgL: z.number().nullable(),
      residualMgL: z.number().nullable(),
    }),
  ),
  levelsUsed: z.number().int(),
});
export type FitResponse = z.infer<typeof fitResponseSchema>;

export const levelVerdictSchema = z.enum(['usable-bayesian', 'usable-log-linear', 'discard']);
export const levelValidityResponseSchema = engineMetaSchema.extend({
  levels: z.array(
    z.object({
      levelId: z.uuid(),
      /** usable-log-linear: usable for the two-level method (and for a Bayesian fit unless `bayesian.usable` is false). */
      verdict: levelVerdictSchema,
      /** The engine's own verdict. */
      engineVerdict: z.enum(['both', 'bayesian-only', 'log-linear-only', 'neither']),
      bayesian: z.object({ usable: z.boolean(), reason: z.string() }),
      logLinear: z.object({ usable: z.boolean(), reason: z.string() }),
      reasons: z.array(z.string()),
      hoursAfterInfusionEnd: z.number().nullable(),
    }),
  ),
});
export type LevelValidityResponse = z.infer<typeof levelValidityResponseSchema>;

export const regimenSearchRequestSchema = z
  .object({
    parameters: z.enum(['population', 'map']).default('map'),
    /** Overrides the course target for this search only. */
    target: targetSchema.optional(),
    intervalsH: z.array(z.number().positive().max(168)).min(1).max(10).optional(),
    infusionH: z.number().min(0).max(48).optional(),
    roundToMg: z.number().positive().max(1000).optional(),
    /** Default: intermittent infusion; oral for Michaelis-Menten drugs (phenytoin). */
    regimenKind: z
      .enum(['intermittent-infusion', 'oral', 'intramuscular', 'continuous-infusion'])
      .optional(),
    startAt: isoDateTimeSchema.optional(),
    startHour: relativeHourSchema.optional(),
    /** Propose a loading dose with each regimen (capped per drug); default: the drug's own setting. */
    loadingDose: z.boolean().optional(),
  })
  .strict();
export type RegimenSearchRequest = z.infer<typeof regimenSearchRequestSchema>;

export const regimenResultSchema = z.object({
  regimenKind: z.enum(['intermittent-infusion', 'oral', 'intramuscular', 'continuous-infusion']),
  doseMg: z.number(),
  intervalH: z.number(),
  infusionH: z.number(),
  loadingDoseMg: z.number().nullable(),
  /** Oral loading given in this many portions, 2 h apart (phenytoin); null for a single dose. */
  loadingPortions: z.number().int().nullable(),
  exposure: exposureSchema,
  meetsTarget: z.boolean(),
  /** Within the drug's usual practice (preferred intervals, usual single-dose maximum)? */
  usualPractice: z.boolean(),
  /** Why not, when not: shown beside the regimen. */
  practicalityNotes: z.array(z.string()),
});
export const regimenSearchResponseSchema = engineMetaSchema.extend({
  target: targetSchema,
  regimens: z.array(regimenResultSchema),
  suggestion: regimenResultSchema.nullable(),
});
export type RegimenSearchResponse = z.infer<typeof regimenSearchResponseSchema>;

export const ptaRequestSchema = z
  .object({
    regimen: regimenSchema,
    parameters: z.enum(['population', 'map']).default('map'),
    target: targetSchema.optional(),
    samples: z.number().int().min(100).max(20_000).default(2000),
    seed: z
      .number()
      .int()
      .min(0)
      .max(2 ** 31 - 1)
      .optional(),
  })
  .strict();
export type PtaRequest = z.infer<typeof ptaRequestSchema>;

/** 202 answer of POST /api/courses/:id/pta: poll GET /api/jobs/:jobId. */
export const jobAcceptedSchema = z.object({ jobId: z.uuid(), statusUrl: z.string() });
export type JobAccepted = z.infer<typeof jobAcceptedSchema>;

export const ptaResultSchema = engineMetaSchema.extend({
  target: targetSchema,
  samples: z.number().int(),
  /** Probability of target attainment, 0..1. */
  probability: z.number(),
  /** Percentiles of the target metric across the simulated patients (empty when the engine gives none). */
  percentiles: z.record(z.string(), z.number()),
  /** Monte Carlo standard error of `probability`. */
  standardError: z.number(),
  /** Fraction of virtual patients meeting each target separately. */
  perTarget: z.record(z.string(), z.number()),
  regimen: z.object({ doseMg: z.number(), intervalH: z.number(), infusionH: z.number() }),
  /** Where the virtual patients came from. */
  source: z.enum(['population', 'posterior']),
});
export type PtaResult = z.infer<typeof ptaResultSchema>;

export const jobStateSchema = z.enum(['queued', 'running', 'completed', 'failed', 'cancelled']);
export const jobSchema = z.object({
  id: z.uuid(),
  kind: z.string(),
  state: jobStateSchema,
  /** 0..1 */
  progress: z.number().min(0).max(1),
  result: z.unknown().nullable(),
  error: z.string().nullable(),
  createdAt: isoDateTimeSchema,
  updatedAt: isoDateTimeSchema,
});
export type Job = z.infer<typeof jobSchema>;

/** POST /api/courses/:id/sampling — when to draw the next levels after a planned regimen. */
export const samplingRequestSchema = z
  .object({
    regimen: regimenSchema,
    parameters: z.enum(['population', 'map']).default('map'),
    /** Which planned maintenance dose (1-based) to sample after; at most count − 1, default the last but one. */
    afterDose: z.number().int().min(1).max(200).optional(),
  })
  .strict();
export type SamplingRequest = z.infer<typeof samplingRequestSchema>;

const drawSchema = z.object({
  hour: z.number(),
  at: isoDateTimeSchema.nullable(),
  hoursAfterDoseStart: z.number(),
  hoursAfterInfusionEnd: z.number(),
  predictedMgL: z.number(),
});
const designSchema = z.object({
  draws: z.array(drawSchema),
  /** Predicted SD of ln AUC24 after these draws (≈ CV of AUC24). */
  sdLogAuc24: z.number(),
  /** 1 − SD after / SD now. */
  reduction: z.number(),
});
export const samplingResponseSchema = engineMetaSchema.extend({
  currentSdLogAuc24: z.number(),
  /** The conventional pair (post-distribution peak and pre-dose trough). */
  conventional: designSchema,
  bestSingle: designSchema,
  bestPair: designSchema,
  alternatives: z.array(designSchema),
  /** How much a second level adds to the best single one. */
  valueOfSecondLevel: z.number(),
});
export type SamplingResponse = z.infer<typeof samplingResponseSchema>;
