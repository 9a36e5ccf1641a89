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
