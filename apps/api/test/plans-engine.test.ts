import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { signedInAgent, type SignedInClient } from './support/sign-in';
import {
  hoursFromNow,
  realCourse,
  regimenBody,
  startPlanWorld,
  type PlanWorld,
} from './plans-fixtures';

/**
 * How far the plan's stored exposure may be from the regimen screen's: 0.5% (product rule: the
 * pharmacist sees the same numbers on both; the bound only absorbs JSON rounding).
 */
const SAME_NUMBERS_RELATIVE = 0.005;

let world: PlanWorld;
let pharmacist: SignedInClient;

beforeAll(async () => {
  world = await startPlanWorld();
  pharmacist = await signedInAgent(world.app, 'pharmacist');
});
afterAll(() => world?.stop());

const close = (actual: number | null, expected: number | null) => {
  expect(actual).not.toBeNull();
  expect(expected).not.toBeNull();
  expect(Math.abs(actual! - expected!) / Math.abs(expected!)).toBeLessThanOrEqual(
    SAME_NUMBERS_RELATIVE,
  );
};

describe('POST /api/courses/:courseId/plans (engine path)', () => {
  for (const variant of [
    { name: 'a 12-hourly regimen', regimen: {} },
    {
      name: 'a regimen with a loading dose, 8-hourly',
      regimen: { loadingDoseMg: 2000, intervalH: 8, doseMg: 1000 },
    },
  ]) {
    it(`when a plan uses ${variant.name}, then its stored peak, trough and AUC24 equal the regimen screen's`, async () => {
      // Arrange: a vancomycin course with three doses and two levels, entered through the API.
      const { courseId } = await realCourse(pharmacist);
      const startAt = hoursFromNow(2);
      const body = regimenBody({ startAt, ...variant.regimen });
      const { rationale: _rationale, ...regimen } = body;
      void _rationale;
      const screen = await pharmacist
        .post(`/api/courses/${courseId}/simulate`)
        .send({ parameters: 'map', regimen, horizonH: 24, stepH: 0.25 });
      expect(screen.status, JSON.stringify(screen.body)).toBe(200);
      // Act
      const created = await pharmacist.post(`/api/courses/${courseId}/plans`).send(body);
      // Assert
      expect(created.status, JSON.stringify(created.body)).toBe(201);
      const row = await world.db('plans').where({ id: created.body.id }).first();
      const stored = row.content.basis;
      expect(stored.method).toBe('map');
      close(stored.predicted.peakMgL, screen.body.exposure.peakMgL);
      close(stored.predicted.troughMgL, screen.body.exposure.troughMgL);
      close(stored.predicted.auc24, screen.body.exposure.auc24);
      for (const [k, v] of Object.entries(screen.body.parameters as Record<string, number>)) {
        close(stored.parameters[k], v);
      }
      expect(created.body.predicted).toEqual(stored.predicted);
    });
  }
});

