import type {
  Dose,
  DoseCreate,
  DoseListQuery,
  DoseUpdate,
  Page,
  RowSource,
} from '@ebbtide/contracts';
import { recordAudit } from '../../data-access/audit';
import { databaseErrorKind, inTransaction, type Conn } from '../../data-access/casework-db';
import {
  deleteDose,
  dosesOfCourse,
  findDose,
  insertDoses,
  listDoses,
  updateDose,
  type DoseColumns,
  type DoseRecord,
} from '../../data-access/doses-repo';
import { notFound } from '../../lib/app-error';
import { courseStart, requireCourse, type CourseContext } from '../courses/courses';
import {
  assertMayWrite,
  auditActor,
  invalid,
  staleVersion,
  type CaseworkActor,
} from '../patients/common';
import { checkDose, doseEcho, type CheckedDose, type DoseCheck, type DoseInput } from './checks';
import type { ClinicalTime } from './timing';

export function toDoseDto(d: DoseRecord): Dose {
  const endAt =
    d.startAt && d.durationH !== null
      ? new Date(Date.parse(d.startAt) + d.durationH * 3_600_000).toISOString()
      : null;
  const endHour = d.startHour !== null && d.durationH !== null ? d.startHour + d.durationH : null;
  return {
    id: d.id,
    version: d.version,
    courseId: d.courseId,
    amount: d.amount,
    unit: d.unit,
    amountMg: d.amountMg,
    echo: doseEcho(d.amount, d.unit),
    route: d.route,
    startAt: d.startAt,
    startHour: d.startHour,
    durationH: d.durationH,
    endAt,
    endHour,
    administrationStatus: d.administrationStatus,
    note: d.note,
    source: d.source,
    createdAt: d.createdAt,
    updatedAt: d.updatedAt,
  };
}

export const doseTime = (d: {
  startAt: string | null;
  startHour: number | null;
}): ClinicalTime => ({
  at: d.startAt,
  hour: d.startHour,
});

export function doseColumns(
  ctx: CourseContext,
  d: CheckedDose,
  source: RowSource,
  userId: string | null,
): DoseColumns {
  return {
    course_id: ctx.course.id,
    is_teaching: ctx.course.isTeaching,
    amount: d.amount,
    unit: d.unit,
    amount_mg: d.amountMg,
    route: d.route,
    start_at: d.start.at,
    start_hour: d.start.hour,
    duration_h: d.durationH,
    administration_status: d.administrationStatus,
    note: d.note,
    source,
    created_by: userId,
  };
}

/** Checks a batch of doses against the course and each other (used by typed entry and imports). */
export function checkDoseBatch(
  ctx: CourseContext,
  existing: DoseRecord[],
  inputs: DoseInput[],
  now: Date,
) {
  const starts: ClinicalTime[] = existing.map(doseTime);
  const routes = ctx.model.definition.routes;
  const absorbedCovered = !Array.isArray(routes) || routes.includes('oral');
  return inputs.map((input): DoseCheck => {
    // An oral or IM dose on a course whose model has no absorption (vancomycin IV, the
    // aminoglycosides) cannot be simulated and does not reach the blood as modelled: refuse it.
    if ((input.route === 'oral' || input.route === 'im') && !absorbedCovered)
      return {
        ok: false,
        errors: {
          route: [
            `${ctx.model.name} models IV doses only: an ${input.route === 'oral' ? 'oral' : 'IM'} dose cannot be part of this course`,
          ],
        },
      };
    const result = checkDose(input, {
      isTeaching: ctx.course.isTeaching,
      drug: ctx.course.drug,
      plausibleMg: ctx.model.plausibleSingleDoseMg,
      courseStart: courseStart(ctx.course),
      now,
      existingStarts: starts,
    });
    if (result.ok) starts.push(result.dose.start);
    return result;
  });
}

function mapDbError(error: unknown): never {
  if (databaseErrorKind(error)?.kind === 'unique') {
    throw invalid({
      startAt: ['a dose at this time is already recorded on this course (duplicate)'],
    });
  }
  const check = databaseErrorKind(error);
  if (check?.kind === 'check') {
    throw invalid({
      _: [`the value was refused by the database's plausibility rule ${check.constraint}`],
    });
  }
  throw error;
}

