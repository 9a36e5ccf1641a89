import { randomBytes } from 'node:crypto';
import {
  pitfallLabels,
  type AnonymisedCopy,
  type PitfallCode,
  type PracticePlan,
  type PracticePlanCreate,
  type PracticeScore,
  type TeachingCase,
  type TeachingCaseSummary,
  type TeachingSourceList,
  type Warning,
} from '@ebbtide/contracts';
import type { PkParameters } from '@ebbtide/kinetics';
import { recordAudit } from '../../data-access/audit';
import { inTransaction, type Conn } from '../../data-access/casework-db';
import { covariatesOfPatient } from '../../data-access/covariates-repo';
import { dosesOfCourse } from '../../data-access/doses-repo';
import { levelsOfCourse } from '../../data-access/levels-repo';
import {
  attemptsByCase,
  copyableCourses,
  findTeachingCase,
  insertPracticePlan,
  insertTeachingCase,
  listTeachingCases,
  practicePlansOf,
  realCourseRows,
  type PracticePlanRecord,
  type TeachingCaseRecord,
} from '../../data-access/teaching-repo';
import { AppError, notFound } from '../../lib/app-error';
import { requireCourse } from '../courses/courses';
import { meetsTarget } from '../plans/engine-basis';
import { CLINICAL_CAUTION } from '../plans/caution';
import { engineInputs, exposureOver, fitFrom, regimenDoses } from '../plans/library-engine';
import { auditActor, type CaseworkActor } from '../patients/common';

const HOUR_MS = 3_600_000;

/** The regimen routes a model's engine routes allow (absorbed covers oral and IM). */
function practiceRoutesOf(routes: unknown): Array<'iv-infusion' | 'iv-bolus' | 'oral' | 'im'> {
  const r = Array.isArray(routes) ? routes : ['infusion', 'bolus', 'oral'];
  return [
    ...(r.includes('infusion') ? (['iv-infusion'] as const) : []),
    ...(r.includes('bolus') ? (['iv-bolus'] as const) : []),
    ...(r.includes('oral') ? (['oral', 'im'] as const) : []),
  ];
}

/** "Day 2 08:00": hour 0 is the first dose, which fell at `clockH` on day 1. */
export function relativeLabel(hour: number, clockH: number): string {
  const minutes = Math.round((hour + clockH) * 60);
  const day = Math.floor(minutes / 1440) + 1;
  const m = ((minutes % 1440) + 1440) % 1440;
  return `Day ${day} ${String(Math.floor(m / 60)).padStart(2, '0')}:${String(m % 60).padStart(2, '0')}`;
}

export const ageText = (years: number) => (years >= 90 ? '90+' : String(years));

function summaryOf(
  c: TeachingCaseRecord,
  attempts?: { attempts: number; best: number | null },
): TeachingCaseSummary {
  return {
    id: c.id,
    title: c.title,
    summary: c.summary,
    drug: c.drug,
    age: ageText(c.ageYears),
    sex: c.sex,
    origin: c.origin,
    doseCount: c.doseCount,
    levelCount: c.levelCount,
    attempts: attempts?.attempts ?? 0,
    bestScore: attempts?.best ?? null,
  };
}

export async function browseTeachingCases(
  db: Conn,
  actor: CaseworkActor,
): Promise<TeachingCaseSummary[]> {
  const [cases, attempts] = await Promise.all([
    listTeachingCases(db),
    attemptsByCase(db, actor.userId),
  ]);
  return cases.map((c) => summaryOf(c, attempts.get(c.id)));
}

async function requireCase(db: Conn, id: string): Promise<TeachingCaseRecord> {
  const c = await findTeachingCase(db, id);
  if (!c) throw notFound('Teaching case');
  return c;
}

