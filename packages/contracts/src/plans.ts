import { z } from 'zod';
import { regimenSchema, exposureSchema } from './engine';
import { targetSchema } from './courses';
import {
  isoDateTimeSchema,
  listQuerySchema,
  pageSchema,
  versionSchema,
  warningSchema,
} from './pagination';

/**
 * Dosing plans: the chosen regimen of a course, the next levels to draw, the re-check time, a
 * rationale and the exact engine inputs and outputs it rests on (recomputed by the server).
 *
 * Lifecycle: draft → submitted → countersigned; or submitted → returned (with a comment) →
 * edited → submitted again. A countersigned plan is never edited: a new plan version supersedes it
 * (the older one becomes `superseded` when the newer one is countersigned).
 */
export const planStateSchema = z.enum([
  'draft',
  'submitted',
  'returned',
  'countersigned',
  'superseded',
]);
export type PlanState = z.infer<typeof planStateSchema>;

/** What a signature means (21 CFR 11.50): shown with the printed name and the date/time. */
export const signatureMeaningSchema = z.enum(['authored', 'reviewed-agree', 'returned']);
export type SignatureMeaning = z.infer<typeof signatureMeaningSchema>;
export const signatureMeaningLabels: Record<SignatureMeaning, string> = {
  authored: 'authored',
  'reviewed-agree': 'reviewed – agree',
  returned: 'returned',
};

/**
 * A level to draw, tied to a named dose of the planned regimen: e.g. 1 h after the END of
 * dose 3, or 0.5 h before the START of dose 4. The server turns it into a clock time and a label.
 */
export const sampleAnchorSchema = z.enum(['before-start', 'after-start', 'after-end']);
export type SampleAnchor = z.infer<typeof sampleAnchorSchema>;
export const sampleDrawInputSchema = z
  .object({
    kind: z.enum(['trough', 'peak', 'random']),
    /** Which maintenance dose of this regimen (1 = the first). */
    doseNumber: z.number().int().min(1).max(200),
    anchor: sampleAnchorSchema,
    /** Hours before or after the anchor. */
    offsetH: z.number().min(0).max(48),
  })
  .strict();
export type SampleDrawInput = z.infer<typeof sampleDrawInputSchema>;

const rationaleSchema = z.string().trim().max(4000);

/**
 * POST /api/courses/:courseId/plans — "Use this regimen": the regimen fields of
 * engine.ts `regimenSchema`, plus an optional rationale, sampling and re-check time.
 * Answers 201 with the draft plan (see `planSchema`).
 */
export const planCreateSchema = regimenSchema.extend({
  rationale: rationaleSchema.optional(),
  sampling: z.array(sampleDrawInputSchema).max(6).optional(),
  recheckAt: isoDateTimeSchema.optional(),
});
export type PlanCreate = z.infer<typeof planCreateSchema>;

/** PATCH /api/plans/:id — only in draft or returned, only by the author. */
export const planUpdateSchema = z
  .object({
    version: versionSchema,
    regimen: regimenSchema.optional(),
    rationale: rationaleSchema.optional(),
    sampling: z.array(sampleDrawInputSchema).max(6).optional(),
    recheckAt: isoDateTimeSchema.nullable().optional(),
  })
  .strict();
export type PlanUpdate = z.infer<typeof planUpdateSchema>;

/** Body of submit and supersede: the version the client read. */
export const planTransitionSchema = z.object({ version: versionSchema }).strict();
export type PlanTransition = z.infer<typeof planTransitionSchema>;

/** The reviewer's checklist: every box must be ticked to countersign. */
export const countersignChecklistSchema = z
  .object({
    weightAndDate: z.literal(true, 'confirm the weight and its date'),
    administrationTimes: z.literal(true, 'confirm the administration times'),
    sampleTiming: z.literal(true, 'confirm the sample timing'),
    fitPlausible: z.literal(true, 'confirm the fit is plausible'),
    roundingAndRate: z.literal(true, 'confirm the rounding and infusion rate'),
  })
  .strict();
export type CountersignChecklist = z.infer<typeof countersignChecklistSchema>;
export const countersignChecklistLabels: Record<keyof CountersignChecklist, string> = {
  weightAndDate: 'Weight and its date',
  administrationTimes: 'Administration times',
  sampleTiming: 'Sample timing',
  fitPlausible: 'Fit plausibility',
  roundingAndRate: 'Rounding and infusion rate',
};

