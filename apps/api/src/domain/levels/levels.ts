import type {
  Level,
  LevelCreate,
  LevelListQuery,
  LevelUpdate,
  Page,
  RowSource,
} from '@ebbtide/contracts';
import { recordAudit } from '../../data-access/audit';
import { databaseErrorKind, inTransaction, type Conn } from '../../data-access/casework-db';
import type { DoseRecord } from '../../data-access/doses-repo';
import { dosesOfCourse } from '../../data-access/doses-repo';
import {
  deleteLevel,
  findLevel,
  insertLevels,
  levelsOfCourse,
  listLevels,
  updateLevel,
  type LevelColumns,
  type LevelRecord,
} from '../../data-access/levels-repo';
import { notFound } from '../../lib/app-error';
import { courseStart, requireCourse, type CourseContext } from '../courses/courses';
import { doseTime } from '../doses/doses';
import {
  assertMayWrite,
  auditActor,
  invalid,
  staleVersion,
  type CaseworkActor,
} from '../patients/common';
import {
  checkLevel,
  levelEcho,
  type CheckedLevel,
  type InfusionSpan,
  type LevelInput,
} from './checks';

export function toLevelDto(l: LevelRecord, drug: CourseContext['course']['drug']): Level {
  return {
    id: l.id,
    version: l.version,
    courseId: l.courseId,
    value: l.value,
    unit: l.unit,
    valueMgL: l.valueMgL,
    echo: levelEcho(l.value, l.unit, drug),
    collectedAt: l.collectedAt,
    collectedHour: l.collectedHour,
    sampleKind: l.sampleKind,
    fraction: l.fraction,
    assayLowerLimit: l.assayLowerLimit,
    loincCode: l.loincCode,
    flags: l.flags,
    note: l.note,
    source: l.source,
    createdAt: l.createdAt,
    updatedAt: l.updatedAt,
  };
}

export function infusionsOf(
  doses: Array<
    Pick<DoseRecord, 'route' | 'durationH' | 'administrationStatus' | 'startAt' | 'startHour'>
  >,
): InfusionSpan[] {
  return doses
    .filter(
      (d) =>
        d.route === 'iv-infusion' && d.durationH !== null && d.administrationStatus !== 'missed',
    )
    .map((d) => ({ start: doseTime(d), durationH: d.durationH as number }));
}

export function levelColumns(
  ctx: CourseContext,
  l: CheckedLevel,
  source: RowSource,
  userId: string | null,
): LevelColumns {
  return {
    course_id: ctx.course.id,
    is_teaching: ctx.course.isTeaching,
    value: l.value,
    unit: l.unit,
    value_mg_l: l.valueMgL,
    collected_at: l.collected.at,
    collected_hour: l.collected.hour,
    sample_kind: l.sampleKind,
    fraction: l.fraction,
    assay_lower_limit: l.assayLowerLimit,
    loinc_code: l.loincCode,
    flags: l.flags,
    note: l.note,
    source,
    created_by: userId,
  };
}

/** Checks a batch of levels against the course's infusions, existing levels and each other. */
export function checkLevelBatch(
  ctx: CourseContext,
  infusions: InfusionSpan[],
  existing: LevelRecord[],
  inputs: LevelInput[],
  now: Date,
) {
  const seen = existing.map((l) => ({
    time: { at: l.collectedAt, hour: l.collectedHour },
    fraction: l.fraction,
  }));
  return inputs.map((input) => {
    const result = checkLevel(input, {
      isTeaching: ctx.course.isTeaching,
      drug: ctx.course.drug,
      courseStart: courseStart(ctx.course),
      now,
      infusions,
      existing: seen,
    });
    if (result.ok) seen.push({ time: result.level.collected, fraction: result.level.fraction });
    return result;
  });
}