/** A case as a trainee sees it: relative times, no identifiers, never the hidden true patient. */
export async function getTeachingCase(
  db: Conn,
  actor: CaseworkActor,
  id: string,
): Promise<TeachingCase> {
  const c = await requireCase(db, id);
  const ctx = await requireCourse(db, actor, c.courseId);
  const [covariates, doses, levels, attempts] = await Promise.all([
    covariatesOfPatient(db, c.patientId),
    dosesOfCourse(db, c.courseId),
    levelsOfCourse(db, c.courseId),
    attemptsByCase(db, actor.userId),
  ]);
  const t = (hour: number | null) => ({
    hour: hour ?? 0,
    label: relativeLabel(hour ?? 0, c.firstDoseClockH),
  });
  return {
    ...summaryOf(c, attempts.get(c.id)),
    courseId: c.courseId,
    patientId: c.patientId,
    indication: ctx.course.indication,
    micMgL: ctx.course.micMgL,
    target: ctx.course.target,
    model: {
      id: ctx.model.id,
      version: ctx.model.version,
      name: ctx.model.name,
      routes: practiceRoutesOf(ctx.model.definition.routes),
    },
    firstDoseClockH: c.firstDoseClockH,
    covariates: covariates.map((cv) => ({
      id: cv.id,
      kind: cv.kind,
      value: cv.value,
      unit: cv.unit,
      detail: cv.weightSource ?? cv.dialysisStatus ?? null,
      time: t(cv.observedHour),
    })),
    doses: doses.map((d) => ({
      id: d.id,
      amountMg: d.amountMg,
      route: d.route,
      durationH: d.durationH,
      status: d.administrationStatus,
      time: t(d.startHour),
    })),
    levels: levels.map((l) => ({
      id: l.id,
      value: l.value,
      unit: l.unit,
      valueMgL: l.valueMgL,
      sampleKind: l.sampleKind,
      time: t(l.collectedHour),
    })),
    caution: CLINICAL_CAUTION,
  };
}

const round = (x: number | null, digits = 1) => (x === null ? null : Number(x.toFixed(digits)));

function toPracticeDto(p: PracticePlanRecord): PracticePlan {
  return {
    id: p.id,
    caseId: p.caseId,
    createdAt: p.createdAt,
    regimen: p.regimen as PracticePlan['regimen'],
    pitfallsFlagged: p.pitfallsFlagged as PitfallCode[],
    rationale: p.rationale,
    warnings: ((p.basis.warnings as Warning[] | undefined) ?? []).slice(0, 20),
    score: p.score as unknown as PracticeScore,
    caution: CLINICAL_CAUTION,
  };
}

/**
 * Scores a practice plan against the case's hidden true patient: the trainee's own fit (with the
 * levels they chose to leave out) predicts the regimen's exposure; the true parameters give the
 * real one, over the same last dosing interval at (near) steady state. Never reaches the sign-off
 * queue: practice plans live in their own table.
 */
