import { vancomycinGoti2018 } from '@ebbtide/kinetics';
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
let reviewer: SignedInClient;
let trainee: SignedInClient;
let admin: SignedInClient;

beforeAll(async () => {
  await ensureTestModels(db);
  pharmacist = await signedInAgent(app, 'pharmacist');
  reviewer = await signedInAgent(app, 'reviewer');
  trainee = await signedInAgent(app, 'trainee');
  admin = await signedInAgent(app, 'admin');
});
afterAll(() => db.destroy());

async function vancoCourse() {
  const p = await createRealPatient(pharmacist);
  return createCourse(pharmacist, p.id, 'vancomycin');
}

describe('POST /api/courses/:id/doses', () => {
  it('when 1 g is given over 60 min, then it is stored as 1000 mg and echoed "1 g (1000 mg)"', async () => {
    // Arrange
    const c = await vancoCourse();
    const startAt = hoursAgo(10);
    // Act
    const res = await pharmacist
      .post(`/api/courses/${c.id}/doses`)
      .send({ amount: 1, unit: 'g', route: 'iv-infusion', startAt, infusionMinutes: 60 });
    // Assert
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({
      amount: 1,
      unit: 'g',
      amountMg: 1000,
      echo: '1 g (1000 mg)',
      durationH: 1,
      administrationStatus: 'given',
      source: 'typed',
    });
    expect(res.body.endAt).toBe(new Date(Date.parse(startAt) + 3_600_000).toISOString());
    const row = await db('doses').where({ id: res.body.id }).first();
    expect(row).toMatchObject({ amount_mg: 1000, unit: 'g', duration_h: 1, version: 1 });
    expect((await auditRows(db, 'dose', res.body.id))[0].action).toBe('dose.create');
  });

  it('when 1.5 "mg" of vancomycin is typed, then it answers 400 suggesting 1.5 g = 1500 mg and saves nothing', async () => {
    // Arrange
    const c = await vancoCourse();
    // Act
    const res = await pharmacist.post(`/api/courses/${c.id}/doses`).send({
      amount: 1.5,
      unit: 'mg',
      route: 'iv-infusion',
      startAt: hoursAgo(3),
      infusionMinutes: 90,
    });
    // Assert
    expect(res.status).toBe(400);
    expect(res.body.fieldErrors.amount[0]).toMatch(/looks like grams: 1.5 g = 1500 mg/);
    expect(await db('doses').where({ course_id: c.id })).toHaveLength(0);
  });

  it('when an oral dose is entered on an IV vancomycin course, then it answers 400 on the route and saves nothing', async () => {
    // Arrange: the course's model (Goti 2018) has no absorption; oral vancomycin is not absorbed.
    const c = await vancoCourse();
    // Act
    const res = await pharmacist
      .post(`/api/courses/${c.id}/doses`)
      .send({ amount: 125, unit: 'mg', route: 'oral', startAt: hoursAgo(3) });
    // Assert
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.fieldErrors)).toEqual(['route']);
    expect(res.body.fieldErrors.route[0]).toMatch(/models IV doses only: an oral dose/);
    expect(await db('doses').where({ course_id: c.id })).toHaveLength(0);
  });

  it('when 1000 "g" is typed, then it answers 400 suggesting milligrams', async () => {
    // Arrange
    const c = await vancoCourse();
    // Act
    const res = await pharmacist.post(`/api/courses/${c.id}/doses`).send({
      amount: 1000,
      unit: 'g',
      route: 'iv-infusion',
      startAt: hoursAgo(3),
      infusionMinutes: 60,
    });
    // Assert
    expect(res.status).toBe(400);
    expect(res.body.fieldErrors.amount[0]).toMatch(/did you mean 1000 mg/);
  });

  it('when the end time is given instead of the duration, then the duration is derived', async () => {
    // Arrange
    const c = await vancoCourse();
    const startAt = hoursAgo(5);
    const endAt = new Date(Date.parse(startAt) + 90 * 60_000).toISOString();
    // Act
    const res = await pharmacist
      .post(`/api/courses/${c.id}/doses`)
      .send({ amount: 1250, unit: 'mg', route: 'iv-infusion', startAt, endAt });
    // Assert
    expect(res.status).toBe(201);
    expect(res.body.durationH).toBe(1.5);
  });

  it('when an infusion has no duration, ends before it starts, or the time is in the future, then it answers 400 per field', async () => {
    // Arrange
    const c = await vancoCourse();
    // Act
    const noDuration = await pharmacist
      .post(`/api/courses/${c.id}/doses`)
      .send({ amount: 1000, unit: 'mg', route: 'iv-infusion', startAt: hoursAgo(3) });
    const backwards = await pharmacist.post(`/api/courses/${c.id}/doses`).send({
      amount: 1000,
      unit: 'mg',
      route: 'iv-infusion',
      startAt: hoursAgo(3),
      endAt: hoursAgo(4),
    });
    const future = await pharmacist.post(`/api/courses/${c.id}/doses`).send({
      amount: 1000,
      unit: 'mg',
      route: 'iv-infusion',
      startAt: hoursAgo(-2),
      infusionMinutes: 60,
    });
    // Assert
    expect(noDuration.body.fieldErrors.infusionMinutes[0]).toMatch(/duration/);
    expect(backwards.body.fieldErrors.endAt[0]).toMatch(/end after it starts/);
    expect(future.body.fieldErrors.startAt[0]).toMatch(/future/);
  });

  it('when the dose is before the course start, then it answers 400', async () => {
    // Arrange
    const p = await createRealPatient(pharmacist);
    const c = await createCourse(pharmacist, p.id, 'vancomycin', { startedAt: hoursAgo(24) });
    // Act
    const res = await pharmacist.post(`/api/courses/${c.id}/doses`).send({
      amount: 1000,
      unit: 'mg',
      route: 'iv-infusion',
      startAt: hoursAgo(30),
      infusionMinutes: 60,
    });
    // Assert
    expect(res.status).toBe(400);
    expect(res.body.fieldErrors.startAt[0]).toMatch(/before the course began/);
  });

  it('when the same dose time is entered twice, then the second is refused as a duplicate', async () => {
    // Arrange
    const c = await vancoCourse();
    const body = {
      amount: 1000,
      unit: 'mg',
      route: 'iv-infusion',
      startAt: hoursAgo(12),
      infusionMinutes: 60,
    };
    await pharmacist.post(`/api/courses/${c.id}/doses`).send(body).expect(201);
    // Act
    const res = await pharmacist.post(`/api/courses/${c.id}/doses`).send(body);
    // Assert
    expect(res.status).toBe(400);
    expect(res.body.fieldErrors.startAt[0]).toMatch(/duplicate/);
  });

  it('when a missed dose is recorded, then it is kept with its status', async () => {
    // Arrange
    const c = await vancoCourse();
    // Act
    const res = await pharmacist.post(`/api/courses/${c.id}/doses`).send({
      amount: 1000,
      unit: 'mg',
      route: 'iv-infusion',
      startAt: hoursAgo(12),
      infusionMinutes: 60,
      administrationStatus: 'missed',
    });
    // Assert
    expect(res.status).toBe(201);
    expect(res.body.administrationStatus).toBe('missed');
  });

  it('when a teaching course gets a dose, then it is in hours from the first dose; a trainee cannot add one', async () => {
    // Arrange
    const t = await createTeachingPatient(pharmacist);
    const c = await createCourse(pharmacist, t.id);
    // Act
    const ok = await pharmacist
      .post(`/api/courses/${c.id}/doses`)
      .send({ amount: 1000, unit: 'mg', route: 'iv-infusion', startHour: 0, infusionMinutes: 60 });
    // Assert
    expect(ok.status).toBe(201);
    expect(ok.body).toMatchObject({ startAt: null, startHour: 0, endHour: 1 });
    const denied = await trainee
      .post(`/api/courses/${c.id}/doses`)
      .send({ amount: 1000, unit: 'mg', route: 'iv-infusion', startHour: 12, infusionMinutes: 60 });
    expect(denied.status).toBe(403);
    expect((await trainee.get(`/api/courses/${c.id}/doses`)).body.total).toBe(1);
  });

  it('when a site model allows a dose the table refuses (over 20 g), then it answers 400 and saves nothing', async () => {
    // Arrange
    const id = `site-vanco-huge-${Date.now().toString(36)}`;
    await admin
      .post('/api/drug-models')
      .send({
        id,
        drug: 'vancomycin',
        name: 'wide',
        source: 'test',
        definition: { ...vancomycinGoti2018, id },
        plausibleSingleDoseMg: { min: 250, max: 50_000 },
      })
      .expect(201);
    const p = await createRealPatient(pharmacist);
    const c = await createCourse(pharmacist, p.id, 'vancomycin', { modelId: id });
    // Act
    const res = await pharmacist.post(`/api/courses/${c.id}/doses`).send({
      amount: 30,
      unit: 'g',
      route: 'iv-infusion',
      startAt: hoursAgo(3),
      infusionMinutes: 60,
    });
    // Assert
    expect(res.status).toBe(400);
    expect(res.body.fieldErrors._[0]).toMatch(/doses_amount_check/);
    expect(await db('doses').where({ course_id: c.id })).toHaveLength(0);
    expect(
      await db('audit_events')
        .where({ action: 'dose.create' })
        .whereRaw("context->>'courseId' = ?", [c.id]),
    ).toHaveLength(0);
  });

  it('when signed out, then it answers 401', async () => {
    // Act
    const c = await vancoCourse();
    // Assert
    expect((await anonymousAgent(app).post(`/api/courses/${c.id}/doses`).send({})).status).toBe(
      401,
    );
  });
});

