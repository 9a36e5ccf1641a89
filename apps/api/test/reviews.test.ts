import { execFileSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { randomUUID } from 'node:crypto';
import { startMailCatcher, type RunningMailCatcher } from '@ebbtide/mailcatcher';
import { pino } from 'pino';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { AppConfig } from '../src/config';
import { mailOverdueRechecks } from '../src/domain/plans/recheck';
import { planDeps } from '../src/domain/plans/plan-deps';
import { startMailWorker, type RunningMailWorker } from '../src/mail/mail-worker';
import { createMailTransport } from '../src/mail/transport';
import { signedInAgent, type SignedInClient } from './support/sign-in';
import { realCourse, regimenBody, startPlanWorld, type PlanWorld } from './plans-fixtures';

const QUEUE = `plan-mail-test-${randomUUID()}`;
let world: PlanWorld;
let catcher: RunningMailCatcher;
let worker: RunningMailWorker;
let pharmacist: SignedInClient;
let reviewer: SignedInClient;
let secondReviewer: SignedInClient;
let trainee: SignedInClient;

const CHECKLIST = {
  weightAndDate: true,
  administrationTimes: true,
  sampleTiming: true,
  fitPlausible: true,
  roundingAndRate: true,
};

beforeAll(async () => {
  world = await startPlanWorld({}, { mailQueueName: QUEUE });
  catcher = await startMailCatcher({ smtpPort: 0, httpPort: 0, nodeEnv: 'test' });
  worker = await startMailWorker({
    boss: world.boss,
    db: world.db,
    transport: createMailTransport({
      host: '127.0.0.1',
      port: catcher.smtpPort,
      secure: false,
      ignoreTls: true,
    }),
    logger: pino({ level: 'silent' }),
    from: 'Ebbtide <ebbtide@kestrelbay.example>',
    queueName: QUEUE,
    pollingIntervalSeconds: 0.5,
    sweepIntervalSeconds: 0,
  });
  pharmacist = await signedInAgent(world.app, 'pharmacist', { displayName: 'Ines Harrowgate' });
  reviewer = await signedInAgent(world.app, 'reviewer', { displayName: 'Tomasz Ellery' });
  secondReviewer = await signedInAgent(world.app, 'reviewer');
  trainee = await signedInAgent(world.app, 'trainee');
});
afterAll(async () => {
  await worker?.stop();
  await catcher?.stop();
  await world?.stop();
});

async function draft(author: SignedInClient = pharmacist) {
  const { courseId } = await realCourse(author);
  const res = await author.post(`/api/courses/${courseId}/plans`).send(regimenBody());
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body as { id: string; version: number; courseId: string; contentHash: string };
}

async function submitted(author: SignedInClient = pharmacist) {
  const plan = await draft(author);
  const res = await author.post(`/api/plans/${plan.id}/submit`).send({ version: plan.version });
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return res.body as {
    id: string;
    version: number;
    courseId: string;
    contentHash: string;
    state: string;
  };
}

/** Makes the session look as if credentials were entered long ago. */
async function ageSession(client: SignedInClient, minutes: number) {
  await world.db.raw(
    `UPDATE sessions SET sess = jsonb_set(sess::jsonb, '{signedInAt}', to_jsonb(?::text))::json WHERE sid = ?`,
    [new Date(Date.now() - minutes * 60_000).toISOString(), client.sid],
  );
}

describe('POST /api/plans/:id/submit', () => {
  it('when the author submits, then the plan is recomputed, signed "authored", queued for review and mailed to reviewers', async () => {
    // Arrange
    catcher.clear();
    const plan = await draft();
    // Act
    const res = await pharmacist
      .post(`/api/plans/${plan.id}/submit`)
      .send({ version: plan.version });
    // Assert
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.state).toBe('submitted');
    expect(res.body.basis.method).toBe('map');
    expect(res.body.basis.levels.filter((l: { used: boolean }) => l.used)).toHaveLength(2);
    expect(res.body.basis.doses).toHaveLength(3);
    expect(res.body.predicted.auc24).toBeGreaterThan(100);
    expect(res.body.signatures).toEqual([
      expect.objectContaining({
        signerName: 'Ines Harrowgate',
        meaning: 'authored',
        meaningLabel: 'authored',
        contentHash: res.body.contentHash,
        matchesContent: true,
      }),
    ]);
    const outbox = await world
      .db('mail_outbox')
      .where({ idempotency_key: `plan:${plan.id}:submitted:v${res.body.version}` });
    expect(outbox).toHaveLength(1);
    expect(outbox[0].to).toContain(reviewer.user.email);
    expect(outbox[0].to).not.toContain(pharmacist.user.email);
    const mail = await catcher.waitForMessage((m) => m.text.includes(plan.id), 15_000);
    expect(mail.subject).toMatch(/awaiting countersignature/);
    expect(mail.to).toContain(reviewer.user.email);
    expect(mail.text).not.toMatch(/Quenby|Marlowe/);
    const queue = await reviewer.get('/api/reviews?pageSize=100');
    expect(queue.body.items.map((i: { planId: string }) => i.planId)).toContain(plan.id);
  });

  it('when the session is older than the signing window, then 401 reauthentication-required and nothing changes', async () => {
    const plan = await draft();
    const stale = await signedInAgent(world.app, 'pharmacist', { user: pharmacist.user });
    await ageSession(stale, 60);
    const res = await stale.post(`/api/plans/${plan.id}/submit`).send({ version: plan.version });
    expect(res.status).toBe(401);
    expect(res.body.code).toBe('reauthentication-required');
    expect(res.body.reauthenticateUrl).toBe('/api/signing/reauthenticate');
    const status = await stale.get('/api/signing/status');
    expect(status.body.fresh).toBe(false);
    expect((await world.db('plans').where({ id: plan.id }).first()).state).toBe('draft');
  });

  it('when a trainee tries to submit to the real queue, then 403 and the plan stays a draft', async () => {
    const plan = await draft();
    const res = await trainee.post(`/api/plans/${plan.id}/submit`).send({ version: plan.version });
    expect(res.status).toBe(403);
    expect((await world.db('plans').where({ id: plan.id }).first()).state).toBe('draft');
  });

  it('when someone else submits the author’s plan, then 403 not-author', async () => {
    const plan = await draft();
    const res = await reviewer.post(`/api/plans/${plan.id}/submit`).send({ version: plan.version });
    expect(res.status).toBe(403);
    expect(res.body.code).toBe('not-author');
  });

  it('when a submitted plan is edited, then 409 plan-locked', async () => {
    const plan = await submitted();
    const res = await pharmacist
      .patch(`/api/plans/${plan.id}`)
      .send({ version: plan.version, rationale: 'x' });
    expect(res.status).toBe(409);
    expect(res.body.code).toBe('plan-locked');
  });
});

