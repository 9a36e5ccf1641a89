import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { stopPtaQueues } from '../src/jobs/pta-queue';
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
let trainee: SignedInClient;

beforeAll(async () => {
  await ensureTestModels(db);
  pharmacist = await signedInAgent(app, 'pharmacist');
  trainee = await signedInAgent(app, 'trainee');
});
afterAll(async () => {
  await stopPtaQueues();
  await db.destroy();
});

const CAUTION_PATTERN = /supports and does not replace clinical judgement/;

/** Male, 60 y, 80 kg, 178 cm, SCr 1.0 mg/dL; vancomycin 1000 mg over 1 h q12h × 4 (last started 14 h ago); two levels in the last interval. */
async function vancomycinCase(options: { levels?: boolean } = {}) {
  const birth = new Date();
  birth.setUTCFullYear(birth.getUTCFullYear() - 60);
  birth.setUTCDate(birth.getUTCDate() - 20);
  const p = await createRealPatient(pharmacist, { birthDate: birth.toISOString().slice(0, 10) });
  const cov = (body: object) =>
    pharmacist
      .post(`/api/patients/${p.id}/covariates`)
      .send({ observedAt: hoursAgo(60), ...body })
      .expect(201);
  await cov({ kind: 'weight', value: 80, unit: 'kg', weightSource: 'measured' });
  await cov({ kind: 'height', value: 178, unit: 'cm' });
  await cov({ kind: 'serum-creatinine', value: 1.0, unit: 'mg/dL' });
  const c = await createCourse(pharmacist, p.id, 'vancomycin');
  for (const h of [50, 38, 26, 14]) {
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
  if (options.levels !== false) {
    await pharmacist
      .post(`/api/courses/${c.id}/levels`)
      .send({ value: 24, unit: 'mg/L', collectedAt: hoursAgo(12), sampleKind: 'peak' })
      .expect(201);
    await pharmacist
      .post(`/api/courses/${c.id}/levels`)
      .send({ value: 11, unit: 'mg/L', collectedAt: hoursAgo(3), sampleKind: 'random' })
      .expect(201);
  }
  return { patient: p, course: c };
}

describe('POST /api/courses/:id/simulate', () => {
  it('when simulating the population prior, then points, exposure, warnings and the caution come back and nothing is written', async () => {
    // Arrange
    const { course } = await vancomycinCase({ levels: false });
    const auditBefore = await db('audit_events').count<{ count: string }[]>({ count: '*' });
    // Act
    const res = await pharmacist
      .post(`/api/courses/${course.id}/simulate`)
      .send({ parameters: 'population' });
    // Assert
    expect(res.status).toBe(200);
    expect(res.body.caution).toMatch(CAUTION_PATTERN);
    expect(res.body.model).toEqual({ id: 'vancomycin-adult-goti-2018', version: 1 });
    expect(res.body.points.length).toBeGreaterThan(100);
    expect(res.body.points[0]).toMatchObject({ hour: 0 });
    expect(Date.parse(res.body.points[0].at)).toBeCloseTo(Date.parse(hoursAgo(50)), -4);
    const codes = res.body.warnings.map((w: { code: string }) => w.code);
    expect(codes).toEqual(expect.arrayContaining(['population-only', 'crcl-used']));
    expect(res.body.exposure.peakMgL).toBeGreaterThan(res.body.exposure.troughMgL);
    expect((await db('audit_events').count<{ count: string }[]>({ count: '*' }))[0]?.count).toBe(
      auditBefore[0]?.count,
    );
  });

  it('when a regimen is simulated to steady state, then AUC24 matches daily dose / CL', async () => {
    // Arrange
    // Source: pk-reference A7, identity at steady state for linear PK: AUC24,ss = F·daily dose / CL
    // (Gibaldi M, Perrier D. Pharmacokinetics, 2nd ed., 1982 — from memory).
    const { course } = await vancomycinCase({ levels: false });
    // Act
    const res = await pharmacist.post(`/api/courses/${course.id}/simulate`).send({
      parameters: 'population',
      regimen: { doseMg: 1000, intervalH: 12, infusionH: 1, count: 40 },
    });
    // Assert
    expect(res.status).toBe(200);
    const expected = 2000 / res.body.parameters.CL;
    expect(Math.abs(res.body.exposure.auc24 - expected) / expected).toBeLessThan(0.01);
  });

  it('when the step is out of range, then it answers 400; signed out, 401', async () => {
    // Arrange
    const { course } = await vancomycinCase({ levels: false });
    // Act
    const res = await pharmacist.post(`/api/courses/${course.id}/simulate`).send({ stepH: 0 });
    // Assert
    expect(res.status).toBe(400);
    expect(res.body.fieldErrors.stepH).toBeDefined();
    expect(
      (await anonymousAgent(app).post(`/api/courses/${course.id}/simulate`).send({})).status,
    ).toBe(401);
  });

  it('when a covariate the model needs is missing, then it answers 422 naming it', async () => {
    // Arrange
    const p = await createRealPatient(pharmacist);
    const c = await createCourse(pharmacist, p.id, 'vancomycin');
    // Act
    const res = await pharmacist.post(`/api/courses/${c.id}/simulate`).send({});
    // Assert
    expect(res.status).toBe(422);
    expect(res.body.code).toBe('missing-covariates');
    expect(res.body.message).toMatch(/CRCL/);
  });

  it('when a trainee simulates a real course, then it answers 404; a teaching course, 200 in relative hours', async () => {
    // Arrange
    const { course } = await vancomycinCase({ levels: false });
    const t = await createTeachingPatient(pharmacist, { sex: 'male', ageYears: 60 });
    for (const body of [
      { kind: 'weight', value: 80, unit: 'kg', weightSource: 'measured', observedHour: -2 },
      { kind: 'serum-creatinine', value: 88, unit: 'umol/L', observedHour: -2 },
    ])
      await pharmacist.post(`/api/patients/${t.id}/covariates`).send(body).expect(201);
    const tc = await createCourse(pharmacist, t.id, 'vancomycin');
    await pharmacist
      .post(`/api/courses/${tc.id}/doses`)
      .send({ amount: 1000, unit: 'mg', route: 'iv-infusion', startHour: 0, infusionMinutes: 60 })
      .expect(201);
    // Act
    const real = await trainee.post(`/api/courses/${course.id}/simulate`).send({});
    const teaching = await trainee.post(`/api/courses/${tc.id}/simulate`).send({});
    // Assert
    expect(real.status).toBe(404);
    expect(teaching.status).toBe(200);
    expect(teaching.body.points[0].at).toBeNull();
  });
});

describe('POST /api/courses/:id/fit', () => {
  it('when fitting by MAP, then individual and population predictions, shrinkage and the caution come back', async () => {
    // Arrange
    const { course } = await vancomycinCase();
    // Act
    const res = await pharmacist.post(`/api/courses/${course.id}/fit`).send({ method: 'map' });
    // Assert
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ method: 'map', levelsUsed: 2 });
    expect(res.body.caution).toMatch(CAUTION_PATTERN);
    expect(res.body.parameters.CL).toBeGreaterThan(0);
    expect(res.body.predictions).toHaveLength(2);
    for (const p of res.body.predictions) {
      expect(p.predictedMgL).toBeGreaterThan(0);
      expect(p.populationPredictedMgL).toBeGreaterThan(0);
    }
  });

  it('when fitting by the two-level method, then k, V, CL and half-life come from the two post-distribution levels', async () => {
    // Arrange
    const { course } = await vancomycinCase();
    // Act
    const res = await pharmacist
      .post(`/api/courses/${course.id}/fit`)
      .send({ method: 'two-level' });
    // Assert
    expect(res.status).toBe(200);
    // Source: Sawchuk RJ, Zaske DE. J Pharmacokinet Biopharm 1976;4:183 — k = ln(C1/C2)/(t2 − t1).
    // Tolerance: the test's timestamps are taken a few ms apart, so the 9 h spacing is exact only to ~1e-5 h.
    const k = Math.log(24 / 11) / 9;
    expect(res.body.parameters.k).toBeCloseTo(k, 5);
    expect(res.body.parameters.halfLife).toBeCloseTo(Math.LN2 / k, 3);
    expect(res.body.warnings.map((w: { code: string }) => w.code)).toContain(
      'one-compartment-method',
    );
  });

  it('when one level is dropped, then the fit reports a single level', async () => {
    // Arrange
    const { course } = await vancomycinCase();
    // Act
    const levels = await pharmacist.get(`/api/courses/${course.id}/levels`);
    const res = await pharmacist
      .post(`/api/courses/${course.id}/fit`)
      .send({ method: 'map', excludeLevelIds: [levels.body.items[0].id] });
    // Assert
    expect(res.body.levelsUsed).toBe(1);
    expect(res.body.warnings.map((w: { code: string }) => w.code)).toContain('single-level');
  });

  it('when there are no levels, then MAP answers 422 and population-only answers 200', async () => {
    // Act
    const { course } = await vancomycinCase({ levels: false });
    // Assert
    expect(
      (await pharmacist.post(`/api/courses/${course.id}/fit`).send({ method: 'map' })).status,
    ).toBe(422);
    const pop = await pharmacist
      .post(`/api/courses/${course.id}/fit`)
      .send({ method: 'population' });
    expect(pop.status).toBe(200);
    expect(pop.body.predictions).toEqual([]);
  });

  it('when the method is unknown, then it answers 400', async () => {
    // Act
    const { course } = await vancomycinCase({ levels: false });
    // Assert
    expect(
      (await pharmacist.post(`/api/courses/${course.id}/fit`).send({ method: 'guess' })).status,
    ).toBe(400);
  });
});

