import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp } from './helpers';
import { anonymousAgent, signedInAgent, type SignedInClient } from './support/sign-in';
import {
  auditRows,
  createCourse,
  createRealPatient,
  createTeachingPatient,
  ensureTestModels,
  hoursAgo,
} from './casework-helpers';

const { app, db } = createTestApp();
let pharmacist: SignedInClient;
let trainee: SignedInClient;

beforeAll(async () => {
  await ensureTestModels(db);
  pharmacist = await signedInAgent(app, 'pharmacist');
  trainee = await signedInAgent(app, 'trainee');
});
afterAll(() => db.destroy());

/** A vancomycin course with one 1000 mg infusion from 10 h ago to 9 h ago. */
async function courseWithInfusion(drug: 'vancomycin' | 'phenytoin' = 'vancomycin') {
  const p = await createRealPatient(pharmacist);
  const c = await createCourse(
    pharmacist,
    p.id,
    drug,
    drug === 'phenytoin' ? { target: { metric: 'trough', low: 10, high: 20 } } : {},
  );
  const startAt = hoursAgo(10);
  await pharmacist
    .post(`/api/courses/${c.id}/doses`)
    .send({ amount: 1000, unit: 'mg', route: 'iv-infusion', startAt, infusionMinutes: 60 })
    .expect(201);
  return { course: c, infusionStart: Date.parse(startAt) };
}

describe('POST /api/courses/:id/levels', () => {
  it('when a trough in mg/L is entered, then it is stored, echoed in µmol/L too, and audited', async () => {
    // Arrange
    const { course } = await courseWithInfusion();
    // Act
    const res = await pharmacist.post(`/api/courses/${course.id}/levels`).send({
      value: 15,
      unit: 'mg/L',
      collectedAt: hoursAgo(1),
      sampleKind: 'trough',
      assayLowerLimit: 2,
    });
    // Assert
    expect(res.status).toBe(201);
    // Source of the factor: ASHP SI conversion appendix, vancomycin 0.69 µmol/L per mg/L.
    expect(res.body).toMatchObject({
      valueMgL: 15,
      echo: '15 mg/L (10.35 µmol/L)',
      flags: [],
      version: 1,
    });
    expect(await db('levels').where({ id: res.body.id }).first()).toMatchObject({
      unit: 'mg/L',
      value_mg_l: 15,
      sample_kind: 'trough',
    });
    expect((await auditRows(db, 'level', res.body.id))[0].action).toBe('level.create');
  });

  it('when a phenytoin level is in µmol/L, then it is converted with 3.964 and echoed back', async () => {
    // Arrange
    const { course } = await courseWithInfusion('phenytoin');
    // Act
    const res = await pharmacist
      .post(`/api/courses/${course.id}/levels`)
      .send({ value: 59.46, unit: 'umol/L', collectedAt: hoursAgo(1), sampleKind: 'random' });
    // Assert
    expect(res.status).toBe(201);
    expect(res.body.valueMgL).toBeCloseTo(15, 2);
    expect(res.body.echo).toBe('59.46 µmol/L (15 mg/L)');
  });

  it('when a level was collected during the infusion and marked as a trough, then it answers 400 and saves nothing', async () => {
    // Arrange
    const { course, infusionStart } = await courseWithInfusion();
    const during = new Date(infusionStart + 30 * 60_000).toISOString();
    // Act
    const res = await pharmacist
      .post(`/api/courses/${course.id}/levels`)
      .send({ value: 30, unit: 'mg/L', collectedAt: during, sampleKind: 'trough' });
    // Assert
    expect(res.status).toBe(400);
    expect(res.body.fieldErrors.sampleKind[0]).toMatch(/during the infusion/);
    expect(await db('levels').where({ course_id: course.id })).toHaveLength(0);
  });

  it('when it is deliberately marked "during-infusion", then it is kept and flagged', async () => {
    // Arrange
    const { course, infusionStart } = await courseWithInfusion();
    const during = new Date(infusionStart + 30 * 60_000).toISOString();
    // Act
    const res = await pharmacist
      .post(`/api/courses/${course.id}/levels`)
      .send({ value: 30, unit: 'mg/L', collectedAt: during, sampleKind: 'during-infusion' });
    // Assert
    expect(res.status).toBe(201);
    expect(res.body.flags).toEqual(['during-infusion']);
  });

  it('when the level is implausibly high, in the future, or before the course, then it answers 400 per field', async () => {
    // Arrange
    const p = await createRealPatient(pharmacist);
    const c = await createCourse(pharmacist, p.id, 'vancomycin', { startedAt: hoursAgo(24) });
    // Act
    const high = await pharmacist
      .post(`/api/courses/${c.id}/levels`)
      .send({ value: 900, unit: 'mg/L', collectedAt: hoursAgo(1), sampleKind: 'random' });
    const future = await pharmacist
      .post(`/api/courses/${c.id}/levels`)
      .send({ value: 10, unit: 'mg/L', collectedAt: hoursAgo(-3), sampleKind: 'random' });
    const before = await pharmacist
      .post(`/api/courses/${c.id}/levels`)
      .send({ value: 10, unit: 'mg/L', collectedAt: hoursAgo(48), sampleKind: 'random' });
    // Assert
    expect(high.body.fieldErrors.value[0]).toMatch(/above the plausible range/);
    expect(future.body.fieldErrors.collectedAt[0]).toMatch(/future/);
    expect(before.body.fieldErrors.collectedAt[0]).toMatch(/before the course began/);
  });

  it('when the value is below the assay lower limit, then it is kept and flagged', async () => {
    // Arrange
    const { course } = await courseWithInfusion();
    // Act
    const res = await pharmacist.post(`/api/courses/${course.id}/levels`).send({
      value: 1,
      unit: 'mg/L',
      collectedAt: hoursAgo(1),
      sampleKind: 'trough',
      assayLowerLimit: 2,
    });
    // Assert
    expect(res.status).toBe(201);
    expect(res.body.flags).toEqual(['below-assay-limit']);
  });

  it('when the same collection time is entered twice, then the second is refused as a duplicate', async () => {
    // Arrange
    const { course } = await courseWithInfusion();
    const body = { value: 12, unit: 'mg/L', collectedAt: hoursAgo(2), sampleKind: 'trough' };
    await pharmacist.post(`/api/courses/${course.id}/levels`).send(body).expect(201);
    // Act
    const res = await pharmacist.post(`/api/courses/${course.id}/levels`).send(body);
    // Assert
    expect(res.status).toBe(400);
    expect(res.body.fieldErrors.collectedAt[0]).toMatch(/duplicate/);
  });

  it('when the unit or sample kind is unknown, then it answers 400 on that field', async () => {
    // Arrange
    const { course } = await courseWithInfusion();
    // Act
    const res = await pharmacist
      .post(`/api/courses/${course.id}/levels`)
      .send({ value: 12, unit: 'mcg/mL', collectedAt: hoursAgo(2), sampleKind: 'lowest' });
    // Assert
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.fieldErrors)).toEqual(
      expect.arrayContaining(['unit', 'sampleKind']),
    );
  });

  it('when a trainee posts a level, then it answers 403; signed out, 401', async () => {
    // Arrange
    const t = await createTeachingPatient(pharmacist);
    const c = await createCourse(pharmacist, t.id);
    // Act
    const body = { value: 12, unit: 'mg/L', collectedHour: 11, sampleKind: 'trough' };
    // Assert
    expect((await trainee.post(`/api/courses/${c.id}/levels`).send(body)).status).toBe(403);
    expect((await anonymousAgent(app).post(`/api/courses/${c.id}/levels`).send(body)).status).toBe(
      401,
    );
  });
});

