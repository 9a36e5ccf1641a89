import { z } from 'zod';
import { exposureSchema } from './engine';
import { targetSchema } from './courses';
import { isoDateTimeSchema, warningSchema } from './pagination';

/**
 * Teaching cases: synthetic or anonymised cases in relative time only ("Day 1 08:00", hours from
 * the first dose). None of the HIPAA Safe Harbor identifiers: no names, record numbers, dates
 * (only day numbers), places or contact details; ages over 89 are "90+".
 * The "true" patient behind a case stays on the server until a practice plan is scored.
 */

/** Deliberate flaws a case may hide; the trainee says which they caught. */
export const pitfallCodeSchema = z.enum([
  'early-trough',
  'level-during-infusion',
  'stale-weight',
  'unit-mix-up',
  'non-steady-state',
  'missed-dose',
]);
export type PitfallCode = z.infer<typeof pitfallCodeSchema>;
export const pitfallLabels: Record<PitfallCode, string> = {
  'early-trough': 'Trough drawn too early',
  'level-during-infusion': 'Level drawn during the infusion',
  'stale-weight': 'Weight out of date',
  'unit-mix-up': 'Unit mix-up',
  'non-steady-state': 'Level read as steady state too early',
  'missed-dose': 'A dose was not given as charted',
};

/** Relative clinical time: hours from the first dose, and how it reads ("Day 2 08:00"). */
export const relativeTimeSchema = z.object({ hour: z.number(), label: z.string() });

export const teachingCaseSummarySchema = z.object({
  id: z.uuid(),
  title: z.string(),
  summary: z.string(),
  drug: z.string(),
  /** e.g. "58", or "90+" */
  age: z.string(),
  sex: z.enum(['female', 'male']),
  origin: z.enum(['synthetic', 'anonymised-copy']),
  doseCount: z.number().int(),
  levelCount: z.number().int(),
  /** The caller's attempts so far and their best score (0–100). */
  attempts: z.number().int(),
  bestScore: z.number().nullable(),
});
export type TeachingCaseSummary = z.infer<typeof teachingCaseSummarySchema>;
export const teachingCaseListSchema = z.object({ items: z.array(teachingCaseSummarySchema) });
export type TeachingCaseList = z.infer<typeof teachingCaseListSchema>;

export const teachingCaseSchema = teachingCaseSummarySchema.extend({
  courseId: z.uuid(),
  patientId: z.uuid(),
  indication: z.string(),
  micMgL: z.number().nullable(),
  target: targetSchema,
  model: z.object({
    id: z.string(),
    version: z.number().int(),
    name: z.string(),
    /** How the model can give doses: the practice plan offers only these. */
    routes: z.array(z.enum(['iv-infusion', 'iv-bolus', 'oral', 'im'])),
  }),
  /** Clock hour of the first dose, so hour 0 reads "Day 1 08:00". */
  firstDoseClockH: z.number(),
  covariates: z.array(
    z.object({
      id: z.uuid(),
      kind: z.string(),
      value: z.number().nullable(),
      unit: z.string().nullable(),
      detail: z.string().nullable(),
      time: relativeTimeSchema,
    }),
  ),
  doses: z.array(
    z.object({
      id: z.uuid(),
      amountMg: z.number(),
      route: z.string(),
      durationH: z.number().nullable(),
      status: z.string(),
      time: relativeTimeSchema,
    }),
  ),
  levels: z.array(
    z.object({
      id: z.uuid(),
      value: z.number(),
      unit: z.string(),
      valueMgL: z.number(),
      sampleKind: z.string(),
      time: relativeTimeSchema,
    }),
  ),
  caution: z.string(),
});
export type TeachingCase = z.infer<typeof teachingCaseSchema>;

export const teachingCaseParamsSchema = z.object({ id: z.uuid() });

/** POST /api/teaching/cases/:id/practice-plans — never enters the real sign-off queue. */
export const practicePlanCreateSchema = z
  .object({
    regimen: z
      .object({
        doseMg: z.number().positive().max(10_000),
        intervalH: z.number().positive().max(168),
        infusionH: z.number().min(0).max(48),
        /** How it is given; default: an IV infusion, or an IV bolus when infusionH is 0. */
        route: z.enum(['iv-infusion', 'iv-bolus', 'oral', 'im']).optional(),
        loadingDoseMg: z.number().positive().max(10_000).nullable().optional(),
        /** First dose of the regimen, hours from the case's first dose. */
        startHour: z
          .number()
          .min(0)
          .max(24 * 60),
      })
      .strict(),
    /** Levels the trainee chose to leave out of the fit. */
    excludeLevelIds: z.array(z.uuid()).max(50).default([]),
    pitfallsFlagged: z.array(pitfallCodeSchema).max(10).default([]),
    rationale: z.string().trim().max(4000).default(''),
  })
  .strict();
export type PracticePlanCreate = z.infer<typeof practicePlanCreateSchema>;

export const practiceScoreSchema = z.object({
  /** What the trainee's fit predicts for their regimen. */
  predicted: exposureSchema,
  /** What the hidden true patient would have. */
  truth: exposureSchema,
  trueParameters: z.record(z.string(), z.number()),
  estimatedParameters: z.record(z.string(), z.number()),
  /** (predicted − true) / true × 100 for AUC24. */
  auc24ErrorPercent: z.number().nullable(),
  /** Whether the regimen meets the course target in the true patient. */
  targetMet: z.boolean().nullable(),
  pitfalls: z.array(
    z.object({
      code: pitfallCodeSchema,
      label: z.string(),
      description: z.string(),
      caught: z.boolean(),
    }),
  ),
  /** Pitfalls flagged that the case does not have. */
  falseAlarms: z.array(pitfallCodeSchema),
  /** 0–100: target attainment 40, prediction accuracy 30, pitfalls 30. */
  points: z.number(),
  feedback: z.array(z.string()),
});
export type PracticeScore = z.infer<typeof practiceScoreSchema>;

export const practicePlanSchema = z.object({
  id: z.uuid(),
  caseId: z.uuid(),
  createdAt: isoDateTimeSchema,
  regimen: practicePlanCreateSchema.shape.regimen,
  pitfallsFlagged: z.array(pitfallCodeSchema),
  rationale: z.string(),
  warnings: z.array(warningSchema),
  score: practiceScoreSchema,
  caution: z.string(),
});
export type PracticePlan = z.infer<typeof practicePlanSchema>;
export const practicePlanListSchema = z.object({ items: z.array(practicePlanSchema) });
export type PracticePlanList = z.infer<typeof practicePlanListSchema>;

/** POST /api/teaching/cases (admin): an anonymising copy of a real course. */
export const anonymisedCopySchema = z
  .object({
    courseId: z.uuid(),
    title: z.string().trim().min(3).max(120),
    summary: z.string().trim().max(1000).default(''),
    /** Replaces the free-text indication, which may name people or places. */
    indication: z.string().trim().min(1).max(200).default('not stated'),
  })
  .strict();
export type AnonymisedCopy = z.infer<typeof anonymisedCopySchema>;

/** GET /api/teaching/sources (admin): real courses that can be copied, without identifiers. */
export const teachingSourceSchema = z.object({
  courseId: z.uuid(),
  drug: z.string(),
  startedYear: z.number().int().nullable(),
  doseCount: z.number().int(),
  levelCount: z.number().int(),
});
export const teachingSourceListSchema = z.object({ items: z.array(teachingSourceSchema) });
export type TeachingSourceList = z.infer<typeof teachingSourceListSchema>;
