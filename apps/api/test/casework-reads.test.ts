import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp } from './helpers';
import { anonymousAgent, signedInAgent, type SignedInClient } from './support/sign-in';
import { createCourse, createRealPatient, ensureTestModels, hoursAgo } from './casework-helpers';

const { app, db } = createTestApp();
let pharmacist: SignedInClient;
let reviewer: SignedInClient;

beforeAll(async () => {
  await ensureTestModels(db);
  pharmacist = await signedInAgent(app, 'pharmacist');
  reviewer = await signedInAgent(app, 'reviewer');
});
afterAll(() => db.destroy());

/** A course with one dose, one level and one covariate, made through the API. */
async function fullCourse() {
  const p = await createRealPatient(pharmacist);
  const cov = await pharmacist
    .post(`/api/patients/${p.id}/covariates`)
    .send({ kind: 'serum-creatinine', value: 97, unit: 'umol/L', observedAt: hoursAgo(30) })
    .expect(201);
  const c = await createCourse(pharmacist, p.id);
  const d = await pharmacist
    .post(`/api/courses/${c.id}/doses`)
    .send({
      amount: 1500,
      unit: 'mg',
      route: 'iv-infusion',
      startAt: hoursAgo(20),
      infusionMinutes: 90,
    })
    .expect(201);
  const l1 = await pharmacist
    .post(`/api/courses/${c.id}/levels`)
    .send({ value: 31.2, unit: 'mg/L', collectedAt: hoursAgo(17), sampleKind: 'peak' })
    .expect(201);
  const l2 = await pharmacist
    .post(`/api/courses/${c.id}/levels`)
    .send({ value: 9.8, unit: 'ug/mL', collectedAt: hoursAgo(9), sampleKind: 'random' })
    .expect(201);
  return { patient: p, covariate: cov.body, course: c, dose: d.body, levels: [l1.body, l2.body] };
}

describe('GET /api/courses/:id', () => {
  it('when a reviewer opens a course, then it comes back with its model version and target', async () => {
    // Arrange
    const { course } = await fullCourse();
    // Act
    const res = await reviewer.get(`/api/courses/${course.id}`);
    // Assert
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({
      id: course.id,
      modelVersion: 1,
      target: { metric: 'auc24', low: 400, high: 600 },
      status: 'active',
    });
  });
});

describe('GET /api/covariates/:id, /api/doses/:id, /api/levels/:id', () => {
  it('when each row is read by id, then it echoes its units', async () => {
    // Arrange
    const { covariate, dose, levels } = await fullCourse();
    // Act
    const c = await reviewer.get(`/api/covariates/${covariate.id}`);
    const d = await reviewer.get(`/api/doses/${dose.id}`);
    const l = await reviewer.get(`/api/levels/${levels[1].id}`);
    // Assert
    expect(c.body.echo).toBe('97 µmol/L (1.1 mg/dL)');
    expect(d.body).toMatchObject({ echo: '1500 mg (1.5 g)', durationH: 1.5 });
    expect(l.body).toMatchObject({
      unit: 'ug/mL',
      valueMgL: 9.8,
      echo: '9.8 µg/mL (6.762 µmol/L)',
    });
  });

  it('when an id does not exist, then it answers 404', async () => {
    const missing = '00000000-0000-4000-8000-000000000000';
    for (const path of ['covariates', 'doses', 'levels', 'courses', 'patients']) {
      expect((await reviewer.get(`/api/${path}/${missing}`)).status).toBe(404);
    }
  });
});

describe('GET /api/courses/:id/levels', () => {
  it('when sorted by value descending, then the highest level comes first', async () => {
    // Arrange
    const { course } = await fullCourse();
    // Act
    const res = await reviewer.get(`/api/courses/${course.id}/levels?sort=valueMgL&order=desc`);
    // Assert
    expect(res.body.total).toBe(2);
    expect(res.body.items.map((l: { valueMgL: number }) => l.valueMgL)).toEqual([31.2, 9.8]);
  });
});

describe('list endpoints', () => {
  it('when signed out, then every list answers 401', async () => {
    const { patient, course } = await fullCourse();
    const anon = anonymousAgent(app);
    for (const url of [
      '/api/patients',
      '/api/courses',
      `/api/patients/${patient.id}/covariates`,
      `/api/courses/${course.id}/doses`,
      `/api/courses/${course.id}/levels`,
      '/api/caseload',
    ]) {
      expect((await anon.get(url)).status).toBe(401);
    }
  });
});
