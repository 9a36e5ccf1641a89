import type { PatientListQuery } from '@ebbtide/contracts';
import {
  fetchPage,
  iso,
  scoped,
  updateVersioned,
  type Conn,
  type UpdateOutcome,
} from './casework-db';
import type { ScopedActor } from './scope';

/** A patients row as a plain object (camelCase, ISO times). */
export interface PatientRecord {
  id: string;
  version: number;
  isTeaching: boolean;
  mrn: string | null;
  givenName: string | null;
  familyName: string | null;
  birthDate: string | null;
  teachingLabel: string | null;
  ageYears: number | null;
  sex: 'female' | 'male';
  ward: string | null;
  createdBy: string | null;
  createdAt: string;
  updatedAt: string;
}

interface PatientRow {
  id: string;
  version: number;
  is_teaching: boolean;
  mrn: string | null;
  given_name: string | null;
  family_name: string | null;
  birth_date: string | Date | null;
  teaching_label: string | null;
  age_years: number | null;
  sex: 'female' | 'male';
  ward: string | null;
  created_by: string | null;
  created_at: Date;
  updated_at: Date;
}

function dateOnly(d: string | Date | null): string | null {
  if (d === null) return null;
  if (typeof d === 'string') return d.slice(0, 10);
  // pg returns DATE as a local-midnight Date; rebuild the calendar date from local fields.
  const m = String(d.getMonth() + 1).padStart(2, '0');
  const day = String(d.getDate()).padStart(2, '0');
  return `${d.getFullYear()}-${m}-${day}`;
}

export const toPatientRecord = (r: PatientRow): PatientRecord => ({
  id: r.id,
  version: r.version,
  isTeaching: r.is_teaching,
  mrn: r.mrn,
  givenName: r.given_name,
  familyName: r.family_name,
  birthDate: dateOnly(r.birth_date),
  teachingLabel: r.teaching_label,
  ageYears: r.age_years,
  sex: r.sex,
  ward: r.ward,
  createdBy: r.created_by,
  createdAt: iso(r.created_at) as string,
  updatedAt: iso(r.updated_at) as string,
});

export type PatientColumns = Partial<{
  is_teaching: boolean;
  mrn: string | null;
  given_name: string | null;
  family_name: string | null;
  birth_date: string | null;
  teaching_label: string | null;
  age_years: number | null;
  sex: 'female' | 'male';
  ward: string | null;
  created_by: string | null;
}>;

export async function insertPatient(conn: Conn, columns: PatientColumns): Promise<PatientRecord> {
  const [row] = (await conn('patients').insert(columns).returning('*')) as PatientRow[];
  return toPatientRecord(row as PatientRow);
}

/** One patient the actor may see (a trainee only ever gets teaching patients). */
export async function findPatient(
  conn: Conn,
  actor: ScopedActor,
  id: string,
): Promise<PatientRecord | undefined> {
  const row = (await scoped(
    actor,
    conn('patients').where('patients.id', id),
    'patients',
  ).first()) as PatientRow | undefined;
  return row ? toPatientRecord(row) : undefined;
}

export async function findPatientByMrn(
  conn: Conn,
  actor: ScopedActor,
  mrn: string,
): Promise<PatientRecord | undefined> {
  const row = (await scoped(
    actor,
    conn('patients').where('patients.mrn', mrn),
    'patients',
  ).first()) as PatientRow | undefined;
  return row ? toPatientRecord(row) : undefined;
}

const sortColumns: Record<PatientListQuery['sort'], string> = {
  familyName: 'patients.family_name',
  mrn: 'patients.mrn',
  ward: 'patients.ward',
  createdAt: 'patients.created_at',
  birthDate: 'patients.birth_date',
};

export async function listPatients(
  conn: Conn,
  actor: ScopedActor,
  query: PatientListQuery,
): Promise<{ items: PatientRecord[]; total: number }> {
  const q = scoped(actor, conn('patients').select('patients.*'), 'patients');
  if (query.ward) q.where('patients.ward', query.ward);
  if (query.isTeaching) q.where('patients.is_teaching', query.isTeaching === 'true');
  if (query.q) {
    const like = `%${query.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
    q.where((w) =>
      w
        .whereILike('patients.family_name', like)
        .orWhereILike('patients.given_name', like)
        .orWhereILike('patients.mrn', like)
        .orWhereILike('patients.teaching_label', like),
    );
  }
  const orderBy = [
    { column: sortColumns[query.sort] },
    { column: 'patients.teaching_label' },
    { column: 'patients.id' },
  ];
  const { rows, total } = await fetchPage<PatientRow>(q, query, orderBy);
  return { items: rows.map(toPatientRecord), total };
}

export async function updatePatient(
  conn: Conn,
  id: string,
  expectedVersion: number,
  columns: PatientColumns,
): Promise<UpdateOutcome<PatientRecord>> {
  const result = await updateVersioned<PatientRow>(conn, 'patients', id, expectedVersion, columns);
  if (result.outcome === 'updated') return { outcome: 'updated', row: toPatientRecord(result.row) };
  if (result.outcome === 'stale')
    return { outcome: 'stale', current: toPatientRecord(result.current) };
  return result;
}