function mapDbError(error: unknown): never {
  if (databaseErrorKind(error)?.kind === 'unique') {
    throw invalid({
      collectedAt: [
        'a level collected at this time is already recorded on this course (duplicate)',
      ],
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

export async function createLevel(
  db: Conn,
  actor: CaseworkActor,
  courseId: string,
  input: LevelCreate,
  now = new Date(),
): Promise<Level> {
  const ctx = await requireCourse(db, actor, courseId);
  assertMayWrite(actor, ctx.course.isTeaching);
  const infusions = infusionsOf(await dosesOfCourse(db, courseId));
  const [check] = checkLevelBatch(ctx, infusions, await levelsOfCourse(db, courseId), [input], now);
  if (!check?.ok) throw invalid(check?.errors ?? {});
  try {
    return await inTransaction(db, async (trx) => {
      const [created] = await insertLevels(trx, [
        levelColumns(ctx, check.level, 'typed', actor.userId),
      ]);
      const level = created as LevelRecord;
      await recordAudit(trx, {
        actor: auditActor(actor),
        action: 'level.create',
        entityType: 'level',
        entityId: level.id,
        after: level,
        context: { courseId },
      });
      return toLevelDto(level, ctx.course.drug);
    });
  } catch (error) {
    mapDbError(error);
  }
}

export async function browseLevels(
  db: Conn,
  actor: CaseworkActor,
  courseId: string,
  query: LevelListQuery,
): Promise<Page<Level>> {
  const ctx = await requireCourse(db, actor, courseId);
  const { items, total } = await listLevels(db, courseId, query);
  return {
    items: items.map((l) => toLevelDto(l, ctx.course.drug)),
    page: query.page,
    pageSize: query.pageSize,
    total,
  };
}

async function requireLevel(db: Conn, actor: CaseworkActor, id: string) {
  const level = await findLevel(db, id);
  if (!level) throw notFound('Level');
  const ctx = await requireCourse(db, actor, level.courseId).catch(() => {
    throw notFound('Level');
  });
  return { level, ctx };
}

export async function getLevel(db: Conn, actor: CaseworkActor, id: string): Promise<Level> {
  const { level, ctx } = await requireLevel(db, actor, id);
  return toLevelDto(level, ctx.course.drug);
}

export async function editLevel(
  db: Conn,
  actor: CaseworkActor,
  id: string,
  input: LevelUpdate,
  now = new Date(),
): Promise<Level> {
  const { level: before, ctx } = await requireLevel(db, actor, id);
  assertMayWrite(actor, ctx.course.isTeaching);
  const { version, ...changes } = input;
  const timingChanged = changes.collectedAt !== undefined || changes.collectedHour !== undefined;
  const merged: LevelInput = {
    value: changes.value ?? before.value,
    unit: changes.unit ?? before.unit,
    collectedAt: timingChanged ? changes.collectedAt : (before.collectedAt ?? undefined),
    collectedHour: timingChanged ? changes.collectedHour : (before.collectedHour ?? undefined),
    sampleKind: changes.sampleKind ?? before.sampleKind,
    fraction: changes.fraction ?? before.fraction,
    assayLowerLimit:
      changes.assayLowerLimit !== undefined ? changes.assayLowerLimit : before.assayLowerLimit,
    loincCode: changes.loincCode !== undefined ? changes.loincCode : before.loincCode,
    note: changes.note ?? before.note ?? undefined,
  };
  const infusions = infusionsOf(await dosesOfCourse(db, ctx.course.id));
  const others = (await levelsOfCourse(db, ctx.course.id)).filter((l) => l.id !== id);
  const [check] = checkLevelBatch(ctx, infusions, others, [merged], now);
  if (!check?.ok) throw invalid(check?.errors ?? {});
  try {
    return await inTransaction(db, async (trx) => {
      const {
        created_by: _c,
        source: _s,
        ...columns
      } = levelColumns(ctx, check.level, before.source, actor.userId);
      const result = await updateLevel(trx, id, version, columns);
      if (result.outcome === 'missing') throw notFound('Level');
      if (result.outcome === 'stale')
        throw staleVersion('level', version, toLevelDto(result.current, ctx.course.drug), input);
      await recordAudit(trx, {
        actor: auditActor(actor),
        action: 'level.update',
        entityType: 'level',
        entityId: id,
        before,
        after: result.row,
        context: { courseId: ctx.course.id },
      });
      return toLevelDto(result.row, ctx.course.drug);
    });
  } catch (error) {
    mapDbError(error);
  }
}

export async function removeLevel(
  db: Conn,
  actor: CaseworkActor,
  id: string,
  version: number,
): Promise<void> {
  const { level, ctx } = await requireLevel(db, actor, id);
  assertMayWrite(actor, ctx.course.isTeaching);
  await inTransaction(db, async (trx) => {
    const deleted = await deleteLevel(trx, id, version);
    if (!deleted)
      throw staleVersion('level', version, toLevelDto(level, ctx.course.drug), { version });
    await recordAudit(trx, {
      actor: auditActor(actor),
      action: 'level.delete',
      entityType: 'level',
      entityId: id,
      before: deleted,
      context: { courseId: ctx.course.id },
    });
  });
}