/** POST /api/plans/:id/countersign */
export const countersignSchema = z
  .object({
    version: versionSchema,
    /** The content hash the reviewer looked at; refused if the plan changed since. */
    contentHash: z.string().regex(/^[0-9a-f]{64}$/),
    checklist: countersignChecklistSchema,
  })
  .strict();
export type Countersign = z.infer<typeof countersignSchema>;

/** POST /api/plans/:id/return */
export const returnPlanSchema = z
  .object({
    version: versionSchema,
    comment: z.string().trim().min(1, 'say what needs changing').max(2000),
  })
  .strict();
export type ReturnPlan = z.infer<typeof returnPlanSchema>;

export const planParamsSchema = z.object({ id: z.uuid() });
export const coursePlanParamsSchema = z.object({ courseId: z.uuid() });

export const plannedDoseSchema = z.object({
  /** 0 = the loading dose, 1.. = maintenance doses. */
  number: z.number().int().min(0),
  label: z.string(),
  doseMg: z.number(),
  startAt: isoDateTimeSchema,
  endAt: isoDateTimeSchema,
  /** Local clock time of the start, "08:00". */
  clock: z.string(),
});

export const plannedRegimenSchema = z.object({
  doseMg: z.number(),
  intervalH: z.number(),
  infusionH: z.number(),
  route: z.enum(['iv-infusion', 'iv-bolus', 'oral', 'im']),
  count: z.number().int(),
  loadingDoseMg: z.number().nullable(),
  firstDoseAt: isoDateTimeSchema,
  /** mg/h for an infusion, null otherwise. */
  infusionRateMgPerH: z.number().nullable(),
  /** Daily administration clock times when the interval divides a day, else the first times. */
  clockTimes: z.array(z.string()),
  doses: z.array(plannedDoseSchema),
});
export type PlannedRegimen = z.infer<typeof plannedRegimenSchema>;

export const plannedDrawSchema = sampleDrawInputSchema.extend({
  at: isoDateTimeSchema,
  clock: z.string(),
  /** "Draw 1 h after the END of the 20:00 dose (dose 3, 3 Dec)". */
  label: z.string(),
});
export type PlannedDraw = z.infer<typeof plannedDrawSchema>;

/** The engine inputs and outputs the plan rests on, as recomputed by the server. */
export const planBasisSchema = z.object({
  computedAt: isoDateTimeSchema,
  method: z.string(),
  model: z.object({ id: z.string(), version: z.number().int(), name: z.string().nullable() }),
  parameters: z.record(z.string(), z.number()),
  populationParameters: z.record(z.string(), z.number()).nullable(),
  doses: z.array(
    z.object({
      id: z.string(),
      version: z.number().int(),
      startAt: isoDateTimeSchema.nullable(),
      amountMg: z.number(),
      route: z.string(),
      durationH: z.number().nullable(),
      status: z.string(),
    }),
  ),
  levels: z.array(
    z.object({
      id: z.string(),
      version: z.number().int(),
      collectedAt: isoDateTimeSchema.nullable(),
      valueMgL: z.number(),
      sampleKind: z.string(),
      used: z.boolean(),
    }),
  ),
  covariates: z.array(
    z.object({
      id: z.string(),
      kind: z.string(),
      canonicalValue: z.number().nullable(),
      observedAt: isoDateTimeSchema.nullable(),
      detail: z.string().nullable(),
    }),
  ),
  predicted: exposureSchema,
  meetsTarget: z.boolean().nullable(),
  warnings: z.array(warningSchema),
  /** The simulated concentration profile of the regimen (thinned), for plots and the report. */
  profile: z
    .array(
      z.object({
        hour: z.number(),
        at: isoDateTimeSchema.nullable(),
        concentrationMgL: z.number(),
      }),
    )
    .optional(),
});
export type PlanBasis = z.infer<typeof planBasisSchema>;

export const planSignatureSchema = z.object({
  id: z.uuid(),
  signerUserId: z.uuid(),
  /** Printed name of the signer. */
  signerName: z.string(),
  meaning: signatureMeaningSchema,
  meaningLabel: z.string(),
  signedAt: isoDateTimeSchema,
  /** SHA-256 of the canonical plan content the signature was applied to. */
  contentHash: z.string(),
  /** True while the plan's current content still hashes to `contentHash`. */
  matchesContent: z.boolean(),
  comment: z.string().nullable(),
});
export type PlanSignature = z.infer<typeof planSignatureSchema>;

