import { readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp } from './helpers';
import { signedInAgent, type SignedInClient } from './support/sign-in';
import { createCourse, createRealPatient, ensureTestModels, uniqueMrn } from './casework-helpers';

const { app, db } = createTestApp();
let pharmacist: SignedInClient;
let trainee: SignedInClient;

type Bundle = { resourceType: 'Bundle'; entry: Array<{ resource: Record<string, unknown> }> };
/** A fixture bundle with its MRN replaced, so every test has its own patient. */
function bundle(name: string, mrn: string): Bundle {
  const text = readFileSync(
    new URL(`../../../tests/fixtures/fhir/${name}`, import.meta.url),
    'utf8',
  );
  return JSON.parse(text.replace(/KB-\d{6}/g, mrn)) as Bundle;
}

beforeAll(async () => {
  await ensureTestModels(db);
  pharmacist = await signedInAgent(app, 'pharmacist');
  trainee = await signedInAgent(app, 'trainee');
});
afterAll(() => db.destroy());

async function patientWithCourse() {
  const mrn = uniqueMrn();
  const p = await createRealPatient(pharmacist, {
    mrn,
    familyName: 'Pennington',
    givenName: 'Harlow',
    birthDate: '1961-05-19',
  });
  const c = await createCourse(pharmacist, p.id, 'vancomycin');
  return { mrn, patient: p, course: c };
}

describe('POST /api/imports/fhir', () => {
  it('when a vancomycin bundle is previewed for a known patient, then each resource is mapped, the preliminary result skipped and nothing saved', async () => {
    // Arrange
    const { mrn, patient, course } = await patientWithCourse();
    // Act
    const res = await pharmacist
      .post('/api/imports/fhir')
      .send({ bundle: bundle('vancomycin-course-bundle.json', mrn) });
    // Assert
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({
      patientId: patient.id,
      courseId: course.id,
      refusedCount: 0,
      committed: false,
      unknownCodes: [],
    });
    const byResource = Object.fromEntries(
      res.body.entries.map((e: { resource: string }) => [e.resource, e]),
    );
    expect(byResource['Observation/kb-obs-prelim'].status).toBe('skipped');
    expect(byResource['Observation/kb-obs-scr'].echo).toBe('1.1 mg/dL (97.24 µmol/L)');
    expect(byResource['MedicationAdministration/kb-ma-1'].echo).toBe('1250 mg (1.25 g)');
    expect(await db('doses').where({ course_id: course.id })).toHaveLength(0);
  });

  it('when the bundle is committed, then doses, levels and covariates land with effective[x] as the sample time, never issued', async () => {
    // Arrange
    const { mrn, patient, course } = await patientWithCourse();
    // Act
    const res = await pharmacist
      .post('/api/imports/fhir')
      .send({ bundle: bundle('vancomycin-course-bundle.json', mrn), mode: 'commit' });
    // Assert
    expect(res.status).toBe(201);
    const doses = await db('doses').where({ course_id: course.id }).orderBy('start_at');
    expect(doses).toHaveLength(4);
    expect(doses.map((d) => d.duration_h)).toEqual([1.5, 1.5, 1.5, 1.5]);
    expect(doses[3].administration_status).toBe('missed');
    const levels = await db('levels').where({ course_id: course.id }).orderBy('collected_at');
    expect(
      levels.map((l) => [l.collected_at.toISOString(), l.sample_kind, l.loinc_code, l.source]),
    ).toEqual([
      ['2026-11-29T07:45:00.000Z', 'trough', '4092-3', 'fhir'],
      ['2026-11-29T12:00:00.000Z', 'random', '20578-1', 'fhir'],
    ]);
    const covs = await db('covariates').where({ patient_id: patient.id });
    expect(covs.map((c) => c.kind).sort()).toEqual(['height', 'serum-creatinine', 'weight']);
    expect(covs.find((c) => c.kind === 'serum-creatinine').observed_at.toISOString()).toBe(
      '2026-11-28T06:00:00.000Z',
    );
  });

  it('when the bundle holds an unknown code, then it is reported and nothing is imported', async () => {
    // Arrange
    const { mrn, patient, course } = await patientWithCourse();
    const b = bundle('vancomycin-course-bundle.json', mrn);
    b.entry.push({
      resource: {
        resourceType: 'Observation',
        id: 'k',
        status: 'final',
        code: { coding: [{ system: 'http://loinc.org', code: '2823-3' }] },
        effectiveDateTime: '2026-11-29T06:00:00Z',
        valueQuantity: { value: 4.1, code: 'mmol/L', system: 'http://unitsofmeasure.org' },
      },
    });
    // Act
    const preview = await pharmacist.post('/api/imports/fhir').send({ bundle: b });
    const commit = await pharmacist.post('/api/imports/fhir').send({ bundle: b, mode: 'commit' });
    // Assert
    expect(preview.body.unknownCodes).toEqual(['http://loinc.org|2823-3']);
    expect(commit.status).toBe(400);
    expect(commit.body.code).toBe('import-refused');
    expect(await db('doses').where({ course_id: course.id })).toHaveLength(0);
    expect(await db('levels').where({ course_id: course.id })).toHaveLength(0);
    expect(await db('covariates').where({ patient_id: patient.id })).toHaveLength(0);
  });

  it('when a level in the bundle was drawn during an infusion, then it is refused with the reason', async () => {
    // Arrange
    const { mrn } = await patientWithCourse();
    const b = bundle('vancomycin-course-bundle.json', mrn);
    const trough = b.entry.find((e) => e.resource.id === 'kb-obs-trough');
    (trough as { resource: Record<string, unknown> }).resource.effectiveDateTime =
      '2026-11-28T08:30:00Z';
    const res = await pharmacist.post('/api/imports/fhir').send({ bundle: b });
    // Act
    const entry = res.body.entries.find(
      (e: { resource: string }) => e.resource === 'Observation/kb-obs-trough',
    );
    // Assert
    expect(entry.status).toBe('refused');
    expect(entry.reasons.join(' ')).toMatch(/during the infusion/);
  });

  it('when a bundle brings a new patient, then the patient and covariates are created, metres converted, entered-in-error skipped', async () => {
    // Arrange
    const mrn = uniqueMrn();
    // Act
    const res = await pharmacist
      .post('/api/imports/fhir')
      .send({ bundle: bundle('new-patient-covariates-bundle.json', mrn), mode: 'commit' });
    // Assert
    expect(res.status).toBe(201);
    expect(res.body.patientCreated).toBe(true);
    const patient = await db('patients').where({ mrn }).first();
    expect(patient).toMatchObject({ family_name: 'Achterberg', sex: 'female', is_teaching: false });
    const covs = await db('covariates').where({ patient_id: patient.id }).orderBy('observed_at');
    expect(covs).toHaveLength(5);
    expect(covs.find((c) => c.kind === 'height').canonical_value).toBeCloseTo(163, 9);
    expect(covs.find((c) => c.kind === 'albumin').canonical_value).toBeCloseTo(31, 9);
    const derived = await pharmacist.get(`/api/patients/${patient.id}/derived`);
    expect(derived.body.warnings.map((w: { code: string }) => w.code)).toContain(
      'unstable-renal-function',
    );
  });

  it('when the body is not a Bundle, then it answers 400; a trainee gets 403', async () => {
    // Assert
    expect(
      (await pharmacist.post('/api/imports/fhir').send({ bundle: { resourceType: 'Patient' } }))
        .status,
    ).toBe(400);
    expect(
      (await trainee.post('/api/imports/fhir').send({ bundle: { resourceType: 'Bundle' } })).status,
    ).toBe(403);
  });
});
