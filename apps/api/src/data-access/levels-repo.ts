import type { LevelListQuery, LevelUnit, RowSource, SampleKind } from '@ebbtide/contracts';
import { fetchPage, iso, updateVersioned, type Conn, type UpdateOutcome } from './casework-db';

export interface LevelRecord {
  id: string;
  version: number;
  courseId: string;
  isTeaching: boolean;
  value: number;
  unit: LevelUnit;
  valueMgL: number;
  collectedAt: string | null;
  collectedHour: number | null;
  sampleKind: SampleKind;
  fraction: 'total' | 'free';
  assayLowerLimit: number | null;
  loincCode: string | null;
  flags: Array<'during-infusion' | 'below-assay-limit' | 'post-dialysis'>;
  note: string | null;
  source: RowSource;
  createdAt: string;
  updatedAt: string;
}

interface LevelRow {
  id: string;
  version: number;
  course_id: string;
  is_teaching: boolean;
  value: number;
  unit: LevelUnit;
  value_mg_l: number;
  collected_at: Date | null;
  collected_hour: number | null;
  sample_kind: SampleKind;
  fraction: 'total' | 'free';
  assay_lower_limit: number | null;
  loinc_code: string | null;
  flags: LevelRecord['flags'];
  note: string | null;
  source: RowSource;
  created_at: Date;
  updated_at: Date;
}

const toRecord = (r: LevelRow): LevelRecord => ({
  id: r.id,
  version: r.version,
  courseId: r.course_id,
  isTeaching: r.is_teaching,
  value: r.value,
  unit: r.unit,
  valueMgL: r.value_mg_l,
  collectedAt: iso(r.collected_at),
  collectedHour: r.collected_hour,
  sampleKind: r.sample_kind,
  fraction: r.fraction,
  assayLowerLimit: r.assay_lower_limit,
  loincCode: r.loinc_code,
  flags: r.flags ?? [],
  note: r.note,
  source: r.source,
  createdAt: iso(r.created_at) as string,
  updatedAt: iso(r.updated_at) as string,
});

export type LevelColumns = Partial<{
  course_id: string;
  is_teaching: boolean;
  value: number;
  unit: string;
  value_mg_l: number;
  collected_at: string | null;
  collected_hour: number | null;
  sample_kind: string;
  fraction: string;
  assay_lower_limit: number | null;
  loinc_code: string | null;
  flags: string[];
  note: string | null;
  source: string;
  created_by: string | null;
}>;

export async function insertLevels(conn: Conn, rows: LevelColumns[]): Promise<LevelRecord[]> {
  if (rows.length === 0) return [];
  const inserted = (await conn('levels').insert(rows).returning('*')) as LevelRow[];
  return inserted.map(toRecord);
}

export async function findLevel(conn: Conn, id: string): Promise<LevelRecord | undefined> {
  const row = (await conn('levels').where({ id }).first()) as LevelRow | undefined;
  return row ? toRecord(row) : undefined;
}

export async function levelsOfCourse(conn: Conn, courseId: string): Promise<LevelRecord[]> {
  const rows = (await conn('levels')
    .where({ course_id: courseId })
    .orderByRaw('collected_at asc nulls last, collected_hour asc nulls last')) as LevelRow[];
  return rows.map(toRecord);
}

export async function listLevels(
  conn: Conn,
  courseId: string,
  query: LevelListQuery,
): Promise<{ items: LevelRecord[]; total: number }> {
  const q = conn('levels').select('levels.*').where('levels.course_id', courseId);
  const columns =
    query.sort === 'collected'
      ? ['levels.collected_at', 'levels.collected_hour']
      : query.sort === 'valueMgL'
        ? ['levels.value_mg_l']
        : ['levels.created_at'];
  const { rows, total } = await fetchPage<LevelRow>(
    q,
    query,
    [...columns, 'levels.id'].map((column) => ({ column })),
  );
  return { items: rows.map(toRecord), total };
}

export async function updateLevel(
  conn: Conn,
  id: string,
  expectedVersion: number,
  columns: LevelColumns,
): Promise<UpdateOutcome<LevelRecord>> {
  const r = await updateVersioned<LevelRow>(conn, 'levels', id, expectedVersion, columns);
  if (r.outcome === 'updated') return { outcome: 'updated', row: toRecord(r.row) };
  if (r.outcome === 'stale') return { outcome: 'stale', current: toRecord(r.current) };
  return r;
}

export async function deleteLevel(conn: Conn, id: string, expectedVersion: number) {
  const [row] = (await conn('levels')
    .where({ id, version: expectedVersion })
    .del()
    .returning('*')) as LevelRow[];
  return row ? toRecord(row) : undefined;
}
