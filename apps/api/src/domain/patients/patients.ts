import type {
  Patient,
  PatientCreate,
  PatientListQuery,
  PatientUpdate,
  Page,
} from '@ebbtide/contracts';
import { recordAudit } from '../../data-access/audit';
import { databaseErrorKind, inTransaction, type Conn } from '../../data-access/casework-db';
import {
  findPatient,
  insertPatient,
  listPatients,
  updatePatient,
  type PatientColumns,
  type PatientRecord,
} from '../../data-access/patients-repo';
import { notFound } from '../../lib/app-error';
import { assertMayWrite, auditActor, invalid, staleVersion, type CaseworkActor } from './common';

/** Age in whole years at `on` from an ISO date of birth. */
export function ageOn(birthDate: string, on: Date): number {
  const [y, m, d] = birthDate.split('-').map(Number) as [number, number, number];
  let age = on.getUTCFullYear() - y;
  if (on.getUTCMonth() + 1 < m || (on.getUTCMonth() + 1 === m && on.getUTCDate() < d)) age -= 1;
  return age;
}

export function toPatientDto(p: PatientRecord, now = new Date()): Patient {
  return {
    id: p.id,
    version: p.version,
    isTeaching: p.isTeaching,
    mrn: p.mrn,
    givenName: p.givenName,
    familyName: p.familyName,
    displayName: p.isTeaching
      ? (p.teachingLabel ?? 'Teaching case')
      : `${(p.familyName ?? '').toUpperCase()}, ${p.givenName ?? ''}`,
    teachingLabel: p.teachingLabel,
    sex: p.sex,
    birthDate: p.birthDate,
    ageYears: p.isTeaching ? (p.ageYears ?? 0) : ageOn(p.birthDate as string, now),
    ward: p.ward,
    createdAt: p.createdAt,
    updatedAt: p.updatedAt,
  };
}

function checkBirthDate(birthDate: string | undefined, now: Date): void {
  if (birthDate === undefined) return;
  if (Date.parse(`${birthDate}T00:00:00Z`) > now.getTime()) {
    throw invalid({ birthDate: ['the date of birth is in the future'] });
  }
  if (ageOn(birthDate, now) > 120)
    throw invalid({ birthDate: ['an age over 120 years is implausible'] });
}

function mapUniqueError(error: unknown): never {
  const kind = databaseErrorKind(error);
  if (kind?.kind === 'unique' && kind.constraint.includes('mrn')) {
    throw invalid({ mrn: ['a patient with this MRN already exists (duplicate)'] });
  }
  throw error;
}

export async function createPatient(
  db: Conn,
  actor: CaseworkActor,
  input: PatientCreate,
  now = new Date(),
): Promise<Patient> {
  assertMayWrite(actor, input.isTeaching === true);
  const columns: PatientColumns = input.isTeaching
    ? {
        is_teaching: true,
        teaching_label: input.teachingLabel,
        age_years: input.ageYears,
        sex: input.sex,
        ward: input.ward ?? null,
        created_by: actor.userId,
      }
    : {
        is_teaching: false,
        mrn: input.mrn,
        given_name: input.givenName,
        family_name: input.familyName,
        birth_date: input.birthDate,
        sex: input.sex,
        ward: input.ward ?? null,
        created_by: actor.userId,
      };
  if (!input.isTeaching) checkBirthDate(input.birthDate, now);
  try {
    return await inTransaction(db, async (trx) => {
      const created = await insertPatient(trx, columns);
      await recordAudit(trx, {
        actor: auditActor(actor),
        action: 'patient.create',
        entityType: 'patient',
        entityId: created.id,
        after: created,
      });
      return toPatientDto(created, now);
    });
  } catch (error) {
    mapUniqueError(error);
  }
}

export async function getPatient(db: Conn, actor: CaseworkActor, id: string): Promise<Patient> {
  const p = await findPatient(db, actor, id);
  if (!p) throw notFound('Patient');
  return toPatientDto(p);
}

/** The patient record itself, for other use cases (404 when the actor may not see it). */
export async function requirePatient(
  db: Conn,
  actor: CaseworkActor,
  id: string,
): Promise<PatientRecord> {
  const p = await findPatient(db, actor, id);
  if (!p) throw notFound('Patient');
  return p;
}

export async function browsePatients(
  db: Conn,
  actor: CaseworkActor,
  query: PatientListQuery,
): Promise<Page<Patient>> {
  const { items, total } = await listPatients(db, actor, query);
  const now = new Date();
  return {
    items: items.map((p) => toPatientDto(p, now)),
    page: query.page,
    pageSize: query.pageSize,
    total,
  };
}

export async function editPatient(
  db: Conn,
  actor: CaseworkActor,
  id: string,
  input: PatientUpdate,
  now = new Date(),
): Promise<Patient> {
  const before = await requirePatient(db, actor, id);
  assertMayWrite(actor, before.isTeaching);
  const { version, ...changes } = input;
  const identityFields = ['mrn', 'givenName', 'familyName', 'birthDate'] as const;
  if (before.isTeaching) {
    const wrong = identityFields.filter((f) => changes[f] !== undefined);
    if (wrong.length) {
      throw invalid(
        Object.fromEntries(wrong.map((f) => [f, ['teaching cases carry no identifiers']])),
      );
    }
  } else {
    const wrong = (['teachingLabel', 'ageYears'] as const).filter((f) => changes[f] !== undefined);
    if (wrong.length)
      throw invalid(
        Object.fromEntries(wrong.map((f) => [f, ['only teaching cases have this field']])),
      );
    checkBirthDate(changes.birthDate, now);
  }
  const columns: PatientColumns = {};
  if (changes.mrn !== undefined) columns.mrn = changes.mrn;
  if (changes.givenName !== undefined) columns.given_name = changes.givenName;
  if (changes.familyName !== undefined) columns.family_name = changes.familyName;
  if (changes.birthDate !== undefined) columns.birth_date = changes.birthDate;
  if (changes.sex !== undefined) columns.sex = changes.sex;
  if (changes.ward !== undefined) columns.ward = changes.ward;
  if (changes.teachingLabel !== undefined) columns.teaching_label = changes.teachingLabel;
  if (changes.ageYears !== undefined) columns.age_years = changes.ageYears;
  try {
    return await inTransaction(db, async (trx) => {
      const result = await updatePatient(trx, id, version, columns);
      if (result.outcome === 'missing') throw notFound('Patient');
      if (result.outcome === 'stale')
        throw staleVersion('patient', version, toPatientDto(result.current), input);
      await recordAudit(trx, {
        actor: auditActor(actor),
        action: 'patient.update',
        entityType: 'patient',
        entityId: id,
        before,
        after: result.row,
      });
      return toPatientDto(result.row, now);
    });
  } catch (error) {
    mapUniqueError(error);
  }
}