describe('POST /api/courses/:courseId/plans (oral phenytoin loading)', () => {
  it('when an oral phenytoin plan has a loading dose, then it lists the portions 2 h apart and its exposure equals the regimen screen', async () => {
    // Arrange: an invented adult on oral phenytoin 300 mg daily for three days, through the API.
    const patient = await pharmacist.post('/api/patients').send({
      mrn: `KB-${Math.random().toString(16).slice(2, 12).toUpperCase()}`,
      givenName: 'Perrin',
      familyName: 'Alcott',
      sex: 'male',
      birthDate: '1969-11-30',
      ward: '6 West',
    });
    expect(patient.status).toBe(201);
    for (const c of [
      { kind: 'weight', value: 70, unit: 'kg', weightSource: 'measured' },
      { kind: 'serum-creatinine', value: 80, unit: 'umol/L' },
    ])
      expect(
        (
          await pharmacist
            .post(`/api/patients/${patient.body.id}/covariates`)
            .send({ ...c, observedAt: hoursFromNow(-80) })
        ).status,
      ).toBe(201);
    const course = await pharmacist.post(`/api/patients/${patient.body.id}/courses`).send({
      drug: 'phenytoin',
      modelId: 'phenytoin-adult-grasela-1983',
      indication: 'Seizure prophylaxis',
      micMgL: null,
      target: { metric: 'trough', low: 10, high: 20 },
    });
    expect(course.status, JSON.stringify(course.body)).toBe(201);
    for (const h of [72, 48, 24])
      expect(
        (
          await pharmacist
            .post(`/api/courses/${course.body.id}/doses`)
            .send({ amount: 300, unit: 'mg', route: 'oral', startAt: hoursFromNow(-h) })
        ).status,
      ).toBe(201);
    const startAt = hoursFromNow(1);
    const regimen = {
      doseMg: 300,
      intervalH: 24,
      infusionH: 0,
      route: 'oral',
      count: 4,
      loadingDoseMg: 1000,
      startAt,
    };
    const screen = await pharmacist
      .post(`/api/courses/${course.body.id}/simulate`)
      .send({ parameters: 'population', regimen, horizonH: 24, stepH: 0.25 });
    expect(screen.status, JSON.stringify(screen.body)).toBe(200);
    // Oral doses are absorbed with the model's F (0.859 here), not simulated as IV doses: the same
    // regimen by IV infusion gives a higher AUC24 (and more than proportionally so: capacity-limited).
    const asInfusion = await pharmacist.post(`/api/courses/${course.body.id}/simulate`).send({
      parameters: 'population',
      regimen: { ...regimen, route: 'iv-infusion', infusionH: 0.5 },
      horizonH: 24,
      stepH: 0.25,
    });
    expect(asInfusion.status, JSON.stringify(asInfusion.body)).toBe(200);
    expect(asInfusion.body.exposure.auc24).toBeGreaterThan(screen.body.exposure.auc24 / 0.859);
    // The phenytoin model covers oral and IV infusion only: an IV bolus is refused, not simulated.
    const bolus = await pharmacist
      .post(`/api/courses/${course.body.id}/simulate`)
      .send({ parameters: 'population', regimen: { ...regimen, route: 'iv-bolus' } });
    expect(bolus.status).toBe(400);
    expect(bolus.body.fieldErrors['regimen.route'][0]).toMatch(
      /oral or IM .* and IV infusion only/,
    );
    // Act
    const created = await pharmacist
      .post(`/api/courses/${course.body.id}/plans`)
      .send({ ...regimen, rationale: 'Load, then maintain at the steady state.' });
    // Assert: 400 + 400 + 200 mg at +0, +2, +4 h (common practice: oral phenytoin loading in parts),
    // maintenance 24 h after the first part.
    expect(created.status, JSON.stringify(created.body)).toBe(201);
    const doses = created.body.regimen.doses as {
      label: string;
      doseMg: number;
      startAt: string;
    }[];
    const h = (d: { startAt: string }) => (Date.parse(d.startAt) - Date.parse(startAt)) / 3_600_000;
    expect(doses.slice(0, 4).map((d) => [d.label, d.doseMg, Math.round(h(d) * 100) / 100])).toEqual(
      [
        ['loading dose, part 1 of 3', 400, 0],
        ['loading dose, part 2 of 3', 400, 2],
        ['loading dose, part 3 of 3', 200, 4],
        ['dose 1', 300, 24],
      ],
    );
    close(created.body.predicted.troughMgL, screen.body.exposure.troughMgL);
    close(created.body.predicted.auc24, screen.body.exposure.auc24);
  });
});

describe('routes a drug model does not cover', () => {
  it('when a vancomycin plan or simulation is given by mouth, then 400 names the route and nothing is stored', async () => {
    const { courseId } = await realCourse(pharmacist);
    const count = async () =>
      (
        await world.db('plans').where({ course_id: courseId }).count<{ count: string }[]>({
          count: '*',
        })
      )[0]!.count;
    const before = await count();
    const oral = regimenBody({ startAt: hoursFromNow(2), route: 'oral', infusionH: 0 });
    const plan = await pharmacist.post(`/api/courses/${courseId}/plans`).send(oral);
    expect(plan.status).toBe(400);
    expect(plan.body.fieldErrors.route[0]).toMatch(/IV infusion only, not oral/);
    const { rationale: _r, ...regimen } = oral;
    void _r;
    const sim = await pharmacist
      .post(`/api/courses/${courseId}/simulate`)
      .send({ parameters: 'map', regimen });
    expect(sim.status).toBe(400);
    expect(Object.keys(sim.body.fieldErrors)).toEqual(['regimen.route']);
    expect(await count()).toBe(before);
  });
});