describe('POST /api/plans/:id/countersign', () => {
  it('when another reviewer countersigns with every box ticked, then the plan is countersigned, linked to its hash and the author is mailed', async () => {
    catcher.clear();
    const plan = await submitted();
    const res = await reviewer
      .post(`/api/plans/${plan.id}/countersign`)
      .send({ version: plan.version, contentHash: plan.contentHash, checklist: CHECKLIST });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.state).toBe('countersigned');
    expect(res.body.countersignedAt).not.toBeNull();
    expect(res.body.signatures.map((s: { meaning: string }) => s.meaning)).toEqual([
      'authored',
      'reviewed-agree',
    ]);
    expect(res.body.signatures[1]).toMatchObject({
      signerName: 'Tomasz Ellery',
      meaningLabel: 'reviewed – agree',
      contentHash: plan.contentHash,
      matchesContent: true,
    });
    expect(res.body.actions).toMatchObject({ edit: false, countersign: false });
    const mail = await catcher.waitForMessage(
      (m) => m.text.includes(plan.id) && m.subject.includes('countersigned'),
      15_000,
    );
    expect(mail.to).toEqual([pharmacist.user.email]);
    const audit = await world
      .db('audit_events')
      .where({ entity_id: plan.id, action: 'plan.countersign' });
    expect(audit).toHaveLength(1);
    expect(audit[0].actor_user_id).toBe(reviewer.user.id);
  });

  it('when the author (a reviewer) countersigns their own plan, then 403 own-plan', async () => {
    const plan = await submitted(reviewer);
    const res = await reviewer
      .post(`/api/plans/${plan.id}/countersign`)
      .send({ version: plan.version, contentHash: plan.contentHash, checklist: CHECKLIST });
    expect(res.status).toBe(403);
    expect(res.body.code).toBe('own-plan');
    expect((await world.db('plans').where({ id: plan.id }).first()).state).toBe('submitted');
  });

  it('when a pharmacist (not a reviewer) countersigns, then 403', async () => {
    const plan = await submitted(reviewer);
    const res = await pharmacist
      .post(`/api/plans/${plan.id}/countersign`)
      .send({ version: plan.version, contentHash: plan.contentHash, checklist: CHECKLIST });
    expect(res.status).toBe(403);
  });

  it('when a checklist box is not ticked, then 400 names it', async () => {
    const plan = await submitted();
    const res = await reviewer.post(`/api/plans/${plan.id}/countersign`).send({
      version: plan.version,
      contentHash: plan.contentHash,
      checklist: { ...CHECKLIST, sampleTiming: false },
    });
    expect(res.status).toBe(400);
    expect(res.body.fieldErrors['checklist.sampleTiming']).toBeDefined();
  });

  it('when the reviewer signs a hash other than the current content, then 409 content-changed', async () => {
    const plan = await submitted();
    const res = await reviewer
      .post(`/api/plans/${plan.id}/countersign`)
      .send({ version: plan.version, contentHash: 'a'.repeat(64), checklist: CHECKLIST });
    expect(res.status).toBe(409);
    expect(res.body.code).toBe('content-changed');
  });

  it('when two reviewers countersign at once, then exactly one wins', async () => {
    const plan = await submitted();
    const body = { version: plan.version, contentHash: plan.contentHash, checklist: CHECKLIST };
    const results = await Promise.all([
      reviewer.post(`/api/plans/${plan.id}/countersign`).send(body),
      secondReviewer.post(`/api/plans/${plan.id}/countersign`).send(body),
    ]);
    expect(results.map((r) => r.status).sort()).toEqual([200, 409]);
    const sigs = await world
      .db('plan_signatures')
      .where({ plan_id: plan.id, meaning: 'reviewed-agree' });
    expect(sigs).toHaveLength(1);
  });

  it('when the reviewer’s credentials are stale, then 401 and the plan waits', async () => {
    const plan = await submitted();
    const stale = await signedInAgent(world.app, 'reviewer', { user: secondReviewer.user });
    await ageSession(stale, 30);
    const res = await stale
      .post(`/api/plans/${plan.id}/countersign`)
      .send({ version: plan.version, contentHash: plan.contentHash, checklist: CHECKLIST });
    expect(res.status).toBe(401);
    expect(res.body.code).toBe('reauthentication-required');
  });
});

