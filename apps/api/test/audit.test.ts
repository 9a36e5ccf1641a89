import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { signedInAgent, type SignedInClient } from './support/sign-in';
import { realCourse, regimenBody, startPlanWorld, type PlanWorld } from './plans-fixtures';

let world: PlanWorld;
let admin: SignedInClient;
let pharmacist: SignedInClient;

beforeAll(async () => {
  world = await startPlanWorld();
  admin = await signedInAgent(world.app, 'admin');
  pharmacist = await signedInAgent(world.app, 'pharmacist');
});
afterAll(() => world?.stop());

describe('GET /api/audit', () => {
  it('when an admin filters by patient, then the patient’s course, doses, levels and plan events come back with before and after', async () => {
    // Arrange
    const { patientId, courseId } = await realCourse(pharmacist);
    const plan = (await pharmacist.post(`/api/courses/${courseId}/plans`).send(regimenBody())).body;
    await pharmacist
      .patch(`/api/plans/${plan.id}`)
      .send({ version: plan.version, rationale: 'second thoughts' });
    const other = await realCourse(pharmacist, { levels: false });
    // Act
    const res = await admin.get(`/api/audit?patientId=${patientId}&pageSize=200`);
    // Assert
    expect(res.status).toBe(200);
    const actions = res.body.items.map((e: { action: string }) => e.action);
    expect(actions).toEqual(expect.arrayContaining(['plan.create', 'plan.update']));
    expect(actions.some((a: string) => a.startsWith('dose.'))).toBe(true);
    expect(actions.some((a: string) => a.startsWith('level.'))).toBe(true);
    expect(res.body.items.every((e: { entityId: string }) => e.entityId !== other.courseId)).toBe(
      true,
    );
    const update = res.body.items.find((e: { action: string }) => e.action === 'plan.update');
    expect(update.before.content.rationale).toBe(regimenBody().rationale);
    expect(update.after.content.rationale).toBe('second thoughts');
    expect(update.actorName).toBe(pharmacist.user.displayName);
  });

  it('filters by course, user, action prefix and time', async () => {
    const { courseId } = await realCourse(pharmacist, { levels: false });
    const plan = (await pharmacist.post(`/api/courses/${courseId}/plans`).send(regimenBody())).body;
    const byCourse = await admin.get(`/api/audit?courseId=${courseId}&action=plan.`);
    expect(byCourse.body.items.map((e: { entityId: string }) => e.entityId)).toEqual([plan.id]);
    const byUser = await admin.get(`/api/audit?userId=${pharmacist.user.id}&pageSize=200`);
    expect(
      byUser.body.items.every((e: { actorUserId: string }) => e.actorUserId === pharmacist.user.id),
    ).toBe(true);
    const future = await admin.get(
      `/api/audit?from=${encodeURIComponent(new Date(Date.now() + 3_600_000).toISOString())}`,
    );
    expect(future.body.items).toEqual([]);
  });

  it('when the query is bad, then 400 with field errors', async () => {
    const res = await admin.get('/api/audit?patientId=not-a-uuid&from=yesterday');
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.fieldErrors)).toEqual(
      expect.arrayContaining(['patientId', 'from']),
    );
  });

  it('when a pharmacist or trainee asks, then 403', async () => {
    expect((await pharmacist.get('/api/audit')).status).toBe(403);
    expect((await (await signedInAgent(world.app, 'trainee')).get('/api/audit')).status).toBe(403);
  });

  it('when anyone tries to UPDATE or DELETE an audit row, then the database refuses', async () => {
    const { courseId } = await realCourse(pharmacist, { levels: false });
    await pharmacist.post(`/api/courses/${courseId}/plans`).send(regimenBody());
    const event = (await admin.get(`/api/audit?courseId=${courseId}&action=plan.create`)).body
      .items[0];
    await expect(
      world.db('audit_events').where({ id: event.id }).update({ action: 'plan.tampered' }),
    ).rejects.toThrow(/append-only/);
    await expect(world.db('audit_events').where({ id: event.id }).del()).rejects.toThrow(
      /append-only/,
    );
    const again = (await admin.get(`/api/audit?courseId=${courseId}&action=plan.create`)).body
      .items[0];
    expect(again.action).toBe('plan.create');
  });
});
