import type { Knex } from 'knex';

/** Who did it: a signed-in user, or a person known only by the provider (e.g. a failed sign-in). */
export interface AuditActor {
  userId?: string | null;
  subject?: string | null;
  displayName?: string | null;
}

export interface AuditEntry {
  /** null for the system. */
  actor: AuditActor | null;
  /** kebab/dotted verb, e.g. "sign-in", "sign-out", "sign-in.failed", "user.role-change", "level.create". */
  action: string;
  entityType?: string;
  entityId?: string;
  before?: unknown;
  after?: unknown;
  /** Anything else worth keeping: request id, IP, reason. Never secrets. */
  context?: Record<string, unknown>;
}

/**
 * Appends one event to the audit trail (append-only: the table refuses UPDATE and DELETE).
 * Pass the transaction of the change it records, so the change and its audit row commit together:
 *
 *   await db.transaction(async (trx) => {
 *     const [row] = await trx('levels').insert(level).returning('*');
 *     await recordAudit(trx, { actor, action: 'level.create', entityType: 'level', entityId: row.id, after: row });
 *   });
 */
export async function recordAudit(db: Knex | Knex.Transaction, entry: AuditEntry): Promise<void> {
  await db('audit_events').insert({
    actor_user_id: entry.actor?.userId ?? null,
    actor_subject: entry.actor?.subject ?? null,
    actor_name: entry.actor?.displayName ?? null,
    action: entry.action,
    entity_type: entry.entityType ?? null,
    entity_id: entry.entityId ?? null,
    before: entry.before === undefined ? null : JSON.stringify(entry.before),
    after: entry.after === undefined ? null : JSON.stringify(entry.after),
    context: JSON.stringify(entry.context ?? {}),
  });
}

export interface AuditEventRow {
  id: string;
  occurredAt: string;
  actorUserId: string | null;
  actorSubject: string | null;
  actorName: string | null;
  action: string;
  entityType: string | null;
  entityId: string | null;
  before: unknown;
  after: unknown;
  context: Record<string, unknown>;
}

/** The most recent audit events, newest first. */
export async function listAuditEvents(
  db: Knex,
  filter: { action?: string; limit?: number } = {},
): Promise<AuditEventRow[]> {
  const q = db('audit_events')
    .orderBy('id', 'desc')
    .limit(filter.limit ?? 100);
  if (filter.action) q.where('action', filter.action);
  const rows = await q;
  return rows.map((r) => ({
    id: String(r.id),
    occurredAt: new Date(r.occurred_at).toISOString(),
    actorUserId: r.actor_user_id,
    actorSubject: r.actor_subject,
    actorName: r.actor_name,
    action: r.action,
    entityType: r.entity_type,
    entityId: r.entity_id,
    before: r.before,
    after: r.after,
    context: r.context,
  }));
}
