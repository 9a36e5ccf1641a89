import type { Knex } from 'knex';
import type { Transporter } from 'nodemailer';
import type PgBoss from 'pg-boss';
import type { Logger } from 'pino';
import { MAIL_QUEUE, knexJobExecutor, type MailJobData, type MailOutboxRow } from './outbox';

/**
 * How a failed delivery is retried (pg-boss queue policy). With backoff, the n-th retry waits
 * between 1 and 2 times `retryDelay * 2^(n-1)` seconds: the defaults retry for about a day
 * and a half; after that the periodic sweep (below) queues the row again, so nothing is dropped.
 */
export interface MailRetryPolicy {
  retryLimit: number;
  retryDelay: number; // seconds
  retryBackoff: boolean;
}

export const DEFAULT_MAIL_RETRY: Readonly<MailRetryPolicy> = Object.freeze({
  retryLimit: 12,
  retryDelay: 30,
  retryBackoff: true,
});

/**
 * A row left in "sending" longer than this is taken to be from a worker that died mid-send and
 * may be claimed again. A crash after the SMTP server accepted but before the row was marked
 * sent is the only way a message can go out twice; it carries the same Message-ID both times.
 */
export const DEFAULT_SENDING_LEASE_SECONDS = 600;

/** Creates the mail queue if missing and applies the retry policy (pg-boss 10 needs the queue first). */
export async function ensureMailQueue(
  boss: PgBoss,
  queueName: string = MAIL_QUEUE,
  retry: MailRetryPolicy = DEFAULT_MAIL_RETRY,
): Promise<void> {
  await boss.createQueue(queueName, { name: queueName, ...retry });
  await boss.updateQueue(queueName, { name: queueName, ...retry });
}

export type DeliveryOutcome = 'sent' | 'already-sent' | 'in-progress' | 'missing';

export interface DeliverOptions {
  /** The envelope and header sender, e.g. "Ebbtide <ebbtide@kestrelbay.example>". */
  from: string;
  sendingLeaseSeconds?: number;
}

function domainOf(from: string): string {
  const match = /@([^>\s]+)>?\s*$/.exec(from);
  return match?.[1] ?? 'ebbtide.invalid';
}

/**
 * Delivers one outbox row at most once. The row is claimed with a single
 * `UPDATE … WHERE status IN ('queued','failed') RETURNING *`, so of any number of workers and
 * duplicate jobs exactly one gets it; the others see "in-progress" or "already-sent" and stop.
 * On an SMTP error the row is marked "failed" with the error and the error is rethrown, so the
 * job is retried with backoff; the row is kept until it is delivered.
 */
export async function deliverOutboxMessage(
  db: Knex,
  transport: Transporter,
  outboxId: string,
  options: DeliverOptions,
): Promise<DeliveryOutcome> {
  const lease = options.sendingLeaseSeconds ?? DEFAULT_SENDING_LEASE_SECONDS;
  const claimed = (await db('mail_outbox')
    .where({ id: outboxId })
    .andWhere((q) =>
      q
        .whereIn('status', ['queued', 'failed'])
        .orWhere((s) =>
          s
            .where('status', 'sending')
            .andWhereRaw('claimed_at < now() - make_interval(secs => ?)', [lease]),
        ),
    )
    .update({
      status: 'sending',
      attempts: db.raw('attempts + 1'),
      claimed_at: db.fn.now(),
      message_id: db.raw(`COALESCE(message_id, '<' || id::text || '@' || ? || '>')`, [
        domainOf(options.from),
      ]),
    })
    .returning('*')) as MailOutboxRow[];

  const row = claimed[0];
  if (!row) {
    const current = (await db('mail_outbox').where({ id: outboxId }).first('status')) as
      Pick<MailOutboxRow, 'status'> | undefined;
    if (!current) return 'missing';
    return current.status === 'sent' ? 'already-sent' : 'in-progress';
  }

  try {
    await transport.sendMail({
      from: options.from,
      to: row.to,
      subject: row.subject,
      text: row.text_body,
      ...(row.html_body ? { html: row.html_body } : {}),
      messageId: row.message_id ?? undefined,
      headers: { 'X-Ebbtide-Kind': row.kind },
    });
  } catch (err) {
    const message = err instanceof Error ? err.message : String(err);
    await db('mail_outbox')
      .where({ id: row.id, status: 'sending' })
      .update({ status: 'failed', last_error: message.slice(0, 2000) });
    throw err;
  }
  await db('mail_outbox')
    .where({ id: row.id, status: 'sending' })
    .update({ status: 'sent', sent_at: db.fn.now(), last_error: null });
  return 'sent';
}