describe('PATCH /api/levels/:id', () => {
  it('when the version is stale, then it answers 409 and keeps the saved value', async () => {
    // Arrange
    const { course } = await courseWithInfusion();
    const l = await pharmacist
      .post(`/api/courses/${course.id}/levels`)
      .send({ value: 12, unit: 'mg/L', collectedAt: hoursAgo(2), sampleKind: 'trough' });
    await pharmacist.patch(`/api/levels/${l.body.id}`).send({ version: 1, value: 13 }).expect(200);
    // Act
    const res = await pharmacist.patch(`/api/levels/${l.body.id}`).send({ version: 1, value: 14 });
    // Assert
    expect(res.status).toBe(409);
    expect(res.body).toMatchObject({ currentVersion: 2, yourVersion: 1 });
    expect((await db('levels').where({ id: l.body.id }).first()).value).toBe(13);
  });

  it('when a trainee reads a level of a real course by id, then it answers 404', async () => {
    // Arrange
    const { course } = await courseWithInfusion();
    // Act
    const l = await pharmacist
      .post(`/api/courses/${course.id}/levels`)
      .send({ value: 12, unit: 'mg/L', collectedAt: hoursAgo(2), sampleKind: 'trough' });
    // Assert
    expect((await trainee.get(`/api/levels/${l.body.id}`)).status).toBe(404);
  });
});

describe('DELETE /api/levels/:id', () => {
  it('when the version matches, then the level is removed and the removal audited', async () => {
    // Arrange
    const { course } = await courseWithInfusion();
    // Act
    const l = await pharmacist
      .post(`/api/courses/${course.id}/levels`)
      .send({ value: 12, unit: 'mg/L', collectedAt: hoursAgo(2), sampleKind: 'trough' });
    // Assert
    expect((await pharmacist.delete(`/api/levels/${l.body.id}?version=1`)).status).toBe(204);
    expect((await auditRows(db, 'level', l.body.id)).map((a) => a.action)).toEqual([
      'level.create',
      'level.delete',
    ]);
  });
});
