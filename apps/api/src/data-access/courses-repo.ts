import type { CourseListQuery, Drug } from '@ebbtide/contracts';
import {
  fetchPage,
  iso,
  scoped,
  updateVersioned,
  type Conn,
  type UpdateOutcome,
} from './casework-db';
import { seesIdentifiablePatients, type ScopedActor } from './scope';

export interface CourseRecord {
  id: string;
  version: number;
  patientId: string;
  isTeaching: boolean;
  drug: Drug;
  modelId: string;
  modelVersion: number;
  indication: string;
  micMgL: number | null;
  micMethod: string | null;
  target: {
    metric: 'auc24' | 'trough' | 'peak' | 'peak-mic-ratio' | 'css';
    low: number | null;
    high: number | null;
  };
  status: 'active' | 'on-hold' | 'completed' | 'stopped';
  ownerUserId: string | null;
  startedAt: string | null;
  startedHour: number | null;
  createdAt: string;
  updatedAt: string;
}

interface CourseRow {
  id: string;
  version: number;
  patient_id: string;
  is_teaching: boolean;
  drug: Drug;
  model_id: string;
  model_version: number;
  indication: string;
  mic_mg_l: number | null;
  mic_method: string | null;
  target_metric: CourseRecord['target']['metric'];
  target_low: number | null;
  target_high: number | null;
  status: CourseRecord['status'];
  owner_user_id: string | null;
  started_at: Date | null;
  started_hour: number | null;
  created_at: Date;
  updated_at: Date;
}

export const toCourseRecord = (r: CourseRow): CourseRecord => ({
  id: r.id,
  version: r.version,
  patientId: r.patient_id,
  isTeaching: r.is_teaching,
  drug: r.drug,
  modelId: r.model_id,
  modelVersion: r.model_version,
  indication: r.indication,
  micMgL: r.mic_mg_l,
  micMethod: r.mic_method,
  target: { metric: r.target_metric, low: r.target_low, high: r.target_high },
  status: r.status,
  ownerUserId: r.owner_user_id,
  startedAt: iso(r.started_at),
  startedHour: r.started_hour,
  createdAt: iso(r.created_at) as string,
  updatedAt: iso(r.updated_at) as string,
});

export type CourseColumns = Partial<{
  patient_id: string;
  is_teaching: boolean;
  drug: Drug;
  model_id: string;
  model_version: number;
  indication: string;
  mic_mg_l: number | null;
  mic_method: string | null;
  target_metric: string;
  target_low: number | null;
  target_high: number | null;
  status: string;
  owner_user_id: string | null;
  started_at: string | null;
  started_hour: number | null;
  created_by: string | null;
}>;

export async function insertCourse(conn: Conn, columns: CourseColumns): Promise<CourseRecord> {
  const [row] = (await conn('courses').insert(columns).returning('*')) as CourseRow[];
  return toCourseRecord(row as CourseRow);
}

export async function findCourse(
  conn: Conn,
  actor: ScopedActor,
  id: string,
): Promise<CourseRecord | undefined> {
  const row = (await scoped(actor, conn('courses').where('courses.id', id), 'courses').first()) as
    CourseRow | undefined;
  return row ? toCourseRecord(row) : undefined;
}

const sortColumns: Record<CourseListQuery['sort'], string> = {
  createdAt: 'courses.created_at',
  drug: 'courses.drug',
  status: 'courses.status',
  startedAt: 'courses.started_at',
};

export async function listCourses(
  conn: Conn,
  actor: ScopedActor,
  query: CourseListQuery,
): Promise<{ items: CourseRecord[]; total: number }> {
  const q = scoped(actor, conn('courses').select('courses.*'), 'courses');
  if (query.patientId) q.where('courses.patient_id', query.patientId);
  if (query.status) q.where('courses.status', query.status);
  if (query.drug) q.where('courses.drug', query.drug);
  const { rows, total } = await fetchPage<CourseRow>(q, query, [
    { column: sortColumns[query.sort] },
    { column: 'courses.id' },
  ]);
  return { items: rows.map(toCourseRecord), total };
}

/** Active courses for the caseload: owned by `ownerUserId` (or all when null), scoped. */
export async function activeCourses(
  conn: Conn,
  actor: ScopedActor,
  ownerUserId: string | null,
): Promise<CourseRecord[]> {
  const q = scoped(
    actor,
    conn('courses').select('courses.*').where('courses.status', 'active'),
    'courses',
  );
  if (ownerUserId) q.where('courses.owner_user_id', ownerUserId);
  // The clinical caseload of staff who see real patients holds real patients only; teaching
  // cases live under Teaching cases (everyone else's scope already restricts to them).
  if (seesIdentifiablePatients(actor)) q.where('courses.is_teaching', false);
  const rows = (await q.orderBy('courses.created_at')) as CourseRow[];
  return rows.map(toCourseRecord);
}

export async function updateCourse(
  conn: Conn,
  id: string,
  expectedVersion: number,
  columns: CourseColumns,
): Promise<UpdateOutcome<CourseRecord>> {
  const r = await updateVersioned<CourseRow>(conn, 'courses', id, expectedVersion, columns);
  if (r.outcome === 'updated') return { outcome: 'updated', row: toCourseRecord(r.row) };
  if (r.outcome === 'stale') return { outcome: 'stale', current: toCourseRecord(r.current) };
  return r;
}
