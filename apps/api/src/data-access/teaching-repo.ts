import type { Conn } from './casework-db';
import { iso } from './casework-db';

/** A teaching case row with its course and patient essentials (the hidden fields included). */
export interface TeachingCaseRecord {
  id: string;
  patientId: string;
  courseId: string;
  title: string;
  summary: string;
  firstDoseClockH: number;
  pitfalls: Array<{ code: string; description: string; levelId?: string }>;
  trueParameters: {
    structure: { compartments: 1 | 2; elimination: 'linear' | 'michaelis-menten' };
    parameters: Record<string, number>;
  };
  origin: 'synthetic' | 'anonymised-copy';
  drug: string;
  ageYears: number;
  sex: 'female' | 'male';
  doseCount: number;
  levelCount: number;
  createdAt: string;
}

interface CaseRow {
  id: string;
  patient_id: string;
  course_id: string;
  title: string;
  summary: string;
  first_dose_clock_h: number;
  pitfalls: TeachingCaseRecord['pitfalls'];
  true_parameters: TeachingCaseRecord['trueParameters'];
  origin: TeachingCaseRecord['origin'];
  drug: string;
  age_years: number;
  sex: 'female' | 'male';
  dose_count: string | number;
  level_count: string | number;
  created_at: Date;
}

const toRecord = (r: CaseRow): TeachingCaseRecord => ({
  id: r.id,
  patientId: r.patient_id,
  courseId: r.course_id,
  title: r.title,
  summary: r.summary,
  firstDoseClockH: r.first_dose_clock_h,
  pitfalls: r.pitfalls,
  trueParameters: r.true_parameters,
  origin: r.origin,
  drug: r.drug,
  ageYears: r.age_years,
  sex: r.sex,
  doseCount: Number(r.dose_count),
  levelCount: Number(r.level_count),
  createdAt: iso(r.created_at) as string,
});

function caseQuery(conn: Conn) {
  return conn('teaching_cases as tc')
    .join('courses', 'courses.id', 'tc.course_id')
    .join('patients', 'patients.id', 'tc.patient_id')
    .where('patients.is_teaching', true)
    .select(
      'tc.*',
      'courses.drug',
      'patients.age_years',
      'patients.sex',
      conn.raw('(SELECT count(*) FROM doses d WHERE d.course_id = tc.course_id) AS dose_count'),
      conn.raw('(SELECT count(*) FROM levels l WHERE l.course_id = tc.course_id) AS level_count'),
    );
}

export async function listTeachingCases(conn: Conn): Promise<TeachingCaseRecord[]> {
  const rows = (await caseQuery(conn)
    .orderBy('tc.created_at', 'asc')
    .orderBy('tc.id')) as CaseRow[];
  return rows.map(toRecord);
}

export async function findTeachingCase(
  conn: Conn,
  id: string,
): Promise<TeachingCaseRecord | undefined> {
  const row = (await caseQuery(conn).where('tc.id', id).first()) as CaseRow | undefined;
  return row ? toRecord(row) : undefined;
}

/** Attempts and best score per case for one user. */
export async function attemptsByCase(
  conn: Conn,
  userId: string,
): Promise<Map<string, { attempts: number; best: number | null }>> {
  const rows = (await conn('practice_plans')
    .where({ user_id: userId })
    .groupBy('teaching_case_id')
    .select(
      'teaching_case_id',
      conn.raw('count(*) AS attempts'),
      conn.raw("max((score->>'points')::float) AS best"),
    )) as Array<{ teaching_case_id: string; attempts: string; best: number | null }>;
  return new Map(
    rows.map((r) => [r.teaching_case_id, { attempts: Number(r.attempts), best: r.best }]),
  );
}

export interface PracticePlanRecord {
  id: string;
  caseId: string;
  userId: string;
  regimen: Record<string, unknown>;
  pitfallsFlagged: string[];
  rationale: string;
  basis: Record<string, unknown>;
  score: Record<string, unknown>;
  createdAt: string;
}

interface PracticeRow {
  id: string;
  teaching_case_id: string;
  user_id: string;
  regimen: Record<string, unknown>;
  pitfalls_flagged: string[];
  rationale: string;
  basis: Record<string, unknown>;
  score: Record<string, unknown>;
  created_at: Date;
}

