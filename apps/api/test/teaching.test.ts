import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildTeachingCase, teachingSpecs } from '../../../scripts/seed/teaching-cases';
import { insertTeachingCase } from '../src/data-access/teaching-repo';
import { signedInAgent, type SignedInClient } from './support/sign-in';
import { realCourse, startPlanWorld, type PlanWorld } from './plans-fixtures';

let world: PlanWorld;
let trainee: SignedInClient;
let pharmacist: SignedInClient;
let admin: SignedInClient;
const caseIds: string[] = [];

/** Safe Harbor-style identifiers that must never reach a trainee. */
const IDENTIFIER =
  /\b(mrn|givenName|familyName|birthDate|given_name|family_name|birth_date)\b|\d{4}-\d{2}-\d{2}/;

beforeAll(async () => {
  world = await startPlanWorld();
  trainee = await signedInAgent(world.app, 'trainee');
  pharmacist = await signedInAgent(world.app, 'pharmacist');
  admin = await signedInAgent(world.app, 'admin');
  for (const spec of teachingSpecs) {
    const c = buildTeachingCase({
      ...spec,
      title: `${spec.title} [${Math.random().toString(36).slice(2, 8)}]`,
    });
    caseIds.push(await world.db.transaction((trx) => insertTeachingCase(trx, c)));
  }
});
afterAll(() => world?.stop());

describe('GET /api/teaching/cases', () => {
  it('when a trainee lists cases, then they are there without identifiers or the hidden patient', async () => {
    const res = await trainee.get('/api/teaching/cases');
    expect(res.status).toBe(200);
    const mine = res.body.items.filter((c: { id: string }) => caseIds.includes(c.id));
    expect(mine).toHaveLength(teachingSpecs.length);
    const text = JSON.stringify(res.body);
    expect(text).not.toMatch(/trueParameters|true_parameters|pitfalls/);
    expect(text.replace(/"createdAt":"[^"]*"/g, '')).not.toMatch(IDENTIFIER);
    expect(mine.map((c: { age: string }) => c.age)).toContain('90+');
  });

  it('when a trainee opens a case, then every time is relative ("Day 1 08:00") and no date appears', async () => {
    const res = await trainee.get(`/api/teaching/cases/${caseIds[0]}`);
    expect(res.status).toBe(200);
    expect(res.body.doses[0].time).toEqual({ hour: 0, label: 'Day 1 08:00' });
    expect(res.body.levels.map((l: { time: { label: string } }) => l.time.label)).toEqual([
      'Day 2 22:30',
      'Day 3 04:00',
    ]);
    expect(JSON.stringify(res.body)).not.toMatch(IDENTIFIER);
    expect(JSON.stringify(res.body)).not.toMatch(/trueParameters|pitfalls|levelId/);
    expect(res.body.caution).toMatch(/clinical judgement/);
    // The vancomycin model gives doses by IV infusion only: the practice plan offers just that.
    expect(res.body.model.routes).toEqual(['iv-infusion']);
  });

  it('when an admin asks, then 403 (teaching is for trainees and clinical staff)', async () => {
    expect((await admin.get('/api/teaching/cases')).status).toBe(403);
  });
});

describe('POST /api/teaching/cases/:id/practice-plans', () => {
  it('when a trainee submits a practice plan, then it is scored against the hidden patient and never queued for sign-off', async () => {
    // Arrange: the early-trough case; the trainee leaves that level out and says so.
    const detail = (await trainee.get(`/api/teaching/cases/${caseIds[0]}`)).body;
    const earlyTrough = detail.levels.find(
      (l: { sampleKind: string }) => l.sampleKind === 'trough',
    );
    const plansBefore = await world.db('plans').count<{ count: string }[]>({ count: '*' });
    // Act
    const res = await trainee.post(`/api/teaching/cases/${caseIds[0]}/practice-plans`).send({
      regimen: { doseMg: 1250, intervalH: 12, infusionH: 1.5, startHour: 60 },
      excludeLevelIds: [earlyTrough.id],
      pitfallsFlagged: ['early-trough'],
      rationale: 'Trough taken with the morning bloods: left out.',
    });
    // Assert
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const s = res.body.score;
    expect(s.truth.auc24).toBeGreaterThan(100);
    expect(s.predicted.auc24).toBeGreaterThan(100);
    expect(typeof s.auc24ErrorPercent).toBe('number');
    expect(s.pitfalls).toEqual([expect.objectContaining({ code: 'early-trough', caught: true })]);
    expect(s.falseAlarms).toEqual([]);
    expect(s.trueParameters.CL).toBeGreaterThan(0);
    expect(s.points).toBeGreaterThanOrEqual(30);
    expect(s.points).toBeLessThanOrEqual(100);
    const plansAfter = await world.db('plans').count<{ count: string }[]>({ count: '*' });
    expect(plansAfter[0]!.count).toBe(plansBefore[0]!.count);
    const list = await trainee.get(`/api/teaching/cases/${caseIds[0]}/practice-plans`);
    expect(list.body.items.map((p: { id: string }) => p.id)).toContain(res.body.id);
  });

  it('when the trainee flags a pitfall the case does not have and misses the real one, then the score says so', async () => {
    const res = await trainee.post(`/api/teaching/cases/${caseIds[2]}/practice-plans`).send({
      regimen: { doseMg: 1500, intervalH: 12, infusionH: 1.5, startHour: 72 },
      pitfallsFlagged: ['unit-mix-up'],
    });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.score.pitfalls).toEqual([
      expect.objectContaining({ code: 'stale-weight', caught: false }),
    ]);
    expect(res.body.score.falseAlarms).toEqual(['unit-mix-up']);
  });

  it('when the practice regimen uses a route the case model does not cover, then 400 names it', async () => {
    const res = await trainee.post(`/api/teaching/cases/${caseIds[0]}/practice-plans`).send({
      regimen: { doseMg: 1250, intervalH: 12, infusionH: 0, route: 'oral', startHour: 60 },
    });
    expect(res.status).toBe(400);
    expect(res.body.fieldErrors['regimen.route'][0]).toMatch(/IV infusion only/);
  });

  it('when the regimen is invalid, then 400 with field errors', async () => {
    const res = await trainee.post(`/api/teaching/cases/${caseIds[0]}/practice-plans`).send({
      regimen: { doseMg: 0, intervalH: 12, infusionH: 1, startHour: 10 },
      pitfallsFlagged: ['nope'],
    });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.fieldErrors)).toEqual(
      expect.arrayContaining(['regimen.doseMg', 'pitfallsFlagged.0']),
    );
  });

  it('when a trainee opens a real course through the casework API, then it is not found', async () => {
    const { courseId } = await realCourse(pharmacist, { levels: false });
    const res = await trainee.get(`/api/courses/${courseId}`);
    expect(res.status).toBe(404);
  });
});