export async function createDose(
  db: Conn,
  actor: CaseworkActor,
  courseId: string,
  input: DoseCreate,
  now = new Date(),
): Promise<Dose> {
  const ctx = await requireCourse(db, actor, courseId);
  assertMayWrite(actor, ctx.course.isTeaching);
  const [check] = checkDoseBatch(ctx, await dosesOfCourse(db, courseId), [input], now);
  if (!check?.ok) throw invalid(check?.errors ?? {});
  try {
    return await inTransaction(db, async (trx) => {
      const [created] = await insertDoses(trx, [
        doseColumns(ctx, check.dose, 'typed', actor.userId),
      ]);
      const dose = created as DoseRecord;
      await recordAudit(trx, {
        actor: auditActor(actor),
        action: 'dose.create',
        entityType: 'dose',
        entityId: dose.id,
        after: dose,
        context: { courseId },
      });
      return toDoseDto(dose);
    });
  } catch (error) {
    mapDbError(error);
  }
}

export async function browseDoses(
  db: Conn,
  actor: CaseworkActor,
  courseId: string,
  query: DoseListQuery,
): Promise<Page<Dose>> {
  await requireCourse(db, actor, courseId);
  const { items, total } = await listDoses(db, courseId, query);
  return { items: items.map(toDoseDto), page: query.page, pageSize: query.pageSize, total };
}

async function requireDose(db: Conn, actor: CaseworkActor, id: string) {
  const dose = await findDose(db, id);
  if (!dose) throw notFound('Dose');
  const ctx = await requireCourse(db, actor, dose.courseId).catch(() => {
    throw notFound('Dose');
  });
  return { dose, ctx };
}

export async function getDose(db: Conn, actor: CaseworkActor, id: string): Promise<Dose> {
  return toDoseDto((await requireDose(db, actor, id)).dose);
}

export async function editDose(
  db: Conn,
  actor: CaseworkActor,
  id: string,
  input: DoseUpdate,
  now = new Date(),
): Promise<Dose> {
  const { dose: before, ctx } = await requireDose(db, actor, id);
  assertMayWrite(actor, ctx.course.isTeaching);
  const { version, ...changes } = input;
  const timingChanged = changes.startAt !== undefined || changes.startHour !== undefined;
  const durationGiven =
    changes.infusionMinutes !== undefined ||
    changes.endAt !== undefined ||
    changes.endHour !== undefined;
  const route = changes.route ?? before.route;
  const merged: DoseInput = {
    amount: changes.amount ?? before.amount,
    unit: changes.unit ?? before.unit,
    route,
    startAt: timingChanged ? changes.startAt : (before.startAt ?? undefined),
    startHour: timingChanged ? changes.startHour : (before.startHour ?? undefined),
    infusionMinutes: durationGiven
      ? changes.infusionMinutes
      : route === 'iv-infusion' && before.durationH !== null
        ? before.durationH * 60
        : undefined,
    endAt: changes.endAt,
    endHour: changes.endHour,
    administrationStatus: changes.administrationStatus ?? before.administrationStatus,
    note: changes.note ?? before.note ?? undefined,
  };
  const others = (await dosesOfCourse(db, ctx.course.id)).filter((d) => d.id !== id);
  const [check] = checkDoseBatch(ctx, others, [merged], now);
  if (!check?.ok) throw invalid(check?.errors ?? {});
  try {
    return await inTransaction(db, async (trx) => {
      const {
        created_by: _createdBy,
        source: _source,
        ...columns
      } = doseColumns(ctx, check.dose, before.source, actor.userId);
      const result = await updateDose(trx, id, version, columns);
      if (result.outcome === 'missing') throw notFound('Dose');
      if (result.outcome === 'stale')
        throw staleVersion('dose', version, toDoseDto(result.current), input);
      await recordAudit(trx, {
        actor: auditActor(actor),
        action: 'dose.update',
        entityType: 'dose',
        entityId: id,
        before,
        after: result.row,
        context: { courseId: ctx.course.id },
      });
      return toDoseDto(result.row);
    });
  } catch (error) {
    mapDbError(error);
  }
}

export async function removeDose(
  db: Conn,
  actor: CaseworkActor,
  id: string,
  version: number,
): Promise<void> {
  const { dose, ctx } = await requireDose(db, actor, id);
  assertMayWrite(actor, ctx.course.isTeaching);
  await inTransaction(db, async (trx) => {
    const deleted = await deleteDose(trx, id, version);
    if (!deleted) throw staleVersion('dose', version, toDoseDto(dose), { version });
    await recordAudit(trx, {
      actor: auditActor(actor),
      action: 'dose.delete',
      entityType: 'dose',
      entityId: id,
      before: deleted,
      context: { courseId: ctx.course.id },
    });
  });
}
