import type {
  Course,
  CourseCreate,
  CourseListQuery,
  CourseUpdate,
  DrugModel,
  Page,
} from '@ebbtide/contracts';
import { recordAudit } from '../../data-access/audit';
import { inTransaction, type Conn } from '../../data-access/casework-db';
import {
  findCourse,
  insertCourse,
  listCourses,
  updateCourse,
  type CourseColumns,
  type CourseRecord,
} from '../../data-access/courses-repo';
import { findDrugModel } from '../../data-access/drug-models-repo';
import type { PatientRecord } from '../../data-access/patients-repo';
import { notFound } from '../../lib/app-error';
import { isInFuture, resolveTime, type ClinicalTime } from '../doses/timing';
import {
  assertMayWrite,
  auditActor,
  invalid,
  staleVersion,
  type CaseworkActor,
} from '../patients/common';
import { requirePatient } from '../patients/patients';

export function toCourseDto(c: CourseRecord): Course {
  return {
    id: c.id,
    version: c.version,
    patientId: c.patientId,
    isTeaching: c.isTeaching,
    drug: c.drug,
    modelId: c.modelId,
    modelVersion: c.modelVersion,
    indication: c.indication,
    micMgL: c.micMgL,
    micMethod: c.micMethod,
    target: c.target,
    status: c.status,
    ownerUserId: c.ownerUserId,
    startedAt: c.startedAt,
    startedHour: c.startedHour,
    createdAt: c.createdAt,
    updatedAt: c.updatedAt,
  };
}

/** A course with its patient and drug model, as every course-level use case needs. */
export interface CourseContext {
  course: CourseRecord;
  patient: PatientRecord;
  model: DrugModel;
}

export function courseStart(c: CourseRecord): ClinicalTime | null {
  if (c.startedAt) return { at: c.startedAt, hour: null };
  if (c.startedHour !== null) return { at: null, hour: c.startedHour };
  return null;
}

/** Loads a course the actor may see; 404 otherwise (a trainee never learns a real course exists). */
export async function requireCourse(
  db: Conn,
  actor: CaseworkActor,
  id: string,
): Promise<CourseContext> {
  const course = await findCourse(db, actor, id);
  if (!course) throw notFound('Course');
  const patient = await requirePatient(db, actor, course.patientId);
  const model = await findDrugModel(db, course.modelId, course.modelVersion);
  if (!model) throw notFound('Drug model');
  return { course, patient, model };
}

async function requireModel(
  db: Conn,
  drug: string,
  modelId: string,
  version?: number,
): Promise<DrugModel> {
  const model = await findDrugModel(db, modelId, version);
  if (!model) {
    throw invalid({
      [version === undefined ? 'modelId' : 'modelVersion']: [
        `no drug model ${modelId}${version === undefined ? '' : ` version ${version}`} in the library`,
      ],
    });
  }
  if (model.drug !== drug)
    throw invalid({ modelId: [`model ${modelId} is a ${model.drug} model, not ${drug}`] });
  return model;
}

export async function createCourse(
  db: Conn,
  actor: CaseworkActor,
  patientId: string,
  input: CourseCreate,
  now = new Date(),
): Promise<Course> {
  const patient = await requirePatient(db, actor, patientId);
  assertMayWrite(actor, patient.isTeaching);
  const model = await requireModel(db, input.drug, input.modelId, input.modelVersion);
  const errors: Record<string, string[]> = {};
  const started = resolveTime(
    patient.isTeaching,
    input.startedAt,
    input.startedHour,
    'startedAt',
    'startedHour',
    errors,
    false,
  );
  if (started && isInFuture(started, now))
    (errors.startedAt ??= []).push('the course start is in the future');
  if (Object.keys(errors).length) throw invalid(errors);
  const columns: CourseColumns = {
    patient_id: patient.id,
    is_teaching: patient.isTeaching,
    drug: input.drug,
    model_id: model.id,
    model_version: model.version,
    indication: input.indication,
    mic_mg_l: input.micMgL ?? null,
    mic_method: input.micMethod ?? null,
    target_metric: input.target.metric,
    target_low: input.target.low,
    target_high: input.target.high,
    status: input.status,
    owner_user_id: actor.userId,
    started_at: started?.at ?? null,
    started_hour: started?.hour ?? null,
    created_by: actor.userId,
  };
  return inTransaction(db, async (trx) => {
    const created = await insertCourse(trx, columns);
    await recordAudit(trx, {
      actor: auditActor(actor),
      action: 'course.create',
      entityType: 'course',
      entityId: created.id,
      after: created,
    });
    return toCourseDto(created);
  });
}

export async function getCourse(db: Conn, actor: CaseworkActor, id: string): Promise<Course> {
  return toCourseDto((await requireCourse(db, actor, id)).course);
}

export async function browseCourses(
  db: Conn,
  actor: CaseworkActor,
  query: CourseListQuery,
): Promise<Page<Course>> {
  const { items, total } = await listCourses(db, actor, query);
  return { items: items.map(toCourseDto), page: query.page, pageSize: query.pageSize, total };
}

export async function editCourse(
  db: Conn,
  actor: CaseworkActor,
  id: string,
  input: CourseUpdate,
): Promise<Course> {
  const { course: before } = await requireCourse(db, actor, id);
  assertMayWrite(actor, before.isTeaching);
  const { version, ...changes } = input;
  const columns: CourseColumns = {};
  if (changes.modelId !== undefined || changes.modelVersion !== undefined) {
    const model = await requireModel(
      db,
      before.drug,
      changes.modelId ?? before.modelId,
      changes.modelVersion,
    );
    columns.model_id = model.id;
    columns.model_version = model.version;
  }
  if (changes.indication !== undefined) columns.indication = changes.indication;
  if (changes.micMgL !== undefined) columns.mic_mg_l = changes.micMgL;
  if (changes.micMethod !== undefined) columns.mic_method = changes.micMethod;
  if (changes.status !== undefined) columns.status = changes.status;
  if (changes.target !== undefined) {
    columns.target_metric = changes.target.metric;
    columns.target_low = changes.target.low;
    columns.target_high = changes.target.high;
  }
  return inTransaction(db, async (trx) => {
    const result = await updateCourse(trx, id, version, columns);
    if (result.outcome === 'missing') throw notFound('Course');
    if (result.outcome === 'stale')
      throw staleVersion('course', version, toCourseDto(result.current), input);
    await recordAudit(trx, {
      actor: auditActor(actor),
      action: 'course.update',
      entityType: 'course',
      entityId: id,
      before,
      after: result.row,
    });
    return toCourseDto(result.row);
  });
}