describe('POST /api/teaching/cases (anonymising copy)', () => {
  it('when an admin copies a real course, then the teaching case has no identifiers, relative times and a reference patient', async () => {
    const { courseId } = await realCourse(pharmacist);
    const sources = await admin.get('/api/teaching/sources');
    expect(sources.status).toBe(200);
    expect(JSON.stringify(sources.body)).not.toMatch(/Quenby|Marlowe|KB-/);
    const res = await admin.post('/api/teaching/cases').send({
      courseId,
      title: 'Copied: vancomycin bacteraemia',
      indication: 'bacteraemia',
    });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.origin).toBe('anonymised-copy');
    const tc = await world.db('teaching_cases').where({ id: res.body.id }).first();
    const patient = await world.db('patients').where({ id: tc.patient_id }).first();
    expect(patient).toMatchObject({
      is_teaching: true,
      mrn: null,
      given_name: null,
      family_name: null,
      birth_date: null,
      ward: null,
    });
    expect(patient.teaching_label).not.toMatch(/Quenby|Marlowe/);
    const doses = await world.db('doses').where({ course_id: tc.course_id }).orderBy('start_hour');
    expect(doses.map((d: { start_hour: number }) => Math.round(d.start_hour))).toEqual([0, 12, 24]);
    expect(
      doses.every(
        (d: { start_at: unknown; note: unknown }) => d.start_at === null && d.note === null,
      ),
    ).toBe(true);
    expect(tc.true_parameters.parameters.CL).toBeGreaterThan(0);
    const detail = await trainee.get(`/api/teaching/cases/${res.body.id}`);
    expect(detail.status).toBe(200);
    expect(JSON.stringify(detail.body)).not.toMatch(/Quenby|Marlowe|KB-|4 North|MRSA/);
    expect(JSON.stringify(detail.body)).not.toMatch(IDENTIFIER);
  });

  it('when a non-admin tries, then 403', async () => {
    const { courseId } = await realCourse(pharmacist, { levels: false });
    const res = await pharmacist.post('/api/teaching/cases').send({ courseId, title: 'Mine' });
    expect(res.status).toBe(403);
  });
});