const toPractice = (r: PracticeRow): PracticePlanRecord => ({
  id: r.id,
  caseId: r.teaching_case_id,
  userId: r.user_id,
  regimen: r.regimen,
  pitfallsFlagged: r.pitfalls_flagged,
  rationale: r.rationale,
  basis: r.basis,
  score: r.score,
  createdAt: iso(r.created_at) as string,
});

export async function insertPracticePlan(
  conn: Conn,
  p: Omit<PracticePlanRecord, 'id' | 'createdAt'>,
): Promise<PracticePlanRecord> {
  const [row] = (await conn('practice_plans')
    .insert({
      teaching_case_id: p.caseId,
      user_id: p.userId,
      regimen: JSON.stringify(p.regimen),
      pitfalls_flagged: p.pitfallsFlagged,
      rationale: p.rationale,
      basis: JSON.stringify(p.basis),
      score: JSON.stringify(p.score),
    })
    .returning('*')) as PracticeRow[];
  return toPractice(row!);
}

export async function practicePlansOf(
  conn: Conn,
  caseId: string,
  userId: string,
): Promise<PracticePlanRecord[]> {
  const rows = (await conn('practice_plans')
    .where({ teaching_case_id: caseId, user_id: userId })
    .orderBy('created_at', 'desc')) as PracticeRow[];
  return rows.map(toPractice);
}

/** What a new teaching case is made of: every time in hours from the first dose. */
export interface NewTeachingCase {
  label: string;
  ageYears: number;
  sex: 'female' | 'male';
  drug: string;
  modelId: string;
  modelVersion: number;
  indication: string;
  micMgL: number | null;
  micMethod: string | null;
  target: { metric: string; low: number | null; high: number | null };
  covariates: Array<{
    kind: string;
    value: number | null;
    unit: string | null;
    canonicalValue: number | null;
    weightSource?: string | null;
    dialysisStatus?: string | null;
    hour: number;
  }>;
  doses: Array<{
    amountMg: number;
    route: string;
    durationH: number | null;
    status: string;
    hour: number;
  }>;
  levels: Array<{
    value: number;
    unit: string;
    valueMgL: number;
    sampleKind: string;
    hour: number;
    /** Refers to a pitfall by index in `pitfalls` (to attach the level's id). */
    pitfallIndex?: number;
  }>;
  title: string;
  summary: string;
  firstDoseClockH: number;
  pitfalls: Array<{ code: string; description: string }>;
  trueParameters: TeachingCaseRecord['trueParameters'];
  origin: TeachingCaseRecord['origin'];
  createdBy: string | null;
}

/**
 * Writes a teaching patient, course, covariates, doses and levels (relative time only, no
 * identifiers: the casework check constraints refuse names, MRN and dates on teaching rows),
 * and the teaching case itself. Run inside the caller's transaction.
 */