describe('countersigned plans', () => {
  async function countersigned() {
    const plan = await submitted();
    const res = await reviewer
      .post(`/api/plans/${plan.id}/countersign`)
      .send({ version: plan.version, contentHash: plan.contentHash, checklist: CHECKLIST });
    expect(res.status).toBe(200);
    return res.body as { id: string; version: number; courseId: string; contentHash: string };
  }

  it('when a countersigned plan is edited, then 409 plan-locked', async () => {
    const plan = await countersigned();
    const res = await pharmacist
      .patch(`/api/plans/${plan.id}`)
      .send({ version: plan.version, rationale: 'later' });
    expect(res.status).toBe(409);
    expect(res.body.code).toBe('plan-locked');
  });

  it('when it is superseded, then a new draft version follows and the old one is superseded once the new is countersigned', async () => {
    const plan = await countersigned();
    const next = await pharmacist
      .post(`/api/plans/${plan.id}/supersede`)
      .send({ version: plan.version });
    expect(next.status, JSON.stringify(next.body)).toBe(201);
    expect(next.body).toMatchObject({ state: 'draft', planNumber: 2, supersedesPlanId: plan.id });
    const again = await pharmacist
      .post(`/api/plans/${plan.id}/supersede`)
      .send({ version: plan.version });
    expect(again.status).toBe(409);
    const edited = await pharmacist.patch(`/api/plans/${next.body.id}`).send({
      version: next.body.version,
      regimen: { ...regimenBody(), rationale: undefined, doseMg: 1500 },
    });
    expect(edited.status, JSON.stringify(edited.body)).toBe(200);
    const sub = await pharmacist
      .post(`/api/plans/${next.body.id}/submit`)
      .send({ version: edited.body.version });
    expect(sub.status, JSON.stringify(sub.body)).toBe(200);
    const changes = await reviewer.get(`/api/plans/${next.body.id}/changes`);
    expect(changes.body.comparedWith.id).toBe(plan.id);
    expect(changes.body.changes).toEqual(
      expect.arrayContaining([
        expect.objectContaining({
          area: 'regimen',
          field: 'Maintenance dose',
          before: '1250 mg',
          after: '1500 mg',
        }),
      ]),
    );
    const signed = await reviewer
      .post(`/api/plans/${next.body.id}/countersign`)
      .send({ version: sub.body.version, contentHash: sub.body.contentHash, checklist: CHECKLIST });
    expect(signed.status).toBe(200);
    const old = await pharmacist.get(`/api/plans/${plan.id}`);
    expect(old.body.state).toBe('superseded');
    expect(old.body.supersededByPlanId).toBe(next.body.id);
  });

  it('when the stored content is changed after signing, then the signature visibly no longer matches', async () => {
    const plan = await countersigned();
    await world.db.raw(
      `UPDATE plans SET content = jsonb_set(content, '{rationale}', '"altered outside Ebbtide"') WHERE id = ?`,
      [plan.id],
    );
    const res = await pharmacist.get(`/api/plans/${plan.id}`);
    expect(res.body.signatures.map((s: { matchesContent: boolean }) => s.matchesContent)).toEqual([
      false,
      false,
    ]);
    expect(res.body.contentHash).not.toBe(plan.contentHash);
  });

  it('when a signature row is altered, then the database refuses', async () => {
    const plan = await countersigned();
    await expect(
      world
        .db('plan_signatures')
        .where({ plan_id: plan.id })
        .update({ signer_name: 'Someone else' }),
    ).rejects.toThrow(/append-only/);
  });

  it('when the PDF is downloaded, then it carries the statement, the signatures and the regimen numbers', async () => {
    const plan = await countersigned();
    const signedAuc24 = (await pharmacist.get(`/api/plans/${plan.id}`)).body.predicted
      .auc24 as number;
    const res = await pharmacist
      .get(`/api/plans/${plan.id}/report.pdf`)
      .buffer(true)
      .parse((r, cb) => {
        const chunks: Buffer[] = [];
        r.on('data', (c: Buffer) => chunks.push(c));
        r.on('end', () => cb(null, Buffer.concat(chunks)));
      });
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/application\/pdf/);
    const dir = mkdtempSync(path.join(tmpdir(), 'plan-pdf-'));
    const file = path.join(dir, 'plan.pdf');
    writeFileSync(file, res.body as Buffer);
    const text = execFileSync('pdftotext', ['-layout', file, '-'], { encoding: 'utf8' });
    expect(text).toMatch(/does not replace,\s+clinical judgement/);
    expect(text).toContain('Ines Harrowgate');
    expect(text).toContain('Tomasz Ellery');
    expect(text).toMatch(/reviewed – agree/);
    expect(text).toMatch(/1\.25 g \(1,250 mg\)/);
    expect(text).toMatch(/Every[\s\S]*12 h/);
    expect(text).toContain(String(Math.round(signedAuc24)));
    expect(text).toContain(plan.contentHash.slice(0, 16));
    expect(text).toMatch(/QUENBY/);
  });
});