/**
 * Queues a fresh delivery job for every row that is still undelivered after `olderThanSeconds`
 * (its job may have used up its retries, or a "sending" lease expired). Extra jobs are harmless:
 * the claim lets only one of them send. Returns how many rows were queued again.
 */
export async function sweepMailOutbox(deps: {
  boss: PgBoss;
  db: Knex;
  queueName?: string;
  olderThanSeconds: number;
  sendingLeaseSeconds?: number;
}): Promise<number> {
  const lease = deps.sendingLeaseSeconds ?? DEFAULT_SENDING_LEASE_SECONDS;
  const rows = (await deps
    .db('mail_outbox')
    .where((q) =>
      q
        .where('status', 'queued')
        .andWhereRaw('created_at < now() - make_interval(secs => ?)', [deps.olderThanSeconds]),
    )
    .orWhere((q) =>
      q
        .where('status', 'failed')
        .andWhereRaw('claimed_at < now() - make_interval(secs => ?)', [deps.olderThanSeconds]),
    )
    .orWhere((q) =>
      q
        .where('status', 'sending')
        .andWhereRaw('claimed_at < now() - make_interval(secs => ?)', [lease]),
    )
    .select('id')) as Array<{ id: string }>;
  for (const { id } of rows) {
    const data: MailJobData = { outboxId: id };
    await deps.boss.send(deps.queueName ?? MAIL_QUEUE, data, { db: knexJobExecutor(deps.db) });
  }
  return rows.length;
}

export interface MailWorkerOptions {
  boss: PgBoss;
  db: Knex;
  transport: Transporter;
  logger: Logger;
  from: string;
  queueName?: string;
  retry?: MailRetryPolicy;
  /** How often this worker polls for jobs (pg-boss minimum 0.5 s). */
  pollingIntervalSeconds?: number;
  sendingLeaseSeconds?: number;
  /** How often to sweep for stranded rows; 0 turns the sweep off. Default 900. */
  sweepIntervalSeconds?: number;
}

export interface RunningMailWorker {
  stop: () => Promise<void>;
}

/**
 * Starts delivering mail: creates the queue, then works its jobs one at a time with
 * deliverOutboxMessage. Run it in as many processes as you like (each with its own started
 * PgBoss); a message is still delivered once. `stop()` stops this worker only (not the boss).
 */
export async function startMailWorker(options: MailWorkerOptions): Promise<RunningMailWorker> {
  const queueName = options.queueName ?? MAIL_QUEUE;
  await ensureMailQueue(options.boss, queueName, options.retry);
  const log = options.logger.child({ component: 'mail-worker', queue: queueName });

  const workerId = await options.boss.work<MailJobData>(
    queueName,
    { batchSize: 1, pollingIntervalSeconds: options.pollingIntervalSeconds ?? 2 },
    async (jobs) => {
      for (const job of jobs) {
        const { outboxId } = job.data;
        try {
          const outcome = await deliverOutboxMessage(options.db, options.transport, outboxId, {
            from: options.from,
            sendingLeaseSeconds: options.sendingLeaseSeconds,
          });
          log.info({ outboxId, outcome, jobId: job.id }, 'mail job done');
        } catch (err) {
          log.warn({ outboxId, jobId: job.id, err }, 'mail delivery failed; will retry');
          throw err;
        }
      }
    },
  );

  const sweepSeconds = options.sweepIntervalSeconds ?? 900;
  let sweeping = false;
  const timer =
    sweepSeconds > 0
      ? setInterval(() => {
          if (sweeping) return;
          sweeping = true;
          sweepMailOutbox({
            boss: options.boss,
            db: options.db,
            queueName,
            olderThanSeconds: sweepSeconds,
            sendingLeaseSeconds: options.sendingLeaseSeconds,
          })
            .then((n) => n && log.info({ requeued: n }, 'undelivered mail queued again'))
            .catch((err: unknown) => log.error({ err }, 'mail sweep failed'))
            .finally(() => {
              sweeping = false;
            });
        }, sweepSeconds * 1000)
      : undefined;
  timer?.unref();

  return {
    stop: async () => {
      if (timer) clearInterval(timer);
      await options.boss.offWork({ id: workerId });
    },
  };
}
