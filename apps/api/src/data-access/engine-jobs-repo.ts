import { iso, type Conn } from './casework-db';

export interface EngineJobRecord {
  id: string;
  kind: string;
  courseId: string;
  requestedBy: string | null;
  state: 'queued' | 'running' | 'completed' | 'failed' | 'cancelled';
  progress: number;
  request: Record<string, unknown>;
  result: unknown;
  error: string | null;
  createdAt: string;
  updatedAt: string;
}

interface EngineJobRow {
  id: string;
  kind: string;
  course_id: string;
  requested_by: string | null;
  state: EngineJobRecord['state'];
  progress: number;
  request: Record<string, unknown>;
  result: unknown;
  error: string | null;
  created_at: Date;
  updated_at: Date;
}

const toRecord = (r: EngineJobRow): EngineJobRecord => ({
  id: r.id,
  kind: r.kind,
  courseId: r.course_id,
  requestedBy: r.requested_by,
  state: r.state,
  progress: r.progress,
  request: r.request,
  result: r.result,
  error: r.error,
  createdAt: iso(r.created_at) as string,
  updatedAt: iso(r.updated_at) as string,
});

export async function insertEngineJob(
  conn: Conn,
  job: { kind: string; courseId: string; requestedBy: string; request: unknown },
): Promise<EngineJobRecord> {
  const [row] = (await conn('engine_jobs')
    .insert({
      kind: job.kind,
      course_id: job.courseId,
      requested_by: job.requestedBy,
      request: JSON.stringify(job.request),
    })
    .returning('*')) as EngineJobRow[];
  return toRecord(row as EngineJobRow);
}

export async function findEngineJob(conn: Conn, id: string): Promise<EngineJobRecord | undefined> {
  const row = (await conn('engine_jobs').where({ id }).first()) as EngineJobRow | undefined;
  return row ? toRecord(row) : undefined;
}

export async function updateEngineJob(
  conn: Conn,
  id: string,
  changes: Partial<{
    state: EngineJobRecord['state'];
    progress: number;
    result: unknown;
    error: string | null;
  }>,
): Promise<void> {
  const columns: Record<string, unknown> = { updated_at: conn.fn.now() };
  if (changes.state !== undefined) columns.state = changes.state;
  if (changes.progress !== undefined) columns.progress = changes.progress;
  if (changes.result !== undefined) columns.result = JSON.stringify(changes.result);
  if (changes.error !== undefined) columns.error = changes.error;
  await conn('engine_jobs').where({ id }).update(columns);
}
