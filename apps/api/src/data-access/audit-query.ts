import type { Knex } from 'knex';
import type { AuditEvent, AuditQuery } from '@ebbtide/contracts';
import type { Conn } from './casework-db';
import { iso } from './casework-db';

/**
 * Reads the audit trail (never writes it: see audit.ts). Patient and course filters match the
 * event's own entity, the ids it recorded in `context`, `before` or `after`, and the rows that
 * belong to that patient or course (courses, covariates, doses, levels, plans).
 */
export async function queryAuditEvents(
  conn: Conn,
  q: AuditQuery,
): Promise<{ items: AuditEvent[]; total: number }> {
  const base = conn('audit_events');
  const refersTo = (qb: Knex.QueryBuilder, key: string, ids: Knex.QueryBuilder | string) => {
    const list = typeof ids === 'string' ? [ids] : ids;
    qb.orWhereIn(conn.raw(`audit_events.context->>'${key}'`) as never, list as never)
      .orWhereIn(conn.raw(`audit_events.after->>'${key}'`) as never, list as never)
      .orWhereIn(conn.raw(`audit_events.before->>'${key}'`) as never, list as never);
  };
  if (q.patientId) {
    const p = q.patientId;
    const courses = conn('courses').where({ patient_id: p }).select(conn.raw('id::text'));
    const owned = conn
      .select(conn.raw('id::text'))
      .from('courses')
      .where({ patient_id: p })
      .unionAll((u) => {
        u.select(conn.raw('id::text')).from('covariates').where({ patient_id: p });
      })
      .unionAll((u) => {
        u.select(conn.raw('d.id::text'))
          .from('doses as d')
          .whereIn('d.course_id', conn('courses').where({ patient_id: p }).select('id'));
      })
      .unionAll((u) => {
        u.select(conn.raw('l.id::text'))
          .from('levels as l')
          .whereIn('l.course_id', conn('courses').where({ patient_id: p }).select('id'));
      })
      .unionAll((u) => {
        u.select(conn.raw('pl.id::text'))
          .from('plans as pl')
          .whereIn('pl.course_id', conn('courses').where({ patient_id: p }).select('id'));
      });
    base.where((w) => {
      w.where({ 'audit_events.entity_id': p }).orWhereIn('audit_events.entity_id', owned);
      refersTo(w, 'patientId', p);
      refersTo(w, 'courseId', courses);
    });
  }
  if (q.courseId) {
    const c = q.courseId;
    const owned = conn
      .select(conn.raw('id::text'))
      .from('doses')
      .where({ course_id: c })
      .unionAll((u) => {
        u.select(conn.raw('id::text')).from('levels').where({ course_id: c });
      })
      .unionAll((u) => {
        u.select(conn.raw('id::text')).from('plans').where({ course_id: c });
      });
    base.where((w) => {
      w.where({ 'audit_events.entity_id': c }).orWhereIn('audit_events.entity_id', owned);
      refersTo(w, 'courseId', c);
    });
  }
  if (q.userId) base.where('audit_events.actor_user_id', q.userId);
  if (q.action) {
    if (q.action.endsWith('.'))
      base.whereLike('audit_events.action', `${q.action.replace(/[%_]/g, '')}%`);
    else base.where('audit_events.action', q.action);
  }
  if (q.from) base.where('audit_events.occurred_at', '>=', q.from);
  if (q.to) base.where('audit_events.occurred_at', '<=', q.to);
  const count = (await base.clone().count<{ count: string }[]>({ count: '*' }).first()) as
    { count: string } | undefined;
  const rows = (await base
    .clone()
    .select('audit_events.*')
    .orderBy('audit_events.id', 'desc')
    .limit(q.pageSize)
    .offset((q.page - 1) * q.pageSize)) as Array<Record<string, unknown>>;
  return {
    total: Number(count?.count ?? 0),
    items: rows.map((r) => ({
      id: String(r.id),
      occurredAt: iso(r.occurred_at as Date) as string,
      actorUserId: (r.actor_user_id as string | null) ?? null,
      actorSubject: (r.actor_subject as string | null) ?? null,
      actorName: (r.actor_name as string | null) ?? null,
      action: r.action as string,
      entityType: (r.entity_type as string | null) ?? null,
      entityId: (r.entity_id as string | null) ?? null,
      before: r.before ?? null,
      after: r.after ?? null,
      context: (r.context as Record<string, unknown>) ?? {},
    })),
  };
}
