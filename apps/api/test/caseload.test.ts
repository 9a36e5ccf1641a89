import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp } from './helpers';
import { anonymousAgent, signedInAgent, type SignedInClient } from './support/sign-in';
import {
  createCourse,
  createRealPatient,
  createTeachingPatient,
  ensureTestModels,
  hoursAgo,
} from './casework-helpers';

const { app, db } = createTestApp();
let pharmacist: SignedInClient;
let colleague: SignedInClient;
let trainee: SignedInClient;

beforeAll(async () => {
  await ensureTestModels(db);
  pharmacist = await signedInAgent(app, 'pharmacist');
  colleague = await signedInAgent(app, 'pharmacist');
  trainee = await signedInAgent(app, 'trainee');
});
afterAll(() => db.destroy());

type Item = {
  courseId: string;
  due: Array<{ kind: string; dueAt: string | null }>;
  nextAction: string;
  lastDose: { echo: string } | null;
  lastLevel: { echo: string } | null;
  patient: { isTeaching: boolean };
};

describe('GET /api/caseload', () => {
  it('when my active courses have doses but no level, an old level, or a creatinine rise, then each shows what is due', async () => {
    // Arrange
    const a = await createRealPatient(pharmacist);
    const noLevel = await createCourse(pharmacist, a.id);
    for (const h of [30, 18, 6])
      await pharmacist
        .post(`/api/courses/${noLevel.id}/doses`)
        .send({
          amount: 1,
          unit: 'g',
          route: 'iv-infusion',
          startAt: hoursAgo(h),
          infusionMinutes: 60,
        })
        .expect(201);
    const b = await createRealPatient(pharmacist);
    const oldLevel = await createCourse(pharmacist, b.id);
    await pharmacist
      .post(`/api/courses/${oldLevel.id}/doses`)
      .send({
        amount: 1000,
        unit: 'mg',
        route: 'iv-infusion',
        startAt: hoursAgo(220),
        infusionMinutes: 60,
      })
      .expect(201);
    await pharmacist
      .post(`/api/courses/${oldLevel.id}/levels`)
      .send({ value: 10.4, unit: 'umol/L', collectedAt: hoursAgo(200), sampleKind: 'random' })
      .expect(201);
    await pharmacist
      .post(`/api/patients/${b.id}/covariates`)
      .send({ kind: 'serum-creatinine', value: 80, unit: 'umol/L', observedAt: hoursAgo(40) })
      .expect(201);
    await pharmacist
      .post(`/api/patients/${b.id}/covariates`)
      .send({ kind: 'serum-creatinine', value: 130, unit: 'umol/L', observedAt: hoursAgo(4) })
      .expect(201);
    const ward = `Ward ${Date.now().toString(36)}`;
    const c = await createRealPatient(colleague, { ward });
    const others = await createCourse(colleague, c.id);
    // Act
    const mine = await pharmacist.get('/api/caseload?pageSize=100');
    const mineInWard = await pharmacist.get(`/api/caseload?ward=${encodeURIComponent(ward)}`);
    const all = await pharmacist.get(`/api/caseload?scope=all&ward=${encodeURIComponent(ward)}`);
    // Assert
    expect(mine.status).toBe(200);
    const byId = new Map<string, Item>(mine.body.items.map((i: Item) => [i.courseId, i]));
    const first = byId.get(noLevel.id) as Item;
    expect(first.due[0]?.kind).toBe('first-level-due');
    expect(first.due[0]?.dueAt).not.toBeNull();
    expect(first.lastDose?.echo).toBe('1 g (1000 mg)');
    const second = byId.get(oldLevel.id) as Item;
    expect(second.due.map((d) => d.kind)).toEqual(
      expect.arrayContaining(['level-overdue', 'renal-function-unstable']),
    );
    expect(second.lastLevel?.echo).toBe('10.4 µmol/L (15.07 mg/L)');
    expect(byId.has(others.id)).toBe(false);
    expect(all.body.items.map((i: Item) => i.courseId)).toEqual([others.id]);
    expect(mineInWard.body.total).toBe(0);
  });

  it('when a trainee opens the caseload, then no identifiable patient appears', async () => {
    // Act
    const res = await trainee.get('/api/caseload?scope=all&pageSize=100');
    // Assert
    expect(res.status).toBe(200);
    expect(res.body.items.every((i: Item) => i.patient.isTeaching)).toBe(true);
  });

  it('when a pharmacist has a teaching course, then the clinical caseload leaves it out and the trainee sees it', async () => {
    // Arrange
    const practice = await createTeachingPatient(pharmacist);
    const teachingCourse = await createCourse(pharmacist, practice.id);
    // Act
    const staff = await pharmacist.get('/api/caseload?scope=all&pageSize=100');
    const learner = await trainee.get('/api/caseload?scope=all&pageSize=100');
    // Assert
    expect(staff.body.items.map((i: Item) => i.courseId)).not.toContain(teachingCourse.id);
    expect(staff.body.items.every((i: Item) => !i.patient.isTeaching)).toBe(true);
    expect(learner.body.items.map((i: Item) => i.courseId)).toContain(teachingCourse.id);
  });

  it('when the sort is unknown, then it answers 400; signed out, 401', async () => {
    // Assert
    expect((await pharmacist.get('/api/caseload?sort=age')).status).toBe(400);
    expect((await anonymousAgent(app).get('/api/caseload')).status).toBe(401);
  });
});
