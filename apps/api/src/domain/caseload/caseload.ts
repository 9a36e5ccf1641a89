import type { CaseloadItem, CaseloadQuery, DueItem, Page } from '@ebbtide/contracts';
import { latestPlansOf } from '../../data-access/caseload-repo';
import type { Conn } from '../../data-access/casework-db';
import { activeCourses } from '../../data-access/courses-repo';
import { covariatesOfPatient } from '../../data-access/covariates-repo';
import { dosesOfCourse } from '../../data-access/doses-repo';
import { levelsOfCourse } from '../../data-access/levels-repo';
import { findPatient } from '../../data-access/patients-repo';
import { renalStabilityWarnings, STALE_WEIGHT_DAYS } from '../covariates/derived';
import { toDoseDto } from '../doses/doses';
import { levelEcho } from '../levels/checks';
import type { CaseworkActor } from '../patients/common';
import { toPatientDto } from '../patients/patients';

/** A repeat level is due this long after the last one (adults every 7–10 days, sooner if renal function changes: regional guideline [S37]). */
export const REPEAT_LEVEL_DAYS = 7;
/** Ranking of due items, most urgent first. */
const URGENCY: Record<DueItem['kind'], number> = {
  'plan-returned': 0,
  'level-overdue': 1,
  'renal-function-unstable': 2,
  'plan-awaiting-countersignature': 3,
  'plan-recheck-due': 4,
  'first-level-due': 5,
  'level-needs-review': 6,
  'level-due': 7,
  'no-recent-weight': 8,
};

/**
 * The caseload: active courses (the actor's own, or all they may see) with what is due now:
 * levels to draw, levels to review, renal function changes, stale weights and plans awaiting
 * countersignature, returned, or past their re-check time.
 */
