import type { AuditPage, AuditQuery } from '@ebbtide/contracts';
import { queryAuditEvents } from '../../data-access/audit-query';
import type { Conn } from '../../data-access/casework-db';

/** The audit trail for the admin's audit view: who, what, when, before and after. */
export async function browseAudit(db: Conn, query: AuditQuery): Promise<AuditPage> {
  const { items, total } = await queryAuditEvents(db, query);
  return { items, total, page: query.page, pageSize: query.pageSize };
}