export async function insertTeachingCase(conn: Conn, c: NewTeachingCase): Promise<string> {
  const [patient] = (await conn('patients')
    .insert({
      is_teaching: true,
      teaching_label: c.label,
      age_years: c.ageYears,
      sex: c.sex,
      ward: null,
      created_by: c.createdBy,
    })
    .returning('id')) as Array<{ id: string }>;
  const [course] = (await conn('courses')
    .insert({
      patient_id: patient!.id,
      is_teaching: true,
      drug: c.drug,
      model_id: c.modelId,
      model_version: c.modelVersion,
      indication: c.indication,
      mic_mg_l: c.micMgL,
      mic_method: c.micMethod,
      target_metric: c.target.metric,
      target_low: c.target.low,
      target_high: c.target.high,
      status: 'active',
      started_hour: 0,
      created_by: c.createdBy,
    })
    .returning('id')) as Array<{ id: string }>;
  for (const cv of c.covariates) {
    await conn('covariates').insert({
      patient_id: patient!.id,
      is_teaching: true,
      kind: cv.kind,
      value: cv.value,
      unit: cv.unit,
      canonical_value: cv.canonicalValue,
      weight_source: cv.weightSource ?? null,
      dialysis_status: cv.dialysisStatus ?? null,
      observed_hour: cv.hour,
      source: 'seed',
      created_by: c.createdBy,
    });
  }
  for (const d of c.doses) {
    await conn('doses').insert({
      course_id: course!.id,
      is_teaching: true,
      amount: d.amountMg,
      unit: 'mg',
      amount_mg: d.amountMg,
      route: d.route,
      start_hour: d.hour,
      duration_h: d.route === 'iv-infusion' ? d.durationH : null,
      administration_status: d.status,
      source: 'seed',
      created_by: c.createdBy,
    });
  }
  const pitfalls: Array<{ code: string; description: string; levelId?: string }> = c.pitfalls.map(
    (p) => ({ ...p }),
  );
  for (const l of c.levels) {
    const [row] = (await conn('levels')
      .insert({
        course_id: course!.id,
        is_teaching: true,
        value: l.value,
        unit: l.unit,
        value_mg_l: l.valueMgL,
        collected_hour: l.hour,
        sample_kind: l.sampleKind,
        fraction: 'total',
        flags: l.sampleKind === 'during-infusion' ? ['during-infusion'] : [],
        source: 'seed',
        created_by: c.createdBy,
      })
      .returning('id')) as Array<{ id: string }>;
    if (l.pitfallIndex !== undefined && pitfalls[l.pitfallIndex]) {
      pitfalls[l.pitfallIndex]!.levelId = row!.id;
    }
  }
  const [tc] = (await conn('teaching_cases')
    .insert({
      patient_id: patient!.id,
      course_id: course!.id,
      title: c.title,
      summary: c.summary,
      first_dose_clock_h: c.firstDoseClockH,
      pitfalls: JSON.stringify(pitfalls),
      true_parameters: JSON.stringify(c.trueParameters),
      origin: c.origin,
      created_by: c.createdBy,
    })
    .returning('id')) as Array<{ id: string }>;
  return tc!.id;
}

export async function teachingCaseByTitle(conn: Conn, title: string): Promise<string | undefined> {
  const row = (await conn('teaching_cases').where({ title }).first('id')) as
    { id: string } | undefined;
  return row?.id;
}

/** Real courses an admin may copy, described without identifiers. */
export async function copyableCourses(conn: Conn): Promise<
  Array<{
    courseId: string;
    drug: string;
    startedYear: number | null;
    doseCount: number;
    levelCount: number;
  }>
> {
  const rows = (await conn('courses')
    .where('courses.is_teaching', false)
    .select(
      'courses.id',
      'courses.drug',
      conn.raw('extract(year from courses.started_at)::int AS started_year'),
      conn.raw('(SELECT count(*) FROM doses d WHERE d.course_id = courses.id) AS dose_count'),
      conn.raw('(SELECT count(*) FROM levels l WHERE l.course_id = courses.id) AS level_count'),
    )
    .orderBy('courses.created_at', 'desc')
    .limit(200)) as Array<Record<string, unknown>>;
  return rows.map((r) => ({
    courseId: r.id as string,
    drug: r.drug as string,
    startedYear: (r.started_year as number | null) ?? null,
    doseCount: Number(r.dose_count),
    levelCount: Number(r.level_count),
  }));
}

/**
 * The rows of a REAL course for the anonymising copy. Deliberately unscoped: only the admin's
 * anonymising copy calls it, and what leaves it is stripped of identifiers by the domain.
 */
export async function realCourseRows(conn: Conn, courseId: string) {
  const course = (await conn('courses').where({ id: courseId, is_teaching: false }).first()) as
    Record<string, unknown> | undefined;
  if (!course) return undefined;
  const patient = (await conn('patients').where({ id: course.patient_id }).first()) as Record<
    string,
    unknown
  >;
  const covariates = (await conn('covariates')
    .where({ patient_id: course.patient_id })
    .orderBy('observed_at')) as Array<Record<string, unknown>>;
  const doses = (await conn('doses').where({ course_id: courseId }).orderBy('start_at')) as Array<
    Record<string, unknown>
  >;
  const levels = (await conn('levels')
    .where({ course_id: courseId })
    .orderBy('collected_at')) as Array<Record<string, unknown>>;
  return { course, patient, covariates, doses, levels };
}