export async function caseloadOf(
  db: Conn,
  actor: CaseworkActor,
  query: CaseloadQuery,
  now = new Date(),
): Promise<Page<CaseloadItem>> {
  const courses = await activeCourses(db, actor, query.scope === 'mine' ? actor.userId : null);
  const plans = await latestPlansOf(
    db,
    courses.map((c) => c.id),
  );
  const items: Array<CaseloadItem & { urgency: number; wardKey: string; patientKey: string }> = [];
  for (const course of courses) {
    const patientRecord = await findPatient(db, actor, course.patientId);
    if (!patientRecord) continue;
    const patient = toPatientDto(patientRecord, now);
    if (query.ward && patient.ward !== query.ward) continue;
    const doses = await dosesOfCourse(db, course.id);
    const levels = await levelsOfCourse(db, course.id);
    const covariates = await covariatesOfPatient(db, patient.id);
    const due: DueItem[] = [];
    const given = doses.filter((d) => d.administrationStatus !== 'missed');
    const lastDose = doses[doses.length - 1];
    const lastLevel = levels[levels.length - 1];
    const real = !course.isTeaching;
    if (levels.length === 0 && given.length > 0) {
      const prev = given[given.length - 2];
      const last = given[given.length - 1];
      const intervalH =
        real && prev?.startAt && last?.startAt
          ? (Date.parse(last.startAt) - Date.parse(prev.startAt)) / 3_600_000
          : null;
      const nextDose =
        real && last?.startAt && intervalH
          ? new Date(Date.parse(last.startAt) + intervalH * 3_600_000)
          : null;
      due.push({
        kind: 'first-level-due',
        message: nextDose
          ? `No level yet: draw a level before the next dose, due about ${nextDose.toISOString().slice(0, 16).replace('T', ' ')} UTC`
          : 'No level yet: plan the first level',
        dueAt: nextDose ? new Date(nextDose.getTime() - 30 * 60_000).toISOString() : null,
      });
    }
    if (real && lastLevel?.collectedAt) {
      const dueAt = new Date(Date.parse(lastLevel.collectedAt) + REPEAT_LEVEL_DAYS * 86_400_000);
      if (dueAt <= now)
        due.push({
          kind: 'level-overdue',
          message: `Last level was more than ${REPEAT_LEVEL_DAYS} days ago: a repeat level is due`,
          dueAt: dueAt.toISOString(),
        });
      else
        due.push({
          kind: 'level-due',
          message: `Repeat level by ${dueAt.toISOString().slice(0, 10)} (or sooner if renal function changes)`,
          dueAt: dueAt.toISOString(),
        });
    }
    for (const l of levels) {
      if (l.flags.includes('during-infusion') || l.flags.includes('post-dialysis')) {
        due.push({
          kind: 'level-needs-review',
          message: `A ${l.sampleKind} level (${levelEcho(l.value, l.unit, course.drug)}) is flagged ${l.flags.join(', ')}: check how it can be read`,
          dueAt: null,
        });
      }
    }
    for (const w of renalStabilityWarnings(covariates))
      due.push({ kind: 'renal-function-unstable', message: w.message, dueAt: null });
    const weights = covariates.filter((c) => c.kind === 'weight');
    const lastWeight = weights[weights.length - 1];
    if (!lastWeight)
      due.push({ kind: 'no-recent-weight', message: 'No weight recorded', dueAt: null });
    else if (
      real &&
      lastWeight.observedAt &&
      now.getTime() - Date.parse(lastWeight.observedAt) > STALE_WEIGHT_DAYS * 86_400_000
    ) {
      due.push({
        kind: 'no-recent-weight',
        message: `Last weight is more than ${STALE_WEIGHT_DAYS} days old`,
        dueAt: null,
      });
    }
    const plan = plans.get(course.id);
    if (plan?.state === 'submitted') {
      due.push({
        kind: 'plan-awaiting-countersignature',
        message: `Plan ${plan.planNumber} is awaiting countersignature`,
        dueAt: plan.submittedAt,
      });
    } else if (plan?.state === 'returned') {
      due.push({
        kind: 'plan-returned',
        message: `Plan ${plan.planNumber} was returned with comments`,
        dueAt: null,
      });
    } else if (
      plan?.state === 'countersigned' &&
      plan.recheckAt &&
      Date.parse(plan.recheckAt) <= now.getTime()
    ) {
      due.push({
        kind: 'plan-recheck-due',
        message: `Plan ${plan.planNumber} is past its re-check time`,
        dueAt: plan.recheckAt,
      });
    }
    due.sort((a, b) => URGENCY[a.kind] - URGENCY[b.kind]);
    const top = due.find((d) => d.kind !== 'level-due') ?? due[0];
    items.push({
      courseId: course.id,
      patient: {
        id: patient.id,
        displayName: patient.displayName,
        mrn: patient.mrn,
        ward: patient.ward,
        isTeaching: patient.isTeaching,
      },
      drug: course.drug,
      status: course.status,
      lastDose: lastDose
        ? {
            echo: toDoseDto(lastDose).echo,
            startAt: lastDose.startAt,
            startHour: lastDose.startHour,
          }
        : null,
      lastLevel: lastLevel
        ? {
            echo: levelEcho(lastLevel.value, lastLevel.unit, course.drug),
            valueMgL: lastLevel.valueMgL,
            sampleKind: lastLevel.sampleKind,
            collectedAt: lastLevel.collectedAt,
            collectedHour: lastLevel.collectedHour,
          }
        : null,
      due,
      nextAction: top?.message ?? 'Nothing due: review when the next level returns',
      urgency: top ? URGENCY[top.kind] : 99,
      wardKey: patient.ward ?? '',
      patientKey: patient.displayName,
    });
  }
  const dir = query.order === 'desc' ? -1 : 1;
  const key = (i: (typeof items)[number]): string | number =>
    query.sort === 'due'
      ? i.urgency
      : query.sort === 'ward'
        ? i.wardKey
        : query.sort === 'drug'
          ? i.drug
          : i.patientKey;
  items.sort((a, b) => {
    const ka = key(a);
    const kb = key(b);
    return (ka < kb ? -1 : ka > kb ? 1 : a.patientKey.localeCompare(b.patientKey)) * dir;
  });
  const start = (query.page - 1) * query.pageSize;
  return {
    items: items
      .slice(start, start + query.pageSize)
      .map(({ urgency: _u, wardKey: _w, patientKey: _p, ...item }) => item),
    page: query.page,
    pageSize: query.pageSize,
    total: items.length,
  };
}
