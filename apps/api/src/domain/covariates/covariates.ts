import {
  covariateCanonicalUnits,
  type Covariate,
  type CovariateCreate,
  type CovariateListQuery,
  type CovariateUpdate,
  type Page,
  type RowSource,
} from '@ebbtide/contracts';
import { recordAudit } from '../../data-access/audit';
import { databaseErrorKind, inTransaction, type Conn } from '../../data-access/casework-db';
import {
  deleteCovariate,
  findCovariate,
  insertCovariate,
  listCovariates,
  updateCovariate,
  type CovariateColumns,
  type CovariateRecord,
} from '../../data-access/covariates-repo';
import type { PatientRecord } from '../../data-access/patients-repo';
import { notFound } from '../../lib/app-error';
import { isInFuture, resolveTime, showTime } from '../doses/timing';
import {
  assertMayWrite,
  auditActor,
  invalid,
  staleVersion,
  type CaseworkActor,
} from '../patients/common';
import { requirePatient, toPatientDto } from '../patients/patients';
import { checkCovariate } from './units';

export function toCovariateDto(c: CovariateRecord, ageYears = 50): Covariate {
  let echo = '';
  if (c.kind === 'dialysis') echo = `dialysis: ${c.dialysisStatus}`;
  else if (c.value !== null && c.unit)
    echo = checkCovariate(c.kind, c.value, c.unit, ageYears).echo;
  return {
    id: c.id,
    version: c.version,
    patientId: c.patientId,
    kind: c.kind,
    value: c.value,
    unit: c.unit,
    canonicalValue: c.canonicalValue,
    canonicalUnit: covariateCanonicalUnits[c.kind],
    echo,
    weightSource: c.weightSource,
    dialysisStatus: c.dialysisStatus,
    observedAt: c.observedAt,
    observedHour: c.observedHour,
    note: c.note,
    source: c.source,
    createdAt: c.createdAt,
    updatedAt: c.updatedAt,
  };
}

export type CovariateCheckResult =
  | { ok: true; columns: CovariateColumns; echo: string }
  | { ok: false; errors: Record<string, string[]> };

/** Validates one covariate for a patient (shared by typed entry and the FHIR import). */
export function checkCovariateInput(
  patient: PatientRecord,
  input: CovariateCreate,
  now: Date,
  source: RowSource,
): CovariateCheckResult {
  const errors: Record<string, string[]> = {};
  const add = (f: string, m: string) => (errors[f] ??= []).push(m);
  const time = resolveTime(
    patient.isTeaching,
    input.observedAt,
    input.observedHour,
    'observedAt',
    'observedHour',
    errors,
  );
  if (time && isInFuture(time, now))
    add('observedAt', `the observation time ${showTime(time)} is in the future`);
  const columns: CovariateColumns = {
    patient_id: patient.id,
    is_teaching: patient.isTeaching,
    kind: input.kind,
    observed_at: time?.at ?? null,
    observed_hour: time?.hour ?? null,
    note: input.note ?? null,
    source,
  };
  let echo = '';
  if (input.kind === 'dialysis') {
    if (!input.dialysisStatus) add('dialysisStatus', 'required for a dialysis observation');
    if (input.value !== undefined || input.unit !== undefined)
      add('value', 'a dialysis observation has a status, not a value');
    columns.dialysis_status = input.dialysisStatus ?? null;
    echo = `dialysis: ${input.dialysisStatus}`;
  } else {
    if (input.dialysisStatus !== undefined)
      add('dialysisStatus', `only a dialysis observation has a status`);
    if (input.value === undefined) add('value', 'required');
    if (input.unit === undefined) add('unit', 'required (a UCUM code)');
    if (input.kind === 'weight' && !input.weightSource)
      add('weightSource', 'say whether the weight was measured, stated or estimated');
    if (input.kind !== 'weight' && input.weightSource)
      add('weightSource', 'only a weight has a source');
    if (input.value !== undefined && input.unit !== undefined) {
      const check = checkCovariate(
        input.kind,
        input.value,
        input.unit,
        toPatientDto(patient, now).ageYears,
      );
      for (const [f, ms] of Object.entries(check.errors)) for (const m of ms) add(f, m);
      columns.value = input.value;
      columns.unit = input.unit;
      columns.canonical_value = check.canonicalValue;
      echo = check.echo;
    }
    columns.weight_source = input.weightSource ?? null;
  }
  if (Object.keys(errors).length) return { ok: false, errors };
  return { ok: true, columns, echo };
}