export async function submitPracticePlan(
  db: Conn,
  actor: CaseworkActor,
  caseId: string,
  input: PracticePlanCreate,
): Promise<PracticePlan> {
  const c = await requireCase(db, caseId);
  const inputs = await engineInputs(db, actor, c.courseId);
  const known = new Set(inputs.levelRecords.map((l) => l.id));
  const unknown = input.excludeLevelIds.filter((id) => !known.has(id));
  if (unknown.length) {
    throw new AppError('validation-failed', 'Some fields are not valid', 400, {
      fieldErrors: { excludeLevelIds: [`not levels of this case: ${unknown.join(', ')}`] },
    });
  }
  const remaining = inputs.levels.filter((l) => !input.excludeLevelIds.includes(l.id));
  const fit = fitFrom(inputs, {
    method: remaining.length > 0 ? 'map' : 'population',
    excludeLevelIds: input.excludeLevelIds,
  });
  const r = input.regimen;
  const count = Math.max(4, Math.ceil(96 / r.intervalH));
  const planned = regimenDoses(inputs, {
    doseMg: r.doseMg,
    intervalH: r.intervalH,
    infusionH: r.infusionH,
    route: r.route ?? (r.infusionH > 0 ? 'iv-infusion' : 'iv-bolus'),
    count,
    loadingDoseMg: r.loadingDoseMg ?? null,
    startHour: r.startHour,
  });
  const doses = [...inputs.doses, ...planned].sort((a, b) => a.time - b.time);
  const last = planned.at(-1)!;
  const window = { from: last.time, to: last.time + r.intervalH };
  let predicted;
  let truth;
  try {
    predicted = exposureOver(
      inputs.structure,
      fit.parameters as unknown as PkParameters,
      doses,
      window,
    ).exposure;
    truth = exposureOver(
      c.trueParameters.structure,
      c.trueParameters.parameters as unknown as PkParameters,
      doses,
      window,
    ).exposure;
  } catch (error) {
    throw new AppError(
      'engine-input',
      error instanceof Error ? error.message : 'The regimen could not be simulated',
      422,
    );
  }
  const target = inputs.ctx.course.target;
  const targetMet = meetsTarget(target, truth, inputs.ctx.course.micMgL);
  const err =
    predicted.auc24 !== null && truth.auc24
      ? ((predicted.auc24 - truth.auc24) / truth.auc24) * 100
      : null;
  const flagged = new Set(input.pitfallsFlagged);
  const pitfalls = c.pitfalls.map((p) => ({
    code: p.code as PitfallCode,
    label: pitfallLabels[p.code as PitfallCode] ?? p.code,
    description: p.description,
    caught:
      flagged.has(p.code as PitfallCode) ||
      (p.levelId !== undefined && input.excludeLevelIds.includes(p.levelId)),
  }));
  const falseAlarms = input.pitfallsFlagged.filter((f) => !c.pitfalls.some((p) => p.code === f));
  const targetPoints = targetMet ? 40 : 0;
  const accuracyPoints = err === null ? 0 : 30 * Math.max(0, 1 - Math.abs(err) / 50);
  const pitfallPoints =
    pitfalls.length === 0
      ? Math.max(0, 30 - 10 * falseAlarms.length)
      : Math.max(
          0,
          (30 * pitfalls.filter((p) => p.caught).length) / pitfalls.length - 5 * falseAlarms.length,
        );
  const feedback: string[] = [];
  feedback.push(
    targetMet
      ? 'The regimen reaches the target in the true patient.'
      : `The regimen misses the target in the true patient (true AUC24 ${round(truth.auc24, 0)} mg·h/L).`,
  );
  if (err !== null) {
    feedback.push(
      `Your fit predicted AUC24 ${round(predicted.auc24, 0)} mg·h/L against a true ${round(truth.auc24, 0)} (${err > 0 ? '+' : ''}${round(err, 0)}%).`,
    );
  }
  for (const p of pitfalls) {
    feedback.push(`${p.caught ? 'Caught' : 'Missed'}: ${p.label}. ${p.description}`);
  }
  for (const f of falseAlarms) feedback.push(`Flagged but not present: ${pitfallLabels[f]}.`);
  const score: PracticeScore = {
    predicted: {
      peakMgL: round(predicted.peakMgL),
      troughMgL: round(predicted.troughMgL),
      auc24: round(predicted.auc24, 0),
    },
    truth: {
      peakMgL: round(truth.peakMgL),
      troughMgL: round(truth.troughMgL),
      auc24: round(truth.auc24, 0),
    },
    trueParameters: c.trueParameters.parameters,
    estimatedParameters: fit.parameters,
    auc24ErrorPercent: round(err),
    targetMet,
    pitfalls,
    falseAlarms,
    points: Math.round(targetPoints + accuracyPoints + pitfallPoints),
    feedback,
  };
  return inTransaction(db, async (trx) => {
    const saved = await insertPracticePlan(trx, {
      caseId,
      userId: actor.userId,
      regimen: r,
      pitfallsFlagged: input.pitfallsFlagged,
      rationale: input.rationale,
      basis: {
        method: fit.method,
        parameters: fit.parameters,
        excludedLevelIds: input.excludeLevelIds,
        warnings: fit.warnings,
      },
      score: score as unknown as Record<string, unknown>,
    });
    await recordAudit(trx, {
      actor: auditActor(actor),
      action: 'practice-plan.create',
      entityType: 'practice-plan',
      entityId: saved.id,
      after: { caseId, regimen: r, points: score.points },
      context: { teachingCaseId: caseId, courseId: c.courseId, patientId: c.patientId },
    });
    return toPracticeDto(saved);
  });
}

export async function listPracticePlans(
  db: Conn,
  actor: CaseworkActor,
  caseId: string,
): Promise<PracticePlan[]> {
  await requireCase(db, caseId);
  return (await practicePlansOf(db, caseId, actor.userId)).map(toPracticeDto);
}

export async function teachingSources(db: Conn): Promise<TeachingSourceList> {
  return { items: await copyableCourses(db) };
}

const num = (v: unknown) => (v === null || v === undefined ? null : Number(v));

/** Whole years between two dates, by calendar. */
function yearsBetween(birth: Date, on: Date): number {
  let years = on.getUTCFullYear() - birth.getUTCFullYear();
  const m = on.getUTCMonth() - birth.getUTCMonth();
  if (m < 0 || (m === 0 && on.getUTCDate() < birth.getUTCDate())) years -= 1;
  return years;
}

