import { iso, type Conn } from './casework-db';

export interface PlanStatusRecord {
  courseId: string;
  planId: string;
  planNumber: number;
  state: 'draft' | 'submitted' | 'returned' | 'countersigned' | 'superseded';
  recheckAt: string | null;
  submittedAt: string | null;
  authorUserId: string;
}

/** The latest plan of each course (read-only view of the plans table), keyed by course id. */
export async function latestPlansOf(
  conn: Conn,
  courseIds: string[],
): Promise<Map<string, PlanStatusRecord>> {
  const out = new Map<string, PlanStatusRecord>();
  if (courseIds.length === 0) return out;
  const exists = await conn.schema.hasTable('plans');
  if (!exists) return out;
  const rows = (await conn('plans')
    .distinctOn('course_id')
    .select(
      'course_id',
      'id',
      'plan_number',
      'state',
      'recheck_at',
      'submitted_at',
      'author_user_id',
    )
    .whereIn('course_id', courseIds)
    .whereNot('state', 'superseded')
    .orderBy([{ column: 'course_id' }, { column: 'plan_number', order: 'desc' }])) as Array<{
    course_id: string;
    id: string;
    plan_number: number;
    state: PlanStatusRecord['state'];
    recheck_at: Date | null;
    submitted_at: Date | null;
    author_user_id: string;
  }>;
  for (const r of rows) {
    out.set(r.course_id, {
      courseId: r.course_id,
      planId: r.id,
      planNumber: r.plan_number,
      state: r.state,
      recheckAt: iso(r.recheck_at),
      submittedAt: iso(r.submitted_at),
      authorUserId: r.author_user_id,
    });
  }
  return out;
}
