import type { PlanState, SignatureMeaning } from '@ebbtide/contracts';
import { iso, type Conn } from './casework-db';
import { restrictToTeachingFor, type ScopedActor } from './scope';

/** A plans row as a plain object. `content` is the signable content (see domain/plans). */
export interface PlanRecord {
  id: string;
  version: number;
  courseId: string;
  planNumber: number;
  state: PlanState;
  authorUserId: string;
  authorName: string;
  authorEmail: string | null;
  supersedesPlanId: string | null;
  supersededByPlanId: string | null;
  content: Record<string, unknown>;
  contentHash: string;
  recheckAt: string | null;
  returnComment: string | null;
  submittedAt: string | null;
  returnedAt: string | null;
  countersignedAt: string | null;
  supersededAt: string | null;
  recheckMailedAt: string | null;
  createdAt: string;
  updatedAt: string;
}

export interface SignatureRecord {
  id: string;
  planId: string;
  signerUserId: string;
  signerName: string;
  signerRole: string;
  meaning: SignatureMeaning;
  signedAt: string;
  contentHash: string;
  comment: string | null;
  checklist: Record<string, boolean> | null;
  authenticatedAt: string | null;
}

interface PlanRow {
  id: string;
  version: number;
  course_id: string;
  plan_number: number;
  state: PlanState;
  author_user_id: string;
  author_name: string;
  author_email: string | null;
  supersedes_plan_id: string | null;
  superseded_by_plan_id: string | null;
  content: Record<string, unknown>;
  content_hash: string;
  recheck_at: Date | null;
  return_comment: string | null;
  submitted_at: Date | null;
  returned_at: Date | null;
  countersigned_at: Date | null;
  superseded_at: Date | null;
  recheck_mailed_at: Date | null;
  created_at: Date;
  updated_at: Date;
}

const toRecord = (r: PlanRow): PlanRecord => ({
  id: r.id,
  version: r.version,
  courseId: r.course_id,
  planNumber: r.plan_number,
  state: r.state,
  authorUserId: r.author_user_id,
  authorName: r.author_name,
  authorEmail: r.author_email,
  supersedesPlanId: r.supersedes_plan_id,
  supersededByPlanId: r.superseded_by_plan_id,
  content: r.content,
  contentHash: r.content_hash,
  recheckAt: iso(r.recheck_at),
  returnComment: r.return_comment,
  submittedAt: iso(r.submitted_at),
  returnedAt: iso(r.returned_at),
  countersignedAt: iso(r.countersigned_at),
  supersededAt: iso(r.superseded_at),
  recheckMailedAt: iso(r.recheck_mailed_at),
  createdAt: iso(r.created_at) as string,
  updatedAt: iso(r.updated_at) as string,
});

/** plans with the author's name and the newer plan that supersedes it (if any). */
function planQuery(conn: Conn) {
  return conn('plans')
    .join('users as author', 'author.id', 'plans.author_user_id')
    .select(
      'plans.*',
      'author.display_name as author_name',
      'author.email as author_email',
      conn.raw(
        '(SELECT n.id FROM plans n WHERE n.supersedes_plan_id = plans.id ORDER BY n.plan_number DESC LIMIT 1) AS superseded_by_plan_id',
      ),
    );
}

export type PlanColumns = Partial<{
  id: string;
  course_id: string;
  plan_number: number;
  state: PlanState;
  author_user_id: string;
  supersedes_plan_id: string | null;
  content: string;
  content_hash: string;
  recheck_at: string | null;
  return_comment: string | null;
  submitted_at: Date | string | null;
  returned_at: Date | string | null;
  countersigned_at: Date | string | null;
  superseded_at: Date | string | null;
  recheck_mailed_at: Date | string | null;
}>;

/**
 * Locks the course row for the rest of the transaction and returns the next plan number, so two
 * plans created at once never get the same number.
 */
export async function lockCourseAndNextPlanNumber(conn: Conn, courseId: string): Promise<number> {
  await conn('courses').where({ id: courseId }).forUpdate().first('id');
  const row = (await conn('plans')
    .where({ course_id: courseId })
    .max<{ max: number | null }>('plan_number as max')
    .first()) as { max: number | null } | undefined;
  return (row?.max ?? 0) + 1;
}

