import { randomBytes } from 'node:crypto';
import type { Db } from '../src/data-access/db';
import type { SignedInClient } from './support/sign-in';

/**
 * Helpers for the casework API tests. Every test creates its own rows through the API;
 * only the drug models (shared reference data, immutable once stored) are inserted here.
 */
export const TEST_MODELS = {
  vancomycin: 'test-vancomycin-1cmt',
  gentamicin: 'test-gentamicin-1cmt',
  tobramycin: 'test-tobramycin-1cmt',
  amikacin: 'test-amikacin-1cmt',
  phenytoin: 'test-phenytoin-mm',
} as const;

const doseRanges = {
  vancomycin: [250, 4500],
  gentamicin: [10, 1200],
  tobramycin: [10, 1200],
  amikacin: [50, 3000],
  phenytoin: [25, 2000],
} as const;

/** A one-compartment definition in the shape of an engine library entry. */
function definition(drug: keyof typeof TEST_MODELS) {
  const mm = drug === 'phenytoin';
  return {
    id: TEST_MODELS[drug],
    drug,
    title: `${drug} test model`,
    structure: { compartments: 1, elimination: mm ? 'michaelis-menten' : 'linear' },
    routes: ['infusion', 'bolus'],
    parameters: mm
      ? {
          Vmax: { typical: 17.3, unit: 'mg/h' },
          Km: { typical: 5.7, unit: 'mg/L' },
          V1: { typical: 49, unit: 'L' },
        }
      : {
          CL: { typical: drug === 'vancomycin' ? 4.5 : 5, unit: 'L/h' },
          V1: { typical: drug === 'vancomycin' ? 50 : 18, unit: 'L' },
        },
    variability: {},
    residualError: { model: 'proportional', proportional: 0.15 },
    covariates: [],
    references: ['test fixture, not a published model'],
  };
}

export async function ensureTestModels(db: Db): Promise<void> {
  for (const drug of Object.keys(TEST_MODELS) as Array<keyof typeof TEST_MODELS>) {
    await db('drug_models')
      .insert({
        id: TEST_MODELS[drug],
        version: 1,
        drug,
        name: `${drug} test model`,
        source: 'test fixture, not a published model',
        definition: JSON.stringify(definition(drug)),
        plausible_dose_min_mg: doseRanges[drug][0],
        plausible_dose_max_mg: doseRanges[drug][1],
      })
      .onConflict(['id', 'version'])
      .ignore();
  }
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
