import type { AdministrationStatus, DoseListQuery, DoseRoute, RowSource } from '@ebbtide/contracts';
import { fetchPage, iso, updateVersioned, type Conn, type UpdateOutcome } from './casework-db';

export interface DoseRecord {
  id: string;
  version: number;
  courseId: string;
  isTeaching: boolean;
  amount: number;
  unit: 'mg' | 'g';
  amountMg: number;
  route: DoseRoute;
  startAt: string | null;
  startHour: number | null;
  durationH: number | null;
  administrationStatus: AdministrationStatus;
  note: string | null;
  source: RowSource;
  createdAt: string;
  updatedAt: string;
}

interface DoseRow {
  id: string;
  version: number;
  course_id: string;
  is_teaching: boolean;
  amount: number;
  unit: 'mg' | 'g';
  amount_mg: number;
  route: DoseRoute;
  start_at: Date | null;
  start_hour: number | null;
  duration_h: number | null;
  administration_status: AdministrationStatus;
  note: string | null;
  source: RowSource;
  created_at: Date;
  updated_at: Date;
}

const toRecord = (r: DoseRow): DoseRecord => ({
  id: r.id,
  version: r.version,
  courseId: r.course_id,
  isTeaching: r.is_teaching,
  amount: r.amount,
  unit: r.unit,
  amountMg: r.amount_mg,
  route: r.route,
  startAt: iso(r.start_at),
  startHour: r.start_hour,
  durationH: r.duration_h,
  administrationStatus: r.administration_status,
  note: r.note,
  source: r.source,
  createdAt: iso(r.created_at) as string,
  updatedAt: iso(r.updated_at) as string,
});

export type DoseColumns = Partial<{
  course_id: string;
  is_teaching: boolean;
  amount: number;
  unit: string;
  amount_mg: number;
  route: string;
  start_at: string | null;
  start_hour: number | null;
  duration_h: number | null;
  administration_status: string;
  note: string | null;
  source: string;
  created_by: string | null;
}>;

export async function insertDoses(conn: Conn, rows: DoseColumns[]): Promise<DoseRecord[]> {
  if (rows.length === 0) return [];
  const inserted = (await conn('doses').insert(rows).returning('*')) as DoseRow[];
  return inserted.map(toRecord);
}

/** A dose by id; the caller has already checked the actor may see its course. */
export async function findDose(conn: Conn, id: string): Promise<DoseRecord | undefined> {
  const row = (await conn('doses').where({ id }).first()) as DoseRow | undefined;
  return row ? toRecord(row) : undefined;
}

/** Every dose of a course in time order (for checks and the engine). */
export async function dosesOfCourse(conn: Conn, courseId: string): Promise<DoseRecord[]> {
  const rows = (await conn('doses')
    .where({ course_id: courseId })
    .orderByRaw('start_at asc nulls last, start_hour asc nulls last')) as DoseRow[];
  return rows.map(toRecord);
}

export async function listDoses(
  conn: Conn,
  courseId: string,
  query: DoseListQuery,
): Promise<{ items: DoseRecord[]; total: number }> {
  const q = conn('doses').select('doses.*').where('doses.course_id', courseId);
  const columns =
    query.sort === 'start'
      ? ['doses.start_at', 'doses.start_hour']
      : query.sort === 'amountMg'
        ? ['doses.amount_mg']
        : ['doses.created_at'];
  const { rows, total } = await fetchPage<DoseRow>(
    q,
    query,
    [...columns, 'doses.id'].map((column) => ({ column })),
  );
  return { items: rows.map(toRecord), total };
}

export async function updateDose(
  conn: Conn,
  id: string,
  expectedVersion: number,
  columns: DoseColumns,
): Promise<UpdateOutcome<DoseRecord>> {
  const r = await updateVersioned<DoseRow>(conn, 'doses', id, expectedVersion, columns);
  if (r.outcome === 'updated') return { outcome: 'updated', row: toRecord(r.row) };
  if (r.outcome === 'stale') return { outcome: 'stale', current: toRecord(r.current) };
  return r;
}

export async function deleteDose(conn: Conn, id: string, expectedVersion: number) {
  const [row] = (await conn('doses')
    .where({ id, version: expectedVersion })
    .del()
    .returning('*')) as DoseRow[];
  return row ? toRecord(row) : undefined;
}