export async function insertPlan(conn: Conn, columns: PlanColumns): Promise<PlanRecord> {
  await conn('plans').insert({ ...columns, is_teaching: false });
  return (await findPlanById(conn, columns.id!))!;
}

/** A plan by id, whoever asks (for use inside a use case that has already checked access). */
export async function findPlanById(conn: Conn, id: string): Promise<PlanRecord | undefined> {
  const row = (await planQuery(conn).where('plans.id', id).first()) as PlanRow | undefined;
  return row ? toRecord(row) : undefined;
}

/** A plan the actor may see (never a trainee: plans are of real patients only). */
export async function findPlan(
  conn: Conn,
  actor: ScopedActor,
  id: string,
): Promise<PlanRecord | undefined> {
  const row = (await restrictToTeachingFor(
    actor,
    planQuery(conn).where('plans.id', id),
    'plans.is_teaching',
  ).first()) as PlanRow | undefined;
  return row ? toRecord(row) : undefined;
}

/** Takes the row lock on a plan for the rest of the transaction. */
export async function lockPlan(conn: Conn, id: string): Promise<void> {
  await conn('plans').where({ id }).forUpdate().first('id');
}

/**
 * Conditional update: applies `changes` only when the plan is still at `expectedVersion` and in
 * one of `fromStates`, bumping the version. Of two concurrent transitions exactly one matches.
 */
export async function transitionPlan(
  conn: Conn,
  id: string,
  expectedVersion: number,
  fromStates: readonly PlanState[],
  changes: PlanColumns,
): Promise<PlanRecord | undefined> {
  const updated = (await conn('plans')
    .where({ id, version: expectedVersion })
    .whereIn('state', fromStates as PlanState[])
    .update({ ...changes, version: conn.raw('version + 1'), updated_at: conn.fn.now() })
    .returning('id')) as Array<{ id: string }>;
  if (updated.length === 0) return undefined;
  return findPlanById(conn, id);
}

export async function plansOfCourse(conn: Conn, courseId: string): Promise<PlanRecord[]> {
  const rows = (await planQuery(conn)
    .where('plans.course_id', courseId)
    .orderBy('plans.plan_number', 'desc')) as PlanRow[];
  return rows.map(toRecord);
}

/** The course's most recently countersigned plan other than `exceptId`. */
export async function lastCountersignedPlan(
  conn: Conn,
  courseId: string,
  exceptId?: string,
): Promise<PlanRecord | undefined> {
  const q = planQuery(conn)
    .where('plans.course_id', courseId)
    .whereNotNull('plans.countersigned_at')
    .orderBy('plans.countersigned_at', 'desc')
    .first();
  if (exceptId) q.whereNot('plans.id', exceptId);
  const row = (await q) as PlanRow | undefined;
  return row ? toRecord(row) : undefined;
}

/** Other countersigned plans of the course: superseded when a newer one is countersigned. */
export async function supersedeOtherCountersigned(
  conn: Conn,
  courseId: string,
  keepId: string,
): Promise<string[]> {
  const rows = (await conn('plans')
    .where({ course_id: courseId, state: 'countersigned' })
    .whereNot({ id: keepId })
    .update({
      state: 'superseded',
      superseded_at: conn.fn.now(),
      version: conn.raw('version + 1'),
      updated_at: conn.fn.now(),
    })
    .returning('id')) as Array<{ id: string }>;
  return rows.map((r) => r.id);
}

interface SignatureRow {
  id: string;
  plan_id: string;
  signer_user_id: string;
  signer_name: string;
  signer_role: string;
  meaning: SignatureMeaning;
  signed_at: Date;
  content_hash: string;
  comment: string | null;
  checklist: Record<string, boolean> | null;
  authenticated_at: Date | null;
}

const toSignature = (r: SignatureRow): SignatureRecord => ({
  id: r.id,
  planId: r.plan_id,
  signerUserId: r.signer_user_id,
  signerName: r.signer_name,
  signerRole: r.signer_role,
  meaning: r.meaning,
  signedAt: iso(r.signed_at) as string,
  contentHash: r.content_hash,
  comment: r.comment,
  checklist: r.checklist,
  authenticatedAt: iso(r.authenticated_at),
});