export const planActionsSchema = z.object({
  edit: z.boolean(),
  submit: z.boolean(),
  countersign: z.boolean(),
  return: z.boolean(),
  supersede: z.boolean(),
});
export type PlanActions = z.infer<typeof planActionsSchema>;

export const planSchema = z.object({
  id: z.uuid(),
  version: versionSchema,
  courseId: z.uuid(),
  patientId: z.uuid(),
  /** 1, 2, 3 … within the course: the plan's version in the course's history. */
  planNumber: z.number().int().min(1),
  state: planStateSchema,
  authorUserId: z.uuid(),
  authorName: z.string(),
  drug: z.string(),
  target: targetSchema,
  regimen: plannedRegimenSchema,
  sampling: z.array(plannedDrawSchema),
  recheckAt: isoDateTimeSchema.nullable(),
  rationale: z.string(),
  /** Predicted exposure of the regimen (from `basis`). */
  predicted: exposureSchema.nullable(),
  basis: planBasisSchema.nullable(),
  warnings: z.array(warningSchema),
  caution: z.string(),
  /** IANA zone the clock times are given in. */
  timeZone: z.string(),
  /** SHA-256 over the canonical JSON of the plan content as stored now. */
  contentHash: z.string(),
  signatures: z.array(planSignatureSchema),
  returnComment: z.string().nullable(),
  supersedesPlanId: z.uuid().nullable(),
  supersededByPlanId: z.uuid().nullable(),
  submittedAt: isoDateTimeSchema.nullable(),
  countersignedAt: isoDateTimeSchema.nullable(),
  createdAt: isoDateTimeSchema,
  updatedAt: isoDateTimeSchema,
  /** What the caller may do now (the server enforces it anyway). */
  actions: planActionsSchema,
});
export type Plan = z.infer<typeof planSchema>;

export const planSummarySchema = planSchema.pick({
  id: true,
  version: true,
  courseId: true,
  planNumber: true,
  state: true,
  authorName: true,
  submittedAt: true,
  countersignedAt: true,
  createdAt: true,
  updatedAt: true,
});
export type PlanSummary = z.infer<typeof planSummarySchema>;
/** GET /api/courses/:courseId/plans — newest first. */
export const planListSchema = z.object({ items: z.array(planSummarySchema) });
export type PlanList = z.infer<typeof planListSchema>;

/** One difference between a plan and the course's last countersigned plan. */
export const planChangeSchema = z.object({
  area: z.enum(['inputs', 'model', 'regimen', 'sampling', 'target']),
  field: z.string(),
  before: z.string().nullable(),
  after: z.string().nullable(),
});
export type PlanChange = z.infer<typeof planChangeSchema>;
/** GET /api/plans/:id/changes */
export const planChangesSchema = z.object({
  comparedWith: planSummarySchema.nullable(),
  changes: z.array(planChangeSchema),
});
export type PlanChanges = z.infer<typeof planChangesSchema>;

/** GET /api/signing/status — whether the caller may sign now without re-entering credentials. */
export const signingStatusSchema = z.object({
  fresh: z.boolean(),
  authenticatedAt: isoDateTimeSchema.nullable(),
  freshUntil: isoDateTimeSchema.nullable(),
  windowMinutes: z.number(),
  /** Where to send the browser to re-enter credentials (then back to `returnTo`). */
  reauthenticateUrl: z.string(),
});
export type SigningStatus = z.infer<typeof signingStatusSchema>;

/** GET /api/reviews — submitted plans, oldest first. */
export const reviewQueueQuerySchema = listQuerySchema(['submittedAt'] as const, 'submittedAt');
export type ReviewQueueQuery = z.infer<typeof reviewQueueQuerySchema>;
export const reviewQueueItemSchema = z.object({
  planId: z.uuid(),
  courseId: z.uuid(),
  planNumber: z.number().int(),
  drug: z.string(),
  ward: z.string().nullable(),
  patientName: z.string(),
  authorName: z.string(),
  authorUserId: z.uuid(),
  submittedAt: isoDateTimeSchema,
  waitingMinutes: z.number().int(),
  /** false when the caller wrote the plan: someone else must countersign it. */
  mayReview: z.boolean(),
});
export type ReviewQueueItem = z.infer<typeof reviewQueueItemSchema>;
export const reviewQueuePageSchema = pageSchema(reviewQueueItemSchema);
export type ReviewQueuePage = z.infer<typeof reviewQueuePageSchema>;
