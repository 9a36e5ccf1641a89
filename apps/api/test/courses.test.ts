import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp } from './helpers';
import { anonymousAgent, signedInAgent, type SignedInClient } from './support/sign-in';
import {
  auditRows,
  createCourse,
  createRealPatient,
  createTeachingPatient,
  ensureTestModels,
  TEST_MODELS,
} from './casework-helpers';

const { app, db } = createTestApp();
let pharmacist: SignedInClient;
let reviewer: SignedInClient;
let trainee: SignedInClient;

beforeAll(async () => {
  await ensureTestModels(db);
  pharmacist = await signedInAgent(app, 'pharmacist');
  reviewer = await signedInAgent(app, 'reviewer');
  trainee = await signedInAgent(app, 'trainee');
});
afterAll(() => db.destroy());

describe('POST /api/patients/:id/courses', () => {
  it('when a valid course is sent, then it records the model id and its latest version, owned by the caller', async () => {
    // Arrange
    const p = await createRealPatient(pharmacist);
    // Act
    const res = await pharmacist.post(`/api/patients/${p.id}/courses`).send({
      drug: 'vancomycin',
      modelId: TEST_MODELS.vancomycin,
      indication: 'MRSA pneumonia',
      micMgL: 1,
      micMethod: 'broth microdilution',
      target: { metric: 'auc24', low: 400, high: 600 },
    });
    // Assert
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({
      modelId: TEST_MODELS.vancomycin,
      modelVersion: 1,
      status: 'active',
      ownerUserId: pharmacist.user.id,
      version: 1,
    });
    const row = await db('courses').where({ id: res.body.id }).first();
    expect(row).toMatchObject({
      patient_id: p.id,
      is_teaching: false,
      target_low: 400,
      target_high: 600,
    });
    expect((await auditRows(db, 'course', res.body.id))[0].action).toBe('course.create');
  });

  it('when the model belongs to another drug or does not exist, then it answers 400 on modelId', async () => {
    // Arrange
    const p = await createRealPatient(pharmacist);
    // Act
    const wrong = await pharmacist.post(`/api/patients/${p.id}/courses`).send({
      drug: 'gentamicin',
      modelId: TEST_MODELS.vancomycin,
      indication: 'x',
      target: { metric: 'peak', low: 8, high: 10 },
    });
    const missing = await pharmacist.post(`/api/patients/${p.id}/courses`).send({
      drug: 'gentamicin',
      modelId: 'no-such-model',
      indication: 'x',
      target: { metric: 'peak', low: 8, high: 10 },
    });
    // Assert
    expect(wrong.status).toBe(400);
    expect(wrong.body.fieldErrors.modelId[0]).toMatch(/vancomycin model/);
    expect(missing.body.fieldErrors.modelId[0]).toMatch(/no drug model/);
  });

  it('when the target is inverted or the MIC is not positive, then it answers 400', async () => {
    // Arrange
    const p = await createRealPatient(pharmacist);
    // Act
    const res = await pharmacist.post(`/api/patients/${p.id}/courses`).send({
      drug: 'vancomycin',
      modelId: TEST_MODELS.vancomycin,
      indication: 'x',
      micMgL: 0,
      target: { metric: 'auc24', low: 600, high: 400 },
    });
    // Assert
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.fieldErrors)).toEqual(expect.arrayContaining(['micMgL', 'target']));
  });

  it('when a trainee creates a course, then it answers 403; when signed out, 401', async () => {
    // Arrange
    const t = await createTeachingPatient(pharmacist);
    // Act
    const body = {
      drug: 'vancomycin',
      modelId: TEST_MODELS.vancomycin,
      indication: 'x',
      target: { metric: 'auc24', low: 400, high: 600 },
    };
    // Assert
    expect((await trainee.post(`/api/patients/${t.id}/courses`).send(body)).status).toBe(403);
    expect(
      (await anonymousAgent(app).post(`/api/patients/${t.id}/courses`).send(body)).status,
    ).toBe(401);
  });
});

describe('GET /api/courses', () => {
  it('when a trainee lists courses, then no course of a real patient comes back', async () => {
    // Arrange
    const p = await createRealPatient(pharmacist);
    const real = await createCourse(pharmacist, p.id);
    const t = await createTeachingPatient(pharmacist);
    const teaching = await createCourse(pharmacist, t.id);
    // Act
    const list = await trainee.get('/api/courses?pageSize=100&sort=createdAt&order=desc');
    const one = await trainee.get(`/api/courses/${real.id}`);
    // Assert
    expect(list.body.items.every((c: { isTeaching: boolean }) => c.isTeaching)).toBe(true);
    expect(list.body.items.map((c: { id: string }) => c.id)).toContain(teaching.id);
    expect(one.status).toBe(404);
    expect((await trainee.get(`/api/courses/${real.id}/doses`)).status).toBe(404);
    expect((await trainee.get(`/api/courses/${real.id}/levels`)).status).toBe(404);
  });

  it('when filtering by patient and drug, then only matching courses come back', async () => {
    // Arrange
    const p = await createRealPatient(pharmacist);
    await createCourse(pharmacist, p.id, 'vancomycin');
    await createCourse(pharmacist, p.id, 'gentamicin', {
      target: { metric: 'peak-mic-ratio', low: 8, high: null },
    });
    // Act
    const res = await reviewer.get(`/api/patients/${p.id}/courses?drug=gentamicin`);
    // Assert
    expect(res.body.total).toBe(1);
    expect(res.body.items[0].drug).toBe('gentamicin');
  });
});

describe('PATCH /api/courses/:id', () => {
  it('when the version matches, then the status changes; when stale, 409 and nothing overwritten', async () => {
    // Arrange
    const p = await createRealPatient(pharmacist);
    const c = await createCourse(pharmacist, p.id);
    // Act
    const ok = await reviewer.patch(`/api/courses/${c.id}`).send({ version: 1, status: 'on-hold' });
    const stale = await pharmacist
      .patch(`/api/courses/${c.id}`)
      .send({ version: 1, status: 'completed' });
    // Assert
    expect(ok.status).toBe(200);
    expect(ok.body).toMatchObject({ status: 'on-hold', version: 2 });
    expect(stale.status).toBe(409);
    expect(stale.body).toMatchObject({ yourVersion: 1, currentVersion: 2 });
    expect((await db('courses').where({ id: c.id }).first()).status).toBe('on-hold');
  });

  it('when an unknown field is sent, then it answers 400', async () => {
    // Arrange
    const p = await createRealPatient(pharmacist);
    const c = await createCourse(pharmacist, p.id);
    // Act
    const res = await pharmacist
      .patch(`/api/courses/${c.id}`)
      .send({ version: 1, drug: 'gentamicin' });
    // Assert
    expect(res.status).toBe(400);
  });
});