export async function insertSignature(
  conn: Conn,
  s: Omit<SignatureRecord, 'id' | 'signedAt'> & { signedAt: Date },
): Promise<SignatureRecord> {
  const [row] = (await conn('plan_signatures')
    .insert({
      plan_id: s.planId,
      signer_user_id: s.signerUserId,
      signer_name: s.signerName,
      signer_role: s.signerRole,
      meaning: s.meaning,
      signed_at: s.signedAt,
      content_hash: s.contentHash,
      comment: s.comment,
      checklist: s.checklist === null ? null : JSON.stringify(s.checklist),
      authenticated_at: s.authenticatedAt,
    })
    .returning('*')) as SignatureRow[];
  return toSignature(row!);
}

export async function signaturesOf(conn: Conn, planId: string): Promise<SignatureRecord[]> {
  const rows = (await conn('plan_signatures')
    .where({ plan_id: planId })
    .orderBy('signed_at', 'asc')
    .orderBy('id', 'asc')) as SignatureRow[];
  return rows.map(toSignature);
}

export interface QueueRow {
  planId: string;
  courseId: string;
  planNumber: number;
  drug: string;
  ward: string | null;
  givenName: string | null;
  familyName: string | null;
  authorName: string;
  authorUserId: string;
  submittedAt: string;
}

/** Submitted plans, oldest first: the reviewers' queue. */
export async function submittedPlans(
  conn: Conn,
  actor: ScopedActor,
  page: { page: number; pageSize: number; order: 'asc' | 'desc' },
): Promise<{ rows: QueueRow[]; total: number }> {
  const base = restrictToTeachingFor(
    actor,
    conn('plans')
      .join('courses', 'courses.id', 'plans.course_id')
      .join('patients', 'patients.id', 'courses.patient_id')
      .join('users as author', 'author.id', 'plans.author_user_id')
      .where('plans.state', 'submitted'),
    'plans.is_teaching',
  );
  const count = (await base.clone().count<{ count: string }[]>({ count: '*' }).first()) as
    { count: string } | undefined;
  const rows = (await base
    .clone()
    .select(
      'plans.id as plan_id',
      'plans.course_id',
      'plans.plan_number',
      'plans.submitted_at',
      'plans.author_user_id',
      'courses.drug',
      'patients.ward',
      'patients.given_name',
      'patients.family_name',
      'author.display_name as author_name',
    )
    .orderBy('plans.submitted_at', page.order)
    .orderBy('plans.id', 'asc')
    .limit(page.pageSize)
    .offset((page.page - 1) * page.pageSize)) as Array<Record<string, unknown>>;
  return {
    total: Number(count?.count ?? 0),
    rows: rows.map((r) => ({
      planId: r.plan_id as string,
      courseId: r.course_id as string,
      planNumber: r.plan_number as number,
      drug: r.drug as string,
      ward: r.ward as string | null,
      givenName: r.given_name as string | null,
      familyName: r.family_name as string | null,
      authorName: r.author_name as string,
      authorUserId: r.author_user_id as string,
      submittedAt: iso(r.submitted_at as Date) as string,
    })),
  };
}

/** E-mail addresses of every reviewer except `exceptUserId` (who cannot review their own plan). */
export async function reviewerAddresses(conn: Conn, exceptUserId: string): Promise<string[]> {
  const rows = (await conn('users')
    .where({ role: 'reviewer' })
    .whereNot({ id: exceptUserId })
    .whereNotNull('email')
    .orderBy('email')
    .select('email')) as Array<{ email: string }>;
  return rows.map((r) => r.email);
}

/** Plans in force (submitted or countersigned) whose re-check time has passed and not yet mailed. */
export async function overdueRechecks(conn: Conn, now: Date, limit = 100): Promise<PlanRecord[]> {
  const rows = (await planQuery(conn)
    .whereIn('plans.state', ['submitted', 'countersigned'])
    .whereNotNull('plans.recheck_at')
    .where('plans.recheck_at', '<', now)
    .whereNull('plans.recheck_mailed_at')
    .orderBy('plans.recheck_at', 'asc')
    .limit(limit)) as PlanRow[];
  return rows.map(toRecord);
}

/** Marks the re-check mail as done, once: false when another process got there first. */
export async function markRecheckMailed(conn: Conn, id: string, now: Date): Promise<boolean> {
  const n = await conn('plans').where({ id }).whereNull('recheck_mailed_at').update({
    recheck_mailed_at: now,
  });
  return Number(n) > 0;
}