describe('POST /api/plans/:id/return', () => {
  it('when a reviewer returns with a comment, then the author is mailed, may edit and resubmit', async () => {
    catcher.clear();
    const plan = await submitted();
    const res = await reviewer
      .post(`/api/plans/${plan.id}/return`)
      .send({ version: plan.version, comment: 'Weight is from last week; re-weigh and redo.' });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.state).toBe('returned');
    expect(res.body.returnComment).toMatch(/re-weigh/);
    expect(res.body.signatures.at(-1)).toMatchObject({
      meaning: 'returned',
      signerName: 'Tomasz Ellery',
    });
    const mail = await catcher.waitForMessage(
      (m) => m.text.includes(plan.id) && /returned/.test(m.subject),
      15_000,
    );
    expect(mail.text).toMatch(/re-weigh/);
    const edited = await pharmacist
      .patch(`/api/plans/${plan.id}`)
      .send({ version: res.body.version, rationale: 'Re-weighed: 80 kg.' });
    expect(edited.status).toBe(200);
    expect(edited.body.state).toBe('returned');
    expect(edited.body.signatures[0].matchesContent).toBe(false);
    const again = await pharmacist
      .post(`/api/plans/${plan.id}/submit`)
      .send({ version: edited.body.version });
    expect(again.status).toBe(200);
    expect(again.body.state).toBe('submitted');
    expect(again.body.signatures.at(-1)).toMatchObject({
      meaning: 'authored',
      matchesContent: true,
    });
  });

  it('when the comment is empty, then 400 on comment', async () => {
    const plan = await submitted();
    const res = await reviewer
      .post(`/api/plans/${plan.id}/return`)
      .send({ version: plan.version, comment: ' ' });
    expect(res.status).toBe(400);
    expect(res.body.fieldErrors.comment).toBeDefined();
  });
});