describe('PATCH /api/doses/:id', () => {
  it('when the version matches, then the amount changes and the audit keeps before and after', async () => {
    // Arrange
    const c = await vancoCourse();
    // Act
    const d = await pharmacist.post(`/api/courses/${c.id}/doses`).send({
      amount: 1000,
      unit: 'mg',
      route: 'iv-infusion',
      startAt: hoursAgo(12),
      infusionMinutes: 60,
    });
    const res = await reviewer
      .patch(`/api/doses/${d.body.id}`)
      .send({ version: 1, amount: 1250, administrationStatus: 'partial' });
    // Assert
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({
      amountMg: 1250,
      version: 2,
      administrationStatus: 'partial',
      durationH: 1,
    });
    const audit = await auditRows(db, 'dose', d.body.id);
    expect(audit[1]).toMatchObject({ action: 'dose.update' });
    expect(audit[1].before.amountMg).toBe(1000);
    expect(audit[1].after.amountMg).toBe(1250);
  });

  it('when the version is stale, then it answers 409 with both versions and nothing is overwritten', async () => {
    // Arrange
    const c = await vancoCourse();
    const d = await pharmacist.post(`/api/courses/${c.id}/doses`).send({
      amount: 1000,
      unit: 'mg',
      route: 'iv-infusion',
      startAt: hoursAgo(12),
      infusionMinutes: 60,
    });
    await reviewer.patch(`/api/doses/${d.body.id}`).send({ version: 1, amount: 1250 }).expect(200);
    // Act
    const res = await pharmacist.patch(`/api/doses/${d.body.id}`).send({ version: 1, amount: 750 });
    // Assert
    expect(res.status).toBe(409);
    expect(res.body.current.amountMg).toBe(1250);
    expect(res.body.yours.amount).toBe(750);
    expect((await db('doses').where({ id: d.body.id }).first()).amount_mg).toBe(1250);
  });
});