describe('POST /api/courses/:id/level-validity', () => {
  it('when levels are checked, then each gets a verdict with reasons and its time after the infusion end', async () => {
    // Arrange
    const { course } = await vancomycinCase();
    // Act
    const res = await pharmacist.post(`/api/courses/${course.id}/level-validity`).send({});
    // Assert
    expect(res.status).toBe(200);
    expect(res.body.levels).toHaveLength(2);
    // Tolerance: timestamps a few ms apart.
    expect(res.body.levels[0].hoursAfterInfusionEnd).toBeCloseTo(1, 3);
    for (const l of res.body.levels)
      expect(['usable-bayesian', 'usable-log-linear', 'discard']).toContain(l.verdict);
    expect(res.body.caution).toMatch(CAUTION_PATTERN);
  });
});

describe('POST /api/courses/:id/regimens', () => {
  it('when searching for the course target, then ranked regimens and a suggestion meeting AUC24 400–600 come back', async () => {
    // Arrange
    const { course } = await vancomycinCase();
    // Act
    const res = await pharmacist
      .post(`/api/courses/${course.id}/regimens`)
      .send({ parameters: 'map' });
    // Assert
    expect(res.status).toBe(200);
    expect(res.body.caution).toMatch(CAUTION_PATTERN);
    expect(res.body.target).toEqual({ metric: 'auc24', low: 400, high: 600 });
    expect(res.body.regimens.length).toBeGreaterThan(0);
    expect(res.body.suggestion.meetsTarget).toBe(true);
    expect(res.body.suggestion.exposure.auc24).toBeGreaterThanOrEqual(400);
    expect(res.body.suggestion.exposure.auc24).toBeLessThanOrEqual(600);
    expect(res.body.suggestion.doseMg % 250).toBe(0);
    // The drug's usual practice (library practical settings, common practice): every 12 or 24 h, ≤ 2000 mg.
    expect(res.body.suggestion.usualPractice).toBe(true);
    expect([12, 24]).toContain(res.body.suggestion.intervalH);
    expect(res.body.suggestion.doseMg).toBeLessThanOrEqual(2000);
    for (const r of res.body.regimens as { usualPractice: boolean; practicalityNotes: string[] }[])
      expect(r.usualPractice).toBe(r.practicalityNotes.length === 0);
  });

  it('when the pharmacist names the intervals, then none of them is marked unusual', async () => {
    // Arrange
    const { course } = await vancomycinCase();
    // Act
    const res = await pharmacist
      .post(`/api/courses/${course.id}/regimens`)
      .send({ parameters: 'population', intervalsH: [36, 48] });
    // Assert
    expect(res.status).toBe(200);
    const regimens = res.body.regimens as { intervalH: number; practicalityNotes: string[] }[];
    expect(regimens.length).toBeGreaterThan(0);
    for (const r of regimens) {
      expect([36, 48]).toContain(r.intervalH);
      expect(r.practicalityNotes.join(' ')).not.toMatch(/usual intervals/);
    }
  });
});

