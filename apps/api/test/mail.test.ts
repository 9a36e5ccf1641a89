import { randomUUID } from 'node:crypto';
import { startMailCatcher, type RunningMailCatcher } from '@ebbtide/mailcatcher';
import type PgBoss from 'pg-boss';
import { pino } from 'pino';
import { afterAll, afterEach, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { loadConfig } from '../src/config';
import { createDb, type Db } from '../src/data-access/db';
import { createJobQueue } from '../src/jobs/queue';
import {
  deliverOutboxMessage,
  ensureMailQueue,
  startMailWorker,
  sweepMailOutbox,
  type MailRetryPolicy,
  type RunningMailWorker,
} from '../src/mail/mail-worker';
import { enqueueMail, type MailOutboxRow, type OutgoingMail } from '../src/mail/outbox';
import { planSubmittedMail } from '../src/mail/templates';
import { createMailTransport } from '../src/mail/transport';

// Real PostgreSQL (DATABASE_URL from the test command) and the real mail catcher, in-process.
const databaseUrl = process.env.DATABASE_URL;
if (!databaseUrl)
  throw new Error('DATABASE_URL is not set: run the tests through the test command');

const FROM = 'Ebbtide <ebbtide@kestrelbay.example>';
/** Fast retries so a test sees several attempts within a few seconds. */
const FAST_RETRY: MailRetryPolicy = { retryLimit: 20, retryDelay: 1, retryBackoff: false };
const POLL_SECONDS = 0.5;
const silent = pino({ level: 'silent' });

let db: Db;
const bosses: PgBoss[] = [];
const workers: RunningMailWorker[] = [];

async function startBoss(): Promise<PgBoss> {
  const boss = createJobQueue({ databaseUrl: databaseUrl! }, { supervise: false, schedule: false });
  boss.on('error', () => {});
  await boss.start();
  bosses.push(boss);
  return boss;
}

async function startWorker(boss: PgBoss, queueName: string, smtpPort: number) {
  const worker = await startMailWorker({
    boss,
    db,
    transport: createMailTransport({
      host: '127.0.0.1',
      port: smtpPort,
      secure: false,
      ignoreTls: true,
    }),
    logger: silent,
    from: FROM,
    queueName,
    retry: FAST_RETRY,
    pollingIntervalSeconds: POLL_SECONDS,
    sweepIntervalSeconds: 0,
  });
  workers.push(worker);
  return worker;
}

async function until<T>(
  what: string,
  probe: () => Promise<T | undefined | false>,
  timeoutMs = 15_000,
): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const value = await probe();
    if (value) return value;
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

const outboxRow = async (id: string) =>
  (await db('mail_outbox').where({ id }).first()) as MailOutboxRow | undefined;

function message(overrides: Partial<OutgoingMail> = {}): OutgoingMail {
  const tag = randomUUID();
  return {
    idempotencyKey: `plan:${tag}:submitted:v1`,
    kind: 'plan.submitted',
    to: ['reviewer.okafor@kestrelbay.example'],
    subject: `Dosing plan awaiting countersignature ${tag}`,
    text: 'A plan awaits review.',
    html: '<p>A plan awaits review.</p>',
    ...overrides,
  };
}

beforeAll(async () => {
  db = createDb(databaseUrl);
});

afterEach(async () => {
  for (const w of workers.splice(0)) await w.stop();
});

afterAll(async () => {
  for (const b of bosses.splice(0)) await b.stop({ graceful: false, wait: true });
  await db?.destroy();
});

describe('mail delivery', () => {
  let catcher: RunningMailCatcher;
  let queueName: string;
  let boss: PgBoss;

  beforeAll(async () => {
    catcher = await startMailCatcher({ smtpPort: 0, httpPort: 0, nodeEnv: 'test' });
    boss = await startBoss();
  });
  afterAll(async () => {
    await catcher?.stop();
  });
  beforeEach(async () => {
    catcher.clear();
    queueName = `mail-test-${randomUUID()}`;
    await ensureMailQueue(boss, queueName, FAST_RETRY);
  });

  it('when a message is enqueued in a committed transaction, then the worker delivers it to the catcher once', async () => {
    // Arrange
    await startWorker(boss, queueName, catcher.smtpPort);
    const mail = message();

    // Act
    const { outboxId, created } = await db.transaction((trx) =>
      enqueueMail(trx, mail, { boss, queueName }),
    );

    // Assert
    expect(created).toBe(true);
    const got = await catcher.waitForMessage((m) => m.subject === mail.subject);
    expect(got.to).toEqual(['reviewer.okafor@kestrelbay.example']);
    expect(got.from).toBe('ebbtide@kestrelbay.example');
    expect(got.text.trim()).toBe('A plan awaits review.');
    expect(got.html).toContain('<p>A plan awaits review.</p>');
    expect(got.headers['x-ebbtide-kind']).toBe('plan.submitted');
    const row = await until('row sent', async () => {
      const r = await outboxRow(outboxId);
      return r?.status === 'sent' && r;
    });
    expect(row.attempts).toBe(1);
    expect(row.sent_at).toBeInstanceOf(Date);
    expect(got.messageId).toBe(row.message_id);
    const res = await fetch(`${catcher.httpUrl}/messages`);
    expect(((await res.json()) as unknown[]).length).toBe(1);
  });

  it('when a plan-submitted mail is sent under the default policy, then the delivered message has the link and ward but no patient name or MRN', async () => {
    // Arrange: the plan's patient is invented; the mapper passes only what the policy may show
    await startWorker(boss, queueName, catcher.smtpPort);
    const policy = loadConfig({}).mailPatientDetail;
    const planId = randomUUID();
    const rendered = planSubmittedMail(
      {
        planUrl: `http://127.0.0.1:4610/plans/${planId}`,
        planVersion: 1,
        ward: '4 North',
        patientInitials: 'I.M.',
        actorName: 'Priya Halvorsen',
      },
      policy,
    );

    // Act
    await db.transaction((trx) =>
      enqueueMail(
        trx,
        {
          idempotencyKey: `plan:${planId}:submitted:v1`,
          kind: 'plan.submitted',
          to: ['reviewer.okafor@kestrelbay.example'],
          ...rendered,
        },
        { boss, queueName },
      ),
    );

    // Assert
    const got = await catcher.waitForMessage((m) => m.text.includes(planId));
    const body = `${got.subject}\n${got.text}\n${got.html ?? ''}`;
    expect(body).toContain(`/plans/${planId}`);
    expect(body).toContain('4 North');
    expect(body).not.toMatch(/MERIWETHER|Isla|KB-0042917|1959-04-18|I\.M\./i);
  });

  it('when the enqueuing transaction rolls back, then neither the row nor the job remains and nothing is sent', async () => {
    // Arrange
    await startWorker(boss, queueName, catcher.smtpPort);
    const mail = message();

    // Act
    await expect(
      db.transaction(async (trx) => {
        await enqueueMail(trx, mail, { boss, queueName });
        throw new Error('the plan transition failed');
      }),
    ).rejects.toThrow('the plan transition failed');

    // Assert
    expect(
      await db('mail_outbox').where({ idempotency_key: mail.idempotencyKey }).first(),
    ).toBeUndefined();
    expect(await boss.getQueueSize(queueName)).toBe(0);
    await new Promise((r) => setTimeout(r, 1500));
    expect(catcher.messages()).toHaveLength(0);
  });

  it('when the same idempotency key is enqueued twice, then there is one row and one message', async () => {
    // Arrange
    await startWorker(boss, queueName, catcher.smtpPort);
    const mail = message();

    // Act
    const first = await db.transaction((trx) => enqueueMail(trx, mail, { boss, queueName }));
    const second = await db.transaction((trx) =>
      enqueueMail(trx, { ...mail, subject: `${mail.subject} again` }, { boss, queueName }),
    );

    // Assert
    expect(first.created).toBe(true);
    expect(second).toEqual({ outboxId: first.outboxId, created: false });
    expect(await db('mail_outbox').where({ idempotency_key: mail.idempotencyKey })).toHaveLength(1);
    await catcher.waitForMessage((m) => m.subject === mail.subject);
    await new Promise((r) => setTimeout(r, 1500));
    expect(catcher.messages().filter((m) => m.subject.startsWith(mail.subject))).toHaveLength(1);
  });

  it('when two workers in two processes share the queue and the job is duplicated, then the message is delivered exactly once', async () => {
    // Arrange: a second boss stands for a second API or worker process
    const otherBoss = await startBoss();
    await startWorker(boss, queueName, catcher.smtpPort);
    await startWorker(otherBoss, queueName, catcher.smtpPort);
    const mail = message();

    // Act: the enqueued job plus three duplicates of it, as a redelivered or re-swept job would be
    const { outboxId } = await db.transaction((trx) => enqueueMail(trx, mail, { boss, queueName }));
    await Promise.all([1, 2, 3].map(() => otherBoss.send(queueName, { outboxId })));

    // Assert
    await catcher.waitForMessage((m) => m.subject === mail.subject);
    await until(
      'all jobs done',
      async () => (await boss.getQueueSize(queueName, { before: 'completed' })) === 0,
    );
    await new Promise((r) => setTimeout(r, 1000));
    expect(catcher.messages().filter((m) => m.subject === mail.subject)).toHaveLength(1);
    expect((await outboxRow(outboxId))?.attempts).toBe(1);
  });

  it('when five deliveries of one row race, then one sends and the others see it claimed or sent', async () => {
    // Arrange: no worker; the row is delivered directly
    const mail = message();
    const { outboxId } = await db.transaction((trx) => enqueueMail(trx, mail, { boss, queueName }));
    const transports = [1, 2, 3, 4, 5].map(() =>
      createMailTransport({
        host: '127.0.0.1',
        port: catcher.smtpPort,
        secure: false,
        ignoreTls: true,
      }),
    );

    // Act
    const outcomes = await Promise.all(
      transports.map((t) => deliverOutboxMessage(db, t, outboxId, { from: FROM })),
    );

    // Assert
    expect(outcomes.filter((o) => o === 'sent')).toHaveLength(1);
    expect(
      outcomes
        .filter((o) => o !== 'sent')
        .every((o) => o === 'in-progress' || o === 'already-sent'),
    ).toBe(true);
    expect(catcher.messages().filter((m) => m.subject === mail.subject)).toHaveLength(1);
    expect(await deliverOutboxMessage(db, transports[0]!, outboxId, { from: FROM })).toBe(
      'already-sent',
    );
  });
});

describe('mail outbox recovery', () => {
  let catcher: RunningMailCatcher;
  let boss: PgBoss;
  let queueName: string;

  beforeAll(async () => {
    catcher = await startMailCatcher({ smtpPort: 0, httpPort: 0, nodeEnv: 'test' });
    boss = await startBoss();
  });
  afterAll(async () => {
    await catcher?.stop();
  });
  beforeEach(async () => {
    catcher.clear();
    queueName = `mail-test-${randomUUID()}`;
    await ensureMailQueue(boss, queueName, FAST_RETRY);
  });

  it('when a failed row has no job left (retries used up), then the sweep queues it again and it is delivered once', async () => {
    // Arrange: a row that failed long ago and whose job is gone
    const mail = message();
    const [row] = (await db('mail_outbox')
      .insert({
        idempotency_key: mail.idempotencyKey,
        kind: mail.kind,
        to: mail.to,
        subject: mail.subject,
        text_body: mail.text,
        status: 'failed',
        attempts: 12,
        last_error: 'connect ECONNREFUSED',
        claimed_at: db.raw("now() - interval '2 hours'"),
      })
      .returning('id')) as Array<{ id: string }>;
    await startWorker(boss, queueName, catcher.smtpPort);

    // Act
    const requeued = await sweepMailOutbox({ boss, db, queueName, olderThanSeconds: 3600 });

    // Assert
    expect(requeued).toBeGreaterThanOrEqual(1);
    await catcher.waitForMessage((m) => m.subject === mail.subject);
    const sent = await until('row sent', async () => {
      const r = await outboxRow(row!.id);
      return r?.status === 'sent' && r;
    });
    expect(sent.attempts).toBe(13);
  });

  it('when a row was left "sending" by a worker that died, then it is claimed again only after the lease', async () => {
    // Arrange
    const mail = message();
    const [row] = (await db('mail_outbox')
      .insert({
        idempotency_key: mail.idempotencyKey,
        kind: mail.kind,
        to: mail.to,
        subject: mail.subject,
        text_body: mail.text,
        status: 'sending',
        attempts: 1,
        claimed_at: db.raw("now() - interval '5 minutes'"),
      })
      .returning('id')) as Array<{ id: string }>;
    const transport = createMailTransport({
      host: '127.0.0.1',
      port: catcher.smtpPort,
      secure: false,
      ignoreTls: true,
    });

    // Act / Assert: within the lease nothing is sent
    expect(
      await deliverOutboxMessage(db, transport, row!.id, { from: FROM, sendingLeaseSeconds: 600 }),
    ).toBe('in-progress');
    expect(catcher.messages()).toHaveLength(0);

    // Act / Assert: after the lease it is sent
    expect(
      await deliverOutboxMessage(db, transport, row!.id, { from: FROM, sendingLeaseSeconds: 60 }),
    ).toBe('sent');
    expect(catcher.messages().filter((m) => m.subject === mail.subject)).toHaveLength(1);
  });
});

describe('mail delivery when the mail server is down', () => {
  it('when the SMTP server is unreachable, then the message stays in the outbox, is retried, and is delivered once the server starts', async () => {
    // Arrange: find a free port, then leave nothing listening on it
    const probe = await startMailCatcher({ smtpPort: 0, httpPort: 0, nodeEnv: 'test' });
    const port = probe.smtpPort;
    await probe.stop();
    const boss = await startBoss();
    const queueName = `mail-test-${randomUUID()}`;
    await startWorker(boss, queueName, port);
    const mail = message();

    // Act
    const { outboxId } = await db.transaction((trx) => enqueueMail(trx, mail, { boss, queueName }));

    // Assert: failed attempts are recorded and the row is kept
    const failed = await until('two failed attempts', async () => {
      const r = await outboxRow(outboxId);
      return r && r.status === 'failed' && r.attempts >= 2 && r;
    });
    expect(failed.last_error).toMatch(/ECONNREFUSED|connect/i);
    expect(failed.sent_at).toBeNull();

    // Act: the mail server comes up on the same port
    const catcher = await startMailCatcher({ smtpPort: port, httpPort: 0, nodeEnv: 'test' });
    try {
      // Assert
      const got = await catcher.waitForMessage((m) => m.subject === mail.subject, 15_000);
      expect(got.to).toEqual(mail.to);
      const sent = await until('row sent', async () => {
        const r = await outboxRow(outboxId);
        return r?.status === 'sent' && r;
      });
      expect(sent.attempts).toBeGreaterThanOrEqual(3);
      expect(sent.last_error).toBeNull();
      await new Promise((r) => setTimeout(r, 1500));
      expect(catcher.messages()).toHaveLength(1);
    } finally {
      await catcher.stop();
    }
  });
});

describe('startMailCatcher', () => {
  it('when NODE_ENV is production, then it refuses to start', async () => {
    await expect(
      startMailCatcher({ smtpPort: 0, httpPort: 0, nodeEnv: 'production' }),
    ).rejects.toThrow(/development and tests only/);
  });

  it('when messages arrive, then the page lists them under a development-only banner and DELETE clears them', async () => {
    // Arrange
    const catcher = await startMailCatcher({ smtpPort: 0, httpPort: 0, nodeEnv: 'test' });
    try {
      const transport = createMailTransport({
        host: '127.0.0.1',
        port: catcher.smtpPort,
        secure: false,
        ignoreTls: true,
      });
      await transport.sendMail({
        from: FROM,
        to: 'a@kestrelbay.example',
        subject: 'Hello <4 North>',
        text: 'x',
      });

      // Act
      const page = await (await fetch(`${catcher.httpUrl}/`)).text();
      const del = await fetch(`${catcher.httpUrl}/messages`, { method: 'DELETE' });

      // Assert
      expect(page).toContain('Development only');
      expect(page).toContain('Hello &lt;4 North&gt;');
      expect(del.status).toBe(204);
      expect(catcher.messages()).toHaveLength(0);
    } finally {
      await catcher.stop();
    }
  });
});
