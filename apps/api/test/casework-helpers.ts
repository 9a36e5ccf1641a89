import { randomBytes } from 'node:crypto';
import {
  amikacinExtendedInterval,
  drugModelLibrary,
  gentamicinExtendedInterval,
  phenytoinGrasela1983,
  tobramycinExtendedInterval,
  vancomycinGoti2018,
} from '@ebbtide/kinetics';
import type { Db } from '../src/data-access/db';
import { syncEngineLibrary } from '../src/domain/drug-models/drug-models';
import type { SignedInClient } from './support/sign-in';

/**
 * Helpers for the casework API tests. Every test creates its own rows through the API;
 * only the drug models (shared reference data, immutable once stored) are inserted here.
 */
/** The engine's built-in library models, synced into drug_models. */
export const TEST_MODELS = {
  vancomycin: vancomycinGoti2018.id,
  gentamicin: gentamicinExtendedInterval.id,
  tobramycin: tobramycinExtendedInterval.id,
  amikacin: amikacinExtendedInterval.id,
  phenytoin: phenytoinGrasela1983.id,
} as const;

export async function ensureTestModels(db: Db): Promise<void> {
  await syncEngineLibrary(db, drugModelLibrary);
}

export const uniqueMrn = () => `KB-${randomBytes(5).toString('hex').toUpperCase()}`;

export const hoursAgo = (h: number) => new Date(Date.now() - h * 3_600_000).toISOString();

export async function createRealPatient(
  client: SignedInClient,
  overrides: Record<string, unknown> = {},
): Promise<{ id: string; version: number; mrn: string }> {
  const res = await client.post('/api/patients').send({
    mrn: uniqueMrn(),
    givenName: 'Avery',
    familyName: 'Testperson',
    sex: 'male',
    birthDate: '1966-03-14',
    ward: '4 North',
    ...overrides,
  });
  if (res.status !== 201)
    throw new Error(`patient create failed: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body;
}

export async function createTeachingPatient(
  client: SignedInClient,
  overrides: Record<string, unknown> = {},
): Promise<{ id: string; version: number }> {
  const res = await client.post('/api/patients').send({
    isTeaching: true,
    teachingLabel: `Teaching case ${randomBytes(3).toString('hex')}`,
    sex: 'female',
    ageYears: 58,
    ...overrides,
  });
  if (res.status !== 201)
    throw new Error(`teaching patient create failed: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body;
}

export async function createCourse(
  client: SignedInClient,
  patientId: string,
  drug: keyof typeof TEST_MODELS = 'vancomycin',
  overrides: Record<string, unknown> = {},
): Promise<{ id: string; version: number; isTeaching: boolean }> {
  const res = await client.post(`/api/patients/${patientId}/courses`).send({
    drug,
    modelId: TEST_MODELS[drug],
    indication: 'MRSA bacteraemia',
    micMgL: 1,
    target: { metric: 'auc24', low: 400, high: 600 },
    ...overrides,
  });
  if (res.status !== 201)
    throw new Error(`course create failed: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body;
}

export async function auditRows(db: Db, entityType: string, entityId: string) {
  return db('audit_events').where({ entity_type: entityType, entity_id: entityId }).orderBy('id');
}