describe('POST /api/courses/:id/regimens (phenytoin)', () => {
  it('when the model is Michaelis-Menten, then oral regimens come back with the salt factor and steady-state exposure', async () => {
    // Arrange
    const p = await createRealPatient(pharmacist, { sex: 'female', birthDate: '1955-02-11' });
    await pharmacist
      .post(`/api/patients/${p.id}/covariates`)
      .send({
        kind: 'weight',
        value: 64,
        unit: 'kg',
        weightSource: 'measured',
        observedAt: hoursAgo(100),
      })
      .expect(201);
    await pharmacist
      .post(`/api/patients/${p.id}/covariates`)
      .send({ kind: 'serum-creatinine', value: 80, unit: 'umol/L', observedAt: hoursAgo(100) })
      .expect(201);
    const c = await createCourse(pharmacist, p.id, 'phenytoin', {
      target: { metric: 'trough', low: 10, high: 20 },
      micMgL: null,
    });
    for (const h of [96, 72, 48, 24])
      await pharmacist
        .post(`/api/courses/${c.id}/doses`)
        .send({ amount: 300, unit: 'mg', route: 'oral', startAt: hoursAgo(h) })
        .expect(201);
    // Act
    const res = await pharmacist
      .post(`/api/courses/${c.id}/regimens`)
      .send({ parameters: 'population' });
    // Assert
    expect(res.status).toBe(200);
    expect(res.body.caution).toMatch(CAUTION_PATTERN);
    expect(res.body.regimens.length).toBeGreaterThan(0);
    expect(res.body.regimens.every((r: { regimenKind: string }) => r.regimenKind === 'oral')).toBe(
      true,
    );
    expect(res.body.warnings.map((w: { code: string }) => w.code)).toContain('salt-factor');
    // Asked for loading doses: oral phenytoin loading comes in portions and allows for the drug already
    // given (LD = V·(Cdesired − C0)/(S·F): Winter ME, Basic Clinical Pharmacokinetics — from memory).
    const loaded = await pharmacist
      .post(`/api/courses/${c.id}/regimens`)
      .send({ parameters: 'population', loadingDose: true });
    expect(loaded.status).toBe(200);
    const withLoading = (
      loaded.body.regimens as { loadingDoseMg: number | null; loadingPortions: number | null }[]
    ).filter((r) => r.loadingDoseMg !== null);
    expect(withLoading.length).toBeGreaterThan(0);
    for (const r of withLoading) {
      expect(r.loadingDoseMg).toBeLessThanOrEqual(2000);
      expect(r.loadingPortions).toBe(Math.ceil((r.loadingDoseMg as number) / 400));
    }
    expect(loaded.body.warnings.map((w: { code: string }) => w.code)).toContain(
      'loading-dose-allows-for-drug-on-board',
    );
  });
});

