import type { CovariateKind, CovariateListQuery } from '@ebbtide/contracts';
import {
  fetchPage,
  iso,
  scoped,
  updateVersioned,
  type Conn,
  type UpdateOutcome,
} from './casework-db';
import type { ScopedActor } from './scope';

export interface CovariateRecord {
  id: string;
  version: number;
  patientId: string;
  isTeaching: boolean;
  kind: CovariateKind;
  value: number | null;
  unit: string | null;
  canonicalValue: number | null;
  weightSource: 'measured' | 'stated' | 'estimated' | null;
  dialysisStatus: 'none' | 'intermittent-haemodialysis' | 'continuous-rrt' | 'peritoneal' | null;
  observedAt: string | null;
  observedHour: number | null;
  note: string | null;
  source: 'typed' | 'csv' | 'fhir' | 'seed';
  createdAt: string;
  updatedAt: string;
}

interface CovariateRow {
  id: string;
  version: number;
  patient_id: string;
  is_teaching: boolean;
  kind: CovariateKind;
  value: number | null;
  unit: string | null;
  canonical_value: number | null;
  weight_source: CovariateRecord['weightSource'];
  dialysis_status: CovariateRecord['dialysisStatus'];
  observed_at: Date | null;
  observed_hour: number | null;
  note: string | null;
  source: CovariateRecord['source'];
  created_at: Date;
  updated_at: Date;
}

const toRecord = (r: CovariateRow): CovariateRecord => ({
  id: r.id,
  version: r.version,
  patientId: r.patient_id,
  isTeaching: r.is_teaching,
  kind: r.kind,
  value: r.value,
  unit: r.unit,
  canonicalValue: r.canonical_value,
  weightSource: r.weight_source,
  dialysisStatus: r.dialysis_status,
  observedAt: iso(r.observed_at),
  observedHour: r.observed_hour,
  note: r.note,
  source: r.source,
  createdAt: iso(r.created_at) as string,
  updatedAt: iso(r.updated_at) as string,
});

export type CovariateColumns = Partial<{
  patient_id: string;
  is_teaching: boolean;
  kind: CovariateKind;
  value: number | null;
  unit: string | null;
  canonical_value: number | null;
  weight_source: string | null;
  dialysis_status: string | null;
  observed_at: string | null;
  observed_hour: number | null;
  note: string | null;
  source: string;
  created_by: string | null;
}>;

export async function insertCovariate(
  conn: Conn,
  columns: CovariateColumns,
): Promise<CovariateRecord> {
  const [row] = (await conn('covariates').insert(columns).returning('*')) as CovariateRow[];
  return toRecord(row as CovariateRow);
}

export async function findCovariate(
  conn: Conn,
  actor: ScopedActor,
  id: string,
): Promise<CovariateRecord | undefined> {
  const row = (await scoped(
    actor,
    conn('covariates').where('covariates.id', id),
    'covariates',
  ).first()) as CovariateRow | undefined;
  return row ? toRecord(row) : undefined;
}

/** All covariates of a patient, oldest first (for derived values and the engine). */
export async function covariatesOfPatient(
  conn: Conn,
  patientId: string,
): Promise<CovariateRecord[]> {
  const rows = (await conn('covariates')
    .where({ patient_id: patientId })
    .orderByRaw(
      'observed_at asc nulls last, observed_hour asc nulls last, created_at asc',
    )) as CovariateRow[];
  return rows.map(toRecord);
}

const sortColumns: Record<CovariateListQuery['sort'], string[]> = {
  observedAt: ['covariates.observed_at', 'covariates.observed_hour'],
  kind: ['covariates.kind', 'covariates.observed_at'],
  createdAt: ['covariates.created_at'],
};

export async function listCovariates(
  conn: Conn,
  patientId: string,
  query: CovariateListQuery,
): Promise<{ items: CovariateRecord[]; total: number }> {
  const q = conn('covariates').select('covariates.*').where('covariates.patient_id', patientId);
  if (query.kind) q.where('covariates.kind', query.kind);
  const orderBy = [...sortColumns[query.sort], 'covariates.id'].map((column) => ({ column }));
  const { rows, total } = await fetchPage<CovariateRow>(q, query, orderBy);
  return { items: rows.map(toRecord), total };
}

export async function updateCovariate(
  conn: Conn,
  id: string,
  expectedVersion: number,
  columns: CovariateColumns,
): Promise<UpdateOutcome<CovariateRecord>> {
  const r = await updateVersioned<CovariateRow>(conn, 'covariates', id, expectedVersion, columns);
  if (r.outcome === 'updated') return { outcome: 'updated', row: toRecord(r.row) };
  if (r.outcome === 'stale') return { outcome: 'stale', current: toRecord(r.current) };
  return r;
}

export async function deleteCovariate(conn: Conn, id: string, expectedVersion: number) {
  const current = (await conn('covariates').where({ id }).first()) as CovariateRow | undefined;
  if (!current) return { outcome: 'missing' as const };
  if (current.version !== expectedVersion)
    return { outcome: 'stale' as const, current: toRecord(current) };
  await conn('covariates').where({ id, version: expectedVersion }).del();
  return { outcome: 'updated' as const, row: toRecord(current) };
}
