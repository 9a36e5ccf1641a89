import { readFileSync } from 'node:fs';
import { vancomycinGoti2018 } from '@ebbtide/kinetics';
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
let trainee: SignedInClient;
let admin: SignedInClient;

const fixture = (name: string) =>
  readFileSync(new URL(`../../../tests/fixtures/csv/${name}`, import.meta.url));

beforeAll(async () => {
  await ensureTestModels(db);
  pharmacist = await signedInAgent(app, 'pharmacist');
  trainee = await signedInAgent(app, 'trainee');
  admin = await signedInAgent(app, 'admin');
});
afterAll(() => db.destroy());

async function vancoCourse() {
  const p = await createRealPatient(pharmacist);
  return createCourse(pharmacist, p.id, 'vancomycin');
}

const upload = (
  client: SignedInClient,
  courseId: string,
  csv: Buffer | string,
  fields: Record<string, string>,
) => {
  let req = client.post(`/api/courses/${courseId}/imports/csv`);
  for (const [k, v] of Object.entries(fields)) req = req.field(k, v);
  return req.attach('file', Buffer.from(csv), { filename: 'upload.csv', contentType: 'text/csv' });
};

describe('POST /api/courses/:id/imports/csv', () => {
  it('when a dose file is previewed without a mapping, then a mapping is suggested and each row is checked and echoed, saving nothing', async () => {
    // Arrange
    const c = await vancoCourse();
    // Act
    const res = await upload(pharmacist, c.id, fixture('vancomycin-doses.csv'), { kind: 'doses' });
    // Assert
    expect(res.status).toBe(200);
    expect(res.body.mapping).toMatchObject({
      start: 'Given at',
      amount: 'Dose',
      unit: 'Unit',
      route: 'Route',
      infusionMinutes: 'Duration (min)',
      administrationStatus: 'Status',
      note: 'Comment',
    });
    expect(res.body).toMatchObject({ acceptedCount: 4, refusedCount: 0, committed: false });
    expect(res.body.rows[1].echo).toBe('1.25 g (1250 mg)');
    expect(await db('doses').where({ course_id: c.id })).toHaveLength(0);
  });

  it('when the dose file is committed, then every row is saved with source csv and audited', async () => {
    // Arrange
    const c = await vancoCourse();
    // Act
    const res = await upload(pharmacist, c.id, fixture('vancomycin-doses.csv'), {
      kind: 'doses',
      mode: 'commit',
    });
    // Assert
    expect(res.status).toBe(201);
    expect(res.body.createdIds).toHaveLength(4);
    const rows = await db('doses').where({ course_id: c.id }).orderBy('start_at');
    expect(rows.map((r) => r.source)).toEqual(['csv', 'csv', 'csv', 'csv']);
    expect(rows[0].start_at.toISOString()).toBe('2026-11-27T19:00:00.000Z');
    expect(rows.map((r) => r.administration_status)).toEqual(['given', 'given', 'given', 'missed']);
    const audit = await db('audit_events').whereIn('entity_id', res.body.createdIds);
    expect(audit).toHaveLength(4);
  });

  it('when rows have an unknown unit, a future time, a duplicate or a level during an infusion, then the preview marks each reason and the commit saves nothing', async () => {
    // Arrange: a course with one infusion 10 h ago (60 min).
    const c = await vancoCourse();
    const infusionAt = hoursAgo(10);
    await pharmacist
      .post(`/api/courses/${c.id}/doses`)
      .send({
        amount: 1000,
        unit: 'mg',
        route: 'iv-infusion',
        startAt: infusionAt,
        infusionMinutes: 60,
      })
      .expect(201);
    const during = new Date(Date.parse(infusionAt) + 20 * 60_000).toISOString();
    const ok = hoursAgo(2);
    const csv = [
      'collected,value,unit,sampleKind',
      `${ok},14,mg/L,trough`,
      `${hoursAgo(4)},14,mcg/mL,trough`,
      `${hoursAgo(-3)},14,mg/L,trough`,
      `${ok},14,mg/L,trough`,
      `${during},40,mg/L,peak`,
    ].join('\n');
    // Act
    const preview = await upload(pharmacist, c.id, csv, { kind: 'levels' });
    const commit = await upload(pharmacist, c.id, csv, { kind: 'levels', mode: 'commit' });
    // Assert
    expect(preview.status).toBe(200);
    const reasons = preview.body.rows.map((r: { reasons: string[] }) => r.reasons.join(' '));
    expect(preview.body.rows[0].status).toBe('accepted');
    expect(reasons[1]).toMatch(/unknown unit "mcg\/mL"/);
    expect(reasons[2]).toMatch(/future/);
    expect(reasons[3]).toMatch(/duplicate/);
    expect(reasons[4]).toMatch(/during the infusion/);
    expect(preview.body.refusedCount).toBe(4);
    expect(commit.status).toBe(400);
    expect(commit.body.code).toBe('import-refused');
    expect(commit.body.preview.refusedCount).toBe(4);
    expect(await db('levels').where({ course_id: c.id })).toHaveLength(0);
  });

  it('when a row fails in the database half-way through the commit, then nothing is left behind, audit rows included', async () => {
    // Arrange: a site model allowing doses up to 50 g passes the domain check; the table refuses > 20 g.
    const id = `site-vanco-wide-${Date.now().toString(36)}`;
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
    const csv = [
      'start,amount,unit,route,infusionMinutes',
      `${hoursAgo(30)},1000,mg,iv-infusion,60`,
      `${hoursAgo(18)},30000,mg,iv-infusion,60`,
    ].join('\n');
    const auditBefore = await db('audit_events')
      .count<{ count: string }[]>({ count: '*' })
      .where('action', 'dose.create');
    // Act
    const res = await upload(pharmacist, c.id, csv, { kind: 'doses', mode: 'commit' });
    // Assert
    expect(res.status).toBe(400);
    expect(res.body.code).toBe('import-failed');
    expect(res.body.message).toMatch(/row 3/);
    expect(await db('doses').where({ course_id: c.id })).toHaveLength(0);
    const auditAfter = await db('audit_events')
      .count<{ count: string }[]>({ count: '*' })
      .where('action', 'dose.create');
    expect(auditAfter[0]?.count).toBe(auditBefore[0]?.count);
  });

  it('when the mapping names columns explicitly, then they are used; a required field left unmapped is reported', async () => {
    // Arrange
    const c = await vancoCourse();
    const csv = ['When,Amt,U,How', `${hoursAgo(6)},1000,mg,iv-bolus`].join('\n');
    // Act
    const mapped = await upload(pharmacist, c.id, csv, {
      kind: 'doses',
      mapping: JSON.stringify({ start: 'When', amount: 'Amt', unit: 'U', route: 'How' }),
    });
    const unmapped = await upload(pharmacist, c.id, csv, {
      kind: 'doses',
      mapping: JSON.stringify({ start: 'When', amount: 'Amt' }),
    });
    // Assert
    expect(mapped.body.acceptedCount).toBe(1);
    expect(unmapped.body.missingFields).toEqual(['unit', 'route']);
    expect(unmapped.body.rows[0].status).toBe('refused');
  });

  it('when the file or the kind is missing, or the mapping is not JSON, then it answers 400 per field', async () => {
    // Arrange
    const c = await vancoCourse();
    // Act
    const noFile = await pharmacist.post(`/api/courses/${c.id}/imports/csv`).field('kind', 'doses');
    const noKind = await upload(pharmacist, c.id, 'a,b\n1,2', {});
    const badMapping = await upload(pharmacist, c.id, 'a,b\n1,2', {
      kind: 'doses',
      mapping: '{oops',
    });
    // Assert
    expect(noFile.body.fieldErrors.file).toBeDefined();
    expect(noKind.body.fieldErrors.kind).toBeDefined();
    expect(badMapping.body.fieldErrors.mapping).toBeDefined();
  });

  it('when a trainee uploads, then it answers 403; signed out, 401', async () => {
    // Arrange
    const t = await createTeachingPatient(pharmacist);
    // Act
    const c = await createCourse(pharmacist, t.id);
    // Assert
    expect((await upload(trainee, c.id, 'start\n0', { kind: 'doses' })).status).toBe(403);
    const anon = await anonymousAgent(app)
      .post(`/api/courses/${c.id}/imports/csv`)
      .field('kind', 'doses');
    expect(anon.status).toBe(401);
  });
});