describe('POST /api/courses/:id/regimens (loading doses)', () => {
  it('when loading doses are asked for a patient already on vancomycin, then each is capped and the result warns about drug on board', async () => {
    // Arrange
    const { course } = await vancomycinCase();
    // Act
    const res = await pharmacist
      .post(`/api/courses/${course.id}/regimens`)
      .send({ parameters: 'map', loadingDose: true });
    // Assert
    expect(res.status).toBe(200);
    const regimens = res.body.regimens as { loadingDoseMg: number | null; doseMg: number }[];
    expect(regimens.some((r) => r.loadingDoseMg !== null)).toBe(true);
    for (const r of regimens)
      if (r.loadingDoseMg !== null) {
        // Cap 3000 mg: Kidney360 summary of the 2020 vancomycin consensus (pk-reference).
        expect(r.loadingDoseMg).toBeLessThanOrEqual(3000);
        expect(r.loadingDoseMg).toBeGreaterThan(r.doseMg);
      }
    expect(res.body.warnings.map((w: { code: string }) => w.code)).toContain(
      'loading-with-drug-on-board',
    );
  });

  it('when loadingDose is not a boolean, then 400 names the field and nothing is computed', async () => {
    const { course } = await vancomycinCase();
    const res = await pharmacist
      .post(`/api/courses/${course.id}/regimens`)
      .send({ parameters: 'map', loadingDose: 'yes' });
    expect(res.status).toBe(400);
    expect(JSON.stringify(res.body)).toMatch(/loadingDose/);
  });
});

describe('POST /api/courses/:id/sampling', () => {
  it('when asking when to draw after a planned regimen, then ranked draw times with predicted values and the caution come back', async () => {
    // Arrange
    const { course } = await vancomycinCase();
    // Act
    const res = await pharmacist
      .post(`/api/courses/${course.id}/sampling`)
      .send({ regimen: { doseMg: 1250, intervalH: 12, infusionH: 1.5, count: 4 } });
    // Assert
    expect(res.status).toBe(200);
    expect(res.body.caution).toMatch(CAUTION_PATTERN);
    expect(res.body.bestPair.draws).toHaveLength(2);
    for (const d of res.body.bestPair.draws) {
      expect(d.hoursAfterInfusionEnd).toBeGreaterThanOrEqual(1 - 1e-9);
      expect(Date.parse(d.at)).toBeGreaterThan(Date.now());
    }
    expect(res.body.bestPair.sdLogAuc24).toBeLessThanOrEqual(res.body.currentSdLogAuc24);
  });
});

