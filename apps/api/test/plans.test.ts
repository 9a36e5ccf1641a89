import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { contentHash } from '../src/domain/plans/content-hash';
import { signedInAgent, type SignedInClient } from './support/sign-in';
import { realCourse, regimenBody, startPlanWorld, type PlanWorld } from './plans-fixtures';

let world: PlanWorld;
let pharmacist: SignedInClient;
let otherPharmacist: SignedInClient;
let trainee: SignedInClient;

beforeAll(async () => {
  world = await startPlanWorld();
  pharmacist = await signedInAgent(world.app, 'pharmacist');
  otherPharmacist = await signedInAgent(world.app, 'pharmacist');
  trainee = await signedInAgent(world.app, 'trainee');
});
afterAll(() => world?.stop());

describe('POST /api/courses/:courseId/plans', () => {
  it('when a pharmacist uses a regimen, then a draft plan with clock times, draws and a content hash is stored', async () => {
    // Arrange
    const { courseId, patientId } = await realCourse(pharmacist);
    const body = regimenBody({ loadingDoseMg: 2000 });
    // Act
    const res = await pharmacist.post(`/api/courses/${courseId}/plans`).send(body);
    // Assert
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body).toMatchObject({
      courseId,
      patientId,
      planNumber: 1,
      state: 'draft',
      authorUserId: pharmacist.user.id,
      rationale: body.rationale,
      regimen: { doseMg: 1250, intervalH: 12, infusionH: 1.5, loadingDoseMg: 2000, count: 6 },
      actions: { edit: true, submit: true, countersign: false },
    });
    expect(res.body.regimen.doses).toHaveLength(7);
    expect(res.body.regimen.doses[0]).toMatchObject({
      number: 0,
      label: 'loading dose',
      doseMg: 2000,
    });
    expect(res.body.regimen.clockTimes).toHaveLength(2);
    expect(res.body.regimen.infusionRateMgPerH).toBe(1333);
    expect(res.body.sampling).toHaveLength(2);
    expect(res.body.sampling[0].label).toMatch(/after the END of the \d\d:\d\d dose/);
    expect(res.body.caution).toMatch(/does not replace, clinical judgement/);
    expect(res.body.warnings.map((w: { code: string }) => w.code)).toContain('infusion-rate-high');
    const row = await world.db('plans').where({ id: res.body.id }).first();
    expect(row.state).toBe('draft');
    expect(row.content_hash).toBe(contentHash(row.content));
    expect(res.body.contentHash).toBe(row.content_hash);
    const audit = await world
      .db('audit_events')
      .where({ entity_id: res.body.id, action: 'plan.create' });
    expect(audit).toHaveLength(1);
  });

  it('when the body is bad, then 400 names the fields and nothing is stored', async () => {
    const { courseId } = await realCourse(pharmacist, { levels: false });
    const res = await pharmacist
      .post(`/api/courses/${courseId}/plans`)
      .send(regimenBody({ doseMg: -5, intervalH: 'twelve' }));
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.fieldErrors)).toEqual(
      expect.arrayContaining(['doseMg', 'intervalH']),
    );
    expect(await world.db('plans').where({ course_id: courseId })).toHaveLength(0);
  });

  it('when a draw names a dose the regimen does not have, then 400 on that draw', async () => {
    const { courseId } = await realCourse(pharmacist, { levels: false });
    const res = await pharmacist.post(`/api/courses/${courseId}/plans`).send(
      regimenBody({
        count: 2,
        sampling: [{ kind: 'trough', doseNumber: 5, anchor: 'before-start', offsetH: 0.5 }],
      }),
    );
    expect(res.status).toBe(400);
    expect(res.body.fieldErrors['sampling.0.doseNumber']).toBeDefined();
  });

  it('when a trainee tries, then 403 and no plan', async () => {
    const { courseId } = await realCourse(pharmacist, { levels: false });
    const res = await trainee.post(`/api/courses/${courseId}/plans`).send(regimenBody());
    expect(res.status).toBe(403);
    expect(await world.db('plans').where({ course_id: courseId })).toHaveLength(0);
  });

  it('when two plans are made for one course, then they are numbered 1 and 2', async () => {
    const { courseId } = await realCourse(pharmacist, { levels: false });
    const [a, b] = await Promise.all([
      pharmacist.post(`/api/courses/${courseId}/plans`).send(regimenBody()),
      otherPharmacist.post(`/api/courses/${courseId}/plans`).send(regimenBody()),
    ]);
    expect([a.status, b.status]).toEqual([201, 201]);
    expect([a.body.planNumber, b.body.planNumber].sort()).toEqual([1, 2]);
    const list = await pharmacist.get(`/api/courses/${courseId}/plans`);
    expect(list.body.items.map((p: { planNumber: number }) => p.planNumber)).toEqual([2, 1]);
  });
});

describe('PATCH /api/plans/:id', () => {
  it('when the author edits a draft, then the content and hash change and the version goes up', async () => {
    const { courseId } = await realCourse(pharmacist, { levels: false });
    const created = (await pharmacist.post(`/api/courses/${courseId}/plans`).send(regimenBody()))
      .body;
    const res = await pharmacist
      .patch(`/api/plans/${created.id}`)
      .send({ version: created.version, rationale: 'Changed my mind about the interval.' });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.version).toBe(created.version + 1);
    expect(res.body.rationale).toBe('Changed my mind about the interval.');
    expect(res.body.contentHash).not.toBe(created.contentHash);
  });

  it('when someone other than the author edits, then 403 not-author', async () => {
    const { courseId } = await realCourse(pharmacist, { levels: false });
    const created = (await pharmacist.post(`/api/courses/${courseId}/plans`).send(regimenBody()))
      .body;
    const res = await otherPharmacist
      .patch(`/api/plans/${created.id}`)
      .send({ version: created.version, rationale: 'mine now' });
    expect(res.status).toBe(403);
    expect(res.body.code).toBe('not-author');
  });

  it('when the version is stale, then 409 and nothing is overwritten', async () => {
    const { courseId } = await realCourse(pharmacist, { levels: false });
    const created = (await pharmacist.post(`/api/courses/${courseId}/plans`).send(regimenBody()))
      .body;
    await pharmacist
      .patch(`/api/plans/${created.id}`)
      .send({ version: created.version, rationale: 'first' });
    const res = await pharmacist
      .patch(`/api/plans/${created.id}`)
      .send({ version: created.version, rationale: 'second' });
    expect(res.status).toBe(409);
    expect(res.body.code).toBe('stale-version');
    expect((await pharmacist.get(`/api/plans/${created.id}`)).body.rationale).toBe('first');
  });

  it('when a trainee asks for a real plan, then 403 (plans are clinical staff only)', async () => {
    const { courseId } = await realCourse(pharmacist, { levels: false });
    const created = (await pharmacist.post(`/api/courses/${courseId}/plans`).send(regimenBody()))
      .body;
    const res = await trainee.get(`/api/plans/${created.id}`);
    expect(res.status).toBe(403);
  });
});