function mapDbError(error: unknown): never {
  const kind = databaseErrorKind(error);
  if (kind?.kind === 'unique')
    throw invalid({
      observedAt: ['this kind of observation is already recorded at that time (duplicate)'],
    });
  const check = databaseErrorKind(error);
  if (check?.kind === 'check') {
    throw invalid({
      _: [`the value was refused by the database's plausibility rule ${check.constraint}`],
    });
  }
  throw error;
}

export async function createCovariate(
  db: Conn,
  actor: CaseworkActor,
  patientId: string,
  input: CovariateCreate,
  now = new Date(),
): Promise<Covariate> {
  const patient = await requirePatient(db, actor, patientId);
  assertMayWrite(actor, patient.isTeaching);
  const check = checkCovariateInput(patient, input, now, 'typed');
  if (!check.ok) throw invalid(check.errors);
  try {
    return await inTransaction(db, async (trx) => {
      const created = await insertCovariate(trx, { ...check.columns, created_by: actor.userId });
      await recordAudit(trx, {
        actor: auditActor(actor),
        action: 'covariate.create',
        entityType: 'covariate',
        entityId: created.id,
        after: created,
      });
      return toCovariateDto(created, toPatientDto(patient, now).ageYears);
    });
  } catch (error) {
    mapDbError(error);
  }
}

export async function browseCovariates(
  db: Conn,
  actor: CaseworkActor,
  patientId: string,
  query: CovariateListQuery,
): Promise<Page<Covariate>> {
  const patient = await requirePatient(db, actor, patientId);
  const { items, total } = await listCovariates(db, patient.id, query);
  const age = toPatientDto(patient).ageYears;
  return {
    items: items.map((c) => toCovariateDto(c, age)),
    page: query.page,
    pageSize: query.pageSize,
    total,
  };
}

async function requireCovariate(db: Conn, actor: CaseworkActor, id: string) {
  const c = await findCovariate(db, actor, id);
  if (!c) throw notFound('Covariate');
  const patient = await requirePatient(db, actor, c.patientId);
  return { covariate: c, patient };
}

export async function getCovariate(db: Conn, actor: CaseworkActor, id: string): Promise<Covariate> {
  const { covariate, patient } = await requireCovariate(db, actor, id);
  return toCovariateDto(covariate, toPatientDto(patient).ageYears);
}

export async function editCovariate(
  db: Conn,
  actor: CaseworkActor,
  id: string,
  input: CovariateUpdate,
  now = new Date(),
): Promise<Covariate> {
  const { covariate: before, patient } = await requireCovariate(db, actor, id);
  assertMayWrite(actor, patient.isTeaching);
  const { version, ...changes } = input;
  const merged: CovariateCreate = {
    kind: before.kind,
    value: changes.value ?? before.value ?? undefined,
    unit: changes.unit ?? before.unit ?? undefined,
    weightSource: changes.weightSource ?? before.weightSource ?? undefined,
    dialysisStatus: changes.dialysisStatus ?? before.dialysisStatus ?? undefined,
    observedAt: patient.isTeaching
      ? changes.observedAt
      : (changes.observedAt ?? before.observedAt ?? undefined),
    observedHour: patient.isTeaching
      ? (changes.observedHour ?? before.observedHour ?? undefined)
      : changes.observedHour,
    note: changes.note ?? before.note ?? undefined,
  };
  const check = checkCovariateInput(patient, merged, now, before.source);
  if (!check.ok) throw invalid(check.errors);
  try {
    return await inTransaction(db, async (trx) => {
      const result = await updateCovariate(trx, id, version, check.columns);
      if (result.outcome === 'missing') throw notFound('Covariate');
      if (result.outcome === 'stale')
        throw staleVersion('covariate', version, toCovariateDto(result.current), input);
      await recordAudit(trx, {
        actor: auditActor(actor),
        action: 'covariate.update',
        entityType: 'covariate',
        entityId: id,
        before,
        after: result.row,
      });
      return toCovariateDto(result.row, toPatientDto(patient, now).ageYears);
    });
  } catch (error) {
    mapDbError(error);
  }
}

export async function removeCovariate(
  db: Conn,
  actor: CaseworkActor,
  id: string,
  version: number,
): Promise<void> {
  const { patient } = await requireCovariate(db, actor, id);
  assertMayWrite(actor, patient.isTeaching);
  await inTransaction(db, async (trx) => {
    const result = await deleteCovariate(trx, id, version);
    if (result.outcome === 'missing') throw notFound('Covariate');
    if (result.outcome === 'stale')
      throw staleVersion('covariate', version, toCovariateDto(result.current), { version });
    await recordAudit(trx, {
      actor: auditActor(actor),
      action: 'covariate.delete',
      entityType: 'covariate',
      entityId: id,
      before: result.row,
    });
  });
}