/**
 * The anonymising copy (admin): a real course becomes a teaching case with none of the HIPAA Safe
 * Harbor identifiers. Dropped: name, MRN, birth date, ward, every free-text note and the
 * indication (replaced by the admin's text). Times become hours from the first dose; only the
 * clock hour of that dose is kept (no date element). Age at the first dose, over 89 as 90.
 * Weight and height are rounded to whole units. The label is random, not derived from the patient.
 * The hidden "true" patient is the Bayesian estimate of the copied data.
 */
export async function anonymisingCopy(
  db: Conn,
  actor: CaseworkActor,
  input: AnonymisedCopy,
  timeZone: string,
): Promise<TeachingCaseSummary> {
  const rows = await realCourseRows(db, input.courseId);
  if (!rows) throw notFound('Course');
  const { course, patient, covariates, doses, levels } = rows;
  const times = doses
    .filter((d) => d.administration_status !== 'missed')
    .map((d) => new Date(d.start_at as Date).getTime())
    .sort((a, b) => a - b);
  if (times.length === 0) {
    throw new AppError('no-doses', 'A course without doses cannot become a teaching case', 422);
  }
  const origin = times[0]!;
  const hour = (d: unknown) =>
    Number(((new Date(d as Date).getTime() - origin) / HOUR_MS).toFixed(3));
  const clock = Number(
    new Intl.DateTimeFormat('en-GB', { timeZone, hour: '2-digit', hourCycle: 'h23' }).format(
      new Date(origin),
    ),
  );
  const age = Math.min(90, yearsBetween(new Date(patient.birth_date as Date), new Date(origin)));
  const rounded = (kind: unknown, v: number | null) =>
    v === null ? null : kind === 'weight' || kind === 'height' ? Math.round(v) : v;
  const label = `Copied case ${randomBytes(3).toString('hex').toUpperCase()}`;
  return inTransaction(db, async (trx) => {
    const id = await insertTeachingCase(trx, {
      label,
      ageYears: age,
      sex: patient.sex as 'female' | 'male',
      drug: course.drug as string,
      modelId: course.model_id as string,
      modelVersion: course.model_version as number,
      indication: input.indication,
      micMgL: num(course.mic_mg_l),
      micMethod: (course.mic_method as string | null) ?? null,
      target: {
        metric: course.target_metric as string,
        low: num(course.target_low),
        high: num(course.target_high),
      },
      covariates: covariates
        .filter((cv) => cv.observed_at)
        .map((cv) => ({
          kind: cv.kind as string,
          value: rounded(cv.kind, num(cv.value)),
          unit: (cv.unit as string | null) ?? null,
          canonicalValue: rounded(cv.kind, num(cv.canonical_value)),
          weightSource: (cv.weight_source as string | null) ?? null,
          dialysisStatus: (cv.dialysis_status as string | null) ?? null,
          hour: hour(cv.observed_at),
        })),
      doses: doses.map((d) => ({
        amountMg: Number(d.amount_mg),
        route: d.route as string,
        durationH: num(d.duration_h),
        status: d.administration_status as string,
        hour: hour(d.start_at),
      })),
      levels: levels.map((l) => ({
        value: Number(l.value),
        unit: l.unit as string,
        valueMgL: Number(l.value_mg_l),
        sampleKind: l.sample_kind as string,
        hour: hour(l.collected_at),
      })),
      title: input.title,
      summary: input.summary,
      firstDoseClockH: clock,
      pitfalls: [],
      trueParameters: { structure: { compartments: 1, elimination: 'linear' }, parameters: {} },
      origin: 'anonymised-copy',
      createdBy: actor.userId,
    });
    const copy = (await findTeachingCase(trx, id))!;
    // The reference patient: the Bayesian estimate (or population values) of the copied data.
    const inputs = await engineInputs(trx, { ...actor, role: 'trainee' }, copy.courseId);
    const fit = fitFrom(inputs, {
      method: inputs.levels.length > 0 ? 'map' : 'population',
      excludeLevelIds: [],
    });
    await trx('teaching_cases')
      .where({ id })
      .update({
        true_parameters: JSON.stringify({
          structure: inputs.structure,
          parameters: fit.parameters,
        }),
      });
    await recordAudit(trx, {
      actor: auditActor(actor),
      action: 'teaching-case.anonymised-copy',
      entityType: 'teaching-case',
      entityId: id,
      after: { title: input.title, doses: doses.length, levels: levels.length },
      context: { sourceCourseId: input.courseId, courseId: copy.courseId },
    });
    return summaryOf((await findTeachingCase(trx, id))!);
  });
}