describe('GET /api/reviews', () => {
  it('lists submitted plans oldest first with author, ward and waiting time; never drafts', async () => {
    const a = await submitted();
    const b = await submitted();
    const d = await draft();
    const res = await reviewer.get('/api/reviews?pageSize=100');
    expect(res.status).toBe(200);
    const ids = res.body.items.map((i: { planId: string }) => i.planId);
    expect(ids.indexOf(a.id)).toBeLessThan(ids.indexOf(b.id));
    expect(ids).not.toContain(d.id);
    const item = res.body.items.find((i: { planId: string }) => i.planId === a.id);
    expect(item).toMatchObject({ authorName: 'Ines Harrowgate', ward: '4 North', mayReview: true });
    expect(item.waitingMinutes).toBeGreaterThanOrEqual(0);
    expect((await pharmacist.get('/api/reviews')).status).toBe(403);
    expect((await trainee.get('/api/reviews')).status).toBe(403);
  });
});

describe('re-check overdue mail', () => {
  it('when a countersigned plan passes its re-check time, then its author is mailed exactly once', async () => {
    catcher.clear();
    const { courseId } = await realCourse(pharmacist);
    const created = await pharmacist
      .post(`/api/courses/${courseId}/plans`)
      .send(regimenBody({ recheckAt: new Date(Date.now() + 6 * 3_600_000).toISOString() }));
    const sub = await pharmacist
      .post(`/api/plans/${created.body.id}/submit`)
      .send({ version: created.body.version });
    await reviewer
      .post(`/api/plans/${created.body.id}/countersign`)
      .send({ version: sub.body.version, contentHash: sub.body.contentHash, checklist: CHECKLIST });
    const deps = planDeps({
      boss: world.boss,
      config: (world.app.locals as { config: AppConfig }).config,
      mailQueueName: QUEUE,
    });
    const later = new Date(Date.now() + 7 * 3_600_000);
    const first = await mailOverdueRechecks(world.db, deps, later);
    const second = await mailOverdueRechecks(world.db, deps, later);
    expect(first).toBeGreaterThanOrEqual(1);
    expect(second).toBe(0);
    const rows = await world
      .db('mail_outbox')
      .where({ idempotency_key: `plan:${created.body.id}:recheck-overdue:v1` });
    expect(rows).toHaveLength(1);
    expect(rows[0].to).toEqual([pharmacist.user.email]);
    const mail = await catcher.waitForMessage(
      (m) => m.text.includes(created.body.id) && /re-check/.test(m.subject),
      15_000,
    );
    expect(mail.to).toEqual([pharmacist.user.email]);
    // The sweep stays correct after the content was re-checked: the plan is not mailed again.
    expect((await world.db('plans').where({ id: created.body.id }).first()).state).toBe(
      'countersigned',
    );
  });
});
