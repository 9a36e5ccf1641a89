import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp } from './helpers';
import { anonymousAgent, signedInAgent, type SignedInClient } from './support/sign-in';
import {
  auditRows,
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

describe('POST /api/patients/:id/covariates', () => {
  it('when a creatinine is entered in mg/dL, then it is stored with its UCUM unit, converted to µmol/L and echoed in both', async () => {
    // Arrange
    const p = await createRealPatient(pharmacist);
    // Act
    const res = await pharmacist
      .post(`/api/patients/${p.id}/covariates`)
      .send({ kind: 'serum-creatinine', value: 1.1, unit: 'mg/dL', observedAt: hoursAgo(2) });
    // Assert
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({
      unit: 'mg/dL',
      canonicalUnit: 'umol/L',
      echo: '1.1 mg/dL (97.24 µmol/L)',
    });
    expect(res.body.canonicalValue).toBeCloseTo(97.24, 2);
    const row = await db('covariates').where({ id: res.body.id }).first();
    expect(row).toMatchObject({ unit: 'mg/dL', value: 1.1, version: 1, source: 'typed' });
    expect((await auditRows(db, 'covariate', res.body.id))[0].action).toBe('covariate.create');
  });

  it('when 1.1 is labelled µmol/L, then it answers 400 saying it is almost certainly mg/dL', async () => {
    // Arrange
    const p = await createRealPatient(pharmacist);
    // Act
    const res = await pharmacist
      .post(`/api/patients/${p.id}/covariates`)
      .send({ kind: 'serum-creatinine', value: 1.1, unit: 'umol/L', observedAt: hoursAgo(2) });
    // Assert
    expect(res.status).toBe(400);
    expect(res.body.fieldErrors.value[0]).toMatch(
      /almost certainly mg\/dL: 1.1 mg\/dL = 97.24 µmol\/L/,
    );
    expect(await db('covariates').where({ patient_id: p.id })).toHaveLength(0);
  });

  it('when a height looks like metres or inches, then it answers 400 with a hint', async () => {
    // Arrange
    const p = await createRealPatient(pharmacist);
    // Act
    const metres = await pharmacist
      .post(`/api/patients/${p.id}/covariates`)
      .send({ kind: 'height', value: 1.75, unit: 'cm', observedAt: hoursAgo(1) });
    const inches = await pharmacist
      .post(`/api/patients/${p.id}/covariates`)
      .send({ kind: 'height', value: 69, unit: 'cm', observedAt: hoursAgo(1) });
    // Assert
    expect(metres.status).toBe(400);
    expect(metres.body.fieldErrors.value[0]).toMatch(/looks like metres: 1.75 m = 175 cm/);
    expect(inches.status).toBe(400);
    expect(inches.body.fieldErrors.value[0]).toMatch(/looks like inches: 69 in = 175.3 cm/);
  });

  it('when a weight is outside 0.3–350 kg or has no source, then it answers 400', async () => {
    // Arrange
    const p = await createRealPatient(pharmacist);
    // Act
    const heavy = await pharmacist.post(`/api/patients/${p.id}/covariates`).send({
      kind: 'weight',
      value: 400,
      unit: 'kg',
      weightSource: 'measured',
      observedAt: hoursAgo(1),
    });
    const noSource = await pharmacist
      .post(`/api/patients/${p.id}/covariates`)
      .send({ kind: 'weight', value: 80, unit: 'kg', observedAt: hoursAgo(1) });
    // Assert
    expect(heavy.status).toBe(400);
    expect(heavy.body.fieldErrors.value[0]).toMatch(/0.3–350 kg/);
    expect(noSource.body.fieldErrors.weightSource).toBeDefined();
  });

  it('when a weight is given in pounds, then it is converted and echoed', async () => {
    // Arrange
    const p = await createRealPatient(pharmacist);
    // Act
    const res = await pharmacist.post(`/api/patients/${p.id}/covariates`).send({
      kind: 'weight',
      value: 176,
      unit: '[lb_av]',
      weightSource: 'stated',
      observedAt: hoursAgo(1),
    });
    // Assert
    expect(res.status).toBe(201);
    expect(res.body.canonicalValue).toBeCloseTo(79.83, 2);
    expect(res.body.echo).toBe('176 lb (79.83 kg)');
  });

  it('when the unit is unknown or the time is in the future, then it answers 400 on those fields', async () => {
    // Arrange
    const p = await createRealPatient(pharmacist);
    // Act
    const res = await pharmacist
      .post(`/api/patients/${p.id}/covariates`)
      .send({ kind: 'albumin', value: 30, unit: 'mmol/L', observedAt: hoursAgo(-5) });
    // Assert
    expect(res.status).toBe(400);
    expect(res.body.fieldErrors.unit[0]).toMatch(/unknown albumin unit/);
    expect(res.body.fieldErrors.observedAt[0]).toMatch(/future/);
  });

  it('when the same observation is entered twice, then the second is refused as a duplicate', async () => {
    // Arrange
    const p = await createRealPatient(pharmacist);
    const body = { kind: 'height', value: 172, unit: 'cm', observedAt: hoursAgo(3) };
    await pharmacist.post(`/api/patients/${p.id}/covariates`).send(body).expect(201);
    // Act
    const res = await pharmacist.post(`/api/patients/${p.id}/covariates`).send(body);
    // Assert
    expect(res.status).toBe(400);
    expect(res.body.fieldErrors.observedAt[0]).toMatch(/duplicate/);
  });

  it('when a teaching patient gets a real date, then it answers 400 asking for hours', async () => {
    // Arrange
    const t = await createTeachingPatient(pharmacist);
    // Act
    const res = await pharmacist
      .post(`/api/patients/${t.id}/covariates`)
      .send({ kind: 'height', value: 172, unit: 'cm', observedAt: hoursAgo(3) });
    // Assert
    expect(res.status).toBe(400);
    expect(res.body.fieldErrors.observedAt[0]).toMatch(/teaching cases have no real dates/);
  });

  it('when a trainee writes a covariate, then it answers 403; when signed out, 401', async () => {
    // Arrange
    const t = await createTeachingPatient(pharmacist);
    // Act
    const body = { kind: 'height', value: 172, unit: 'cm', observedHour: -2 };
    // Assert
    expect((await trainee.post(`/api/patients/${t.id}/covariates`).send(body)).status).toBe(403);
    expect(
      (await anonymousAgent(app).post(`/api/patients/${t.id}/covariates`).send(body)).status,
    ).toBe(401);
  });
});

describe('PATCH /api/covariates/:id', () => {
  it('when the version is stale, then it answers 409 and keeps the saved value', async () => {
    // Arrange
    const p = await createRealPatient(pharmacist);
    const c = await pharmacist
      .post(`/api/patients/${p.id}/covariates`)
      .send({ kind: 'albumin', value: 32, unit: 'g/L', observedAt: hoursAgo(4) });
    await pharmacist
      .patch(`/api/covariates/${c.body.id}`)
      .send({ version: 1, value: 30 })
      .expect(200);
    // Act
    const res = await pharmacist
      .patch(`/api/covariates/${c.body.id}`)
      .send({ version: 1, value: 28 });
    // Assert
    expect(res.status).toBe(409);
    expect(res.body.current.value).toBe(30);
    expect((await db('covariates').where({ id: c.body.id }).first()).value).toBe(30);
  });
});

describe('DELETE /api/covariates/:id', () => {
  it('when the version matches, then the row is removed and the removal audited', async () => {
    // Arrange
    const p = await createRealPatient(pharmacist);
    // Act
    const c = await pharmacist.post(`/api/patients/${p.id}/covariates`).send({
      kind: 'dialysis',
      dialysisStatus: 'intermittent-haemodialysis',
      observedAt: hoursAgo(4),
    });
    // Assert
    expect(c.body.echo).toBe('dialysis: intermittent-haemodialysis');
    const res = await pharmacist.delete(`/api/covariates/${c.body.id}?version=1`);
    expect(res.status).toBe(204);
    expect(await db('covariates').where({ id: c.body.id }).first()).toBeUndefined();
    expect((await auditRows(db, 'covariate', c.body.id)).map((a) => a.action)).toEqual([
      'covariate.create',
      'covariate.delete',
    ]);
  });
});

describe('GET /api/patients/:id/covariates', () => {
  it('when a trainee lists a real patient’s covariates, then it answers 404', async () => {
    // Act
    const p = await createRealPatient(pharmacist);
    // Assert
    expect((await trainee.get(`/api/patients/${p.id}/covariates`)).status).toBe(404);
  });

  it('when listing with a kind filter, then only that kind comes back, paginated', async () => {
    // Arrange
    const p = await createRealPatient(pharmacist);
    await pharmacist
      .post(`/api/patients/${p.id}/covariates`)
      .send({ kind: 'height', value: 180, unit: 'cm', observedAt: hoursAgo(5) })
      .expect(201);
    await pharmacist
      .post(`/api/patients/${p.id}/covariates`)
      .send({
        kind: 'weight',
        value: 80,
        unit: 'kg',
        weightSource: 'measured',
        observedAt: hoursAgo(5),
      })
      .expect(201);
    // Act
    const res = await pharmacist.get(`/api/patients/${p.id}/covariates?kind=weight`);
    // Assert
    expect(res.body).toMatchObject({ total: 1, page: 1 });
    expect(res.body.items[0].kind).toBe('weight');
  });
});

describe('GET /api/patients/:id/derived', () => {
  it('when weight, height and creatinine are known, then CrCl matches the Cockcroft-Gault worked example with the weight used and the formula', async () => {
    // Arrange: male, 60 y, 72 kg, SCr 1.0 mg/dL -> 80 mL/min.
    // Source: Cockcroft DW, Gault MH. Nephron 1976;16:31-41 (worked example in pk-reference C: 80.0000).
    const birth = new Date();
    birth.setUTCFullYear(birth.getUTCFullYear() - 60);
    birth.setUTCDate(birth.getUTCDate() - 10);
    const p = await createRealPatient(pharmacist, { birthDate: birth.toISOString().slice(0, 10) });
    const post = (body: object) =>
      pharmacist
        .post(`/api/patients/${p.id}/covariates`)
        .send({ observedAt: hoursAgo(6), ...body })
        .expect(201);
    await post({ kind: 'weight', value: 72, unit: 'kg', weightSource: 'measured' });
    await post({ kind: 'height', value: 177.8, unit: 'cm' });
    await post({ kind: 'serum-creatinine', value: 1.0, unit: 'mg/dL' });
    // Act
    const res = await pharmacist.get(`/api/patients/${p.id}/derived`);
    // Assert
    expect(res.status).toBe(200);
    expect(res.body.creatinineClearance.value).toBeCloseTo(80, 6);
    expect(res.body.creatinineClearance).toMatchObject({
      weightUsed: 'total',
      weightKg: 72,
      unit: 'mL/min',
    });
    expect(res.body.creatinineClearance.formula).toContain('(140 − 60 y) × 72 kg');
    expect(res.body.creatinineClearance.source).toContain('Nephron 1976;16:31-41');
    // Source: Devine BJ. Drug Intell Clin Pharm 1974;8:650-655 — 177.8 cm (70 in) male -> 73.0 kg (pk-reference C).
    expect(res.body.idealBodyWeight.value).toBeCloseTo(73, 6);
    // Source: Mosteller RD. N Engl J Med 1987;317:1098 — √(177.8 × 72 / 3600).
    expect(res.body.bodySurfaceArea.value).toBeCloseTo(Math.sqrt((177.8 * 72) / 3600), 9);
    expect(res.body.egfr.unit).toBe('mL/min/{1.73_m2}');
  });

  it('when the patient is obese, then CrCl uses adjusted body weight and eGFR matches the CKD-EPI 2021 worked example', async () => {
    // Arrange: female, 55 y, 177.8 cm, 120 kg, SCr 0.9 mg/dL.
    const birth = new Date();
    birth.setUTCFullYear(birth.getUTCFullYear() - 55);
    birth.setUTCDate(birth.getUTCDate() - 10);
    const p = await createRealPatient(pharmacist, {
      sex: 'female',
      birthDate: birth.toISOString().slice(0, 10),
    });
    const post = (body: object) =>
      pharmacist
        .post(`/api/patients/${p.id}/covariates`)
        .send({ observedAt: hoursAgo(6), ...body })
        .expect(201);
    await post({ kind: 'weight', value: 120, unit: 'kg', weightSource: 'measured' });
    await post({ kind: 'height', value: 177.8, unit: 'cm' });
    await post({ kind: 'serum-creatinine', value: 0.9, unit: 'mg/dL' });
    // Act
    const res = await pharmacist.get(`/api/patients/${p.id}/derived`);
    // Assert
    // Source: Devine BJ. Drug Intell Clin Pharm 1974;8:650-655 — female 70 in -> 68.5 kg (pk-reference C).
    expect(res.body.idealBodyWeight.value).toBeCloseTo(68.5, 6);
    // AdjBW = IBW + 0.4 (TBW − IBW) = 68.5 + 0.4 × 51.5 = 89.1 kg (the widely taught 0.4 factor).
    expect(res.body.creatinineClearance).toMatchObject({ weightUsed: 'adjusted' });
    expect(res.body.creatinineClearance.weightKg).toBeCloseTo(89.1, 6);
    // Source: Cockcroft DW, Gault MH. Nephron 1976;16:31-41 — (140 − 55) × 89.1 / (72 × 0.9) × 0.85.
    expect(res.body.creatinineClearance.value).toBeCloseTo((85 * 89.1 * 0.85) / (72 * 0.9), 6);
    // Source: Inker LA et al. N Engl J Med 2021;385:1737-49 — SCr 0.9, 55 F -> 75.4988 (pk-reference C).
    expect(res.body.egfr.value).toBeCloseTo(75.4988, 3);
  });

  it('when creatinine rose by more than 26.5 µmol/L within 48 h, then it warns of unstable renal function', async () => {
    // Arrange
    const p = await createRealPatient(pharmacist);
    await pharmacist
      .post(`/api/patients/${p.id}/covariates`)
      .send({ kind: 'serum-creatinine', value: 80, unit: 'umol/L', observedAt: hoursAgo(30) })
      .expect(201);
    await pharmacist
      .post(`/api/patients/${p.id}/covariates`)
      .send({ kind: 'serum-creatinine', value: 120, unit: 'umol/L', observedAt: hoursAgo(2) })
      .expect(201);
    // Act
    const res = await pharmacist.get(`/api/patients/${p.id}/derived`);
    // Assert
    expect(res.body.warnings.map((w: { code: string }) => w.code)).toContain(
      'unstable-renal-function',
    );
  });
});
