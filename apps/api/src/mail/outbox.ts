import type { Knex } from 'knex';
import type PgBoss from 'pg-boss';

/** The pg-boss queue that carries mail deliveries. Tests pass their own name to stay isolated. */
export const MAIL_QUEUE = 'mail-delivery';

/** The one piece of data a delivery job carries: which outbox row to deliver. */
export interface MailJobData {
  outboxId: string;
}

/** A message to send. Build the subject and bodies with the functions in ./templates. */
export interface OutgoingMail {
  /**
   * Names this event so it is mailed at most once, whatever retries or double clicks happen:
   * e.g. `plan:<planId>:submitted:v<version>`, `plan:<planId>:recheck-overdue:v<version>`.
   */
  idempotencyKey: string;
  /** What kind of message this is, e.g. "plan.submitted" (logs and the catcher page). */
  kind: string;
  /** Recipient addresses; at least one. */
  to: string[];
  subject: string;
  text: string;
  html?: string;
}

export type MailOutboxStatus = 'queued' | 'sending' | 'sent' | 'failed';

/** A row of `mail_outbox`, as the data-access layer returns it. */
export interface MailOutboxRow {
  id: string;
  idempotency_key: string;
  kind: string;
  to: string[];
  subject: string;
  text_body: string;
  html_body: string | null;
  status: MailOutboxStatus;
  attempts: number;
  last_error: string | null;
  message_id: string | null;
  created_at: Date;
  claimed_at: Date | null;
  sent_at: Date | null;
}

export interface EnqueueResult {
  outboxId: string;
  /** false when a message with this idempotency key was already enqueued (nothing new was sent). */
  created: boolean;
}

export interface EnqueueDeps {
  boss: PgBoss;
  /** Defaults to MAIL_QUEUE. */
  queueName?: string;
}

/**
 * pg-boss runs its SQL through `executeSql(text, $n-values)`; this runs it on a Knex transaction,
 * so the job row commits or rolls back with the caller's change. Knex binds with `?`, so `$n`
 * placeholders are rewritten and literal question marks escaped.
 */
export function knexJobExecutor(db: Knex | Knex.Transaction): PgBoss.Db {
  return {
    executeSql: async (text: string, values: unknown[] = []) => {
      const bindings: unknown[] = [];
      const sql = text.replace(/\?/g, '\\?').replace(/\$(\d+)/g, (_match, n: string) => {
        bindings.push(values[Number(n) - 1] ?? null);
        return '?';
      });
      const result = (await db.raw(sql, bindings as Knex.RawBinding[])) as { rows?: unknown[] };
      return { rows: result.rows ?? [] };
    },
  };
}

/**
 * Puts a message in the outbox inside the caller's transaction and queues its delivery job in
 * the same transaction: a plan transition and its mail commit or roll back together, and once
 * committed the message is never lost (the row stays until a worker has delivered it).
 *
 * The same `idempotencyKey` twice enqueues once: the second call returns the first row's id
 * with `created: false` and queues no job.
 *
 * The queue must exist (`ensureMailQueue(boss)`, done by startMailWorker and at server start).
 *
 * @example
 *   await db.transaction(async (trx) => {
 *     await markPlanSubmitted(trx, plan);               // the colleague's own update
 *     const mail = planSubmittedMail({ ...context }, policy);
 *     await enqueueMail(trx, { idempotencyKey: `plan:${plan.id}:submitted:v${plan.version}`,
 *       kind: 'plan.submitted', to: reviewerEmails, ...mail }, { boss });
 *   });
 * @throws TypeError when `to` is empty or the key is blank.
 */
export async function enqueueMail(
  trx: Knex.Transaction | Knex,
  message: OutgoingMail,
  deps: EnqueueDeps,
): Promise<EnqueueResult> {
  const to = message.to.map((a) => a.trim()).filter(Boolean);
  if (to.length === 0) throw new TypeError('enqueueMail: at least one recipient is required');
  if (!message.idempotencyKey.trim())
    throw new TypeError('enqueueMail: idempotencyKey is required');

  const inserted = (await trx('mail_outbox')
    .insert({
      idempotency_key: message.idempotencyKey,
      kind: message.kind,
      to,
      subject: message.subject,
      text_body: message.text,
      html_body: message.html ?? null,
    })
    .onConflict('idempotency_key')
    .ignore()
    .returning('id')) as Array<{ id: string }>;

  const row = inserted[0];
  if (!row) {
    const existing = (await trx('mail_outbox')
      .where({ idempotency_key: message.idempotencyKey })
      .first('id')) as { id: string } | undefined;
    if (!existing) throw new Error('enqueueMail: idempotency conflict without an existing row');
    return { outboxId: existing.id, created: false };
  }

  const data: MailJobData = { outboxId: row.id };
  await deps.boss.send(deps.queueName ?? MAIL_QUEUE, data, { db: knexJobExecutor(trx) });
  return { outboxId: row.id, created: true };
}