describe('PATCH /api/doses/:id (partial update)', () => {
  it('when only the note is sent, then a missed dose stays missed', async () => {
    // Arrange
    const c = await vancoCourse();
    // Act
    const d = await pharmacist.post(`/api/courses/${c.id}/doses`).send({
      amount: 1000,
      unit: 'mg',
      route: 'iv-infusion',
      startAt: hoursAgo(12),
      infusionMinutes: 60,
      administrationStatus: 'missed',
    });
    const res = await pharmacist
      .patch(`/api/doses/${d.body.id}`)
      .send({ version: 1, note: 'no IV access' });
    // Assert
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({
      administrationStatus: 'missed',
      note: 'no IV access',
      version: 2,
    });
  });
});

describe('DELETE /api/doses/:id', () => {
  it('when the version is stale, then it answers 409 and the dose stays; with the current version it is removed', async () => {
    // Arrange
    const c = await vancoCourse();
    const d = await pharmacist.post(`/api/courses/${c.id}/doses`).send({
      amount: 1000,
      unit: 'mg',
      route: 'iv-infusion',
      startAt: hoursAgo(12),
      infusionMinutes: 60,
    });
    // Act
    await pharmacist
      .patch(`/api/doses/${d.body.id}`)
      .send({ version: 1, note: 'checked against the MAR' })
      .expect(200);
    // Assert
    expect((await pharmacist.delete(`/api/doses/${d.body.id}?version=1`)).status).toBe(409);
    expect(await db('doses').where({ id: d.body.id }).first()).toBeDefined();
    expect((await pharmacist.delete(`/api/doses/${d.body.id}?version=2`)).status).toBe(204);
    expect(await db('doses').where({ id: d.body.id }).first()).toBeUndefined();
  });
});

describe('GET /api/courses/:id/doses', () => {
  it('when sorted by start descending, then the latest dose comes first', async () => {
    // Arrange
    const c = await vancoCourse();
    for (const h of [36, 24, 12]) {
      await pharmacist
        .post(`/api/courses/${c.id}/doses`)
        .send({
          amount: 1000,
          unit: 'mg',
          route: 'iv-infusion',
          startAt: hoursAgo(h),
          infusionMinutes: 60,
        })
        .expect(201);
    }
    // Act
    const res = await pharmacist.get(`/api/courses/${c.id}/doses?sort=start&order=desc&pageSize=2`);
    // Assert
    expect(res.body.total).toBe(3);
    expect(res.body.items).toHaveLength(2);
    expect(Date.parse(res.body.items[0].startAt)).toBeGreaterThan(
      Date.parse(res.body.items[1].startAt),
    );
  });
});
