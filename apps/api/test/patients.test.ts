import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp } from './helpers';
import { anonymousAgent, signedInAgent, type SignedInClient } from './support/sign-in';
import {
  auditRows,
  createRealPatient,
  createTeachingPatient,
  ensureTestModels,
  uniqueMrn,
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

describe('POST /api/patients', () => {
  it('when a pharmacist sends a valid real patient, then it is stored with version 1 and audited in the same transaction', async () => {
    // Arrange
    const mrn = uniqueMrn();
    // Act
    const res = await pharmacist.post('/api/patients').send({
      mrn,
      givenName: 'Marama',
      familyName: 'Okonkwo',
      sex: 'female',
      birthDate: '1958-07-02',
      ward: 'ICU',
    });
    // Assert
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({
      mrn,
      version: 1,
      isTeaching: false,
      displayName: 'OKONKWO, Marama',
    });
    const row = await db('patients').where({ id: res.body.id }).first();
    expect(row).toMatchObject({ mrn, family_name: 'Okonkwo', is_teaching: false, version: 1 });
    const audit = await auditRows(db, 'patient', res.body.id);
    expect(audit).toHaveLength(1);
    expect(audit[0]).toMatchObject({ action: 'patient.create', actor_user_id: pharmacist.user.id });
    expect(audit[0].after.mrn).toBe(mrn);
  });

  it('when a teaching patient is created, then it carries no name, MRN or date of birth', async () => {
    // Act
    const res = await reviewer
      .post('/api/patients')
      .send({ isTeaching: true, teachingLabel: 'Case 7', sex: 'male', ageYears: 90 });
    // Assert
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({
      isTeaching: true,
      mrn: null,
      givenName: null,
      birthDate: null,
      displayName: 'Case 7',
      ageYears: 90,
    });
  });

  it('when a teaching patient is sent with an MRN, then it answers 400 and stores nothing', async () => {
    // Arrange
    const mrn = uniqueMrn();
    // Act
    const res = await pharmacist
      .post('/api/patients')
      .send({ isTeaching: true, teachingLabel: 'Leaky', sex: 'male', ageYears: 40, mrn });
    // Assert
    expect(res.status).toBe(400);
    expect(await db('patients').where({ mrn }).first()).toBeUndefined();
  });

  it('when required fields are missing, then it answers 400 with field-level messages', async () => {
    // Act
    const res = await pharmacist.post('/api/patients').send({ mrn: uniqueMrn(), sex: 'male' });
    // Assert
    expect(res.status).toBe(400);
    expect(res.body.code).toBe('validation-failed');
    expect(Object.keys(res.body.fieldErrors).join(' ')).toMatch(/givenName|familyName|birthDate/);
  });

  it('when the date of birth is in the future, then it answers 400 on birthDate', async () => {
    // Act
    const res = await pharmacist.post('/api/patients').send({
      mrn: uniqueMrn(),
      givenName: 'A',
      familyName: 'B',
      sex: 'male',
      birthDate: '2999-01-01',
    });
    // Assert
    expect(res.status).toBe(400);
    expect(res.body.fieldErrors.birthDate[0]).toMatch(/future/);
  });

  it('when the MRN already exists, then it answers 400 duplicate and writes no audit row', async () => {
    // Arrange
    const first = await createRealPatient(pharmacist);
    const before = await db('audit_events')
      .where({ action: 'patient.create' })
      .count<{ count: string }[]>({ count: '*' });
    // Act
    const res = await pharmacist.post('/api/patients').send({
      mrn: first.mrn,
      givenName: 'X',
      familyName: 'Y',
      sex: 'male',
      birthDate: '1970-01-01',
    });
    // Assert
    expect(res.status).toBe(400);
    expect(res.body.fieldErrors.mrn[0]).toMatch(/duplicate/);
    const after = await db('audit_events')
      .where({ action: 'patient.create' })
      .count<{ count: string }[]>({ count: '*' });
    expect(after[0]?.count).toBe(before[0]?.count);
  });

  it('when nobody is signed in, then it answers 401', async () => {
    // Act
    const res = await anonymousAgent(app).post('/api/patients').send({});
    // Assert
    expect(res.status).toBe(401);
  });

  it('when a trainee or an admin tries to create a patient, then it answers 403', async () => {
    // Act
    const body = { isTeaching: true, teachingLabel: 'Mine', sex: 'male', ageYears: 40 };
    // Assert
    expect((await trainee.post('/api/patients').send(body)).status).toBe(403);
    expect((await admin.post('/api/patients').send(body)).status).toBe(403);
  });
});

describe('GET /api/patients/:id', () => {
  it('when a pharmacist asks for a real patient, then it is returned', async () => {
    // Arrange
    const p = await createRealPatient(pharmacist);
    // Act
    const res = await reviewer.get(`/api/patients/${p.id}`);
    // Assert
    expect(res.status).toBe(200);
    expect(res.body.mrn).toBe(p.mrn);
  });

  it('when a trainee asks for a real patient by id, then it answers 404 and reveals nothing', async () => {
    // Arrange
    const p = await createRealPatient(pharmacist);
    // Act
    const res = await trainee.get(`/api/patients/${p.id}`);
    // Assert
    expect(res.status).toBe(404);
    expect(JSON.stringify(res.body)).not.toContain(p.mrn);
  });

  it('when a trainee asks for a teaching patient, then it is returned', async () => {
    // Arrange
    const t = await createTeachingPatient(pharmacist);
    // Act
    const res = await trainee.get(`/api/patients/${t.id}`);
    // Assert
    expect(res.status).toBe(200);
    expect(res.body.isTeaching).toBe(true);
  });

  it('when an admin asks for a patient, then it answers 403', async () => {
    // Act
    const t = await createTeachingPatient(pharmacist);
    // Assert
    expect((await admin.get(`/api/patients/${t.id}`)).status).toBe(403);
  });

  it('when the id is not a uuid, then it answers 400', async () => {
    // Act
    const res = await pharmacist.get('/api/patients/not-a-uuid');
    // Assert
    expect(res.status).toBe(400);
    expect(res.body.fieldErrors.id).toBeDefined();
  });
});

describe('GET /api/patients', () => {
  it('when a trainee lists patients, then only teaching patients come back, even when asking for real ones', async () => {
    // Arrange
    await createRealPatient(pharmacist, { familyName: 'Zzconfined' });
    await createTeachingPatient(pharmacist);
    // Act
    const all = await trainee.get('/api/patients?pageSize=100');
    const real = await trainee.get('/api/patients?isTeaching=false&q=Zzconfined');
    // Assert
    expect(all.status).toBe(200);
    expect(all.body.items.length).toBeGreaterThan(0);
    expect(all.body.items.every((p: { isTeaching: boolean }) => p.isTeaching)).toBe(true);
    expect(real.body.items).toEqual([]);
    expect(real.body.total).toBe(0);
  });

  it('when paging and sorting by family name, then pages are consistent and ordered', async () => {
    // Arrange
    const tag = `Pg${Date.now()}`;
    for (const n of ['C', 'A', 'B'])
      await createRealPatient(pharmacist, { familyName: `${tag}${n}` });
    // Act
    const page1 = await pharmacist.get(
      `/api/patients?q=${tag}&sort=familyName&order=asc&pageSize=2&page=1`,
    );
    const page2 = await pharmacist.get(
      `/api/patients?q=${tag}&sort=familyName&order=asc&pageSize=2&page=2`,
    );
    // Assert
    expect(page1.body.total).toBe(3);
    expect(page1.body.items.map((p: { familyName: string }) => p.familyName)).toEqual([
      `${tag}A`,
      `${tag}B`,
    ]);
    expect(page2.body.items.map((p: { familyName: string }) => p.familyName)).toEqual([`${tag}C`]);
  });

  it('when the sort field is unknown, then it answers 400', async () => {
    // Act
    const res = await pharmacist.get('/api/patients?sort=password');
    // Assert
    expect(res.status).toBe(400);
    expect(res.body.fieldErrors.sort).toBeDefined();
  });
});

describe('PATCH /api/patients/:id', () => {
  it('when the version matches, then the change is saved, the version bumped and before/after audited', async () => {
    // Arrange
    const p = await createRealPatient(pharmacist);
    // Act
    const res = await pharmacist
      .patch(`/api/patients/${p.id}`)
      .send({ version: 1, ward: 'Renal unit' });
    // Assert
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ version: 2, ward: 'Renal unit' });
    const audit = await auditRows(db, 'patient', p.id);
    expect(audit.map((a) => a.action)).toEqual(['patient.create', 'patient.update']);
    expect(audit[1].before.ward).toBe('4 North');
    expect(audit[1].after.ward).toBe('Renal unit');
  });

  it('when the version is stale, then it answers 409 with both versions and overwrites nothing', async () => {
    // Arrange
    const p = await createRealPatient(pharmacist);
    await reviewer.patch(`/api/patients/${p.id}`).send({ version: 1, ward: 'ICU' }).expect(200);
    // Act
    const res = await pharmacist
      .patch(`/api/patients/${p.id}`)
      .send({ version: 1, ward: 'Paediatrics' });
    // Assert
    expect(res.status).toBe(409);
    expect(res.body).toMatchObject({ code: 'stale-version', yourVersion: 1, currentVersion: 2 });
    expect(res.body.current.ward).toBe('ICU');
    expect(res.body.yours.ward).toBe('Paediatrics');
    const row = await db('patients').where({ id: p.id }).first();
    expect(row).toMatchObject({ ward: 'ICU', version: 2 });
    expect((await auditRows(db, 'patient', p.id)).length).toBe(2);
  });

  it('when a teaching patient is given a name, then it answers 400', async () => {
    // Arrange
    const t = await createTeachingPatient(pharmacist);
    // Act
    const res = await pharmacist
      .patch(`/api/patients/${t.id}`)
      .send({ version: 1, familyName: 'Real' });
    // Assert
    expect(res.status).toBe(400);
    expect(res.body.fieldErrors.familyName).toBeDefined();
  });

  it('when a trainee edits a teaching patient, then it answers 403 and nothing changes', async () => {
    // Arrange
    const t = await createTeachingPatient(pharmacist);
    // Act
    const res = await trainee.patch(`/api/patients/${t.id}`).send({ version: 1, ward: 'ICU' });
    // Assert
    expect(res.status).toBe(403);
    expect((await db('patients').where({ id: t.id }).first()).version).toBe(1);
  });
});

describe('patients table', () => {
  it('refuses a teaching patient with a name at the database level', async () => {
    await expect(
      db('patients').insert({
        is_teaching: true,
        teaching_label: 'x',
        age_years: 30,
        sex: 'male',
        family_name: 'Leak',
      }),
    ).rejects.toThrow(/patients_identity_check/);
  });
});