describe('POST /api/courses/:id/pta and GET /api/jobs/:id', () => {
  it('when a PTA run is requested, then it is accepted as a job whose progress can be polled to a result', async () => {
    // Arrange
    const { course } = await vancomycinCase();
    // Act
    const accepted = await pharmacist
      .post(`/api/courses/${course.id}/pta`)
      .send({ regimen: { doseMg: 1250, intervalH: 12, infusionH: 1.5 }, samples: 400, seed: 7 });
    // Assert
    expect(accepted.status).toBe(202);
    expect(accepted.body.statusUrl).toBe(`/api/jobs/${accepted.body.jobId}`);
    let job = (await pharmacist.get(accepted.body.statusUrl)).body;
    for (let i = 0; i < 60 && job.state !== 'completed' && job.state !== 'failed'; i++) {
      await new Promise((r) => setTimeout(r, 250));
      job = (await pharmacist.get(accepted.body.statusUrl)).body;
    }
    expect(job.state).toBe('completed');
    expect(job.progress).toBe(1);
    expect(job.result.probability).toBeGreaterThanOrEqual(0);
    expect(job.result.probability).toBeLessThanOrEqual(1);
    expect(job.result).toMatchObject({ samples: 400, source: 'posterior' });
    expect(job.result.caution).toMatch(CAUTION_PATTERN);
    expect((await trainee.get(accepted.body.statusUrl)).status).toBe(404);
  });

  it('when a phenytoin regimen is run, then the trough range is evaluated as Css and the job completes', async () => {
    // Arrange
    const p = await createRealPatient(pharmacist, { sex: 'male', birthDate: '1970-06-01' });
    await pharmacist
      .post(`/api/patients/${p.id}/covariates`)
      .send({
        kind: 'weight',
        value: 75,
        unit: 'kg',
        weightSource: 'measured',
        observedAt: hoursAgo(50),
      })
      .expect(201);
    const c = await createCourse(pharmacist, p.id, 'phenytoin', {
      target: { metric: 'trough', low: 10, high: 20 },
      micMgL: null,
    });
    await pharmacist
      .post(`/api/courses/${c.id}/doses`)
      .send({ amount: 300, unit: 'mg', route: 'oral', startAt: hoursAgo(24) })
      .expect(201);
    // Act
    const accepted = await pharmacist.post(`/api/courses/${c.id}/pta`).send({
      regimen: { doseMg: 300, intervalH: 24, infusionH: 0, route: 'oral' },
      parameters: 'population',
      samples: 200,
      seed: 3,
    });
    let job = (await pharmacist.get(accepted.body.statusUrl)).body;
    for (let i = 0; i < 60 && job.state !== 'completed' && job.state !== 'failed'; i++) {
      await new Promise((r) => setTimeout(r, 250));
      job = (await pharmacist.get(accepted.body.statusUrl)).body;
    }
    // Assert
    expect(accepted.status).toBe(202);
    expect(job.error).toBeNull();
    expect(job.state).toBe('completed');
    expect(job.result.source).toBe('population');
    expect(job.result.warnings.map((w: { code: string }) => w.code)).toContain('target-as-css');
  });

  it('when a large run is requested, then it goes to the worker-thread pool and completes', async () => {
    // Arrange
    const { course } = await vancomycinCase();
    // Act
    const accepted = await pharmacist.post(`/api/courses/${course.id}/pta`).send({
      regimen: { doseMg: 1000, intervalH: 12, infusionH: 1 },
      parameters: 'population',
      samples: 6000,
      seed: 11,
    });
    let job = (await pharmacist.get(accepted.body.statusUrl)).body;
    for (let i = 0; i < 120 && job.state !== 'completed' && job.state !== 'failed'; i++) {
      await new Promise((r) => setTimeout(r, 250));
      job = (await pharmacist.get(accepted.body.statusUrl)).body;
    }
    // Assert
    expect(job.error).toBeNull();
    expect(job.state).toBe('completed');
    expect(job.result.samples).toBe(6000);
  }, 60_000);

  it('when the regimen is missing, then it answers 400', async () => {
    // Act
    const { course } = await vancomycinCase({ levels: false });
    // Assert
    expect((await pharmacist.post(`/api/courses/${course.id}/pta`).send({})).status).toBe(400);
  });
});
